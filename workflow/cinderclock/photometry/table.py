"""Build the table of synthetic magnitudes (unit solid angle) over Teff and E(B-V), once per
configuration.

For each band the integration weights w = S(lambda) lambda dlambda on the band's own wavelength
grid and the extinction transmission T_e(lambda) for every E(B-V) node are computed once; the
photon-counting integral of every (Teff, E(B-V)) node is then one matrix product

    I[t, e] = sum_lambda  pi B_lambda(T_t) * T_e(lambda) * w(lambda),

so extinction is applied to the spectrum before it is integrated through the band, never at an
effective wavelength.
"""

from __future__ import annotations

import numpy as np

from ..errors import ConfigError
from .cautions import BLACKBODY_CAUTION
from .extinction import ExtinctionLaw
from .grid import BAND_PREFIX, EBV_COLUMN, MBOL_COLUMN, TEFF_COLUMN, PhotometryGrid
from .passbands import load_passband, vega_minus_ab
from .synthetic import BandWeights, planck_lambda

SYSTEMS = ("ab", "vega")
SPECTRA = ("blackbody",)


def default_teff_grid_k(teff_min_k=3000.0, teff_max_k=150000.0, step_dex=0.002):
    """Teff nodes uniform in log10 Teff, K (default 3,000-150,000 K in steps of 0.002 dex)."""
    n = int(np.ceil(np.log10(teff_max_k / teff_min_k) / step_dex)) + 1
    return np.logspace(np.log10(teff_min_k), np.log10(teff_max_k), n)


def default_ebv_grid_mag(ebv_max_mag=0.0, step_mag=0.02):
    """E(B-V) nodes 0, step, ..., ebv_max (just [0] when ``ebv_max_mag`` is 0), mag."""
    if ebv_max_mag <= 0:
        return np.array([0.0])
    n = int(np.ceil(ebv_max_mag / step_mag)) + 1
    return np.linspace(0.0, ebv_max_mag, n)


def validate_bands(bands):
    """Check a list of band definitions ``{key, passband, system}``; return it as tuples.

    Raises
    ------
    ConfigError
        Naming the faulty entry.
    """
    out = []
    seen = set()
    for i, b in enumerate(bands):
        if not isinstance(b, dict) or not {"key", "passband", "system"} <= set(b):
            raise ConfigError(f"band entry {i} must have keys key, passband, system; got {b!r}")
        key, name, system = str(b["key"]), str(b["passband"]), str(b["system"]).lower()
        if key in seen:
            raise ConfigError(f"band key '{key}' appears twice")
        if system not in SYSTEMS:
            raise ConfigError(f"band '{key}': system must be one of {SYSTEMS}, got '{b['system']}'")
        if not key.replace("_", "").isalnum():
            raise ConfigError(f"band key '{key}' must be letters, digits and underscores")
        seen.add(key)
        out.append((key, name, system))
    return out


def band_integrals(passband_name, teff_k, ebv_mag, law):
    """Photon-counting AB magnitudes of reddened blackbodies of unit solid angle, shape (n_teff, n_ebv).

    Parameters
    ----------
    passband_name : str
        speclite passband name.
    teff_k : ndarray
        Teff nodes, K.
    ebv_mag : ndarray
        E(B-V) nodes, mag.
    law : ExtinctionLaw or None
        Extinction law (None only if every E(B-V) node is 0).
    """
    bw = BandWeights(load_passband(passband_name))
    ebv = np.atleast_1d(np.asarray(ebv_mag, dtype=float))
    if law is None:
        if np.any(ebv != 0):
            raise ConfigError("E(B-V) nodes other than 0 need an extinction law")
        trans = np.ones((ebv.size, bw.wavelength_m.size))
    else:
        trans = law.transmission(bw.wavelength_m, ebv, band=passband_name)
    spec = np.pi * planck_lambda(bw.wavelength_m, np.asarray(teff_k, dtype=float))  # W m^-3
    integral = spec @ (trans * bw.weights[None, :]).T                                  # (n_teff, n_ebv)
    with np.errstate(divide="ignore"):
        return -2.5 * np.log10(integral / bw.ab_norm)


