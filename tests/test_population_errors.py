"""Measurement errors in the population model, the goodness of fit and the named warnings.

Sources: the fold of a step with a normal error is the normal CDF (standard statistics, exact,
checked against scipy.stats.norm); the Poisson deviance is 2 sum [n ln(n/mu) - n + mu] (the
likelihood-ratio statistic of Poisson counts; common practice) and, for counts large enough, it
follows a chi-square with K - p degrees of freedom (Wilks' theorem; checked against
scipy.stats.chi2 through the simulated p-values, which must be uniform under the model); the
bootstrap mode count uses Silverman's normal-reference bandwidth 1.06 sd n^(-1/5) (Silverman
1986, eq. 3.28, checked through several secondary sources; eq. 3.31 is the robust variant). The
simulated samples are built through the package's own simulation (IMF, lifetimes, IFMR, Mestel
cooling forwards), so the checks hold whatever the numerical cooling model: they test the
estimator, not the physics.
"""

from __future__ import annotations

import numpy as np
import pytest
from cinderclock.cooling import mestel
from cinderclock.population.agefit import (
    bin_sample,
    bootstrap_intervals,
    fit_age,
    floored,
    profile_loglike,
)
from cinderclock.population.diagnostics import (
    MODE_MIN_SEPARATION,
    count_modes,
    fit_warnings,
    poisson_deviance,
    simulated_deviances,
)
from cinderclock.population.model import PopulationModel
from cinderclock.population.simulate import observe_sample, simulate_white_dwarfs
from cinderclock.population.smear import build_fold, volume_per_mag, volume_points
from cinderclock.population.vmax import SurveyLimits, compute_vmax

COEFF = mestel.age_coefficient_yr()
EDGES = np.arange(12.0, 19.01, 0.5)
AGES = np.arange(5.0, 14.001, 0.05)


def mestel_lum(m, t):
    return mestel.luminosity_at_age(m, t, COEFF)


@pytest.fixture(scope="module")
def model():
    pm = PopulationModel(mestel_lum)
    cache = {}

    def lf(edges, ages):
        key = (np.asarray(edges).tobytes(), np.asarray(ages).tobytes())
        if key not in cache:
            cache[key] = pm.luminosity_function(edges, ages)
        return cache[key]

    return lf


def noisy_sample(seed, age_gyr=9.0, n_formed=200_000, plx_err=0.8):
    """A measured sample: sphere of 200 pc cut at 150 pc (measured), m < 18, parallax S/N >= 5."""
    rng = np.random.default_rng(seed)
    wd = simulate_white_dwarfs(rng, n_formed, age_gyr, mestel_lum)
    o = observe_sample(rng, wd, 200.0, 18.0, plx_err_mas=plx_err, mag_err=0.03, min_parallax_over_error=5,
                       distance_limit_pc=150.0)
    v = compute_vmax(o["dist_pc"], o["mag"], SurveyLimits(faint_mag=18.0, min_parallax_over_error=5,
                                                          max_distance_pc=150.0), plx_err_mas=o["plx_err_mas"])
    ok = v["usable"]
    return o["mbol"][ok], 1.0 / v["vmax_pc3"][ok], o["mbol_err"][ok]


def test_fold_of_one_cell_is_the_normal_distribution():
    # A single star magnitude (all errors 0.3 mag) folded into 0.5 mag bins: the response of the fine
    # cell at M is Phi((hi - M)/s) - Phi((lo - M)/s) (scipy.stats.norm, exact to rounding)
    from scipy.stats import norm

    mbol = np.array([14.2, 14.3, 14.4, 15.1])
    fold = build_fold(mbol, np.full(4, 0.3), EDGES, max_sigma_mag=1.0, subdivisions=5)
    centres = 0.5 * (fold.fine_edges[:-1] + fold.fine_edges[1:])
    j = int(np.argmin(np.abs(centres - 14.25)))
    expected = norm.cdf((EDGES[1:] - centres[j]) / 0.3) - norm.cdf((EDGES[:-1] - centres[j]) / 0.3)
    assert np.allclose(fold.response[j], expected, atol=1e-12)
    # the fine grid reaches 4 sigma (1.2 mag) capped at max_sigma_mag (1 mag): two 0.5 mag bins beyond the range
    assert fold.fine_edges[0] == pytest.approx(EDGES[0] - 1.0) and fold.fine_edges[-1] == pytest.approx(EDGES[-1] + 1.0)
    # a star inside the fitted range far from its edges is observed somewhere in it (probability ~1)
    k = int(np.argmin(np.abs(centres - 15.6)))
    assert fold.response[k].sum() == pytest.approx(1.0, abs=1e-9)


