"""Population age from the faint end of the luminosity function: maximum likelihood and bootstrap.

Likelihood (our choice among the usual ones): a Poisson likelihood of the *raw* star counts n_k
in the M_bol bins of the fitted range, with each bin's exposure taken from the 1/Vmax weights.
In bin k the 1/Vmax estimate is Phi_k = n_k / (V_k dM_k) with V_k = n_k / sum(1/Vmax) the
harmonic-mean maximum volume of its stars, so a model luminosity function A m_k(T) (pc^-3
mag^-1) predicts

    mu_k(T, A) = A m_k(T) e_k,     e_k = V_k dM_k,

and ln L = sum_k [n_k ln mu_k - mu_k]. The normalisation A is profiled out analytically
(A = sum n_k / sum m_k e_k), leaving a one-parameter profile ln L(T) evaluated on a grid of ages
and refined by a parabola through the three best nodes. A bin with no stars still counts (its
predicted number should be small): its exposure is interpolated in log V from the neighbouring
bins, or beyond the faintest occupied bin continued with the slope of the last two occupied bins
(clipped to [-1, 0] dex per mag: a magnitude-limited volume shrinks as 10^(-0.6 M), a volume
limit keeps it flat). The model is floored at ``floor`` times its peak so that one stray star
beyond a young model's cut-off costs ln(floor) instead of minus infinity (a tolerance for
contaminants and measurement scatter; our choice).

Measurement errors: with the stars' M_bol errors the model is folded with their distribution
before it is compared with the counts (:mod:`cinderclock.population.smear`); without them it is
compared as it is.

Uncertainty, three intervals:

* the bootstrap over the stars (counts and exposures recomputed, the fit repeated) with a
  configurable number of resamples and seed; the percentiles 16-84 and 2.5-97.5 of the bootstrap
  ages are the 68 % and 95 % *bootstrap* intervals;
* the profile-likelihood intervals, ln L within 0.5 (68 %) and 1.92 (95 %) of its maximum
  (Wilks' theorem; exact only for a regular likelihood, which the luminosity function's cut-off
  is not);
* their calibration on simulated samples is measured by ``benchmarks/bench_population_intervals.py``
  (see the README for the figures and which interval to quote).

Goodness of fit (deviance with the same floor, parametric-bootstrap p-value) and the modes of the
bootstrap distribution: :mod:`cinderclock.population.diagnostics`.

Cautions: the fitted age is that of the *model*: it moves with the cooling model's calibration
(Mestel ages are indicative only), the IFMR and the lifetimes; an age at the edge of the grid is
flagged.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .lf import bin_index, bootstrap_bin_sums

#: Slope limits of log10 exposure per magnitude used to continue it into empty faint bins.
EXPOSURE_SLOPE_RANGE = (-1.0, 0.0)
#: Default floor of the model, relative to its peak, in the likelihood.
DEFAULT_FLOOR = 1e-6


def exposures(counts, sums, widths, centres):
    """Exposure e_k = V_k dM_k (pc^3 mag) per bin, filled in for empty bins.

    Parameters
    ----------
    counts, sums : (..., K) ndarray
        Stars per bin and sum of 1/Vmax per bin (pc^-3); leading axes are independent samples.
    widths, centres : (K,) ndarray
        Bin widths and centres (mag).
    """
    counts = np.atleast_2d(np.asarray(counts, dtype=float))
    sums = np.atleast_2d(np.asarray(sums, dtype=float))
    out = np.full(counts.shape, np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        logv = np.where(counts > 0, np.log10(counts / sums), np.nan)
    for r in range(counts.shape[0]):
        row = logv[r]
        ok = np.isfinite(row)
        if not ok.any():
            continue
        x, y = centres[ok], row[ok]
        filled = np.interp(centres, x, y)                      # flat beyond either end
        if x.size >= 2:
            slope = np.clip((y[-1] - y[-2]) / (x[-1] - x[-2]), *EXPOSURE_SLOPE_RANGE)
            faint = centres > x[-1]
            filled = np.where(faint, y[-1] + slope * (centres - x[-1]), filled)
        out[r] = 10.0 ** filled * widths
    return out


def floored(model, floor=DEFAULT_FLOOR):
    """The model with every value raised to at least ``floor`` times its row's peak (and above zero)."""
    model = np.asarray(model, dtype=float)
    m = np.maximum(model, floor * np.max(model, axis=1, keepdims=True))
    return np.where(m > 0, m, np.finfo(float).tiny)


