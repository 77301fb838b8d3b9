"""Star-formation history in lookback-time bins, from the luminosity function or from per-star total ages.

Luminosity function (``method = luminosity_function``)
    The rate is piecewise constant, r_b progenitors born per pc^3 per Gyr in lookback bin
    [t_b, t_b+1) (initial masses in the model's progenitor range). A population born at unit rate in
    bin b gives the model luminosity function B_b(M) = Psi_(t_b+1)(M) - Psi_(t_b)(M), the difference
    of two constant-rate models (the forward model of :mod:`cinderclock.population.model`), so the
    expected counts are mu_k = sum_b r_b B'_bk e_k with B' folded with the M_bol errors and e_k the
    1/Vmax exposures, exactly as in the age fit. The posterior of theta_b = ln r_b (which keeps the
    rates positive) is

        ln p(theta | n) = sum_k [n_k ln mu_k - mu_k] - sum_b (theta_b+1 - theta_b)^2 / (2 s^2),

    a Poisson likelihood and a random-walk smoothness prior between adjacent bins of width
    s = ``smoothing_dex`` ln 10 (flat in the overall level; our choice of regularisation). It is
    maximised by a trust-region Newton method with the exact Hessian and then sampled by
    :data:`N_CHAINS` chains of adaptive random-walk Metropolis (:mod:`cinderclock.population.mcmc`)
    started around the mode with the inverse Hessian as first proposal covariance; split R-hat and
    bulk and tail effective sample sizes of every bin are recorded. (An importance sampling of
    the Laplace approximation, used before, had 11 effective draws of 4000 on the demo run: the
    posterior of the weakly constrained old bins is far from normal in ln r.) Means, standard
    deviations, percentiles and the correlation matrix of the rates are those of the kept draws.
    The cost does not grow with the number of stars (the counts are binned).

Total ages (``method = total_ages``, on request)
    Each star with a total age spreads its 1/Vmax over the lookback bins by a normal of its
    Monte Carlo 16-84 % half-width (its central value when it has none): S_b is the space density
    of white dwarfs formed in bin b, and r_b = S_b / D_b with D_b the white dwarfs per unit rate the
    model places in the luminosity-function range from bin b. Uncertainties and correlations by a
    bootstrap over the stars. Age errors move stars between neighbouring bins (not deconvolved),
    and stars without a total age (progenitor outside the IFMR range, off the tables) are left out,
    which biases the rates low by their share (reported).

Cautions: the history is that of the model (cooling, IFMR, lifetimes, IMF) and of the prior;
lookback bins the luminosity function barely constrains follow their neighbours through the
prior (their correlations show it); exposures are taken as known (their scatter is not in the
posterior).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Markov chains of the history's posterior.
N_CHAINS = 4
#: Warm-up steps per chain.
WARMUP_STEPS = 3000
#: Steps between kept draws, per fitted bin (random-walk Metropolis needs of order d steps per independent draw).
THIN_PER_BIN = 3


@dataclass
class SFHFit:
    """Rates per lookback bin (progenitors pc^-3 Gyr^-1) with uncertainties and correlations."""

    method: str
    edges_gyr: np.ndarray
    mean: np.ndarray
    sd: np.ndarray
    p16: np.ndarray
    p50: np.ndarray
    p84: np.ndarray
    best: np.ndarray
    correlation: np.ndarray
    effective_samples: float
    draws: int
    extra: dict

    def summary(self):
        return {"method": self.method, "lookback_edges_gyr": [float(e) for e in self.edges_gyr],
                "rate_mean": self.mean.tolist(), "rate_sd": self.sd.tolist(), "rate_p16": self.p16.tolist(),
                "rate_p50": self.p50.tolist(), "rate_p84": self.p84.tolist(), "rate_best": self.best.tolist(),
                "correlation": self.correlation.tolist(), "effective_samples": float(self.effective_samples),
                "draws": int(self.draws)} | self.extra


def basis_lf(model, sfh_edges_gyr):
    """Callable ``(mbol_edges, _) -> (B, K)``: luminosity function per magnitude of each lookback bin
    at unit rate (per progenitor born per Gyr), from a :class:`~cinderclock.population.model.PopulationModel`."""
    t = np.asarray(sfh_edges_gyr, dtype=float)

    def basis(edges, _params=None):
        cum = model.luminosity_function(edges, t)          # constant rate from now back to each edge
        return np.diff(cum, axis=0)

    return basis


def _weighted_percentiles(x, w, qs):
    o = np.argsort(x, axis=0)
    xs = np.take_along_axis(x, o, axis=0)
    cw = np.cumsum(w[o], axis=0)
    cw = (cw - 0.5 * w[o]) / cw[-1:]
    return np.array([[np.interp(q / 100.0, cw[:, b], xs[:, b]) for b in range(x.shape[1])] for q in qs])


def _stats(r, w):
    """Weighted mean, sd, 16/50/84 percentiles and correlation of draws ``r`` (S, B)."""
    w = w / w.sum()
    mean = w @ r
    dev = r - mean
    cov = (dev * w[:, None]).T @ dev
    sd = np.sqrt(np.clip(np.diag(cov), 0, None))
    with np.errstate(invalid="ignore", divide="ignore"):
        corr = cov / np.outer(sd, sd)
    corr = np.where(np.isfinite(corr), corr, 0.0)
    np.fill_diagonal(corr, 1.0)
    p16, p50, p84 = _weighted_percentiles(r, w, (16, 50, 84))
    return mean, sd, p16, p50, p84, corr


def fit_sfh_lf(counts, exposure, basis, edges_gyr, smoothing_dex=0.5, n_draws=4000, seed=0):
    """Posterior of a piecewise-constant history from binned counts (see the module docstring).

    Parameters
    ----------
    counts, exposure : (K,) ndarray
        Observed counts and exposures (pc^3 mag) of the M_bol bins.
    basis : (B, K) ndarray
        Folded model per lookback bin at unit rate (per magnitude), as from
        :meth:`BinnedSample.model` with :func:`basis_lf`.
    edges_gyr : (B + 1,) ndarray
    smoothing_dex : float
        Standard deviation of log10 r between adjacent bins under the prior.
    n_draws : int
        Posterior draws kept (over all chains).
    seed : int

    Returns
    -------
    SFHFit
    """
    from scipy.optimize import minimize

    n = np.asarray(counts, dtype=float)
    g0 = np.asarray(basis, dtype=float) * np.asarray(exposure, dtype=float)[None, :]   # (B, K)
    nb = g0.shape[0]
    s2 = (float(smoothing_dex) * np.log(10.0)) ** 2
    d = np.diff(np.eye(nb), axis=0)                                                  # (B-1, B)
    prior_h = d.T @ d / s2
    use = g0.sum(axis=0) > 0                                                         # bins any model reaches
    n_off = n[~use].sum()
    n, g0 = n[use], g0[:, use]

    def neg(theta):
        r = np.exp(theta)
        mu = r @ g0
        lnl = np.sum(n * np.log(np.maximum(mu, 1e-300)) - mu)
        return -lnl + 0.5 * theta @ prior_h @ theta

    def grad(theta):
        r = np.exp(theta)
        mu = np.maximum(r @ g0, 1e-300)
        g = r[:, None] * g0
        return g @ (1.0 - n / mu) + prior_h @ theta

    def hess(theta):
        r = np.exp(theta)
        mu = np.maximum(r @ g0, 1e-300)
        g = r[:, None] * g0
        return (g * (n / mu**2)) @ g.T + np.diag(g @ (1.0 - n / mu)) + prior_h

    level = np.log(max(n.sum(), 1.0) / max(g0.sum(), 1e-300))
    res = minimize(neg, np.full(nb, level), jac=grad, hess=hess, method="trust-exact",
                   options={"gtol": 1e-8, "maxiter": 500})
    theta = res.x
    h = hess(theta)
    vals, vecs = np.linalg.eigh(0.5 * (h + h.T))
    vals = np.clip(vals, 1e-8 * max(vals.max(), 1e-12), None)
    cov = (vecs / vals) @ vecs.T
    from .mcmc import diagnostics, metropolis

    rng = np.random.default_rng(seed)
    keep = max(int(np.ceil(int(n_draws) / N_CHAINS)), 4)
    chains, acc = metropolis(lambda th: -_neg_many(th, n, g0, prior_h), theta, cov, N_CHAINS, WARMUP_STEPS, keep,
                             max(THIN_PER_BIN * nb, 1), rng)
    diag = diagnostics(chains) | {"chains": N_CHAINS, "warmup_steps": WARMUP_STEPS, "thin": max(THIN_PER_BIN * nb, 1),
                                  "acceptance": acc, "sampler": "adaptive random-walk Metropolis"}
    r = np.exp(chains.reshape(-1, nb))
    mean, sd, p16, p50, p84, corr = _stats(r, np.ones(r.shape[0]))
    r_best = np.exp(theta)
    mu = r_best @ g0
    from .diagnostics import poisson_deviance

    return SFHFit(method="luminosity_function", edges_gyr=np.asarray(edges_gyr, dtype=float), mean=mean, sd=sd,
                  p16=p16, p50=p50, p84=p84, best=r_best, correlation=corr,
                  effective_samples=diag["ess_bulk_min"], draws=int(r.shape[0]),
                  extra={"smoothing_dex": float(smoothing_dex), "converged": bool(res.success),
                         "deviance": float(poisson_deviance(n, np.maximum(mu, 1e-300))), "bins_fitted": int(n.size), "sampling": diag,
                         "stars_in_fit": int(n.sum() + n_off), "stars_where_no_model_reaches": int(n_off),
                         "expected_counts": mu.tolist(), "counts": n.tolist()})


def _neg_many(th, n, g0, prior_h):
    """Negative log posterior of many parameter vectors (S, B) at once."""
    r = np.exp(th)
    mu = np.maximum(r @ g0, 1e-300)
    lnl = (n[None, :] * np.log(mu) - mu).sum(axis=1)
    return -lnl + 0.5 * np.einsum("sb,bc,sc->s", th, prior_h, th)


def fit_sfh_total_ages(total_age_gyr, half_width_gyr, inv_vmax, density_per_rate, edges_gyr, n_boot=200, seed=0):
    """Rates from per-star total ages (see the module docstring).

    Parameters
    ----------
    total_age_gyr, half_width_gyr : (N,) ndarray
        Total age (Gyr) of each star and half its 16-84 % range (NaN or 0: taken as exact).
    inv_vmax : (N,) ndarray
        1/Vmax (pc^-3) of each star.
    density_per_rate : (B,) ndarray
        D_b, white dwarfs per pc^3 in the luminosity-function range per unit rate in bin b.
    edges_gyr : (B + 1,) ndarray
    n_boot : int
    seed : int

    Returns
    -------
    SFHFit
    """
    from scipy.special import ndtr

    t = np.asarray(total_age_gyr, dtype=float)
    s = np.nan_to_num(np.asarray(half_width_gyr, dtype=float), nan=0.0)
    w = np.asarray(inv_vmax, dtype=float)
    e = np.asarray(edges_gyr, dtype=float)
    ok = np.isfinite(t) & np.isfinite(w)
    share_missing = float(w[~ok & np.isfinite(w)].sum() / w[np.isfinite(w)].sum()) if np.isfinite(w).any() else 0.0
    t, s, w = t[ok], np.clip(s[ok], 0, None), w[ok]
    with np.errstate(divide="ignore", invalid="ignore"):
        z = (e[None, :] - t[:, None]) / s[:, None]
    cdf = np.where(s[:, None] > 0, ndtr(z), (e[None, :] > t[:, None]).astype(float))
    p = np.diff(cdf, axis=1)                                                          # (N, B)
    dens = np.asarray(density_per_rate, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        rate = np.where(dens > 0, (w @ p) / dens, np.nan)
    rng = np.random.default_rng(seed)
    boots = np.empty((int(n_boot), e.size - 1))
    for i in range(int(n_boot)):
        c = np.bincount(rng.integers(0, t.size, t.size), minlength=t.size) if t.size else np.zeros(0)
        with np.errstate(divide="ignore", invalid="ignore"):
            boots[i] = np.where(dens > 0, ((c * w) @ p) / dens, np.nan)
    if n_boot >= 2 and t.size:
        mean, sd, p16, p50, p84, corr = _stats(np.nan_to_num(boots), np.ones(int(n_boot)))
    else:
        nanv = np.full(e.size - 1, np.nan)
        mean, sd, p16, p50, p84, corr = rate, nanv, nanv, nanv, nanv, np.eye(e.size - 1)
    return SFHFit(method="total_ages", edges_gyr=e, mean=mean, sd=sd, p16=p16, p50=p50, p84=p84, best=rate,
                  correlation=corr, effective_samples=float(n_boot), draws=int(n_boot),
                  extra={"stars_used": int(t.size), "density_share_without_total_age": share_missing})


def constant_rate_fit(counts, exposure, model_row):
    """Maximum-likelihood rate of a constant history (one model row, per magnitude at unit rate)."""
    pred = float(np.sum(np.asarray(model_row) * np.asarray(exposure)))
    return float(np.sum(counts) / pred) if pred > 0 else float("nan")
