"""Markov-chain sampler of the star-formation history and its convergence diagnostics.

Sources: the integrated autocorrelation time of an AR(1) process x_t = phi x_(t-1) + e_t is
(1 + phi) / (1 - phi), so its effective sample size is N (1 - phi) / (1 + phi) (Geyer 1992, Stat.
Sci. 7, 473, the example of his section 3; a textbook result, common practice); R-hat is 1 for
chains from one distribution and grows with a difference of location or scale between chains
(Vehtari et al. 2021, Bayesian Analysis 16, 667; the folded R-hat is the one that sees the scale);
the posterior of a two-bin history is checked against brute-force quadrature on a grid of ln r.
"""

from __future__ import annotations

import numpy as np
import pytest
from cinderclock.population.mcmc import (
    ESS_MIN,
    RHAT_MAX,
    diagnostics,
    ess_bulk,
    metropolis,
    split_rhat,
)
from cinderclock.population.sfh_fit import fit_sfh_lf


def ar1(rng, phi, chains, n):
    x = np.empty((chains, n))
    x[:, 0] = rng.standard_normal(chains) / np.sqrt(1 - phi**2)         # stationary start
    e = rng.standard_normal((chains, n))
    for t in range(1, n):
        x[:, t] = phi * x[:, t - 1] + e[:, t]
    return x[..., None]


@pytest.mark.parametrize("phi", [0.0, 0.5, 0.9])
def test_ess_of_an_ar1_process(phi):
    # ESS = N (1 - phi) / (1 + phi); 8 chains x 4000 draws: the estimate scatters by ~5-10 %
    # (more for the slowly mixing phi = 0.9), so 15 % is a fair tolerance
    x = ar1(np.random.default_rng(2), phi, 8, 4000)
    expected = x.shape[0] * x.shape[1] * (1 - phi) / (1 + phi)
    assert ess_bulk(x)[0] == pytest.approx(expected, rel=0.15)


def test_rhat_sees_location_and_scale_differences():
    rng = np.random.default_rng(3)
    same = rng.standard_normal((4, 1000, 1))
    assert split_rhat(same)[0] < RHAT_MAX
    shifted = same.copy()
    shifted[0] += 1.0                                                    # one chain 1 sd off
    assert split_rhat(shifted)[0] > 1.05
    wide = same.copy()
    wide[0] *= 3.0                                                       # one chain 3x wider, same centre
    assert split_rhat(wide)[0] > 1.05
    drift = same + np.linspace(0, 2, 1000)[None, :, None]                # every chain drifting: split R-hat
    assert split_rhat(drift)[0] > 1.05


def test_metropolis_samples_a_correlated_normal():
    # 3-d normal, correlation 0.9, a badly scaled start covariance: means within 5 Monte Carlo
    # errors (sd / sqrt(ESS)), covariance within 10 %, diagnostics pass
    rng = np.random.default_rng(4)
    c = np.array([[1.0, 0.9, 0.0], [0.9, 1.0, 0.0], [0.0, 0.0, 4.0]])
    prec = np.linalg.inv(c)
    mu = np.array([1.0, -2.0, 0.5])

    def logp(x):
        d = x - mu
        return -0.5 * np.einsum("si,ij,sj->s", d, prec, d)

    draws, acc = metropolis(logp, mu + 0.3, np.eye(3), 8, 2000, 1000, 3, rng)
    d = diagnostics(draws)
    assert d["passed"] and 0.1 < acc < 0.5
    flat = draws.reshape(-1, 3)
    assert np.all(np.abs(flat.mean(axis=0) - mu) < 5 * np.sqrt(np.diag(c) / np.array(d["ess_bulk"])))
    assert np.allclose(np.cov(flat, rowvar=False), c, atol=0.1 * np.sqrt(np.outer(np.diag(c), np.diag(c))))


def test_two_bin_history_matches_quadrature():
    # Two lookback bins, Poisson counts in 6 magnitude bins, smoothness prior 0.5 dex: the posterior
    # of (ln r1, ln r2) evaluated on a 400 x 400 grid (brute force) gives the means and sds of the
    # rates; the chains agree within 3 % (Monte Carlo error of ~4000 draws with ESS > 400: ~2-3 %
    # on a mean of a rate with 20-40 % sd)
    basis = np.array([[5.0, 3.0, 1.0, 0.3, 0.1, 0.02], [0.2, 1.0, 2.0, 3.0, 2.0, 1.0]])
    n = np.array([9.0, 7.0, 5.0, 6.0, 3.0, 1.0])
    expo = np.ones(6)
    fit = fit_sfh_lf(n, expo, basis, np.array([0.0, 1.0, 2.0]), 0.5, 4000, seed=1)
    assert fit.extra["sampling"]["passed"]
    s2 = (0.5 * np.log(10)) ** 2
    t = np.linspace(-5.0, 3.5, 400)
    t1, t2 = np.meshgrid(t, t, indexing="ij")
    mu = np.exp(t1)[..., None] * basis[0] + np.exp(t2)[..., None] * basis[1]
    lp = (n * np.log(mu) - mu).sum(axis=-1) - (t2 - t1) ** 2 / (2 * s2)
    w = np.exp(lp - lp.max())
    w /= w.sum()
    for r, m, sd in ((np.exp(t1), fit.mean[0], fit.sd[0]), (np.exp(t2), fit.mean[1], fit.sd[1])):
        em = np.sum(w * r)
        esd = np.sqrt(np.sum(w * (r - em) ** 2))
        assert m == pytest.approx(em, rel=0.03)
        assert sd == pytest.approx(esd, rel=0.06)


def test_short_chains_fail_the_diagnostics():
    # 16 draws over 8 chains cannot reach ESS 400: the diagnostics say so (what raises sfh_poor_sampling)
    basis = np.array([[5.0, 3.0, 1.0, 0.3], [0.2, 1.0, 2.0, 3.0]])
    fit = fit_sfh_lf(np.array([9.0, 7.0, 5.0, 6.0]), np.ones(4), basis, np.array([0.0, 1.0, 2.0]), 0.5, 16, seed=1)
    s = fit.extra["sampling"]
    assert not s["passed"] and s["ess_bulk_min"] < ESS_MIN