def profile_loglike(counts, expo, model, floor=DEFAULT_FLOOR):
    """Profile Poisson log-likelihood over a grid of models.

    Parameters
    ----------
    counts, expo : (B, K) ndarray
        Observed counts and exposures (B samples).
    model : (T, K) ndarray
        Model luminosity function (any units) per age.
    floor : float
        Model floor relative to each model's peak.

    Returns
    -------
    lnl : (B, T) ndarray
        ln L up to a constant independent of the model.
    amp : (B, T) ndarray
        Maximum-likelihood normalisation A (model units -> pc^-3 mag^-1).
    """
    m = floored(model, floor)
    n = np.atleast_2d(counts)
    e = np.atleast_2d(expo)
    pred = e @ m.T                                             # (B, T): sum_k m_k e_k
    ntot = n.sum(axis=1, keepdims=True)
    with np.errstate(divide="ignore"):
        lnl = n @ np.log(m).T + (n * np.log(np.where(e > 0, e, 1.0))).sum(axis=1, keepdims=True) \
            - ntot * np.log(pred) + ntot * np.log(np.maximum(ntot, 1)) - ntot
        amp = ntot / pred
    return lnl, amp


def refine_maximum(ages, lnl):
    """Age of the maximum of ``lnl`` on the grid, refined by a parabola; and whether it is at an edge.

    Parameters
    ----------
    ages : (T,) ndarray
    lnl : (B, T) ndarray

    Returns
    -------
    best : (B,) ndarray
    at_edge : (B,) ndarray of bool
    """
    lnl = np.atleast_2d(lnl)
    j = np.argmax(lnl, axis=1)
    at_edge = (j == 0) | (j == ages.size - 1)
    jc = np.clip(j, 1, ages.size - 2)
    rows = np.arange(lnl.shape[0])
    y0, y1, y2 = lnl[rows, jc - 1], lnl[rows, jc], lnl[rows, jc + 1]
    h = ages[jc + 1] - ages[jc]
    denom = y0 - 2 * y1 + y2
    with np.errstate(divide="ignore", invalid="ignore"):
        shift = np.where(denom < 0, 0.5 * h * (y0 - y2) / denom, 0.0)
    best = np.where(at_edge, ages[j], ages[jc] + np.clip(shift, -h, h))
    return best, at_edge


def likelihood_interval(ages, lnl, delta=0.5):
    """Ages where the profile ln L lies within ``delta`` of its maximum (grid, linear interpolation)."""
    lnl = np.asarray(lnl, dtype=float)
    top = np.max(lnl)
    inside = lnl >= top - delta
    j = np.flatnonzero(inside)
    lo_j, hi_j = j[0], j[-1]

    def cross(a, b):
        ya, yb = lnl[a] - (top - delta), lnl[b] - (top - delta)
        return ages[a] + (ages[b] - ages[a]) * ya / (ya - yb) if ya != yb else ages[a]

    lo = ages[0] if lo_j == 0 else cross(lo_j, lo_j - 1)
    hi = ages[-1] if hi_j == ages.size - 1 else cross(hi_j, hi_j + 1)
    return float(lo), float(hi)


#: The bootstrap interval reported as ``interval68_gyr`` / ``interval95_gyr`` (one of
#: :data:`BOOTSTRAP_INTERVALS`; chosen by the coverage benchmark, see the README).
REPORTED_INTERVAL = "percentile"
#: Bootstrap intervals computed (all are in ``age_fit.json``, ``bootstrap_intervals``).
BOOTSTRAP_INTERVALS = ("percentile", "bias_corrected", "basic", "parametric")


