"""Mass-radius tables in (mass, Teff): built once per configuration, then interpolated.

:func:`build_mass_radius_table` integrates the zero-temperature sequence of the chosen core
(:mod:`~cinderclock.massradius.chandrasekhar`), interpolates it onto the mass grid and adds the
finite-temperature envelope at every Teff: by default the integrated envelope of
:mod:`cinderclock.envelope` (the same one the cooling model uses), or, as an explicit non-default
choice (``envelope="kramers"``), the older Mestel/Kramers estimate of
:mod:`~cinderclock.massradius.envelope`. The result
is a long pandas DataFrame of plain float columns (Parquet-ready, see :data:`TABLE_COLUMNS` for
:func:`cinderclock.tableio.write_table`); settings and model references sit in ``df.attrs``.
:class:`~cinderclock.massradius.grid.MassRadiusGrid` (re-exported here) interpolates it.

The integrated envelope is solved on a coarser (mass, log Teff) grid and its inflation ln(R/R_0)
is interpolated bilinearly onto the table grid (R_0 from the dense zero-temperature sequence).
CAUTION: analytic opacities, grey atmosphere and a local mixing length (see
:data:`cinderclock.envelope.table.CAUTION`). Rows where the model does not apply (envelope not
bound; masses below 0.10 Msun; for the Kramers choice more than ``max_envelope_mass_fraction`` of
the star above the degeneracy boundary) have NaN radius and log g, and the inversion reports them
as outside the table.
"""

from __future__ import annotations

import numpy as np

from ..constants import G_SI, L_SUN_W, M_SUN_KG, R_SUN_M, SIGMA_SB_SI
from ..tableio import Column
from .chandrasekhar import CHANDRASEKHAR_1939, zero_temperature_sequence
from .composition import core_composition
from .envelope import DEEP_ENVELOPE, MESTEL_KRAMERS_ENVELOPE, HydrogenLayer, finite_temperature_radius
from .envelope import hydrogen_layer as _lookup_layer
from .eos import SALPETER_1961
from .grid import MassRadiusGrid  # noqa: F401  (re-exported: the table and its interpolator go together)

#: Default mass grid in Msun: 0.10 to 1.34 in steps of 0.005 (upper end below the Newtonian
#: model's range limit, CHANDRASEKHAR_1939).
DEFAULT_MASS_GRID = np.round(np.arange(0.10, 1.34 + 1e-9, 0.005), 6)
#: Default Teff grid in K: 241 points, uniform in log from 3000 K to 150000 K (0.007 dex: with the
#: core material below the helium layer the inflation of hot low-mass stars grows steeply with
#: Teff, and 121 points left mass round trips near 0.5 Msun and 40,000 K at 1.2e-4 Msun).
DEFAULT_TEFF_GRID = np.geomspace(3000.0, 150000.0, 241)
#: Largest envelope mass fraction (mass above the degeneracy boundary / M) kept in a table; above
#: it the thin-envelope assumption of the model fails (our choice).
MAX_ENVELOPE_MASS_FRACTION = 0.1

#: Column descriptions for cinderclock.tableio.write_table.
TABLE_COLUMNS = {
    "mass_msun": Column("solMass", "White-dwarf mass", "phys.mass"),
    "teff_k": Column("K", "Effective temperature", "phys.temperature.effective"),
    "radius_rsun": Column("solRad", "Photospheric radius with the finite-temperature envelope "
                          "(NaN where the envelope model does not apply)", "phys.size.radius"),
    "logg_cgs": Column("dex(cm/s2)", "log10 of surface gravity G M / R^2", "phys.gravity"),
    "radius_zero_t_rsun": Column("solRad", "Radius of the zero-temperature model of the same core",
                                 "phys.size.radius"),
    "core_temp_k": Column("K", "Isothermal core temperature of the envelope model", "phys.temperature"),
    "log_lum": Column("dex(solLum)", "log10 of the luminosity 4 pi R^2 sigma Teff^4 in solar units",
                      "phys.luminosity"),
    "envelope_mass_fraction": Column("", "Kramers envelope only: mass above the degeneracy boundary over the "
                                     "total mass", "phys.mass;arith.ratio"),
    "hydrogen_base_temp_k": Column("K", "Kramers envelope only: temperature at the base of the hydrogen layer",
                                   "phys.temperature"),
    "log_dm_conv": Column("", "Integrated envelope only: log10 of the mass above the base of the outer "
                          "convection zone over M (NaN: radiative)", ""),
    "coupled": Column("", "Integrated envelope only: 1 where the convection zone reaches degenerate electrons",
                      ""),
}
#: Columns written by each envelope choice.
COLUMNS_BY_ENVELOPE = {
    "integrated": ("mass_msun", "teff_k", "radius_rsun", "logg_cgs", "radius_zero_t_rsun", "core_temp_k",
                   "log_lum", "log_dm_conv", "coupled"),
    "kramers": ("mass_msun", "teff_k", "radius_rsun", "logg_cgs", "radius_zero_t_rsun", "core_temp_k",
                "log_lum", "envelope_mass_fraction", "hydrogen_base_temp_k"),
}
#: Hydrogen-layer mass fractions of the integrated envelope ("none": helium atmosphere).
INTEGRATED_LAYERS = {"thick": 1e-4, "thin": 1e-10, "none": 0.0}
#: Envelope grid used for the mass-radius table (Msun; interpolated onto the table's mass grid).
ENVELOPE_MASSES = np.round(np.concatenate([[0.10, 0.125], np.arange(0.15, 1.35 + 1e-9, 0.05)]), 6)