def test_zero_errors_give_the_indicator_of_the_bin():
    # exact errors: each fine cell is observed in the bin that holds it (internal check of the limit)
    fold = build_fold(np.array([13.0, 14.0]), np.zeros(2), EDGES, subdivisions=5)
    assert np.array_equal(fold.response.sum(axis=1), np.ones(fold.response.shape[0]))
    assert np.all(np.isin(fold.response, [0.0, 1.0]))


def test_volume_points_follow_a_magnitude_limit():
    # Vmax of a magnitude-limited survey is (4 pi / 3) (10 pc 10^(0.2 (m_lim - M)))^3: log-linear in M
    # with slope -0.6 dex/mag (Schmidt 1968); the interpolated volume reproduces it (1e-9 dex)
    rng = np.random.default_rng(3)
    m = rng.uniform(12.0, 17.0, 4000)
    vmax = 4 * np.pi / 3 * (10.0 * 10 ** (0.2 * (18.0 - m))) ** 3
    fine = np.arange(12.5, 16.51, 0.1)
    v = volume_per_mag(*volume_points(m, 1 / vmax, np.arange(12.0, 17.01, 0.1)), fine)
    x = 0.5 * (fine[:-1] + fine[1:])
    assert np.allclose(np.log10(v), np.log10(4 * np.pi / 3 * (10.0 * 10 ** (0.2 * (18.0 - x))) ** 3), atol=1e-9)


def test_folding_removes_the_bias_of_measurement_errors(model):
    # Parallax errors of 0.8 mas (M_bol errors ~0.13 mag at the faint end) over 8 samples of ~5,000
    # stars in the fitted range. Folded: the mean age lies within 3 standard errors of the input, and
    # the model describes the counts (mean simulated-sample p-value above 0.1; 0.5 expected). The
    # unfolded fit is run beside it for the flag (the larger bias comparison is in the benchmark).
    ages_f, p_f = [], []
    for seed in range(8):
        mbol, inv, err = noisy_sample(40 + seed)
        f = fit_age(mbol, inv, EDGES, AGES, model, n_boot=0, seed=seed, mbol_err=err, gof_simulations=100)
        u = fit_age(mbol, inv, EDGES, AGES, model, n_boot=0, seed=seed, gof_simulations=100)
        ages_f.append(f.age_gyr)
        p_f.append(f.goodness["p_value"])
        assert f.errors_folded and not u.errors_folded and f.median_mbol_err > 0.05
    a = np.array(ages_f)
    assert abs(a.mean() - 9.0) < 3 * a.std(ddof=1) / np.sqrt(a.size) + 0.02
    assert np.mean(p_f) > 0.1


def test_deviance_is_finite_where_the_model_is_zero():
    # A star in a bin where the best model is exactly zero: with the likelihood's floor the deviance is
    # finite and equals 2 sum [n ln(n/mu) - n + mu] on the floored model (worked by hand here)
    m = np.array([[4.0, 2.0, 1.0, 0.0]])
    e = np.ones(4)
    n = np.array([40.0, 20.0, 10.0, 1.0])
    lnl, amp = profile_loglike(n, e, m, floor=1e-6)
    mu = amp[0, 0] * floored(m, 1e-6)[0] * e
    d = poisson_deviance(n, mu)
    assert np.isfinite(d)
    by_hand = 2 * (np.sum(n * np.log(n / mu)) - n.sum() + mu.sum())
    assert d == pytest.approx(by_hand, rel=1e-12)
    assert mu[3] == pytest.approx(amp[0, 0] * 4e-6)


def test_simulated_p_values_are_uniform_under_the_model():
    # Counts drawn from the model itself: the parametric-bootstrap p-value is uniform on (0, 1), so
    # about 10 % of 200 datasets fall below 0.1 (binomial sd 2.1 %; accept 3-19 %); and the simulated
    # deviances of well-filled bins follow chi-square(K - 2) (mean K - 2 within 10 %; Wilks' theorem)
    rng = np.random.default_rng(1)
    ages = np.linspace(1, 3, 41)
    k = np.arange(8)
    model = np.exp(-k[None, :] / ages[:, None]) + 0.2
    e = np.full(8, 400.0)
    mu = 1.0 * model[20] * e
    sims = simulated_deviances(mu, e, model, 1e-6, 2000, rng)
    assert np.mean(sims) == pytest.approx(8 - 2, rel=0.1)
    low = 0
    for _ in range(200):
        n = rng.poisson(mu).astype(float)
        lnl, amp = profile_loglike(n, e, model)
        j = int(np.argmax(lnl[0]))
        d = poisson_deviance(n, amp[0, j] * model[j] * e)
        low += (1 + np.sum(sims >= d)) / (1 + sims.size) < 0.1
    assert 6 <= low <= 38


