"""Vectorised random-walk Metropolis over several chains, and its convergence diagnostics.

Sampler
    ``n_chains`` chains advance together (one vectorised log-density call per step; the only
    Python loop is over the steps). Proposals are multivariate normal with covariance
    scale^2 Sigma, Sigma starting from a given matrix (the inverse Hessian at the mode) and the
    scale from 2.38 / sqrt(d), the optimum for normal targets (Roberts, Gelman & Gilks 1997, Ann.
    Appl. Probab. 7, 110; from memory). During warm-up the scale of each chain follows a
    Robbins-Monro recursion towards an acceptance rate of 0.234 (same source), and at the end of
    each of :data:`WARMUP_WINDOWS` windows Sigma is replaced by the covariance of the pooled
    draws of the window's second half (adaptive Metropolis). After warm-up Sigma and the scales are
    frozen, so the kept draws are an ordinary Metropolis chain. Chains start from points drawn
    from the normal approximation with its covariance inflated by :data:`START_INFLATION`
    (over-dispersed starts, so that R-hat can see a chain that has not forgotten its start).

Diagnostics (Vehtari, Gelman, Simpson, Carpenter & Buerkner 2021, Bayesian Analysis 16, 667)
    Each chain is split in halves; R-hat is the larger of the rank-normalised split R-hat and the
    same for the folded draws |x - median| (sensitive to a difference of scale); bulk ESS is the
    effective sample size of the rank-normalised draws, tail ESS the smaller of the ESS of the
    indicators x <= q05 and x <= q95. The ESS uses the multi-chain autocorrelation estimate and
    Geyer's (1992, Stat. Sci. 7, 473) initial monotone sequence truncation. Thresholds: R-hat below
    :data:`RHAT_MAX` (1.01, the paper's recommendation, from memory; the rstan documentation of
    ``Rhat`` quotes 1.05) and bulk and tail ESS at least :data:`ESS_MIN` (100 per chain for
    four chains, rstan documentation of ``ess_bulk``).
"""

from __future__ import annotations

import numpy as np

#: Split R-hat above this fails the diagnostics.
RHAT_MAX = 1.01
#: Bulk or tail ESS below this fails the diagnostics.
ESS_MIN = 400.0
#: Target acceptance rate of the warm-up adaptation.
TARGET_ACCEPTANCE = 0.234
#: Number of covariance-adaptation windows in the warm-up.
WARMUP_WINDOWS = 4
#: Starting points are drawn with the covariance times this factor (over-dispersed).
START_INFLATION = 4.0


