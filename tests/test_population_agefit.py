"""Population age by maximum likelihood with a bootstrap interval, on simulated populations of known age.

Simulated samples: constant star formation for 8 and 11 Gyr, Salpeter IMF, the Cummings et al.
(2018) MIST IFMR, Hurley et al. (2000) lifetimes and Mestel cooling, white dwarfs spread
uniformly through a 100 pc sphere and kept by an apparent limit m_bol < 17.5. The simulation draws
stars one by one, the fit uses the tabulated forward model and the 1/Vmax weights, so recovering
the input age checks the estimator, the likelihood and the stated uncertainty -- not the physics,
which both share.

Likelihood facts checked on exact inputs: a Gaussian log-likelihood's Delta ln L = 0.5 interval is
+-1 sigma (common practice, Wilks' theorem), and a parabola's vertex is found exactly.
"""

from __future__ import annotations

import numpy as np
import pytest

from cinderclock.cooling import mestel
from cinderclock.errors import ConfigError
from cinderclock.population.agefit import (age_grid_from_settings, exposures, fit_age, likelihood_interval,
                                           profile_loglike, refine_maximum)
from cinderclock.population.model import PopulationModel
from cinderclock.population.simulate import place_in_sphere, simulate_white_dwarfs
from cinderclock.population.vmax import SurveyLimits, compute_vmax

COEFF = mestel.age_coefficient_yr()
EDGES = np.arange(12.0, 19.01, 0.5)
AGES = np.arange(4.0, 15.001, 0.02)
RADIUS_PC = 100.0
MAG_LIMIT = 17.5


def mestel_lum(m, t):
    return mestel.luminosity_at_age(m, t, COEFF)


@pytest.fixture(scope="module")
def model_grid():
    return PopulationModel(mestel_lum).luminosity_function(EDGES, AGES)


def simulated_sample(age_gyr, seed, n_formed=30000):
    """M_bol and 1/Vmax of a magnitude-limited sample of a population of known age."""
    rng = np.random.default_rng(seed)
    wd = simulate_white_dwarfs(rng, n_formed, age_gyr, mestel_lum)
    d, _ = place_in_sphere(rng, wd["mbol"].size, RADIUS_PC)
    m = wd["mbol"] + 5 * np.log10(d / 10.0)                 # survey band = bolometric (BC = 0)
    keep = m < MAG_LIMIT
    v = compute_vmax(d[keep], m[keep], SurveyLimits(faint_mag=MAG_LIMIT, max_distance_pc=RADIUS_PC))
    return wd["mbol"][keep], 1.0 / v["vmax_pc3"]


@pytest.mark.parametrize("age_gyr, seed", [(8.0, 11), (11.0, 12)])
def test_age_is_recovered_within_its_stated_uncertainty(model_grid, age_gyr, seed):
    # The input age lies inside the stated 95 % bootstrap interval; the interval is informative
    # (68 % half-width below 1 Gyr for ~1,300 stars in the fitted range), so the test can fail.
    mbol, inv = simulated_sample(age_gyr, seed)
    fit = fit_age(mbol, inv, EDGES, AGES, model_grid, n_boot=200, seed=seed)
    assert fit.interval95_gyr[0] <= age_gyr <= fit.interval95_gyr[1]
    assert fit.interval68_gyr[0] <= fit.age_gyr <= fit.interval68_gyr[1]
    assert 0 < fit.sigma_gyr < 1.0
    assert not fit.at_grid_edge
    assert fit.n_stars > 800
    # the fit describes the data: Poisson deviance within ~3 sigma of its expectation (dof)
    assert fit.deviance < fit.dof + 3 * np.sqrt(2 * fit.dof)


@pytest.mark.parametrize("age_gyr", [8.0, 11.0])
def test_68_percent_interval_covers_the_input_age_about_68_percent_of_the_time(model_grid, age_gyr):
    # 40 independent simulated samples: the number whose 68 % bootstrap interval holds the input age
    # is binomial (40, 0.68), mean 27.2 and sd 2.95; accept 18-36 (about +-3 sd). An interval that
    # understated the uncertainty by half would cover ~38 % (15 of 40) and fail.
    covered = 0
    for seed in range(40):
        mbol, inv = simulated_sample(age_gyr, 1000 + seed, n_formed=15000)
        fit = fit_age(mbol, inv, EDGES, AGES, model_grid, n_boot=100, seed=seed)
        covered += fit.interval68_gyr[0] <= age_gyr <= fit.interval68_gyr[1]
    assert 18 <= covered <= 36


def test_profile_likelihood_recovers_normalisation_and_model():
    # Exact expected counts A m e for the second of three models: the profile likelihood peaks there
    # and returns A (the Poisson maximum-likelihood normalisation sum n / sum m e, exact).
    m = np.array([[1.0, 2.0, 3.0, 0.0], [1.0, 2.0, 4.0, 1.0], [1.0, 3.0, 4.0, 3.0]])
    e = np.array([10.0, 20.0, 30.0, 40.0])
    counts = 2.5 * m[1] * e
    lnl, amp = profile_loglike(counts, e, m)
    assert np.argmax(lnl[0]) == 1
    assert amp[0, 1] == pytest.approx(2.5, rel=1e-12)


def test_parabola_vertex_and_gaussian_interval():
    # ln L = -(T - 5.013)^2 / (2 * 0.4^2): vertex 5.013 (a parabola is refined exactly) and the
    # Delta ln L = 0.5 interval is 5.013 +- 0.4 (to the grid's linear interpolation, 1e-3)
    t = np.arange(3.0, 7.0001, 0.05)
    lnl = -((t - 5.013) ** 2) / (2 * 0.4**2)
    best, edge = refine_maximum(t, lnl[None, :])
    assert best[0] == pytest.approx(5.013, abs=1e-9) and not edge[0]
    lo, hi = likelihood_interval(t, lnl)
    assert lo == pytest.approx(4.613, abs=1e-3) and hi == pytest.approx(5.413, abs=1e-3)
    best, edge = refine_maximum(t, -t[None, :])
    assert edge[0] and best[0] == t[0]


def test_exposures_fill_empty_bins():
    # exposures are n / sum(1/Vmax) x width; empty interior bins are interpolated in log V, empty
    # faint bins continue the last slope (clipped to at most flat): internal check of the rule
    centres = np.array([12.25, 12.75, 13.25, 13.75, 14.25])
    widths = np.full(5, 0.5)
    counts = np.array([10.0, 0.0, 10.0, 10.0, 0.0])
    sums = counts / np.array([1e4, 1.0, 1e3, 1e2, 1.0])           # harmonic-mean volumes 1e4, -, 1e3, 1e2
    e = exposures(counts, sums, widths, centres)[0]
    assert e[0] == pytest.approx(0.5e4) and e[2] == pytest.approx(0.5e3)
    assert e[1] == pytest.approx(0.5 * 10**3.5, rel=1e-12)
    # slope -2 dex/mag between the last two occupied bins is clipped to -1 dex/mag
    assert e[4] == pytest.approx(0.5 * 10**1.5, rel=1e-12)


def test_age_grid_settings():
    assert age_grid_from_settings({"min_gyr": 1.0, "max_gyr": 2.0, "step_gyr": 0.25}).tolist() == \
        [1.0, 1.25, 1.5, 1.75, 2.0]
    with pytest.raises(ConfigError, match="age_grid"):
        age_grid_from_settings({"min_gyr": 3.0, "max_gyr": 2.0, "step_gyr": 0.25})