@pytest.mark.parametrize("seed", range(5))
def test_mode_count(seed):
    # two-normal mixture criterion (Ashman, Bird & Zepf 1994, AJ 108, 2348: D > 2 for a clean
    # separation): one normal, a skewed and a heavy-tailed sample and a normal sample rounded to a
    # coarse grid (the clustered ages of a binned fit) are unimodal; two normals 8 sd apart
    # (D = 8, 40 % minor share, 20 % apart) are bimodal, found at their centres
    rng = np.random.default_rng(seed)
    assert count_modes(rng.normal(9.0, 0.3, 200))[0] == 1
    assert count_modes(9.0 + rng.standard_t(3, 200) * 0.3)[0] == 1
    assert count_modes(9.0 + 0.3 * np.round(rng.normal(0, 1, 200) * 2) / 2)[0] == 1
    n, where, st = count_modes(np.concatenate([rng.normal(3.5, 0.1, 120), rng.normal(4.3, 0.1, 80)]))
    assert n == 2 and where[0] == pytest.approx(3.5, abs=0.05) and where[1] == pytest.approx(4.3, abs=0.05)
    assert st["ashman_d"] == pytest.approx(8.0, rel=0.25) and st["minor_weight"] == pytest.approx(0.4, abs=0.1)


def test_mode_count_ignores_clusters_closer_than_the_threshold():
    # two tight clusters 3 % apart (D ~ 6): real structure but below MODE_MIN_SEPARATION (5 %)
    rng = np.random.default_rng(9)
    n, _, st = count_modes(np.concatenate([rng.normal(8.00, 0.04, 120), rng.normal(8.24, 0.04, 80)]))
    assert st["ashman_d"] > 2 and st["relative_separation"] < MODE_MIN_SEPARATION and n == 1


def test_bootstrap_interval_constructions():
    # Bootstrap estimates normal about T + b with sd s (B large): the percentile interval is
    # T + b +- s; the bias-corrected one is T - b +- s (z0 = -b / s, percentiles Phi(2 z0 +- 1);
    # Efron & Tibshirani 1993, An Introduction to the Bootstrap, ch. 14: it removes the median bias)
    # and so is the basic one (2 T - q84, 2 T - q16; Davison & Hinkley 1997, from memory)
    from scipy.stats import norm

    t, b, s = 8.0, 0.1, 0.2
    boot = norm.ppf((np.arange(20000) + 0.5) / 20000, t + b, s)
    iv = bootstrap_intervals(boot, t, boot - 2 * b)
    assert iv["percentile"][0] == pytest.approx((t + b - s, t + b + s), abs=2e-3)
    assert iv["bias_corrected"][0] == pytest.approx((t - b - s, t - b + s), abs=2e-3)
    assert iv["basic"][0] == pytest.approx((t - b - s, t - b + s), abs=2e-3)
    assert iv["bias_corrected"][1] == pytest.approx((t - b - 1.96 * s, t - b + 1.96 * s), abs=3e-3)
    assert iv["parametric"][0] == pytest.approx((t - b - s, t - b + s), abs=2e-3)
    assert np.isnan(bootstrap_intervals([], t)["percentile"][0][0])


def test_named_warnings(model):
    # internal check of the rules: an age at the grid edge, <V/Vmax> 3.8 sigma low and a bimodal
    # bootstrap each raise their warning; a good fit raises none of the others
    mbol, inv, err = noisy_sample(5, n_formed=60_000, plx_err=0.3)
    fit = fit_age(mbol, inv, EDGES, np.arange(5.0, 7.001, 0.05), model, n_boot=50, mbol_err=err)
    codes = [w["code"] for w in fit_warnings(fit, {"mean": 0.471, "sigma": 0.0076, "z": -3.8, "n": 1440})]
    assert "age_at_grid_edge" in codes and "v_over_vmax_offset" in codes
    fit = fit_age(mbol, inv, EDGES, AGES, model, n_boot=50, mbol_err=err)
    assert [w["code"] for w in fit_warnings(fit, {"mean": 0.5, "sigma": 0.01, "z": 0.0, "n": 800})] in (
        [], ["poor_fit"], ["multimodal_bootstrap"])
    fit.bootstrap_modes, fit.bootstrap_mode_ages_gyr = 2, [3.5, 3.9]
    fit.bootstrap_mode_stats = {"ashman_d": 3.0, "minor_weight": 0.3, "delta_bic": 40.0, "relative_separation": 0.1}
    assert "multimodal_bootstrap" in [w["code"] for w in fit_warnings(fit)]


def test_bin_sample_without_errors_is_the_plain_model(model):
    # internal: no positive error, no fold; the model is evaluated on the fitted bins
    mbol, inv, _ = noisy_sample(2, n_formed=30_000, plx_err=0.3)
    data = bin_sample(mbol, inv, EDGES, np.zeros(mbol.size))
    assert not data.folded
    assert np.array_equal(data.model(model, AGES[:3]), model(EDGES, AGES[:3]))
