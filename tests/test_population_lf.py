"""Binned 1/Vmax luminosity function and its Poisson and bootstrap errors.

Sources: the estimator Phi = sum(1/Vmax) / dM (Schmidt 1968, ApJ 151, 393) and its Poisson error
sqrt(sum 1/Vmax^2) / dM (common practice; reference-values.md section 9); the bootstrap variance
of a bin count is the binomial variance N p (1 - p) of resampling with replacement (standard
statistics, exact).
"""

from __future__ import annotations

import numpy as np
import pytest

from cinderclock.errors import ConfigError
from cinderclock.population.lf import (bin_index, binned_lf, bootstrap_bin_sums, bootstrap_lf_error,
                                       edges_from_settings)


def test_estimator_and_poisson_error_by_hand():
    # three stars in [12, 12.5) with Vmax 1000, 2000, 4000 pc^3, one in [13, 13.5), one outside
    mbol = [12.1, 12.2, 12.49, 13.0, 20.0]
    vmax = np.array([1000.0, 2000.0, 4000.0, 500.0, 100.0])
    lf = binned_lf(mbol, 1 / vmax, [12.0, 12.5, 13.0, 13.5], v_over_vmax=[0.2, 0.4, 0.6, 0.9, 0.5])
    assert lf["n_stars"].tolist() == [3, 0, 1]
    assert lf["phi"][0] == pytest.approx((1e-3 + 5e-4 + 2.5e-4) / 0.5, rel=1e-12)
    assert lf["phi_err_poisson"][0] == pytest.approx(np.sqrt(1e-6 + 2.5e-7 + 6.25e-8) / 0.5, rel=1e-12)
    assert lf["phi"][1] == 0 and lf["phi"][2] == pytest.approx(2e-3 / 0.5)
    assert lf["vmax_harmonic_pc3"][0] == pytest.approx(3 / (1e-3 + 5e-4 + 2.5e-4))
    assert lf["mean_v_over_vmax"][0] == pytest.approx(0.4)
    assert lf["v_over_vmax_sigma"][2] == pytest.approx(1 / np.sqrt(12))
    assert np.isnan(lf["mean_v_over_vmax"][1])


def test_bin_index_edges():
    e = np.array([0.0, 1.0, 2.0])
    assert bin_index([0.0, 0.999, 1.0, 2.0, -0.1, np.nan], e).tolist() == [0, 0, 1, -1, -1, -1]


@pytest.mark.parametrize("bins, message", [({"min": 4, "max": 4, "width": 0.5}, "max > min"),
                                           ({"min": 4, "max": 5.3, "width": 0.5}, "whole number")])
def test_bad_bins_are_reported(bins, message):
    with pytest.raises(ConfigError, match=message):
        edges_from_settings(bins)


def test_bootstrap_matches_the_binomial_variance():
    # N = 5000 stars, 400 in the first bin and 100 in the second, weight 1: the bootstrap standard
    # deviation of a bin count is sqrt(N p (1 - p)) (resampling with replacement is multinomial).
    # With 600 resamples the Monte Carlo error of a standard deviation is ~1/sqrt(2 * 600) = 3 %;
    # tolerance 12 % (4 sigma).
    n_total = 5000
    bins = np.concatenate([np.zeros(400, int), np.ones(100, int)])
    rng = np.random.default_rng(5)
    counts, sums = bootstrap_bin_sums(bins, np.ones(bins.size), n_total, 2, 600, rng)
    assert np.array_equal(counts, sums)
    for k, n in enumerate((400, 100)):
        p = n / n_total
        assert counts[:, k].mean() == pytest.approx(n, rel=0.02)
        assert counts[:, k].std(ddof=1) == pytest.approx(np.sqrt(n_total * p * (1 - p)), rel=0.12)


def test_bootstrap_error_close_to_poisson_for_equal_weights():
    # For a small share of the sample in a bin (p -> 0) the binomial and Poisson variances agree:
    # sqrt(n (1 - p)) against sqrt(n). Bins hold 1-2 % of 20000 stars here; tolerance 12 % as above.
    rng = np.random.default_rng(8)
    mbol = rng.uniform(0, 50, 20000)
    w = np.full(mbol.size, 1e-4)
    edges = np.arange(10.0, 14.01, 1.0)
    lf = binned_lf(mbol, w, edges)
    boot = bootstrap_lf_error(mbol, w, edges, 600, seed=1)
    assert np.allclose(boot, lf["phi_err_poisson"], rtol=0.12)
    # same seed, same errors (reproducible runs)
    assert np.array_equal(boot, bootstrap_lf_error(mbol, w, edges, 600, seed=1))