def _zero_t_radius_function(mu_e, ion_charge, coulomb):
    """Cubic spline of log R0 against log M from a dense zero-temperature sequence."""
    from scipy.interpolate import CubicSpline

    seq = zero_temperature_sequence(mu_e, ion_charge, coulomb, np.linspace(2.5, 11.5, 361))
    spline = CubicSpline(np.log(seq["mass_msun"]), np.log(seq["radius_rsun"]))
    m_lo, m_hi = seq["mass_msun"][0], seq["mass_msun"][-1]

    def radius0(mass_msun):
        m = np.asarray(mass_msun, dtype=float)
        ok = (m >= m_lo) & (m <= m_hi)
        return np.where(ok, np.exp(spline(np.log(np.where(ok, m, 1.0)))), np.nan)

    return radius0


def build_mass_radius_table(core="CO", hydrogen_layer="thick", coulomb=True, mass_grid=None,
                            teff_grid=None, max_envelope_mass_fraction=MAX_ENVELOPE_MASS_FRACTION,
                            envelope="integrated", envelope_table=None, mlt_alpha=None):
    """Tabulate radius and log g over (mass, Teff) for one core and hydrogen-layer choice.

    Parameters
    ----------
    core : {"CO", "He", "ONe"} or CoreComposition
        Core composition (sets mu_e and the Coulomb ion charge), see
        :mod:`cinderclock.massradius.composition`.
    hydrogen_layer : {"thick", "thin", "none"} or HydrogenLayer
        Hydrogen-layer mass (q_H = 1e-4 or 1e-10; "none": helium atmosphere, integrated envelope only).
    coulomb : bool
        Include the Salpeter (1961) lattice correction in the core.
    mass_grid : array_like, optional
        Masses in Msun, strictly increasing (default :data:`DEFAULT_MASS_GRID`).
    teff_grid : array_like, optional
        Effective temperatures in K, strictly increasing (default :data:`DEFAULT_TEFF_GRID`).
    max_envelope_mass_fraction : float
        Kramers envelope only: rows whose envelope holds more than this fraction of the mass are NaN.
    envelope : {"integrated", "kramers"}
        Integrated envelope (:mod:`cinderclock.envelope`, default) or the older Kramers estimate.
    envelope_table : cinderclock.envelope.EnvelopeTable, optional
        A prebuilt integrated envelope (e.g. the one of the cooling model) to use instead of
        building one; its layers should match ``hydrogen_layer``.
    mlt_alpha : float, optional
        Mixing-length parameter of the integrated envelope (default that of
        :mod:`cinderclock.envelope.convection`).

    Raises
    ------
    cinderclock.errors.ModelRangeError
        If a grid reaches outside the valid range of a model used (mass 0.1-1.35 Msun,
        Teff 3000-150000 K; see the ``ranges`` of the PublishedRelation constants).

    Returns
    -------
    pandas.DataFrame
        One row per (mass, Teff), mass varying slowest, with the float columns of
        :data:`TABLE_COLUMNS`. ``df.attrs["settings"]`` holds the configuration (JSON-ready) and
        ``df.attrs["models"]`` a list of ``{"name", "reference", ...}`` entries for provenance.

    Notes
    -----
    The Kramers choice builds in about a second; the integrated envelope in some tens of seconds
    (see benchmarks). Both are models with the cautions of their modules.
    """
    if envelope == "integrated":
        return _integrated_table(core, hydrogen_layer, coulomb, mass_grid, teff_grid, envelope_table, mlt_alpha)
    if envelope != "kramers":
        raise ValueError(f"envelope must be 'integrated' or 'kramers', not {envelope!r}")
    import pandas as pd

    comp = core_composition(core)
    layer = _lookup_layer(hydrogen_layer)
    masses, teffs = _grids(mass_grid, teff_grid)
    ion_charge = comp.coulomb_charge if coulomb else None
    radius0 = _zero_t_radius_function(comp.mu_e, ion_charge, coulomb)(masses)
    if np.any(~np.isfinite(radius0)):
        raise ValueError(f"mass grid reaches beyond the zero-temperature sequence of core {comp.name}")
    m2, t2 = np.meshgrid(masses, teffs, indexing="ij")
    r0_2 = np.broadcast_to(radius0[:, None], m2.shape)
    env = finite_temperature_radius(m2, t2, r0_2, layer, comp.mu_e, ion_charge)
    radius = env["radius_rsun"]
    bad = ~(env["envelope_mass_fraction"] <= max_envelope_mass_fraction)
    radius = np.where(bad, np.nan, radius)
    with np.errstate(invalid="ignore", divide="ignore"):
        logg = np.log10(G_SI * m2 * M_SUN_KG / (radius * R_SUN_M) ** 2 * 100.0)
    df = pd.DataFrame({
        "mass_msun": m2.ravel(),
        "teff_k": t2.ravel(),
        "radius_rsun": radius.ravel(),  # (Kramers envelope)
        "logg_cgs": logg.ravel(),
        "radius_zero_t_rsun": r0_2.ravel().copy(),
        "core_temp_k": env["core_temp_k"].ravel(),
        "log_lum": env["log_lum"].ravel(),
        "envelope_mass_fraction": env["envelope_mass_fraction"].ravel(),
        "hydrogen_base_temp_k": env["hydrogen_base_temp_k"].ravel(),
    })
    models = [CHANDRASEKHAR_1939.as_model(), MESTEL_KRAMERS_ENVELOPE.as_model()]
    if coulomb:
        models.insert(1, SALPETER_1961.as_model())
    df.attrs["settings"] = {
        "core": comp.name,
        "composition": comp.as_dict(),
        "mu_e": comp.mu_e,
        "coulomb": bool(coulomb),
        "coulomb_ion_charge": ion_charge,
        "hydrogen_layer": layer.name,
        "hydrogen_mass_fraction": layer.mass_fraction,
        "hydrogen_layer_mu": layer.mu,
        "deep_envelope": {"X": DEEP_ENVELOPE.X, "Z": DEEP_ENVELOPE.Z, "mu": DEEP_ENVELOPE.mu},
        "max_envelope_mass_fraction": float(max_envelope_mass_fraction),
        "n_mass": int(masses.size),
        "n_teff": int(teffs.size),
        "envelope": "kramers",
        "caution": "finite-temperature envelope is a simplified Mestel/Kramers model: radii differ from "
                   "detailed evolutionary models by some per cent; Newtonian zero-temperature core",
    }
    df.attrs["models"] = models
    return df