def bootstrap_intervals(boot, estimate, parametric=None):
    """68 % and 95 % bootstrap intervals of an estimate by four standard constructions.

    * ``percentile``: the 16-84 (2.5-97.5) percentiles of the bootstrap estimates (Efron &
      Tibshirani 1993, An Introduction to the Bootstrap, ch. 13);
    * ``bias_corrected``: the percentiles Phi(2 z0 +- z) with z0 = Phi^-1(share of the bootstrap
      estimates below the estimate, ties counted half) (ibid. ch. 14, the BCa interval with zero
      acceleration);
    * ``basic``: (2 T - q_hi, 2 T - q_lo), the percentiles reflected about the estimate T (Davison &
      Hinkley 1997, Bootstrap Methods, eq. 5.6; from memory);
    * ``parametric``: percentiles of the ages refitted to Poisson counts drawn from the best-fit
      model (exposures held fixed), the goodness-of-fit simulations.

    Parameters
    ----------
    boot : (B,) ndarray
        Bootstrap estimates (Gyr).
    estimate : float
    parametric : (S,) ndarray, optional
        Estimates from the parametric bootstrap.

    Returns
    -------
    dict
        ``{method: ((lo68, hi68), (lo95, hi95))}`` (NaN where fewer than two estimates).
    """
    from scipy.special import ndtr, ndtri

    nan2 = ((float("nan"),) * 2,) * 2
    out = dict.fromkeys(BOOTSTRAP_INTERVALS, nan2)
    z = {68: 0.994457883, 95: 1.959963985}                           # Phi^-1(0.84), Phi^-1(0.975)

    def pct(x, ps):
        return tuple(float(v) for v in np.percentile(x, ps))

    boot = np.asarray(boot, dtype=float)
    if boot.size >= 2:
        out["percentile"] = (pct(boot, [16, 84]), pct(boot, [2.5, 97.5]))
        share = (np.sum(boot < estimate) + 0.5 * np.sum(boot == estimate)) / boot.size
        z0 = float(ndtri(np.clip(share, 0.5 / boot.size, 1 - 0.5 / boot.size)))
        out["bias_corrected"] = tuple(pct(boot, 100 * ndtr(2 * z0 + np.array([-z[c], z[c]]))) for c in (68, 95))
        out["basic"] = tuple((2 * estimate - hi, 2 * estimate - lo) for lo, hi in out["percentile"])
    par = np.asarray(parametric if parametric is not None else [], dtype=float)
    if par.size >= 2:
        out["parametric"] = (pct(par, [16, 84]), pct(par, [2.5, 97.5]))
    return out


#: Delta ln L of the 95 % profile-likelihood interval (chi-square, one parameter: 3.841 / 2).
DELTA_LNL_95 = 1.920729


@dataclass
class AgeFit:
    """Result of :func:`fit_age` (ages in Gyr)."""

    age_gyr: float
    at_grid_edge: bool
    amplitude: float
    interval68_gyr: tuple
    interval95_gyr: tuple
    sigma_gyr: float
    likelihood_interval_gyr: tuple
    likelihood_interval95_gyr: tuple
    bootstrap_ages_gyr: np.ndarray
    ages_grid_gyr: np.ndarray
    profile_lnl: np.ndarray
    counts: np.ndarray
    exposure: np.ndarray
    expected: np.ndarray
    edges: np.ndarray
    goodness: dict
    bootstrap_modes: int
    bootstrap_mode_ages_gyr: list
    bootstrap_mode_stats: dict
    bootstrap_intervals: dict
    errors_folded: bool
    median_mbol_err: float
    n_stars: int
    effective_model: np.ndarray = field(repr=False, default=None)

    @property
    def deviance(self):
        return self.goodness["deviance"]

    @property
    def dof(self):
        return self.goodness["dof"]

    def summary(self):
        """JSON-ready dictionary (without the large arrays except the bootstrap ages)."""
        return {
            "age_gyr": self.age_gyr, "at_grid_edge": self.at_grid_edge, "sigma_gyr": self.sigma_gyr,
            "interval68_gyr": list(self.interval68_gyr), "interval95_gyr": list(self.interval95_gyr),
            "likelihood_interval_gyr": list(self.likelihood_interval_gyr),
            "likelihood_interval95_gyr": list(self.likelihood_interval95_gyr),
            "amplitude_per_pc3_per_gyr": self.amplitude, "deviance": self.deviance, "dof": self.dof,
            "goodness_of_fit": dict(self.goodness),
            "n_stars_in_fit": self.n_stars, "fit_edges_mbol": [float(e) for e in self.edges],
            "counts": [int(c) for c in self.counts], "expected_counts": [float(m) for m in self.expected],
            "bootstrap_resamples": int(self.bootstrap_ages_gyr.size),
            "bootstrap_ages_gyr": [round(float(a), 5) for a in self.bootstrap_ages_gyr],
            "bootstrap_modes": int(self.bootstrap_modes),
            "bootstrap_mode_ages_gyr": [float(a) for a in self.bootstrap_mode_ages_gyr],
            "bootstrap_mode_test": dict(self.bootstrap_mode_stats),
            "bootstrap_interval_method": REPORTED_INTERVAL,
            "bootstrap_intervals": {k: {"interval68_gyr": list(v[0]), "interval95_gyr": list(v[1])}
                                    for k, v in self.bootstrap_intervals.items()},
            "measurement_errors_folded": bool(self.errors_folded), "median_mbol_err_mag": self.median_mbol_err,
        }


