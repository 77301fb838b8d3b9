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
    A Gaussian kernel density of the bootstrap ages with the normal-reference bandwidth
    1.06 sd n^(-1/5) (Silverman 1986, Density Estimation, eq. 3.28, as quoted by several secondary
    sources; his robust variant 0.9 min(sd, IQR/1.34) n^(-1/5) is eq. 3.31; it oversmooths
    multimodal data, so it errs towards one mode: the bootstrap ages of a binned fit cluster on a
    scale of a tenth of a Gyr, which is not what this warning is about); a mode counts if its
    height is at least :data:`MODE_MIN_HEIGHT` of the highest and the density between it and its
    neighbour dips below :data:`MODE_MAX_DIP` of the lower of the two (our thresholds).
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
    "multimodal_bootstrap": "The bootstrap ages have more than one mode: the interval is not a single range of "
                            "plausible ages.",
    "age_at_grid_edge": "The best-fit age lies at the edge of the age grid (population.fit.age_grid).",
    "sfh_poor_sampling": "The importance sampling of the star-formation-history posterior has a small effective "
                         "sample size: its uncertainties are rough.",
}
#: A secondary mode must reach this fraction of the highest mode's density.
MODE_MIN_HEIGHT = 0.25
#: ... and the density between two modes must dip below this fraction of the lower one.
MODE_MAX_DIP = 0.6


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


def simulated_deviances(mu, expo, model, floor, n_sim, rng):
    """Deviances of Poisson counts drawn from ``mu`` and refitted over the model grid.

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

    Returns
    -------
    (n_sim,) ndarray
    """
    from .agefit import floored, profile_loglike

    if n_sim <= 0:
        return np.empty(0)
    sim = rng.poisson(np.broadcast_to(mu, (int(n_sim), mu.size))).astype(float)
    lnl, amp = profile_loglike(sim, np.broadcast_to(expo, sim.shape), model, floor)
    j = np.argmax(lnl, axis=1)
    m = floored(model, floor)
    mu_sim = amp[np.arange(sim.shape[0]), j][:, None] * m[j] * expo[None, :]
    return poisson_deviance(sim, mu_sim)


def goodness_of_fit(deviance, dof, simulated):
    """p-values of an observed deviance: parametric bootstrap and chi-square approximation."""
    from scipy.stats import chi2

    sim = np.asarray(simulated, dtype=float)
    p_boot = float((1 + np.sum(sim >= deviance)) / (1 + sim.size)) if sim.size else float("nan")
    p_chi2 = float(chi2.sf(deviance, dof)) if dof > 0 else float("nan")
    return {"deviance": float(deviance), "dof": int(dof), "p_value": p_boot, "p_value_chi2": p_chi2,
            "simulations": int(sim.size), "deviance_per_dof": float(deviance / dof) if dof > 0 else float("nan")}


def count_modes(x):
    """Number of modes of a sample (see the module docstring) and their locations.

    Returns
    -------
    n : int
    locations : list of float
    """
    x = np.asarray(x, dtype=float)
    x = x[np.isfinite(x)]
    if x.size < 10:
        return (1 if x.size else 0), ([float(np.median(x))] if x.size else [])
    sd = float(np.std(x, ddof=1))
    if sd <= 0:
        return 1, [float(x[0])]
    h = 1.06 * sd * x.size ** -0.2
    grid = np.linspace(x.min() - 3 * h, x.max() + 3 * h, 512)
    dens = np.zeros(grid.size)
    for s in range(0, x.size, 256):                      # bounded memory for many resamples
        dens += np.exp(-0.5 * ((grid[:, None] - x[None, s:s + 256]) / h) ** 2).sum(axis=1)
    peaks = np.flatnonzero((dens[1:-1] > dens[:-2]) & (dens[1:-1] >= dens[2:])) + 1
    peaks = [p for p in peaks if dens[p] >= MODE_MIN_HEIGHT * dens.max()]
    modes = [peaks[0]] if peaks else [int(np.argmax(dens))]
    for p in peaks[1:]:
        q = modes[-1]
        dip = dens[q:p + 1].min()
        if dip < MODE_MAX_DIP * min(dens[q], dens[p]):
            modes.append(p)
        elif dens[p] > dens[q]:
            modes[-1] = p                                 # same mode: keep its higher summit
    return len(modes), [float(grid[m]) for m in modes]


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
        out.append(warning("multimodal_bootstrap", f"The bootstrap ages have {fit.bootstrap_modes} modes (near {locs} "
                                                   "Gyr): quote the modes, not one interval."))
    if fit.at_grid_edge:
        out.append(warning("age_at_grid_edge", f"Best-fit age {fit.age_gyr:.3f} Gyr at the edge of the grid "
                                               f"{fit.ages_grid_gyr[0]:g}-{fit.ages_grid_gyr[-1]:g} Gyr: widen "
                                               "population.fit.age_grid."))
    return out