def _grids(mass_grid, teff_grid):
    """Validated mass and Teff grids; never outside the stated model ranges (ModelRangeError)."""
    masses = np.asarray(DEFAULT_MASS_GRID if mass_grid is None else mass_grid, dtype=float)
    teffs = np.asarray(DEFAULT_TEFF_GRID if teff_grid is None else teff_grid, dtype=float)
    for name, arr in (("mass_grid", masses), ("teff_grid", teffs)):
        if arr.ndim != 1 or arr.size < 2 or np.any(np.diff(arr) <= 0) or not np.all(np.isfinite(arr)):
            raise ValueError(f"{name} must be a strictly increasing 1-d array of at least two finite values")
    CHANDRASEKHAR_1939.check(strict=True, mass=masses)
    MESTEL_KRAMERS_ENVELOPE.check(strict=True, mass=masses)
    MESTEL_KRAMERS_ENVELOPE.check(strict=True, teff=teffs)
    return masses, teffs


def _integrated_table(core, hydrogen_layer, coulomb, mass_grid, teff_grid, envelope_table, mlt_alpha):
    """Mass-radius table from the integrated envelope of :mod:`cinderclock.envelope`."""
    import pandas as pd

    from ..envelope import build_envelope_table
    from ..envelope.convection import DEFAULT_ALPHA
    from ..envelope.table import DEFAULT_LOG_TEFF

    comp = core_composition(core)
    layer_name = hydrogen_layer.name if isinstance(hydrogen_layer, HydrogenLayer) else hydrogen_layer
    if isinstance(hydrogen_layer, HydrogenLayer):
        q_h = hydrogen_layer.mass_fraction
    elif hydrogen_layer in INTEGRATED_LAYERS:
        q_h = INTEGRATED_LAYERS[hydrogen_layer]
    else:
        from ..errors import ConfigError
        raise ConfigError(f"unknown hydrogen layer '{hydrogen_layer}'; choose one of {sorted(INTEGRATED_LAYERS)}")
    masses, teffs = _grids(mass_grid, teff_grid)
    if envelope_table is None:
        log_teff = DEFAULT_LOG_TEFF
        if np.log10(teffs[0]) < log_teff[0] - 1e-9 or np.log10(teffs[-1]) > log_teff[-1] + 1e-9:
            log_teff = np.linspace(np.log10(teffs[0]), np.log10(teffs[-1]), log_teff.size)
        k0 = max(int(np.searchsorted(ENVELOPE_MASSES, masses[0], side="right")) - 1, 0)
        k1 = min(int(np.searchsorted(ENVELOPE_MASSES, masses[-1], side="left")), ENVELOPE_MASSES.size - 1)
        env_masses = ENVELOPE_MASSES[k0:max(k1, k0 + 1) + 1]        # only the nodes the grid needs
        envelope_table = build_envelope_table(env_masses, log_teff, atmosphere="H" if q_h > 0 else "He",
                                              q_h=q_h if q_h > 0 else 1e-4, core=comp.name,
                                              mlt_alpha=DEFAULT_ALPHA if mlt_alpha is None else mlt_alpha)
    env = envelope_table
    ion_charge = comp.coulomb_charge if coulomb else None
    radius0 = _zero_t_radius_function(comp.mu_e, ion_charge, coulomb)(masses)
    if np.any(~np.isfinite(radius0)):
        raise ValueError(f"mass grid reaches beyond the zero-temperature sequence of core {comp.name}")
    m2, t2 = np.meshgrid(masses, teffs, indexing="ij")
    inflation = np.log(env.columns["radius_rsun"] / env.columns["radius_zero_t_rsun"])
    env_cols = {"inflation": inflation, "log_tc": env.columns["log_tc"], "log_dm_conv": env.columns["log_dm_conv"],
                "coupled": env.columns["coupled"]}
    vals = _bilinear(env.masses, env.log_teff, env_cols, m2, np.log10(t2))
    radius = radius0[:, None] * np.exp(vals["inflation"])
    with np.errstate(invalid="ignore", divide="ignore"):
        logg = np.log10(G_SI * m2 * M_SUN_KG / (radius * R_SUN_M) ** 2 * 100.0)
        log_lum = np.log10(4.0 * np.pi * (radius * R_SUN_M) ** 2 * SIGMA_SB_SI * t2**4 / L_SUN_W)
    df = pd.DataFrame({
        "mass_msun": m2.ravel(), "teff_k": t2.ravel(), "radius_rsun": radius.ravel(), "logg_cgs": logg.ravel(),
        "radius_zero_t_rsun": np.broadcast_to(radius0[:, None], m2.shape).ravel().copy(),
        "core_temp_k": (10.0 ** vals["log_tc"]).ravel(), "log_lum": log_lum.ravel(),
        "log_dm_conv": vals["log_dm_conv"].ravel(), "coupled": np.round(vals["coupled"]).ravel(),
    })
    models = [CHANDRASEKHAR_1939.as_model(), env.as_model()]
    if coulomb:
        models.insert(1, SALPETER_1961.as_model())
    df.attrs["settings"] = {
        "core": comp.name, "composition": comp.as_dict(), "mu_e": comp.mu_e, "coulomb": bool(coulomb),
        "coulomb_ion_charge": ion_charge, "hydrogen_layer": layer_name, "hydrogen_mass_fraction": float(q_h),
        "envelope": "integrated", "envelope_settings": dict(env.settings),
        "n_mass": int(masses.size), "n_teff": int(teffs.size),
        "caution": "integrated envelope with analytic opacities, grey atmosphere and local mixing length; "
                   "inflation interpolated from the envelope grid; Newtonian zero-temperature core",
    }
    df.attrs["models"] = models
    return df


def _bilinear(masses, log_teff, columns, m, lt):
    """Bilinear interpolation of (n_mass, n_teff) arrays at (m, lt); NaN outside or next to NaN nodes."""
    i = np.clip(np.searchsorted(masses, m) - 1, 0, masses.size - 2)
    j = np.clip(np.searchsorted(log_teff, lt) - 1, 0, log_teff.size - 2)
    wi = (m - masses[i]) / (masses[i + 1] - masses[i])
    wj = (lt - log_teff[j]) / (log_teff[j + 1] - log_teff[j])
    outside = (m < masses[0]) | (m > masses[-1]) | (lt < log_teff[0] - 1e-9) | (lt > log_teff[-1] + 1e-9)
    out = {}
    for name, a in columns.items():
        v = ((1 - wi) * (1 - wj) * a[i, j] + wi * (1 - wj) * a[i + 1, j] + (1 - wi) * wj * a[i, j + 1]
             + wi * wj * a[i + 1, j + 1])
        out[name] = np.where(outside, np.nan, v)
    return out
