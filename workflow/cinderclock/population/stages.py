"""The population steps of the workflow on whole tables: Vmax and luminosity function, age fit.

Each function takes plain DataFrames and the stage settings (``population``, ``select`` and
``luminosity`` sections) and returns tables with their column descriptions, so the rule scripts
only read and write.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..errors import ConfigError, InputError
from ..tableio import Column

#: Fewest stars in the fitted magnitude range for which a population age is fitted.
MIN_STARS_FOR_FIT = 10
#: The one line said when the final table has no stars.
EMPTY_TABLE = ("the final per-star table has no stars (every input row was rejected upstream; see the rejects "
               "table): there is no luminosity function, population age or star-formation history to fit")

STAR_COLUMNS = {
    "star_id": Column("", "Source identifier from the input catalogue", "meta.id;meta.main"),
    "mbol": Column("mag", "Absolute bolometric magnitude (IAU 2015 B2 scale)", "phys.magAbs.bol"),
    "mbol_err": Column("mag", "Standard error of mbol (NaN where the per-star table has none)",
                       "stat.error;phys.magAbs.bol"),
    "dist_pc": Column("pc", "Distance (inverse corrected parallax)", "pos.distance"),
    "mag_survey": Column("mag", "Apparent magnitude in the survey's selection band", "phot.mag"),
    "d_min_pc": Column("pc", "Nearest distance at which the star would pass the survey limits",
                       "pos.distance;stat.min"),
    "d_max_pc": Column("pc", "Farthest distance at which the star would pass the survey limits",
                       "pos.distance;stat.max"),
    "vmax_pc3": Column("pc3", "Maximum (effective) volume in which the star would enter the sample", ""),
    "v_over_vmax": Column("", "Volume out to the star's distance divided by its maximum volume", "stat.value"),
    "vmax_limit": Column("", "Survey limit that sets d_max (0 magnitude, 1 parallax S/N, 2 proper motion, "
                             "3 distance)", "meta.code"),
    "lf_status": Column("", "0: used in the luminosity function; 1: no selection magnitude; 2: outside the "
                            "survey limits (V/Vmax > 1); 3: no M_bol; 4: no sky position for the disk "
                            "correction", "meta.code"),
}

LF_COLUMNS = {
    "mbol_lo": Column("mag", "Bright edge of the M_bol bin", "phys.magAbs.bol;stat.min"),
    "mbol_hi": Column("mag", "Faint edge of the M_bol bin", "phys.magAbs.bol;stat.max"),
    "mbol_mid": Column("mag", "Centre of the M_bol bin", "phys.magAbs.bol"),
    "n_stars": Column("", "Stars in the bin", "meta.number"),
    "phi": Column("pc-3 mag-1", "Space density per magnitude, sum of 1/Vmax over the bin width", "phys.density"),
    "phi_err_poisson": Column("pc-3 mag-1", "Poisson error: sqrt(sum 1/Vmax^2) / bin width", "stat.error"),
    "phi_err_bootstrap": Column("pc-3 mag-1", "Bootstrap standard deviation of phi (NaN without resamples)",
                                "stat.error"),
    "phi_err": Column("pc-3 mag-1", "Error of phi chosen by population.lf_errors", "stat.error"),
    "vmax_harmonic_pc3": Column("pc3", "Harmonic mean of Vmax over the bin's stars", ""),
    "mean_v_over_vmax": Column("", "Mean V/Vmax of the bin's stars (0.5 expected)", "stat.mean"),
    "v_over_vmax_sigma": Column("", "Expected standard error of the mean V/Vmax, 1/sqrt(12 n)", "stat.error"),
}

MODEL_COLUMNS = {
    "mbol_lo": LF_COLUMNS["mbol_lo"], "mbol_hi": LF_COLUMNS["mbol_hi"], "mbol_mid": LF_COLUMNS["mbol_mid"],
    "phi_model": Column("pc-3 mag-1", "Forward-modelled luminosity function at the best-fit age, fitted "
                                      "normalisation", "phys.density"),
    "phi_model_low": Column("pc-3 mag-1", "Model at the 16th-percentile bootstrap age, same normalisation",
                            "phys.density"),
    "phi_model_high": Column("pc-3 mag-1", "Model at the 84th-percentile bootstrap age, same normalisation",
                             "phys.density"),
}

PROFILE_COLUMNS = {
    "age_gyr": Column("Gyr", "Population age of the grid", "time.age"),
    "delta_lnl": Column("", "Profile log-likelihood minus its maximum", "stat.likelihood"),
}


def _column(table, name, required=True):
    if name in table:
        return table[name].to_numpy(dtype=float)
    if required:
        raise InputError(f"column '{name}' is missing from the per-star table")
    return None


def luminosity_function_stage(table, settings):
    """Vmax of every star and the binned luminosity function.

    Parameters
    ----------
    table : pandas.DataFrame
        The final per-star table.
    settings : dict
        ``{"population": ..., "select": ..., "luminosity": ...}``.

    Returns
    -------
    stars : pandas.DataFrame
        :data:`STAR_COLUMNS`, one row per input star.
    lf : pandas.DataFrame
        :data:`LF_COLUMNS`, one row per bin.
    summary : dict
        Counts per status, <V/Vmax>, the limits used.
    """
    from .lf import binned_lf, bootstrap_lf_error, edges_from_settings
    from .vmax import (LIMIT_CODES, STATUS_CODES, compute_vmax, galactic_sin_b, limits_from_settings,
                       v_over_vmax_statistic)

    pop = settings["population"]
    limits = limits_from_settings(settings)
    band = pop["survey"]["band"]
    if len(table) == 0:
        return _empty_lf(pop, limits, band)
    if f"mag_{band}" not in table:
        raise ConfigError(f"population.survey.band: no column 'mag_{band}' in the per-star table; the band must be "
                          "one of the configured bands")
    n = len(table)
    mag = _column(table, f"mag_{band}")
    dist = _column(table, "dist_pc")
    mbol = _column(table, "mbol")
    plx_err = _column(table, "plx_err_mas", required=False)
    plx = _column(table, "plx_corr_mas", required=False)
    snr = plx / plx_err if plx is not None and plx_err is not None else None
    pm = None
    if limits.min_proper_motion_mas_yr is not None:
        pm = np.hypot(_column(table, "pmra_mas_yr"), _column(table, "pmdec_mas_yr"))
    sin_b = None
    status = np.zeros(n, dtype=np.int8)
    if limits.scale_height_pc is not None and limits.geometry == "line_of_sight":
        ra, dec = _column(table, "ra_deg", required=False), _column(table, "dec_deg", required=False)
        if ra is None or dec is None:
            raise InputError("population.disk: the line-of-sight scale-height correction needs ra_deg and dec_deg")
        sin_b = galactic_sin_b(ra, dec)
        status[~np.isfinite(sin_b)] = 4
    v = compute_vmax(dist, mag, limits, plx_over_err=snr, plx_err_mas=plx_err, pm_mas_yr=pm, sin_b=sin_b)
    status[(status == 0) & ~np.isfinite(mbol)] = 3
    status[(status == 0) & ~np.isfinite(mag)] = 1
    status[(status == 0) & ~v["usable"]] = 2
    used = status == 0
    inv = np.where(used, 1.0 / v["vmax_pc3"], np.nan)

    stars = pd.DataFrame({
        "star_id": table["star_id"].to_numpy() if "star_id" in table else np.arange(n),
        "mbol": mbol, "mbol_err": _column(table, "mbol_err", required=False) if "mbol_err" in table
        else np.full(n, np.nan), "dist_pc": dist, "mag_survey": mag, "d_min_pc": v["d_min_pc"], "d_max_pc": v["d_max_pc"],
        "vmax_pc3": v["vmax_pc3"], "v_over_vmax": v["v_over_vmax"], "vmax_limit": v["vmax_limit"],
        "lf_status": status,
    })
    edges = edges_from_settings(pop["mbol_bins"])
    lf = binned_lf(mbol[used], inv[used], edges, v["v_over_vmax"][used])
    boot = pop["bootstrap"]
    lf["phi_err_bootstrap"] = bootstrap_lf_error(mbol[used], inv[used], edges, boot["resamples"], boot["seed"])
    lf["phi_err"] = lf["phi_err_bootstrap"] if pop["lf_errors"] == "bootstrap" else lf["phi_err_poisson"]
    lf_df = pd.DataFrame({c: lf[c] for c in LF_COLUMNS})
    in_bins = used & (mbol >= edges[0]) & (mbol < edges[-1])
    summary = {
        "rows_in": int(n),
        "status_counts": {STATUS_CODES[c]: int(np.sum(status == c)) for c in STATUS_CODES},
        "stars_in_bins": int(in_bins.sum()),
        "v_over_vmax": v_over_vmax_statistic(v["v_over_vmax"][used]),
        "limit_counts": {name: int(np.sum(used & (v["vmax_limit"] == c))) for c, name in LIMIT_CODES.items()},
        "limits": {k: getattr(limits, k) for k in limits.__dataclass_fields__},
        "band": band,
        "lf_errors": pop["lf_errors"],
        "space_density_pc3": float(np.nansum(inv[in_bins])),
    }
    return stars, lf_df, summary


def _empty_lf(pop, limits, band):
    """Valid, empty outputs of :func:`luminosity_function_stage` for a table without stars."""
    from .lf import binned_lf, edges_from_settings
    from .vmax import LIMIT_CODES, STATUS_CODES, v_over_vmax_statistic

    edges = edges_from_settings(pop["mbol_bins"])
    lf = binned_lf(np.empty(0), np.empty(0), edges, np.empty(0))
    lf["phi_err_bootstrap"] = np.full(edges.size - 1, np.nan)
    lf["phi_err"] = lf["phi_err_bootstrap"] if pop["lf_errors"] == "bootstrap" else lf["phi_err_poisson"]
    stars = pd.DataFrame({c: pd.Series([], dtype="int64" if c in ("star_id", "vmax_limit", "lf_status") else "float64")
                          for c in STAR_COLUMNS})
    summary = {"rows_in": 0, "status_counts": {STATUS_CODES[c]: 0 for c in STATUS_CODES}, "stars_in_bins": 0,
               "v_over_vmax": v_over_vmax_statistic(np.empty(0)), "limit_counts": {v: 0 for v in LIMIT_CODES.values()},
               "limits": {k: getattr(limits, k) for k in limits.__dataclass_fields__}, "band": band,
               "lf_errors": pop["lf_errors"], "space_density_pc3": 0.0, "empty": EMPTY_TABLE}
    return stars, pd.DataFrame({c: lf[c] for c in LF_COLUMNS}), summary


def population_age_stage(stars, cooling_link, settings, lf_summary=None):
    """Fit the population age to the faint end of the luminosity function.

    Parameters
    ----------
    stars : pandas.DataFrame
        Output ``stars`` of :func:`luminosity_function_stage`.
    cooling_link : CoolingLink
        The cooling model of the run.
    settings : dict
        ``{"population": ..., "progenitor": ...}`` (the progenitor section is optional).
    lf_summary : dict, optional
        Summary of :func:`luminosity_function_stage` (its <V/Vmax> raises a warning when off).

    Returns
    -------
    summary : dict
        Best fit, intervals, goodness of fit, named warnings, models and references, cautions.
    model : pandas.DataFrame
        :data:`MODEL_COLUMNS` on 0.1 mag bins over the luminosity-function range.
    profile : pandas.DataFrame
        :data:`PROFILE_COLUMNS`.
    """
    from .agefit import age_grid_from_settings, fit_age
    from .diagnostics import fit_warnings
    from .lf import edges_from_settings
    from .model import model_from_settings
    from .sfh import sfh_from_settings

    pop = settings["population"]
    edges = edges_from_settings(pop["mbol_bins"])
    lo, hi = (float(v) for v in pop["fit"]["mbol_range"])
    fit_edges = edges[(edges >= lo - 1e-9) & (edges <= hi + 1e-9)]
    if fit_edges.size < 3:
        raise ConfigError(f"population.fit.mbol_range: [{lo}, {hi}] covers fewer than two luminosity-function bins")
    ages = age_grid_from_settings(pop["fit"]["age_grid"])
    sfh = sfh_from_settings(pop["sfh"])
    model = model_from_settings(pop, cooling_link, settings.get("progenitor"))
    used = stars["lf_status"].to_numpy() == 0
    mbol = stars["mbol"].to_numpy(dtype=float)[used]
    inv = 1.0 / stars["vmax_pc3"].to_numpy(dtype=float)[used]
    in_range = int(np.sum((mbol >= fit_edges[0]) & (mbol < fit_edges[-1])))
    if in_range < MIN_STARS_FOR_FIT:
        return _no_fit(in_range, fit_edges, ages, edges, model, cooling_link, sfh, empty=len(stars) == 0)
    errs = measurement_errors(stars, pop)
    me = pop["measurement_errors"]
    boot = pop["bootstrap"]
    fit = fit_age(mbol, inv, fit_edges, ages, lambda e, a: model.luminosity_function(e, a, sfh),
                  n_boot=int(boot["resamples"]), seed=int(boot["seed"]), floor=float(pop["fit"]["floor"]),
                  mbol_err=None if errs is None else errs[used], max_sigma_mag=float(me["max_sigma_mag"]),
                  subdivisions=int(me["subdivisions"]), gof_simulations=int(pop["fit"]["gof_simulations"]))

    fine = np.round(np.arange(edges[0], edges[-1] + 1e-9, 0.1), 6)
    mids = 0.5 * (fine[:-1] + fine[1:])
    at = [fit.age_gyr]
    if np.all(np.isfinite(fit.interval68_gyr)):
        at += list(fit.interval68_gyr)
    curves = fit.amplitude * model.luminosity_function(fine, np.clip(at, ages[0], ages[-1]), sfh)
    model_df = pd.DataFrame({"mbol_lo": fine[:-1], "mbol_hi": fine[1:], "mbol_mid": mids, "phi_model": curves[0]})
    if len(at) == 3:
        model_df["phi_model_low"] = curves[1]
        model_df["phi_model_high"] = curves[2]
    profile = pd.DataFrame({"age_gyr": ages, "delta_lnl": fit.profile_lnl})

    total = float(model.white_dwarf_total([fit.age_gyr], sfh)[0])
    warnings = fit_warnings(fit, (lf_summary or {}).get("v_over_vmax"), pop["warnings"])
    folded = ("The model luminosity function is folded with the stars' own M_bol errors (median "
              f"{fit.median_mbol_err:.3f} mag in the fitted range) before it is compared with the counts."
              if fit.errors_folded else
              "Measurement errors in M_bol are not folded into the model luminosity function "
              + ("(population.measurement_errors.fold is off)." if not me["fold"] else
                 "(the per-star table has no positive mbol_err)."))
    summary = fit.summary() | {
        "sfh": sfh.as_model(),
        "models": model.models() + list(cooling_link.models) + [sfh.as_model()] + _method_models(settings),
        "cooling_model": cooling_link.name,
        "imf_share_not_modelled": model.lost_fraction,
        "white_dwarf_density_pc3": fit.amplitude * total,
        "progenitor_mass_range_msun": list(model.mass_range_msun),
        "method": "Poisson likelihood of binned counts with 1/Vmax exposures, normalisation profiled, model folded "
                  "with the M_bol errors; bootstrap over stars (see cinderclock.population.agefit)",
        "warnings": warnings,
        "interval_coverage": INTERVAL_COVERAGE,
        "cautions": [
            "The age is that of the model: it moves with the cooling model's calibration, the IFMR and the "
            "progenitor lifetimes; Mestel-law ages are indicative only.",
            folded,
            "Single-star evolution only; white dwarfs from progenitors outside the IFMR's calibrated range "
            "are left out of the model.",
        ] + _interval_caution(fit),
    }
    return summary, model_df, profile


#: What the interval-coverage benchmark found (benchmarks/bench_population_intervals.py; README).
INTERVAL_COVERAGE = (
    "Measured on 100 simulated samples at each of 8 and 11 Gyr whose model is the fitted one "
    "(benchmarks/bench_population_intervals.py, ~16,000-19,000 stars in the fitted range): the 68 % bootstrap "
    "(percentile) interval held the true age in 72 % and 64 %, the 68 % likelihood interval in 74 % and 58 %, the "
    "95 % likelihood interval in 95 % and 94 %, the 95 % bootstrap interval in 93 % and 93 % (binomial s.e. 4.7 % "
    "and 2.2 %); bias-corrected, basic and parametric bootstrap intervals (bootstrap_intervals) did no better. "
    "Quote the 68 % bootstrap interval as 1 sigma and the 95 % likelihood interval at 95 %. Coverage on real data "
    "is lower by the model systematics (cooling, IFMR, lifetimes, star-formation history), which no interval "
    "here includes.")


def measurement_errors(stars, pop):
    """Per-star M_bol errors to fold into the model (None when folding is off or there are none)."""
    if not pop["measurement_errors"]["fold"] or "mbol_err" not in stars:
        return None
    errs = stars["mbol_err"].to_numpy(dtype=float)
    return errs if np.any(np.isfinite(errs) & (errs > 0)) else None


def _no_fit(n_stars, fit_edges, ages, edges, model, cooling_link, sfh, empty=False):
    """Result without a fit (too few stars): the workflow goes on and the report says why."""
    why = (EMPTY_TABLE[0].upper() + EMPTY_TABLE[1:] + ".") if empty else (
        f"Only {n_stars} star(s) in the fitted M_bol range (at least {MIN_STARS_FOR_FIT} needed): no "
        "population age was fitted.")
    summary = {
        "age_gyr": None, "at_grid_edge": False, "sigma_gyr": None, "interval68_gyr": [None, None],
        "interval95_gyr": [None, None], "likelihood_interval_gyr": [None, None],
        "likelihood_interval95_gyr": [None, None], "amplitude_per_pc3_per_gyr": None,
        "deviance": None, "dof": None, "goodness_of_fit": None, "warnings": [], "interval_coverage": INTERVAL_COVERAGE,
        "bootstrap_modes": 0, "bootstrap_mode_ages_gyr": [], "measurement_errors_folded": False, "n_stars_in_fit": n_stars, "fit_edges_mbol": [float(e) for e in fit_edges],
        "counts": [], "bootstrap_resamples": 0, "bootstrap_ages_gyr": [], "white_dwarf_density_pc3": None,
        "sfh": sfh.as_model(), "models": model.models() + list(cooling_link.models) + [sfh.as_model()],
        "cooling_model": cooling_link.name, "imf_share_not_modelled": model.lost_fraction,
        "progenitor_mass_range_msun": list(model.mass_range_msun), "method": "not fitted",
        "cautions": [why], "not_fitted": why,
    }
    mids = 0.5 * (edges[:-1] + edges[1:])
    model_df = pd.DataFrame({"mbol_lo": edges[:-1], "mbol_hi": edges[1:], "mbol_mid": mids,
                             "phi_model": np.full(mids.size, np.nan)})
    profile = pd.DataFrame({"age_gyr": ages, "delta_lnl": np.full(ages.size, np.nan)})
    return summary, model_df, profile


def _method_models(settings):
    """The 1/Vmax method's provenance entries (for ``cinderclock cite``)."""
    from .vmax import vmax_models

    survey = (settings.get("population") or settings).get("survey") if isinstance(settings, dict) else None
    return vmax_models(survey)


def _interval_caution(fit):
    """A caution when the bootstrap and likelihood intervals disagree by more than a factor of three."""
    b = fit.interval68_gyr[1] - fit.interval68_gyr[0]
    li = fit.likelihood_interval_gyr[1] - fit.likelihood_interval_gyr[0]
    if not (np.isfinite(b) and np.isfinite(li)) or b <= 0 or li <= 0:
        return []
    if max(b / li, li / b) > 3.0:
        return [f"The 68 % bootstrap interval ({b:.3g} Gyr wide) and the likelihood interval ({li:.3g} Gyr wide) "
                "disagree by more than a factor of three: the likelihood is irregular near its maximum (for "
                "instance a magnitude bin that just starts to fill) or the model does not describe the data "
                "(see the deviance); quote the wider interval."]
    return []
