"""Forward-modelled luminosity function: the Mestel-law slope, normalisation, histories, IMFs.

Sources: for Mestel cooling (t ~ L^-5/7) and a constant birth rate, dN/dM_bol ~ dt/dM_bol ~
10^(2/7 M_bol), a slope of 2/7 dex per magnitude (reference-values.md section 9, marked D; the same
model is drawn in Raffelt 1996, Stars as Laboratories for Fundamental Physics, Fig. 2.10, C2).
Integrals are checked against scipy's numerical quadrature (a general-purpose reference). The
Monte Carlo comparison is an internal consistency check (same relations, different numerics).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from cinderclock.cooling import mestel
from cinderclock.errors import ConfigError
from cinderclock.population.imf import KROUPA, SALPETER, get_imf
from cinderclock.population.model import PopulationModel
from cinderclock.population.sfh import StarFormationHistory
from cinderclock.population.simulate import simulate_white_dwarfs

COEFF = mestel.age_coefficient_yr()


def mestel_lum(m, t):
    return mestel.luminosity_at_age(m, t, COEFF)


@pytest.fixture(scope="module")
def salpeter_model():
    return PopulationModel(mestel_lum, ifmr="cummings2018_mist", lifetime="rule_of_thumb", imf="salpeter")


@pytest.mark.parametrize("imf", ["salpeter", "kroupa"])
@pytest.mark.parametrize("lifetime", ["hurley2000", "rule_of_thumb"])
def test_mestel_constant_birth_rate_slope_is_two_sevenths(imf, lifetime):
    # 2/7 dex/mag (D). Between M_bol 6 and 9.5 every progenitor cell's cooling time is far below
    # T - t_prog for T = 10 Gyr, so the analytic slope holds exactly; 1e-6 allows for float rounding
    # of the tabulation (the inversion is linear in log age, exact for a power law).
    pm = PopulationModel(mestel_lum, lifetime=lifetime, imf=imf)
    edges = np.arange(6.0, 9.51, 0.25)
    lf = pm.luminosity_function(edges, [10.0])[0]
    slopes = np.diff(np.log10(lf)) / 0.25
    assert np.allclose(slopes, 2 / 7, rtol=0, atol=1e-6)


def test_single_mass_slope_holds_until_the_cut_off():
    # One progenitor mass (2 Msun): the 2/7 law holds at every magnitude the population reaches (D).
    pm = PopulationModel(mestel_lum, mass_range_msun=(2.0, 2.01), n_mass=4)
    edges = np.arange(6.0, 14.01, 0.5)
    lf = pm.luminosity_function(edges, [12.0])[0]
    assert np.allclose(np.diff(np.log10(lf)) / 0.5, 2 / 7, rtol=0, atol=1e-6)


def test_total_number_against_quadrature(salpeter_model):
    # White dwarfs per progenitor born per Gyr, constant rate over T:
    # N = int xi(M) max(T - t(M), 0) dM / int xi dM with t = 10 Gyr M^-2.5 (Hansen, Kawaler & Trimble,
    # C2), Salpeter xi, Mi in 0.83-7.2 Msun; scipy quad as reference. The model's 400 midpoint cells
    # are accurate to ~1e-5; tolerance 1e-3.
    from scipy.integrate import quad

    for age in (6.0, 10.0, 13.0):
        num = quad(lambda m: m**-2.35 * max(age - 10.0 * m**-2.5, 0.0), 0.83, 7.2, limit=200, points=[
            (10.0 / age) ** 0.4])[0]
        den = quad(lambda m: m**-2.35, 0.83, 7.2)[0]
        assert salpeter_model.white_dwarf_total([age])[0] == pytest.approx(num / den, rel=1e-3)


def test_bins_add_up_to_the_total(salpeter_model):
    # internal check: bins wide enough to hold every white dwarf sum to the total
    edges = np.array([-80.0, 5.0, 10.0, 15.0, 20.0, 85.0])
    counts = salpeter_model.bin_counts(edges, [4.0, 9.0, 13.5])
    assert np.allclose(counts.sum(axis=1), salpeter_model.white_dwarf_total([4.0, 9.0, 13.5]), rtol=1e-9)
    assert np.all(counts >= 0)


def test_older_populations_reach_fainter(salpeter_model):
    # the faintest occupied bin moves faint-ward with age (the basis of the age fit)
    edges = np.arange(10.0, 20.01, 0.25)
    lf = salpeter_model.luminosity_function(edges, [6.0, 9.0, 12.0])
    faintest = [edges[np.flatnonzero(row > 0).max() + 1] for row in lf]
    assert faintest[0] < faintest[1] < faintest[2]


def test_model_agrees_with_monte_carlo(salpeter_model):
    # Internal consistency: 600,000 progenitors drawn star by star (no tabulation or inversion)
    # against the quadrature; chi-square over bins expecting > 20 stars, p > 1e-3.
    from scipy.stats import chi2

    age = 9.0
    rng = np.random.default_rng(42)
    n_formed = 600_000
    sim = simulate_white_dwarfs(rng, n_formed, age, mestel_lum, lifetime="rule_of_thumb")
    edges = np.arange(8.0, 17.51, 0.5)
    observed = np.histogram(sim["mbol"], edges)[0]
    expected = n_formed / age * salpeter_model.bin_counts(edges, [age])[0]
    use = expected > 20
    stat = np.sum((observed[use] - expected[use]) ** 2 / expected[use])
    assert chi2.sf(stat, use.sum()) > 1e-3
    assert use.sum() >= 15


def test_histories():
    # cumulative star formation (exact arithmetic): constant T; burst adds factor x duration
    const = StarFormationHistory("constant")
    burst = StarFormationHistory("constant_plus_burst", burst_lookback_gyr=3.0, burst_duration_gyr=1.0,
                                 burst_rate_factor=4.0)
    single = StarFormationHistory("single_burst", burst_duration_gyr=0.5)
    assert const.cumulative([0.0, 5.0, 20.0], 10.0).tolist() == [0.0, 5.0, 10.0]
    assert burst.total(10.0) == pytest.approx(10.0 + 4.0)
    assert burst.cumulative(3.0, 10.0) == pytest.approx(3.0 + 4.0 * 0.5)
    assert burst.total(2.8) == pytest.approx(2.8 + 4.0 * 0.3)              # burst cut off at T
    assert single.cumulative([9.4, 9.6, 12.0], 10.0) == pytest.approx([0.0, 0.1, 0.5])
    with pytest.raises(ConfigError, match="sfh.kind"):
        StarFormationHistory("exponential")


def test_burst_adds_white_dwarfs(salpeter_model):
    # internal check: a burst only adds white dwarfs, visibly, and the bins still add up to the total
    edges = np.arange(6.0, 18.01, 0.5)
    const = salpeter_model.bin_counts(edges, [10.0])[0]
    burst = StarFormationHistory("constant_plus_burst", burst_lookback_gyr=2.0, burst_duration_gyr=0.2,
                                 burst_rate_factor=10.0)
    with_burst = salpeter_model.bin_counts(edges, [10.0], burst)[0]
    assert np.all(with_burst >= const - 1e-12)
    assert (with_burst - const).max() > 0.05 * const.max()
    wide = salpeter_model.bin_counts([-80.0, 85.0], [10.0], burst)[0, 0]
    assert wide == pytest.approx(salpeter_model.white_dwarf_total([10.0], burst)[0], rel=1e-9)
    assert wide > salpeter_model.white_dwarf_total([10.0])[0]


def test_imf_integrals_against_quadrature():
    # number between two masses: analytic power-law integrals against scipy quad of the density
    from scipy.integrate import quad

    for imf in (SALPETER, KROUPA):
        for lo, hi in ((0.05, 0.3), (0.4, 1.0), (0.9, 7.5)):
            if lo < imf.relation.ranges[0].low:
                continue
            ref = quad(imf.density, lo, hi, points=[0.08, 0.5], limit=200)[0]
            assert imf.number_between(lo, hi) == pytest.approx(ref, rel=1e-9)
    # Kroupa is continuous at its breaks
    for b in (0.08, 0.5):
        assert KROUPA.density(b * (1 - 1e-12)) == pytest.approx(KROUPA.density(b * (1 + 1e-12)), rel=1e-9)
    with pytest.raises(ConfigError, match="salpeter"):
        get_imf("chabrier")


def test_imf_sampling_follows_the_cumulative():
    # Kolmogorov-Smirnov test (scipy.stats) of drawn masses against the analytic cumulative number
    from scipy.stats import kstest

    rng = np.random.default_rng(3)
    m = SALPETER.sample(rng, 20000, 0.8, 8.0)
    cdf = lambda x: SALPETER.number_between(0.8, x) / SALPETER.number_between(0.8, 8.0)  # noqa: E731
    assert kstest(m, cdf).pvalue > 1e-3


def _mestel_frame(masses):
    logl = np.round(np.arange(2.0, -8.0001, -0.01), 6)
    rows = [pd.DataFrame({"mass_msun": m, "log_lum": logl, "age_yr": mestel.cooling_age_yr(m, logl, COEFF)})
            for m in masses]
    return pd.concat(rows, ignore_index=True)


def test_numerical_grid_path_reproduces_the_closed_form():
    # The same Mestel law as a table of tracks through CoolingGrid (vectorised bilinear look-ups):
    # the luminosity functions agree to 1 % (mass interpolation between tracks 0.05 Msun apart).
    from cinderclock.cooling.grid import CoolingGrid

    grid = CoolingGrid.from_frame(_mestel_frame(np.round(np.arange(0.5, 1.3001, 0.05), 4)))
    direct = PopulationModel(mestel_lum)
    tabled = PopulationModel(lambda m, t: grid.log_lum_at_age(m, t)[0])
    edges = np.arange(8.0, 17.01, 0.5)
    a = direct.luminosity_function(edges, [8.0, 11.0])
    b = tabled.luminosity_function(edges, [8.0, 11.0])
    big = a > 1e-3 * a.max()
    assert np.allclose(b[big], a[big], rtol=0.01)
    assert tabled.lost_fraction == 0.0


def test_tracks_that_miss_masses_lose_that_share_cleanly():
    # tracks only for 0.6-0.9 Msun: progenitor cells outside lose their weight (recorded), no NaN
    from cinderclock.cooling.grid import CoolingGrid

    grid = CoolingGrid.from_frame(_mestel_frame(np.round(np.arange(0.6, 0.9001, 0.05), 4)))
    pm = PopulationModel(lambda m, t: grid.log_lum_at_age(m, t)[0])
    assert 0.05 < pm.lost_fraction < 0.95
    lf = pm.luminosity_function(np.arange(8.0, 17.01, 0.5), [10.0])
    assert np.all(np.isfinite(lf)) and lf.max() > 0


def test_mass_range_must_lie_in_the_ifmr_range():
    with pytest.raises(ConfigError, match="calibrated initial-mass range"):
        PopulationModel(mestel_lum, mass_range_msun=(0.5, 8.0))
    with pytest.raises(ConfigError, match="exceed"):
        PopulationModel(mestel_lum).bin_counts([10.0, 11.0], [25.0])
