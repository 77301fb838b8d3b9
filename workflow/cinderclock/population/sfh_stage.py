"""The star-formation-history step on whole tables: rates per lookback bin, their correlations, a summary.

:func:`sfh_stage` takes the Vmax table of the luminosity-function step (and, for the total-age
estimate, the final per-star table in the same row order), the run's cooling link, the settings
and the age fit's summary, and returns the rate table, the correlation table and a JSON summary.
The method is described in :mod:`cinderclock.population.sfh_fit`.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..errors import ConfigError
from ..tableio import Column

RATE_UNIT = "pc-3 Gyr-1"
_WHAT = "progenitors (initial masses in the model's range) born per pc^3 per Gyr"

SFH_COLUMNS = {
    "method": Column("", "Estimate: luminosity_function (Bayesian fit of the binned counts) or total_ages "
                         "(per-star total ages, bootstrap)", "meta.code"),
    "bin": Column("", "Index of the lookback-time bin", "meta.number"),
    "lookback_lo_gyr": Column("Gyr", "Start of the lookback-time bin (time before present)", "time.age;stat.min"),
    "lookback_hi_gyr": Column("Gyr", "End of the lookback-time bin", "time.age;stat.max"),
    "lookback_mid_gyr": Column("Gyr", "Centre of the lookback-time bin", "time.age"),
    "rate_mean": Column(RATE_UNIT, f"Posterior (or bootstrap) mean star-formation rate: {_WHAT}", "phys.rate"),
    "rate_sd": Column(RATE_UNIT, "Standard deviation of the rate", "stat.error"),
    "rate_p16": Column(RATE_UNIT, "16th percentile of the rate", "stat.min"),
    "rate_p50": Column(RATE_UNIT, "Median of the rate", "stat.median"),
    "rate_p84": Column(RATE_UNIT, "84th percentile of the rate", "stat.max"),
    "rate_best": Column(RATE_UNIT, "Maximum-posterior rate (luminosity_function) or the direct estimate "
                                   "(total_ages)", "phys.rate"),
}
CORRELATION_COLUMNS = {
    "method": SFH_COLUMNS["method"],
    "bin_i": Column("", "Index of the first lookback bin", "meta.number"),
    "bin_j": Column("", "Index of the second lookback bin", "meta.number"),
    "correlation": Column("", "Correlation coefficient of the rates of bins i and j", "stat.correlation"),
}


def lookback_edges(sfh_inf):
    """Lookback-time edges (Gyr) from ``population.sfh_inference``, checked."""
    e = np.asarray(sfh_inf["lookback_edges_gyr"], dtype=float)
    if e.size < 2 or np.any(np.diff(e) <= 0):
        raise ConfigError("population.sfh_inference.lookback_edges_gyr: need at least two ascending edges "
                          f"(got {e.tolist()})")
    return e


def _tables(fits):
    rows, corr = [], []
    for f in fits:
        e = f.edges_gyr
        for b in range(e.size - 1):
            rows.append({"method": f.method, "bin": b, "lookback_lo_gyr": e[b], "lookback_hi_gyr": e[b + 1],
                         "lookback_mid_gyr": 0.5 * (e[b] + e[b + 1]), "rate_mean": f.mean[b], "rate_sd": f.sd[b],
                         "rate_p16": f.p16[b], "rate_p50": f.p50[b], "rate_p84": f.p84[b], "rate_best": f.best[b]})
            for c in range(e.size - 1):
                corr.append({"method": f.method, "bin_i": b, "bin_j": c, "correlation": f.correlation[b, c]})
    sfh = pd.DataFrame(rows, columns=list(SFH_COLUMNS)).astype({"bin": "int64"})
    cor = pd.DataFrame(corr, columns=list(CORRELATION_COLUMNS)).astype({"bin_i": "int64", "bin_j": "int64"})
    return sfh, cor


def sfh_stage(stars, cooling_link, settings, age_fit=None, final=None):
    """Star-formation history of the sample.

    Parameters
    ----------
    stars : pandas.DataFrame
        The Vmax table (:data:`cinderclock.population.stages.STAR_COLUMNS`).
    cooling_link : CoolingLink
    settings : dict
        ``{"population": ..., "progenitor": ...}``.
    age_fit : dict, optional
        Summary of the age fit (the constant-rate comparison uses its age).
    final : pandas.DataFrame, optional
        Final per-star table in the row order of ``stars`` (``total_age_gyr`` and its Monte Carlo
        percentiles), for ``population.sfh_inference.from_total_ages``.

    Returns
    -------
    sfh : pandas.DataFrame
        :data:`SFH_COLUMNS`, one row per method and bin.
    correlation : pandas.DataFrame
        :data:`CORRELATION_COLUMNS`.
    summary : dict
    """
    from .agefit import bin_sample
    from .diagnostics import warning
    from .lf import edges_from_settings
    from .model import model_from_settings
    from .sfh_fit import basis_lf, constant_rate_fit, fit_sfh_lf, fit_sfh_total_ages
    from .stages import EMPTY_TABLE, MIN_STARS_FOR_FIT, measurement_errors

    pop = settings["population"]
    inf = pop["sfh_inference"]
    e_gyr = lookback_edges(inf)
    edges = edges_from_settings(pop["mbol_bins"])
    if inf["mbol_range"] is not None:
        lo, hi = (float(v) for v in inf["mbol_range"])
        edges = edges[(edges >= lo - 1e-9) & (edges <= hi + 1e-9)]
        if edges.size < 3:
            raise ConfigError(f"population.sfh_inference.mbol_range: [{lo}, {hi}] covers fewer than two bins")
    model = model_from_settings(pop, cooling_link, settings.get("progenitor"))
    used = stars["lf_status"].to_numpy() == 0
    mbol = stars["mbol"].to_numpy(dtype=float)[used]
    inv = 1.0 / stars["vmax_pc3"].to_numpy(dtype=float)[used]
    in_range = int(np.sum((mbol >= edges[0]) & (mbol < edges[-1])))
    base = {"lookback_edges_gyr": e_gyr.tolist(), "fit_edges_mbol": edges.tolist(), "stars_in_fit": in_range,
            "rate_unit": RATE_UNIT, "rate_meaning": _WHAT, "models": model.models() + list(cooling_link.models),
            "cautions": [
                "The history is that of the model (cooling, IFMR, lifetimes, IMF) and of the smoothness prior "
                "(population.sfh_inference.smoothing_dex): bins the luminosity function barely constrains "
                "follow their neighbours, as their correlations show.",
                "Exposures (1/Vmax volumes) are taken as known; a distance cut on noisy parallaxes (errors above "
                "~10 % at the cut) biases the youngest bins, whose white dwarfs are bright and seen to the cut.",
            ], "warnings": []}
    if in_range < MIN_STARS_FOR_FIT:
        why = EMPTY_TABLE if len(stars) == 0 else (f"only {in_range} star(s) in the M_bol range of the history "
                                                   f"(at least {MIN_STARS_FOR_FIT} needed): no history was fitted")
        sfh, cor = _tables([])
        return sfh, cor, base | {"fitted": False, "not_fitted": why, "methods": []}

    errs = measurement_errors(stars, pop)
    me = pop["measurement_errors"]
    data = bin_sample(mbol, inv, edges, None if errs is None else errs[used], float(me["max_sigma_mag"]),
                      int(me["subdivisions"]))
    basis = data.model(basis_lf(model, e_gyr), None)
    fit = fit_sfh_lf(data.counts, data.exposure, basis, e_gyr, float(inf["smoothing_dex"]), int(inf["draws"]),
                     int(inf["seed"]))
    fits = [fit]
    summary = base | {"fitted": True, "methods": ["luminosity_function"], "measurement_errors_folded": data.folded,
                      "luminosity_function": fit.summary()}
    mc = fit.extra["sampling"]
    if not mc["passed"]:
        summary["warnings"].append(warning("sfh_poor_sampling", f"Largest split R-hat {mc['rhat_max']:.3f} (threshold "
                                                                f"{mc['rhat_threshold']}), smallest bulk / tail "
                                                                f"effective sample size {mc['ess_bulk_min']:.0f} / "
                                                                f"{mc['ess_tail_min']:.0f} (threshold "
                                                                f"{mc['ess_threshold']:.0f}) over {mc['chains']} chains "
                                                                f"and {fit.draws} draws: raise "
                                                                "population.sfh_inference.draws."))
    t = (age_fit or {}).get("age_gyr")
    if t is not None:
        const = data.model(lambda e, a: model.luminosity_function(e, a), np.array([float(t)]))[0]
        summary["constant_rate"] = {"age_gyr": float(t), "rate": constant_rate_fit(data.counts, data.exposure, const),
                                    "note": "constant rate from now back to the fitted population age, normalisation "
                                            "fitted to the same counts"}
    if inf["from_total_ages"]:
        if final is None or "total_age_gyr" not in final:
            summary["cautions"].append("population.sfh_inference.from_total_ages is set but the per-star table has no "
                                       "total_age_gyr: no total-age estimate.")
        else:
            tot = final["total_age_gyr"].to_numpy(dtype=float)[used]
            if "total_age_gyr_p16" in final and "total_age_gyr_p84" in final:
                half = 0.5 * (final["total_age_gyr_p84"].to_numpy(dtype=float)
                              - final["total_age_gyr_p16"].to_numpy(dtype=float))[used]
            else:
                half = np.zeros(tot.size)
            sel = (mbol >= edges[0]) & (mbol < edges[-1])
            dens = np.diff(model.bin_counts(edges, e_gyr), axis=0)       # white dwarfs per unit rate per bin
            tf = fit_sfh_total_ages(tot[sel], half[sel], inv[sel], dens.sum(axis=1), e_gyr,
                                    int(pop["bootstrap"]["resamples"]), int(inf["seed"]))
            fits.append(tf)
            summary["methods"].append("total_ages")
            summary["total_ages"] = tf.summary()
    sfh, cor = _tables(fits)
    return sfh, cor, summary