def _bin_sums(mbol, weights, edges):
    k = bin_index(mbol, edges)
    ok = k >= 0
    nb = edges.size - 1
    return np.bincount(k[ok], minlength=nb).astype(float), np.bincount(k[ok], weights=weights[ok], minlength=nb)


@dataclass
class BinnedSample:
    """Counts and exposures of a sample in the fitted bins, and the fold of its M_bol errors.

    Built by :func:`bin_sample`; :meth:`model` turns a model callable into the (folded) grid the
    likelihood compares with the counts.
    """

    mbol: np.ndarray
    inv_vmax: np.ndarray
    edges: np.ndarray
    counts: np.ndarray
    exposure: np.ndarray
    fold: object = None
    volume: np.ndarray = None

    @property
    def folded(self):
        return self.fold is not None

    def model(self, model, params):
        """Model grid (P, K) for parameters ``params`` from ``callable(edges, params) -> (P, len(edges) - 1)``
        (per magnitude), folded with the errors if the sample has them; an array is used as it is."""
        if not callable(model):
            if self.folded:
                raise ValueError("folding measurement errors needs the model as a callable(edges, params)")
            return np.asarray(model, dtype=float)
        if not self.folded:
            return model(self.edges, params)
        return self.fold.effective_model(model(self.fold.fine_edges, params), self.volume, self.exposure)


def bin_sample(mbol, inv_vmax, edges, mbol_err=None, max_sigma_mag=1.0, subdivisions=5):
    """:class:`BinnedSample` of the usable stars (finite M_bol and 1/Vmax); with ``mbol_err`` (mag)
    the errors are folded in (:mod:`cinderclock.population.smear`) unless none is positive."""
    edges = np.asarray(edges, dtype=float)
    x = np.asarray(mbol, dtype=float)
    w = np.asarray(inv_vmax, dtype=float)
    valid = np.isfinite(w) & np.isfinite(x)
    x, w = x[valid], w[valid]
    counts, sums = _bin_sums(x, w, edges)
    expo = exposures(counts, sums, np.diff(edges), 0.5 * (edges[:-1] + edges[1:]))[0]
    out = BinnedSample(mbol=x, inv_vmax=w, edges=edges, counts=counts, exposure=expo)
    errs = None if mbol_err is None else np.asarray(mbol_err, dtype=float)[valid]
    if errs is not None and np.any(np.isfinite(errs) & (errs > 0)) and counts.sum() > 0:
        from .smear import build_fold, volume_per_mag, volume_points

        out.fold = build_fold(x, errs, edges, max_sigma_mag, subdivisions)
        out.volume = volume_per_mag(*volume_points(x, w, out.fold.fine_edges), out.fold.fine_edges)
    return out