def metropolis(logp, mode, cov, n_chains, n_warmup, n_keep, thin, rng):
    """Draws of a density by adaptive random-walk Metropolis (see the module docstring).

    Parameters
    ----------
    logp : callable
        ``(C, d) -> (C,)``, log density up to a constant (-inf outside the support).
    mode, cov : (d,), (d, d) ndarray
        Centre and covariance of the starting distribution and first proposal.
    n_chains, n_warmup, n_keep, thin : int
        Chains, warm-up steps per chain, kept draws per chain, steps between kept draws.
    rng : numpy.random.Generator

    Returns
    -------
    draws : (n_chains, n_keep, d) ndarray
    acceptance : float
        Acceptance rate after warm-up.
    """
    mode = np.asarray(mode, dtype=float)
    d = mode.size
    sigma = _psd(cov)
    x = mode + rng.multivariate_normal(np.zeros(d), START_INFLATION * sigma, size=n_chains)
    lp = logp(x)
    bad = ~np.isfinite(lp)
    x[bad], lp[bad] = mode, logp(mode[None, :])[0]
    log_scale = np.full(n_chains, np.log(2.38 / np.sqrt(d)))
    window = max(int(n_warmup) // WARMUP_WINDOWS, 1)
    hist = np.empty((window, n_chains, d))
    chol = np.linalg.cholesky(sigma)
    for t in range(int(n_warmup)):
        x, lp, acc = _step(logp, x, lp, chol, np.exp(log_scale), rng)
        log_scale += (acc - TARGET_ACCEPTANCE) / (1.0 + t % window) ** 0.6
        hist[t % window] = x
        if (t + 1) % window == 0:
            pooled = hist[window // 2:].reshape(-1, d)
            if pooled.shape[0] > 10 * d:
                chol = np.linalg.cholesky(_psd(np.cov(pooled, rowvar=False)))
    scale = np.exp(log_scale)
    out = np.empty((n_chains, int(n_keep), d))
    accepted = 0.0
    for i in range(int(n_keep)):
        for _ in range(int(thin)):
            x, lp, acc = _step(logp, x, lp, chol, scale, rng)
            accepted += acc.mean()
        out[:, i] = x
    return out, float(accepted / max(int(n_keep) * int(thin), 1))


def _step(logp, x, lp, chol, scale, rng):
    prop = x + scale[:, None] * (rng.standard_normal(x.shape) @ chol.T)
    lq = logp(prop)
    with np.errstate(invalid="ignore", over="ignore"):
        alpha = np.where(np.isfinite(lq), np.exp(np.minimum(lq - lp, 0.0)), 0.0)
    take = rng.random(x.shape[0]) < alpha
    x = np.where(take[:, None], prop, x)
    lp = np.where(take, lq, lp)
    return x, lp, alpha


def _psd(cov):
    """A symmetric positive-definite version of ``cov`` (eigenvalues floored)."""
    c = np.atleast_2d(np.asarray(cov, dtype=float))
    vals, vecs = np.linalg.eigh(0.5 * (c + c.T))
    vals = np.clip(vals, 1e-10 * max(vals.max(), 1e-300), None)
    return (vecs * vals) @ vecs.T


def _split(draws):
    """(M, N, ...) -> (2M, N // 2, ...): each chain cut in halves (a middle draw of an odd N dropped)."""
    h = draws.shape[1] // 2
    return np.concatenate([draws[:, :h], draws[:, draws.shape[1] - h:]], axis=0)


def _rank_normal(draws):
    """Rank-normalised draws, pooled over chains, per parameter (last axes)."""
    from scipy.special import ndtri
    from scipy.stats import rankdata

    m, n = draws.shape[:2]
    flat = draws.reshape(m * n, -1)
    r = rankdata(flat, axis=0)
    return ndtri((r - 0.375) / (m * n + 0.25)).reshape(draws.shape)


def _rhat_basic(chains):
    """Gelman-Rubin R-hat of (M, N, P) chains (no splitting)."""
    n = chains.shape[1]
    means = chains.mean(axis=1)
    w = chains.var(axis=1, ddof=1).mean(axis=0)
    b = n * means.var(axis=0, ddof=1)
    var_plus = (n - 1) / n * w + b / n
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.sqrt(var_plus / w)


def split_rhat(draws):
    """Rank-normalised split R-hat (max of bulk and folded) of (chains, draws, params) ``draws``."""
    x = np.asarray(draws, dtype=float)
    x = x.reshape(x.shape[0], x.shape[1], -1)
    s = _split(x)
    bulk = _rhat_basic(_rank_normal(s))
    med = np.median(x.reshape(-1, x.shape[2]), axis=0)
    folded = _rhat_basic(_rank_normal(_split(np.abs(x - med))))
    return np.fmax(bulk, folded)


def ess(draws):
    """Effective sample size of (chains, draws, params) ``draws`` (multi-chain, Geyer truncation).

    Not rank-normalised: :func:`ess_bulk` and :func:`ess_tail` are the ones to report.
    """
    x = np.asarray(draws, dtype=float)
    x = x.reshape(x.shape[0], x.shape[1], -1)
    m, n, _ = x.shape
    dev = x - x.mean(axis=1, keepdims=True)
    nfft = 1 << int(np.ceil(np.log2(2 * n)))
    f = np.fft.rfft(dev, n=nfft, axis=1)
    acov = np.fft.irfft(f * np.conj(f), n=nfft, axis=1)[:, :n] / n          # (M, N, P), biased estimator
    w = (acov[:, 0] * n / (n - 1)).mean(axis=0)                             # mean within-chain variance
    var_plus = w * (n - 1) / n + (x.mean(axis=1).var(axis=0, ddof=1) if m > 1 else 0.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        rho = 1.0 - (w - acov.mean(axis=0)) / var_plus                       # (N, P)
    rho[0] = 1.0
    npair = n // 2
    pairs = rho[: 2 * npair].reshape(npair, 2, -1).sum(axis=1)              # P_k = rho_2k + rho_2k+1
    positive = np.cumprod(pairs > 0, axis=0).astype(bool)                   # initial positive sequence
    mono = np.minimum.accumulate(np.where(positive, pairs, np.inf), axis=0)  # initial monotone sequence
    tau = -1.0 + 2.0 * np.sum(np.where(positive, mono, 0.0), axis=0)
    tau = np.maximum(tau, 1.0 / np.log10(m * n))                            # the paper's bound on tau
    return m * n / tau


def ess_bulk(draws):
    """Bulk effective sample size (rank-normalised split chains) per parameter."""
    x = np.asarray(draws, dtype=float)
    return ess(_rank_normal(_split(x.reshape(x.shape[0], x.shape[1], -1))))


def ess_tail(draws):
    """Tail effective sample size: the smaller ESS of the 5 % and 95 % quantile indicators."""
    x = np.asarray(draws, dtype=float)
    x = _split(x.reshape(x.shape[0], x.shape[1], -1))
    q05, q95 = np.quantile(x.reshape(-1, x.shape[2]), [0.05, 0.95], axis=0)
    return np.minimum(ess((x <= q05).astype(float)), ess((x <= q95).astype(float)))


def diagnostics(draws):
    """Per-parameter R-hat, bulk and tail ESS, and whether the thresholds hold."""
    rhat, bulk, tail = split_rhat(draws), ess_bulk(draws), ess_tail(draws)
    ok = bool(np.all(rhat < RHAT_MAX) and np.all(bulk >= ESS_MIN) and np.all(tail >= ESS_MIN))
    return {"rhat": rhat.tolist(), "ess_bulk": bulk.tolist(), "ess_tail": tail.tolist(),
            "rhat_max": float(np.max(rhat)), "ess_bulk_min": float(np.min(bulk)), "ess_tail_min": float(np.min(tail)),
            "rhat_threshold": RHAT_MAX, "ess_threshold": ESS_MIN, "passed": ok}
