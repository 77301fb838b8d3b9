"""Invented survey catalogues for demonstrations and benchmarks.

The scenario is fictional: the *Lanternfall Astrometric Survey*, Data Release 1, an imaginary
all-sky mission with Gaia-like G, BP and RP photometry (the real Gaia DR3 passbands are used for
the synthetic magnitudes) and a spectroscopic follow-up of a fraction of its white dwarfs. Nothing
here is observed data.

The population is deliberately simple: constant star formation over ``age_gyr``, a Salpeter IMF,
main-sequence lifetimes from the 10 Gyr (M/Msun)^-2.5 rule of thumb, a linear initial-final mass
relation, and either Mestel cooling with cinderclock's default coefficient and the Nauenberg
radius (the quick default, used by the tests) or a cinderclock cooling table (luminosity, Teff and
finite-temperature radius along its tracks; the shipped sample uses the default model), with
blackbody photometry. Contaminants are main-sequence stars and distant sources whose parallaxes are
pure noise. A few malformed rows exercise the ingest checks. The generator is vectorised and scales
to millions of rows.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

#: Column names of the fictional survey's table (the survey's own, not cinderclock's).
SURVEY_COLUMNS = ["lf_source", "ra_icrs", "dec_icrs", "plx", "plx_e", "pm_ra", "pm_dec",
                  "g_mag", "g_mag_e", "bp_mag", "bp_mag_e", "rp_mag", "rp_mag_e",
                  "teff_sp", "teff_sp_e", "logg_sp", "logg_sp_e", "ruwe_lf"]

BANDS = {"G": "gaiadr3-G", "BP": "gaiadr3-BP", "RP": "gaiadr3-RP"}
G_LIMIT = 20.5


def _sky(rng, n):
    ra = rng.uniform(0.0, 360.0, n)
    dec = np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n)))
    return ra, dec


def _phot_errors(rng, g):
    """Magnitude and parallax uncertainties growing towards the survey limit (invented model)."""
    f = 10 ** (0.4 * (g - 20.0))
    return {
        "g": 0.0005 + 0.004 * f,
        "bp": 0.003 + 0.05 * f,
        "rp": 0.003 + 0.04 * f,
        "plx": 0.02 + 0.5 * np.sqrt(f),
    }


def white_dwarfs(rng, n, age_gyr=10.0, max_distance_pc=250.0, cooling=None):
    """True parameters of ``n`` white dwarfs from a constant-star-formation population.

    ``cooling`` is an optional :class:`~cinderclock.cooling.grid.CoolingGrid` with ``teff_k`` and
    ``radius_rsun`` columns; without it the stars cool by Mestel's law on the Nauenberg radius.
    Stars the table cannot place (past its faint limit) are dropped: far below any survey limit.
    """
    from .cooling.mestel import age_coefficient_yr, luminosity_at_age
    from .constants import L_SUN_W, R_SUN_M, SIGMA_SB_SI
    from .massradius.nauenberg import radius_rsun

    out = {k: np.empty(0) for k in ("mass", "cool_age", "logl", "teff", "radius", "dist")}
    coeff = age_coefficient_yr()
    while out["mass"].size < n:
        k = 4 * n
        u = rng.uniform(size=k)
        mi = (0.8 ** -1.35 - u * (0.8 ** -1.35 - 8.0 ** -1.35)) ** (-1 / 1.35)     # Salpeter, 0.8-8 Msun
        born = rng.uniform(0.0, age_gyr, k)                                        # Gyr ago
        t_cool = born - 10.0 * mi ** -2.5
        keep = t_cool > 0.003
        mi, t_cool = mi[keep], t_cool[keep]
        mf = np.clip(0.08 * mi + 0.489, 0.5, 1.3)
        if cooling is None:
            logl = luminosity_at_age(mf, t_cool * 1e9, coeff)
            r = radius_rsun(mf)
            teff = (10 ** logl * L_SUN_W / (4 * np.pi * SIGMA_SB_SI * (r * R_SUN_M) ** 2)) ** 0.25
        else:
            logl, _ = cooling.log_lum_at_age(mf, t_cool * 1e9)
            teff = cooling.interpolate("teff_k", mf, logl)
            r = cooling.interpolate("radius_rsun", mf, logl)
            ok = np.isfinite(logl) & np.isfinite(teff) & np.isfinite(r)
            mf, t_cool, logl, teff, r = mf[ok], t_cool[ok], logl[ok], teff[ok], r[ok]
        dist = max_distance_pc * rng.uniform(size=mf.size) ** (1 / 3)
        for key, val in zip(("mass", "cool_age", "logl", "teff", "radius", "dist"), (mf, t_cool, logl, teff, r, dist)):
            out[key] = np.concatenate([out[key], val])
    return {k: v[:n] for k, v in out.items()}


def _blackbody_abs_mags(teff, logl):
    from .photometry.bolometric import absolute_bolometric_magnitude, blackbody_bc_table

    grid = np.geomspace(2500.0, 200000.0, 800)
    bc = blackbody_bc_table(grid, list(BANDS.values()), ["vega"] * 3)
    mbol = absolute_bolometric_magnitude(logl)
    lt = np.log10(teff)
    return {b: mbol - np.interp(lt, np.log10(grid), bc[:, j]) for j, b in enumerate(BANDS)}


def make_catalogue(n_rows, seed=20261201, wd_fraction=0.5, spec_fraction=0.3, malformed=True, cooling=None):
    """Invented Lanternfall DR1 catalogue.

    Parameters
    ----------
    n_rows : int
        Number of well-formed rows (a handful of deliberately faulty rows are added if ``malformed``).
    seed : int
        Seed of the random generator: the same seed gives the same catalogue.
    wd_fraction : float
        Fraction of white dwarfs among the rows; the rest are contaminants.
    spec_fraction : float
        Fraction of white dwarfs with spectroscopic Teff and log g.
    malformed : bool
        Add rows with faults (text in numbers, sentinels, duplicated or missing identifiers, wrong
        field counts are added by :func:`write_csv`).
    cooling : CoolingGrid, optional
        Cooling table for the white dwarfs (see :func:`white_dwarfs`); default Mestel's law.

    Returns
    -------
    catalogue : pandas.DataFrame
        Survey columns (see :data:`SURVEY_COLUMNS`).
    truth : pandas.DataFrame
        True parameters per row (``kind``: wd, ms, noise).
    """
    from .massradius.nauenberg import logg_cgs

    rng = np.random.default_rng(seed)
    n_wd = int(round(n_rows * wd_fraction))
    n_ms = int(round((n_rows - n_wd) * 0.7))
    n_far = n_rows - n_wd - n_ms

    # --- white dwarfs (drawn in batches until enough are brighter than the survey limit)
    parts, absparts, have = [], [], 0
    while have < n_wd:
        batch = white_dwarfs(rng, 2 * (n_wd - have) + 100, cooling=cooling)
        mags = _blackbody_abs_mags(batch["teff"], batch["logl"])
        seen = mags["G"] + 5 * np.log10(batch["dist"]) - 5 < G_LIMIT
        parts.append({k: v[seen] for k, v in batch.items()})
        absparts.append({b: m[seen] for b, m in mags.items()})
        have += int(seen.sum())
    wd = {k: np.concatenate([p[k] for p in parts])[:n_wd] for k in parts[0]}
    absm = {b: np.concatenate([p[b] for p in absparts])[:n_wd] for b in BANDS}
    true_plx_wd = 1000.0 / wd["dist"]
    app_wd = {b: absm[b] + 5 * np.log10(wd["dist"]) - 5 for b in BANDS}

    # --- main-sequence contaminants: crude colour-magnitude locus (invented)
    c = rng.uniform(0.3, 3.0, 3 * n_ms + 100)
    mg = 1.9 + 3.3 * c + rng.normal(0, 0.4, c.size)
    d = 2000.0 * rng.uniform(size=c.size) ** (1 / 3)
    g = mg + 5 * np.log10(d) - 5
    keep = g < G_LIMIT
    c, g, d = c[keep][:n_ms], g[keep][:n_ms], d[keep][:n_ms]
    bp = g + 0.45 * c - 0.05
    app_ms = {"G": g, "BP": bp, "RP": bp - c}
    true_plx_ms = 1000.0 / d

    # --- distant faint sources: parallax is pure noise
    g_far = rng.uniform(18.0, G_LIMIT, n_far)
    c_far = rng.uniform(-0.2, 1.2, n_far)
    bp_far = g_far + 0.3 * c_far
    app_far = {"G": g_far, "BP": bp_far, "RP": bp_far - c_far}

    app = {b: np.concatenate([app_wd[b], app_ms[b], app_far[b]]) for b in BANDS}
    true_plx = np.concatenate([true_plx_wd, true_plx_ms, np.zeros(n_far)])
    kind = np.array(["wd"] * len(true_plx_wd) + ["ms"] * len(true_plx_ms) + ["noise"] * n_far, dtype=object)
    n = kind.size
    err = _phot_errors(rng, app["G"])
    ra, dec = _sky(rng, n)
    cat = pd.DataFrame({
        "lf_source": rng.permutation(10**14 + np.cumsum(rng.integers(1, 10**6, n, dtype=np.int64))),
        "ra_icrs": ra, "dec_icrs": dec,
        "plx": true_plx + rng.normal(0, 1, n) * err["plx"], "plx_e": err["plx"],
        "pm_ra": rng.normal(0, 40, n), "pm_dec": rng.normal(0, 40, n),
        "g_mag": app["G"] + rng.normal(0, 1, n) * err["g"], "g_mag_e": err["g"],
        "bp_mag": app["BP"] + rng.normal(0, 1, n) * err["bp"], "bp_mag_e": err["bp"],
        "rp_mag": app["RP"] + rng.normal(0, 1, n) * err["rp"], "rp_mag_e": err["rp"],
    })
    n_wd = len(true_plx_wd)
    spec = np.zeros(n, dtype=bool)
    spec[:n_wd] = rng.uniform(size=n_wd) < spec_fraction
    teff_true = np.full(n, np.nan)
    teff_true[:n_wd] = wd["teff"]
    logg_true = np.full(n, np.nan)
    logg_true[:n_wd] = logg_cgs(wd["mass"], wd["radius"])
    cat["teff_sp"] = np.where(spec, teff_true * (1 + 0.02 * rng.normal(size=n)), np.nan)
    cat["teff_sp_e"] = np.where(spec, 0.02 * teff_true, np.nan)
    cat["logg_sp"] = np.where(spec, logg_true + 0.05 * rng.normal(size=n), np.nan)
    cat["logg_sp_e"] = np.where(spec, 0.05, np.nan)
    cat["ruwe_lf"] = np.where(rng.uniform(size=n) < 0.03, rng.uniform(1.5, 4.0, n), rng.lognormal(0.0, 0.08, n))

    truth = pd.DataFrame({"kind": kind, "plx_true_mas": true_plx, "teff_true_k": teff_true, "logg_true": logg_true})
    for key, name in (("mass", "mass_true_msun"), ("cool_age", "cool_age_true_gyr"), ("logl", "log_lum_true")):
        col = np.full(n, np.nan)
        col[:n_wd] = wd[key]
        truth[name] = col

    order = rng.permutation(n)                      # shuffle kinds together
    cat = cat.iloc[order].reset_index(drop=True)
    truth = truth.iloc[order].reset_index(drop=True)
    if malformed and n > 20:
        cat = cat.astype({"plx": object, "g_mag": object})
        cat.loc[3, "plx"] = "pending"               # text in a numeric column
        cat.loc[7, "g_mag"] = 99.0                  # sentinel magnitude
        cat.loc[11, "lf_source"] = cat.loc[10, "lf_source"]   # duplicated identifier
        cat.loc[13, "plx_e"] = 0.0                  # impossible uncertainty
        cat.loc[17, "plx"] = -0.8                   # negative parallax (kept: fails the S/N cut)
    return cat, truth


def write_csv(cat, path, malformed_lines=(5, 19)):
    """Write the catalogue as CSV; the listed data rows are cut short (wrong field count)."""
    cat = cat.copy()
    for col in cat.columns[cat.dtypes == object]:
        cat[col] = [f"{v:.6g}" if isinstance(v, float) else v for v in cat[col]]
    text = cat.to_csv(index=False, float_format="%.6g", lineterminator="\n")
    if malformed_lines:
        lines = text.split("\n")
        for i in malformed_lines:
            if i + 1 < len(lines) - 1:
                lines[i + 1] = ",".join(lines[i + 1].split(",")[:6])
        text = "\n".join(lines)
    with open(path, "w") as fh:
        fh.write(text)


def consistent_catalogue(models, n, seed=1, spec_fraction=0.5, mag_error=(0.01, 0.04), snr=(10.0, 60.0),
                         max_distance_pc=150.0, mass_range=(0.5, 1.0), teff_range=(6000.0, 30000.0)):
    """Invented white dwarfs whose observables follow exactly from cinderclock's own model tables.

    For validation of the uncertainty machinery (coverage of the Monte Carlo intervals), not of the
    physics: the truths are made with the same mass-radius, photometry and cooling tables the
    chain inverts, and the observables get Gaussian errors of known size.

    Parameters
    ----------
    models : cinderclock.api.ModelSet
        Model tables of a configuration (bands G, BP, RP in the survey's column names).
    n : int
        Number of stars.

    Returns
    -------
    catalogue, truth : pandas.DataFrame
        Catalogue in the sample's survey columns; true dist_pc, teff_k, log_lum, mass_msun,
        radius_rsun, cool_age_gyr, total_age_gyr.
    """
    from .constants import GYR_S, L_SUN_W, PC_M, R_SUN_M, SIGMA_SB_SI, YR_S
    from .massradius.grid import logg_from_mass_radius
    from .progenitor.total_age import total_age

    rng = np.random.default_rng(seed)
    mass = rng.uniform(*mass_range, n)
    teff = np.exp(rng.uniform(np.log(teff_range[0]), np.log(teff_range[1]), n))
    dist = max_distance_pc * rng.uniform(0.1, 1.0, n) ** (1 / 3)
    radius = models.mass_radius.radius(mass, teff)
    logg = logg_from_mass_radius(mass, radius)
    log_lum = np.log10(4 * np.pi * (radius * R_SUN_M) ** 2 * SIGMA_SB_SI * teff**4 / L_SUN_W)
    age, _ = models.cooling.age_yr(mass, log_lum)
    tot = total_age(mass, age)
    grid = models.photometry
    log_omega = 2 * np.log10(radius * R_SUN_M / (dist * PC_M))
    mags = grid.magnitudes(teff, 0.0) - 2.5 * log_omega[:, None]
    bands = {"G": "g_mag", "BP": "bp_mag", "RP": "rp_mag"}
    plx_true = 1000.0 / dist
    plx_err = plx_true / rng.uniform(*snr, n)
    cat = pd.DataFrame({"lf_source": np.arange(n, dtype=np.int64) + 1, "plx": plx_true + plx_err * rng.normal(size=n),
                        "plx_e": plx_err, "ruwe_lf": np.ones(n)})
    for j, key in enumerate(grid.band_keys):
        err = rng.uniform(*mag_error, n)
        cat[bands[key]] = mags[:, j] + err * rng.normal(size=n)
        cat[bands[key] + "_e"] = err
    spec = rng.uniform(size=n) < spec_fraction
    t_err, g_err = 0.02 * teff, np.full(n, 0.05)
    cat["teff_sp"] = np.where(spec, teff + t_err * rng.normal(size=n), np.nan)
    cat["teff_sp_e"] = np.where(spec, t_err, np.nan)
    cat["logg_sp"] = np.where(spec, logg + g_err * rng.normal(size=n), np.nan)
    cat["logg_sp_e"] = np.where(spec, g_err, np.nan)
    truth = pd.DataFrame({"dist_pc": dist, "teff_k": teff, "log_lum": log_lum, "mass_msun": mass,
                          "radius_rsun": radius, "cool_age_gyr": age * YR_S / GYR_S,
                          "total_age_gyr": tot["total_age_yr"] * YR_S / GYR_S})
    return cat, truth