def fit_age(mbol, inv_vmax, edges, ages_gyr, model, n_boot=200, seed=0, floor=DEFAULT_FLOOR, mbol_err=None,
            max_sigma_mag=1.0, subdivisions=5, gof_simulations=200):
    """Maximum-likelihood population age with bootstrap and likelihood intervals and a goodness of fit.

    Parameters
    ----------
    mbol, inv_vmax : array_like
        Absolute bolometric magnitude (mag) and 1/Vmax (pc^-3) of every usable star (stars
        outside the fitted range are allowed: they matter to the bootstrap's draw counts and to
        the volumes beyond the fitted range that the error fold uses).
    edges : (K + 1,) array_like
        Evenly spaced bin edges of the fitted range (mag).
    ages_gyr : (T,) array_like
        Grid of population ages (Gyr), ascending and evenly spaced.
    model : (T, K) ndarray or callable
        Model luminosity function per age on ``edges``, or ``callable(edges, ages) -> (T, len(edges) - 1)``
        (needed to fold in measurement errors, which evaluates it on a finer grid).
    n_boot : int
        Bootstrap resamples (0: none).
    seed : int
        Seed of the bootstrap's and the goodness-of-fit simulations' random generator.
    floor : float
        Model floor relative to its peak (see the module docstring).
    mbol_err : array_like, optional
        Standard error of each star's M_bol (mag); given, the model is folded with them.
    max_sigma_mag, subdivisions :
        Settings of the fold (:func:`cinderclock.population.smear.build_fold`).
    gof_simulations : int
        Simulated samples of the goodness-of-fit p-value (0: none).

    Returns
    -------
    AgeFit
    """
    from .diagnostics import (
        count_modes,
        goodness_of_fit,
        poisson_deviance,
        simulated_deviances,
    )

    ages = np.asarray(ages_gyr, dtype=float)
    data = bin_sample(mbol, inv_vmax, edges, mbol_err, max_sigma_mag, subdivisions)
    edges, x, w, counts = data.edges, data.mbol, data.inv_vmax, data.counts
    widths = np.diff(edges)
    centres = 0.5 * (edges[:-1] + edges[1:])
    expo = data.exposure[None, :]
    m = data.model(model, ages)
    folded = data.folded
    median_err = data.fold.median_sigma_mag if folded else float("nan")
    lnl, amp = profile_loglike(counts, expo, m, floor)
    best, edge = refine_maximum(ages, lnl)
    jbest = int(np.argmax(lnl[0]))
    a_best = float(np.interp(best[0], ages, amp[0]))
    mu = amp[0, jbest] * floored(m, floor)[jbest] * expo[0]          # the floored model of the likelihood
    deviance = float(poisson_deviance(counts, mu))
    rng = np.random.default_rng(seed)

    boot = np.empty(0)
    if n_boot > 0:
        k = bin_index(x, edges)
        ok = k >= 0
        bc, bs = bootstrap_bin_sums(k[ok], w[ok], int(x.size), edges.size - 1, int(n_boot), rng)
        bexpo = exposures(bc, bs, widths, centres)
        good = np.all(np.isfinite(bexpo), axis=1)
        blnl, _ = profile_loglike(bc[good], bexpo[good], m, floor)
        boot, _ = refine_maximum(ages, blnl)
    dof = int(counts.size - 2)
    sims, pboot = simulated_deviances(mu, expo[0], m, floor, int(gof_simulations), rng, ages=ages)
    intervals = bootstrap_intervals(boot, float(best[0]), pboot)
    i68, i95 = intervals[REPORTED_INTERVAL]
    sigma = 0.5 * (i68[1] - i68[0])
    n_modes, mode_ages, mode_stats = count_modes(boot)
    return AgeFit(age_gyr=float(best[0]), at_grid_edge=bool(edge[0]), amplitude=a_best, interval68_gyr=i68,
                  interval95_gyr=i95, sigma_gyr=float(sigma),
                  likelihood_interval_gyr=likelihood_interval(ages, lnl[0]),
                  likelihood_interval95_gyr=likelihood_interval(ages, lnl[0], DELTA_LNL_95),
                  bootstrap_ages_gyr=np.asarray(boot), ages_grid_gyr=ages, profile_lnl=lnl[0] - lnl[0].max(),
                  counts=counts, exposure=expo[0], expected=mu, edges=edges,
                  goodness=goodness_of_fit(deviance, dof, sims), bootstrap_modes=int(n_modes),
                  bootstrap_mode_ages_gyr=mode_ages, bootstrap_mode_stats=mode_stats,
                  bootstrap_intervals=intervals, errors_folded=folded, median_mbol_err=median_err,
                  n_stars=int(counts.sum()), effective_model=m)


def age_grid_from_settings(grid):
    """Evenly spaced population ages (Gyr) from ``{min_gyr, max_gyr, step_gyr}``."""
    from ..errors import ConfigError

    lo, hi, step = float(grid["min_gyr"]), float(grid["max_gyr"]), float(grid["step_gyr"])
    if not (0 < lo < hi and step > 0) or (hi - lo) / step < 3:
        raise ConfigError(f"population.fit.age_grid: need 0 < min_gyr < max_gyr and at least 3 steps (got {grid})")
    return lo + step * np.arange(int(np.floor((hi - lo) / step + 1e-9)) + 1)