def build_photometry_table(bands, teff_grid, ebv_grid=(0.0,), law="G23", r_v=3.1, spectra="blackbody"):
    """Table of synthetic magnitudes for unit solid angle, one row per (Teff, E(B-V)) node.

    Parameters
    ----------
    bands : list of dict
        Each ``{"key": str, "passband": speclite name, "system": "ab" | "vega"}``. Vega magnitudes
        use the published zero points in ``data/vega_zero_points.csv``.
    teff_grid : array_like
        Teff nodes, K (use a fine grid uniform in log Teff, e.g. :func:`default_teff_grid_k`).
    ebv_grid : array_like
        E(B-V) nodes, mag, starting at 0.
    law : str or None
        dust_extinction law name (see :data:`extinction.KNOWN_LAWS`); None for no extinction.
    r_v : float
        R_V of the law.
    spectra : str
        Model spectra; only ``"blackbody"`` is built in (users supply other models as a
        synthetic-photometry table, see :mod:`cinderclock.photometry.usergrid`).

    Returns
    -------
    pandas.DataFrame
        Columns ``teff_k``, ``ebv_mag``, ``mag_<key>`` per band (magnitude for (R/d)^2 = 1, in
        the band's system) and ``mbol_unit`` (apparent bolometric magnitude for (R/d)^2 = 1,
        IAU 2015 B2, unreddened). ``df.attrs["photometry"]`` holds the metadata, including the
        blackbody caution.
    """
    if spectra not in SPECTRA:
        raise ConfigError(f"model spectra '{spectra}' are not built in (known: {', '.join(SPECTRA)}); "
                          "supply a synthetic-photometry table instead")
    spec = validate_bands(bands)
    teff = np.asarray(teff_grid, dtype=float)
    ebv = np.atleast_1d(np.asarray(ebv_grid, dtype=float))
    if teff.ndim != 1 or teff.size < 3 or np.any(np.diff(teff) <= 0) or teff[0] <= 0:
        raise ConfigError("teff_grid must be at least 3 positive, strictly increasing values")
    if np.any(np.diff(ebv) <= 0) or ebv[0] != 0:
        raise ConfigError("ebv_grid must start at 0 and increase strictly")
    ext = ExtinctionLaw(law, float(r_v)) if (law is not None and np.any(ebv > 0)) else None

    mags = np.empty((1, ebv.size, teff.size, len(spec)))
    for j, (_key, name, system) in enumerate(spec):
        m = band_integrals(name, teff, ebv, ext).T          # (n_ebv, n_teff)
        if system == "vega":
            m = m + vega_minus_ab(name)
        mags[0, :, :, j] = m
    meta = {
        "spectra": spectra,
        "bands": [{"key": k, "passband": n, "system": s} for k, n, s in spec],
        "extinction_law": None if ext is None else ext.name,
        "r_v": None if ext is None else float(r_v),
        "ab_zero_point": "3631 Jy (Oke & Gunn 1983)",
        "vega_zero_points": "Riello et al. 2021, A&A 649, A3 (Gaia EDR3) where listed",
        "bolometric_zero_point": "IAU 2015 Resolution B2",
        "caution": BLACKBODY_CAUTION,
    }
    grid = PhotometryGrid(band_keys=tuple(k for k, _, _ in spec), log_teff=np.log10(teff), ebv=ebv,
                          logg=np.array([np.nan]), mag=mags, metadata=meta)
    df = grid.to_frame()
    assert list(df.columns[:2]) == [TEFF_COLUMN, EBV_COLUMN]
    assert df.columns[-1] == MBOL_COLUMN and df.columns[2].startswith(BAND_PREFIX)
    # exact Teff nodes (avoid 10**log10 round-off in the written table)
    df[TEFF_COLUMN] = np.tile(teff, ebv.size)
    return df


def build_photometry_grid(bands, teff_grid, ebv_grid=(0.0,), law="G23", r_v=3.1, spectra="blackbody"):
    """Shortcut: :func:`build_photometry_table` then :meth:`PhotometryGrid.from_frame`."""
    return PhotometryGrid.from_frame(build_photometry_table(bands, teff_grid, ebv_grid, law, r_v, spectra))
