"""What a referee would ask of a population fit: goodness of fit, modes of the bootstrap, named warnings.

Goodness of fit
    The Poisson deviance D = 2 sum_k [n_k ln(n_k / mu_k) - n_k + mu_k] (the likelihood-ratio
    statistic against the saturated model; it differs from the C statistic of Cash 1979, ApJ 228,
    939 (reference checked against its ADS record 1979ApJ...228..939C) only by a term of the data;
    common practice for binned counts), computed with the *same floored model* as the likelihood
    so that it is always finite. With few counts per bin D is not chi-square distributed, so its
    p-value comes from a parametric bootstrap: counts drawn from Poisson(mu) of the best fit are
    refitted (age and normalisation) and the p-value is the share of simulated deviances at least
    as large as the observed one, (1 + #{D_sim >= D}) / (1 + S). The chi-square approximation
    (D against K - 2 degrees of freedom) is reported beside it.
Modes of the bootstrap
    A two-component normal mixture is fitted to the bootstrap ages by maximum likelihood (EM) and
    the bootstrap is called bimodal only when all three hold (see :func:`count_modes`):
    the components are separated by Ashman's D = |m1 - m2| / sqrt((s1^2 + s2^2) / 2) > 2
    (Ashman, Bird & Zepf 1994, AJ 108, 2348: D > 2 is needed for a clean separation of two
    normals), the smaller component holds at least :data:`MODE_MIN_WEIGHT` of the resamples, and
    the mixture is preferred over a single normal by Delta BIC > :data:`MODE_MIN_DELTA_BIC` (10 is
    "very strong" on the scale of Kass & Raftery 1995, JASA 90, 773; from memory), and the two means
    differ by more than :data:`MODE_MIN_SEPARATION` of their mean (our threshold: the bootstrap ages
    of a binned fit form clusters a few per cent apart as a faint bin gains or loses a star, a real
    but irrelevant structure, smaller than the cooling model's systematic uncertainty; an interval
    spanning both clusters then describes them honestly). Each component's
    sd is floored at :data:`MODE_SD_FLOOR` of the sample's sd so that a component cannot collapse
    on one cluster of the discreteness of a binned fit (the bootstrap ages of a binned fit cluster
    on a scale of a tenth of a Gyr as a faint bin gains or loses a star, which is not what this
    warning is about; a kernel-density mode count of the earlier versions fired on most samples
    for that reason). Its false-alarm rate on unimodal samples is measured by
    ``benchmarks/bench_population_intervals.py`` (README).
Warnings
    Each has a stable code (:data:`WARNINGS`), a message with the numbers, and appears in
    ``age_fit.json``, the run summary and the report.
"""

from __future__ import annotations

import numpy as np

#: Warning codes and what they mean (stable names: never reuse or rename one).
WARNINGS = {
    "poor_fit": "The model does not describe the binned luminosity function (goodness-of-fit p-value below "
                "population.warnings.min_fit_p_value).",
    "v_over_vmax_offset": "<V/Vmax> deviates from 0.5 by more than population.warnings.max_v_over_vmax_sigma "
                          "standard errors: the survey limits (Vmax) or the completeness are in doubt.",
    "multimodal_bootstrap": "The bootstrap ages split into two well separated groups (two-component normal "
                            "mixture with Ashman's D > 2, the smaller group at least 10 % of the resamples, "
                            "Delta BIC > 10, means more than 5 % apart): the interval is not a single range of plausible ages.",
    "age_at_grid_edge": "The best-fit age lies at the edge of the age grid (population.fit.age_grid).",
    "sfh_poor_sampling": "The Markov chains of the star-formation-history posterior failed their convergence "
                         "diagnostics (split R-hat above 1.01 or bulk effective sample size below 400 in some "
                         "bin): its uncertainties are rough.",
}
#: Ashman's D above which two mixture components count as separate modes (Ashman et al. 1994).
MODE_MIN_ASHMAN_D = 2.0
#: The smaller component must hold at least this share of the resamples (our threshold).
MODE_MIN_WEIGHT = 0.1
#: BIC(one normal) - BIC(two normals) must exceed this (Kass & Raftery 1995: "very strong").
MODE_MIN_DELTA_BIC = 10.0
#: The two means must differ by more than this fraction of their mean (our threshold).
MODE_MIN_SEPARATION = 0.05
#: Floor of a component's sd, as a fraction of the sample's sd (our choice; see the module docstring).
MODE_SD_FLOOR = 0.25
#: EM iterations of the mixture fit.
_EM_STEPS = 200


def warning(code, message):
    """A warning entry ``{"code", "meaning", "message"}``."""
    return {"code": code, "meaning": WARNINGS[code], "message": message}


def poisson_deviance(counts, mu):
    """Poisson deviance 2 sum [n ln(n / mu) - n + mu] along the last axis (mu > 0)."""
    n = np.asarray(counts, dtype=float)
    mu = np.asarray(mu, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(n > 0, n * np.log(n / mu), 0.0) - n + mu
    return 2.0 * np.sum(t, axis=-1)


def simulated_deviances(mu, expo, model, floor, n_sim, rng, ages=None):
    """Deviances of Poisson counts drawn from ``mu`` and refitted over the model grid (and, given the
    grid's ``ages``, the refitted ages: the parametric bootstrap).

    Parameters
    ----------
    mu : (K,) ndarray
        Expected counts of the best fit.
    expo : (K,) ndarray
        Exposures.
    model : (T, K) ndarray
        Model grid (the floor is applied as in the likelihood).
    floor : float
    n_sim : int
    rng : numpy.random.Generator

    ages : (T,) ndarray, optional
        Ages of the grid's rows.

    Returns
    -------
    (n_sim,) ndarray, or a pair of them (deviances, ages) when ``ages`` is given
    """
    from .agefit import floored, profile_loglike, refine_maximum

    if n_sim <= 0:
        return np.empty(0) if ages is None else (np.empty(0), np.empty(0))
    sim = rng.poisson(np.broadcast_to(mu, (int(n_sim), mu.size))).astype(float)
    lnl, amp = profile_loglike(sim, np.broadcast_to(expo, sim.shape), model, floor)
    j = np.argmax(lnl, axis=1)
    m = floored(model, floor)
    mu_sim = amp[np.arange(sim.shape[0]), j][:, None] * m[j] * expo[None, :]
    dev = poisson_deviance(sim, mu_sim)
    return dev if ages is None else (dev, refine_maximum(np.asarray(ages, dtype=float), lnl)[0])


def goodness_of_fit(deviance, dof, simulated):
    """p-values of an observed deviance: parametric bootstrap and chi-square approximation."""
    from scipy.stats import chi2

    sim = np.asarray(simulated, dtype=float)
    p_boot = float((1 + np.sum(sim >= deviance)) / (1 + sim.size)) if sim.size else float("nan")
    p_chi2 = float(chi2.sf(deviance, dof)) if dof > 0 else float("nan")
    return {"deviance": float(deviance), "dof": int(dof), "p_value": p_boot, "p_value_chi2": p_chi2,
            "simulations": int(sim.size), "deviance_per_dof": float(deviance / dof) if dof > 0 else float("nan")}


def _mixture2(x, floor_sd):
    """Two-component normal mixture of ``x`` by EM from three starts; (ln L, weights, means, sds)."""
    best = None
    q = np.percentile(x, [[25, 75], [10, 60], [40, 90]])
    for m in q:
        w, s = np.array([0.5, 0.5]), np.full(2, max(np.std(x) / 2, floor_sd))
        m = m.astype(float)
        for _ in range(_EM_STEPS):
            lp = np.log(w) - np.log(s) - 0.5 * ((x[:, None] - m) / s) ** 2       # (N, 2), up to a constant
            top = lp.max(axis=1, keepdims=True)
            lse = top[:, 0] + np.log(np.exp(lp - top).sum(axis=1))
            g = np.exp(lp - lse[:, None])
            nk = np.maximum(g.sum(axis=0), 1e-12)
            w = np.clip(nk / x.size, 1e-9, 1.0)
            m = (g * x[:, None]).sum(axis=0) / nk
            s = np.maximum(np.sqrt((g * (x[:, None] - m) ** 2).sum(axis=0) / nk), floor_sd)
        lnl = float(lse.sum() - 0.5 * x.size * np.log(2 * np.pi))
        if best is None or lnl > best[0]:
            best = (lnl, w, m, s)
    return best


def count_modes(x):
    """Whether a sample is bimodal by the mixture criterion of the module docstring.

    Parameters
    ----------
    x : array_like
        Bootstrap ages (Gyr).

    Returns
    -------
    n : int
        2 when bimodal, else 1 (0 for an empty sample).
    locations : list of float
        The component means (bimodal) or the median.
    stats : dict
        ``ashman_d``, ``minor_weight``, ``delta_bic``, ``relative_separation`` of the two-component fit
        (NaN when not fitted).
    """
    x = np.asarray(x, dtype=float)
    x = x[np.isfinite(x)]
    nan = {"ashman_d": float("nan"), "minor_weight": float("nan"), "delta_bic": float("nan"),
           "relative_separation": float("nan")}
    if x.size == 0:
        return 0, [], nan
    sd = float(np.std(x))
    if x.size < 10 or sd <= 0:
        return 1, [float(np.median(x))], nan
    lnl1 = float(-0.5 * x.size * (np.log(2 * np.pi * sd**2) + 1.0))
    lnl2, w, m, s = _mixture2(x, MODE_SD_FLOOR * sd)
    stats = {"ashman_d": float(abs(m[0] - m[1]) / np.sqrt(0.5 * (s[0] ** 2 + s[1] ** 2))),
             "minor_weight": float(w.min()),
             "delta_bic": float(2 * (lnl2 - lnl1) - 3 * np.log(x.size)),
             "relative_separation": float(abs(m[0] - m[1]) / max(abs(0.5 * (m[0] + m[1])), 1e-300))}
    if (stats["ashman_d"] > MODE_MIN_ASHMAN_D and stats["minor_weight"] >= MODE_MIN_WEIGHT
            and stats["delta_bic"] > MODE_MIN_DELTA_BIC and stats["relative_separation"] > MODE_MIN_SEPARATION):
        return 2, [float(v) for v in np.sort(m)], stats
    return 1, [float(np.median(x))], stats


def fit_warnings(fit, v_over_vmax=None, thresholds=None):
    """Named warnings of an age fit.

    Parameters
    ----------
    fit : AgeFit
    v_over_vmax : dict, optional
        ``{"mean", "sigma", "z", "n"}`` from the luminosity-function step.
    thresholds : dict, optional
        ``population.warnings`` settings (``min_fit_p_value``, ``max_v_over_vmax_sigma``).

    Returns
    -------
    list of dict
    """
    t = {"min_fit_p_value": 0.01, "max_v_over_vmax_sigma": 3.0} | dict(thresholds or {})
    out = []
    g = fit.goodness
    if np.isfinite(g["p_value"]) and g["p_value"] < t["min_fit_p_value"]:
        out.append(warning("poor_fit", f"Poisson deviance {g['deviance']:.1f} for {g['dof']} degrees of freedom, "
                                       f"p = {g['p_value']:.3g} from {g['simulations']} simulated samples "
                                       f"(chi-square approximation p = {g['p_value_chi2']:.3g}): the model misses "
                                       "the shape of the luminosity function, and the age and its interval are "
                                       "those of a model that does not fit."))
    z = (v_over_vmax or {}).get("z")
    if z is not None and np.isfinite(z) and abs(z) > t["max_v_over_vmax_sigma"]:
        out.append(warning("v_over_vmax_offset", f"<V/Vmax> = {v_over_vmax['mean']:.4f} over {v_over_vmax['n']} "
                                                 f"stars is {z:+.1f} sigma from 0.5 (sigma = "
                                                 f"{v_over_vmax['sigma']:.4f}); "
                                                 + ("a deficit: Vmax is overestimated (a limit beyond where the "
                                                    "sample is complete)." if z < 0 else
                                                    "an excess: stars crowd towards the survey limits "
                                                    "(a limit set too tight, or a density gradient).")))
    if fit.bootstrap_modes > 1:
        locs = ", ".join(f"{v:.2f}" for v in fit.bootstrap_mode_ages_gyr)
        st = fit.bootstrap_mode_stats
        out.append(warning("multimodal_bootstrap", f"The bootstrap ages split into two groups near {locs} Gyr "
                                                   f"(Ashman's D = {st['ashman_d']:.1f}, smaller group "
                                                   f"{st['minor_weight']:.0%} of the resamples, Delta BIC = "
                                                   f"{st['delta_bic']:.0f}, {st['relative_separation']:.0%} "
                                                   "apart): quote the groups, not one interval."))
    if fit.at_grid_edge:
        out.append(warning("age_at_grid_edge", f"Best-fit age {fit.age_gyr:.3f} Gyr at the edge of the grid "
                                               f"{fit.ages_grid_gyr[0]:g}-{fit.ages_grid_gyr[-1]:g} Gyr: widen "
                                               "population.fit.age_grid."))
    return out
