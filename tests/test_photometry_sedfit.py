"""SED fit: round trip from synthetic stars (independent synthesis) to Teff, radius and L."""

import numpy as np
import pytest

from cinderclock.constants import L_SUN_W, PC_M, R_SUN_M, SIGMA_SB_SI
from cinderclock.errors import InputError
from cinderclock.photometry.consistency import overluminosity
from cinderclock.photometry.grid import PhotometryGrid
from cinderclock.photometry.sedfit import METHOD_COLOUR, METHOD_FIXED, METHOD_NONE, METHOD_SED, fit_sed
from cinderclock.photometry.table import build_photometry_table, default_teff_grid_k

import test_photometry_reference as ref

BANDS = [
    {"key": "G", "passband": "gaiadr3-G", "system": "vega"},
    {"key": "BP", "passband": "gaiadr3-BP", "system": "vega"},
    {"key": "RP", "passband": "gaiadr3-RP", "system": "vega"},
    {"key": "g", "passband": "sdss2010-g", "system": "ab"},
    {"key": "r", "passband": "sdss2010-r", "system": "ab"},
]
PASSBANDS = [b["passband"] for b in BANDS]
SYSTEMS = [b["system"] for b in BANDS]


@pytest.fixture(scope="module")
def table():
    return build_photometry_table(BANDS, default_teff_grid_k(3000, 150000, 0.002),
                                  np.round(np.arange(0, 0.301, 0.02), 10), law="F99", r_v=3.1)


@pytest.fixture(scope="module")
def grid(table):
    return PhotometryGrid.from_frame(table)


def _log_lum(radius_rsun, teff):
    return np.log10(4 * np.pi * (radius_rsun * R_SUN_M) ** 2 * SIGMA_SB_SI * teff**4 / L_SUN_W)


def test_round_trip_recovers_teff_and_luminosity_within_errors(grid):
    # Synthetic stars -> photometry from an independent synthesis (tests/test_photometry_reference.py:
    # frequency-space integration, `extinction` F99, published Gaia zero points) -> seeded Gaussian
    # noise -> fit. For a correct fit with correct errors the pulls (fit - truth)/error are close
    # to N(0, 1) and chi2 follows chi-square with 5 - 2 = 3 degrees of freedom (mean 3).
    # Tolerances for 1500 stars (statistics, common practice): mean pull within 0.12 (4.6 standard
    # errors of 0.026, leaving room for the small bias of a non-linear fit), pull spread within
    # 10%, the fraction inside 1 sigma within 0.05 of 0.683, mean chi2 within 0.25 of 3 (4 standard
    # errors of sqrt(6/1500)).
    rng = np.random.default_rng(20240501)
    n = 1500
    teff = 10 ** rng.uniform(np.log10(5000), np.log10(40000), n)
    radius = rng.uniform(0.008, 0.02, n)
    dist = rng.uniform(20, 150, n)
    ebv = rng.uniform(0, 0.25, n)
    theta = (radius * R_SUN_M / (dist * PC_M)) ** 2
    true = ref.magnitudes(PASSBANDS, SYSTEMS, teff, theta, ebv)
    err = rng.uniform(0.01, 0.04, true.shape)
    obs = true + err * rng.standard_normal(true.shape)

    fit = fit_sed(obs, err, grid, ebv=ebv, distance_pc=dist)
    assert np.all(fit["method"] == METHOD_SED) and np.all(fit["n_bands"] == 5)
    # the fit works in log Teff, so its Teff error is symmetric in log: pull in ln Teff
    pulls = {"teff": np.log(fit["teff_k"] / teff) / (fit["teff_err_k"] / fit["teff_k"]),
             "log_lum": (fit["log_lum"] - _log_lum(radius, teff)) / fit["log_lum_err"]}
    for name, p in pulls.items():
        assert abs(p.mean()) < 0.12, name
        assert 0.9 < p.std() < 1.1, name
        assert abs(np.mean(np.abs(p) < 1) - 0.683) < 0.05, name
    assert abs(fit["chi2"].mean() - 3.0) < 0.25
    # radius and M_bol are consistent with log L (IAU 2015 B2; L = 4 pi R^2 sigma T^4)
    assert np.allclose(fit["log_lum"], _log_lum(fit["radius_rsun"], fit["teff_k"]), atol=1e-9)
    assert np.allclose(fit["mbol"], -2.5 * fit["log_lum"] + 4.739996, atol=1e-5)


@pytest.mark.parametrize("teff", [6000.0, 9000.0, 20000.0])
def test_two_bands_give_the_single_colour_temperature(grid, teff):
    # Two bands, two parameters: the fit must return the Teff whose colour matches (chi2 = 0).
    # Noise-free photometry from the independent synthesis, so the answer is the true Teff; 0.2%
    # covers the F99 implementations' 4e-4 difference and table interpolation.
    theta = (0.012 * R_SUN_M / (50 * PC_M)) ** 2
    obs = ref.magnitudes(PASSBANDS, SYSTEMS, [teff], theta, 0.05)
    obs[:, [0, 3, 4]] = np.nan                  # only BP and RP
    fit = fit_sed(obs, np.full_like(obs, 0.01), grid, ebv=np.array([0.05]), distance_pc=[50.0])
    assert fit["method"][0] == METHOD_COLOUR and fit["n_bands"][0] == 2
    assert fit["teff_k"][0] == pytest.approx(teff, rel=2e-3)
    assert fit["chi2"][0] < 1e-3
    assert fit["radius_rsun"][0] == pytest.approx(0.012, rel=3e-3)


def test_fixed_teff_sun_closure(grid):
    # A blackbody with the IAU 2015 B3 nominal solar Teff (5772 K) and radius at 10 pc, fitted at
    # fixed Teff: L = 3.828e26 W (log L = 0 to 1e-4 since the nominal values are rounded) and
    # M_bol = 4.74 (IAU 2015 B2). Tolerance 1e-3 dex / 0.003 mag for the grid interpolation.
    theta = (R_SUN_M / (10 * PC_M)) ** 2
    obs = ref.magnitudes(PASSBANDS, SYSTEMS, [5772.0], theta, 0.0)
    obs[0, 1:] = np.nan                         # a single band is enough at fixed Teff
    fit = fit_sed(obs, np.full_like(obs, 0.01), grid, ebv=0.0, distance_pc=[10.0],
                  teff_fixed_k=[5772.0], teff_fixed_err_k=[0.0])
    assert fit["method"][0] == METHOD_FIXED and fit["n_bands"][0] == 1
    assert fit["log_lum"][0] == pytest.approx(0.0, abs=1e-3)
    assert fit["mbol"][0] == pytest.approx(4.74, abs=0.003)
    assert fit["radius_rsun"][0] == pytest.approx(1.0, rel=1e-3)


def test_missing_data_and_grid_edges(grid):
    obs = np.full((3, 5), np.nan)
    obs[1, 0] = 15.0                             # one band, Teff free: no fit
    obs[2] = ref.magnitudes(PASSBANDS, SYSTEMS, [8000.0], 1e-22, 0.0)[0]
    fit = fit_sed(obs, np.full_like(obs, 0.02), grid, ebv=np.array([0.0, 0.0, 0.5]), distance_pc=[10, 10, 10])
    # star 2 asks for E(B-V) = 0.5, beyond the grid's 0.3: no fit rather than extrapolation
    assert list(fit["method"]) == [METHOD_NONE] * 3
    assert list(fit["n_bands"]) == [0, 1, 5]
    assert np.isnan(fit["teff_k"]).all()


def test_hot_star_beyond_grid_is_flagged(grid):
    # A 200,000 K star lies beyond the 150,000 K end of the grid: Teff is a bound, flagged.
    obs = ref.magnitudes(PASSBANDS, SYSTEMS, [200000.0], 1e-24, 0.0)
    fit = fit_sed(obs, np.full_like(obs, 0.01), grid, ebv=0.0)
    assert fit["teff_at_grid_edge"][0]


def test_unresolved_twin_is_overluminous(grid):
    # Two identical stars (Teff 12,000 K, R 0.0125 Rsun) unresolved: twice the flux, so at the
    # spectroscopic Teff the photometric radius is sqrt(2) larger (flux ∝ R^2; exact) and the
    # excess is 2.5 log10 2 = 0.753 mag. A single star must not be flagged.
    theta = (0.0125 * R_SUN_M / (40 * PC_M)) ** 2
    single = ref.magnitudes(PASSBANDS, SYSTEMS, [12000.0], theta, 0.0)[0]
    obs = np.vstack([single, single - 2.5 * np.log10(2.0)])
    rng = np.random.default_rng(7)
    obs = obs + 0.01 * rng.standard_normal(obs.shape)
    fit = fit_sed(obs, np.full_like(obs, 0.01), grid, ebv=0.0, distance_pc=[40.0, 40.0],
                  distance_lo_pc=[39.6, 39.6], distance_hi_pc=[40.4, 40.4],
                  teff_fixed_k=[12000.0, 12000.0], teff_fixed_err_k=[100.0, 100.0])
    flag = overluminosity(fit["radius_rsun"], fit["radius_err_rsun"], 0.0125, 0.0002)
    assert list(flag["overluminous"]) == [False, True]
    assert flag["radius_ratio"][1] == pytest.approx(np.sqrt(2.0), rel=0.02)
    assert flag["excess_mag"][1] == pytest.approx(2.5 * np.log10(2.0), abs=0.03)


def test_overluminosity_thresholds():
    # Table: (R_phot, err, R_exp, flagged?) with defaults ratio > 2**0.25 and > 3 sigma.
    cases = [(0.0125 * 1.41, 0.0002, 0.0125, True),     # equal twin, significant
             (0.0125 * 1.05, 0.0001, 0.0125, False),    # significant but small ratio
             (0.0125 * 1.41, 0.0020, 0.0125, False),    # large ratio, 2.6 sigma only
             (np.nan, 0.0002, 0.0125, False)]
    rp, sp, re, want = map(np.array, zip(*cases))
    got = overluminosity(rp, sp, re)["overluminous"]
    assert list(got) == list(want)


def test_table_round_trip_and_validation(table, grid):
    # internal check: from_frame(to_frame) preserves the table; irregular tables are rejected
    back = grid.to_frame()
    for col in table.columns:
        np.testing.assert_allclose(back[col].to_numpy(), table[col].to_numpy(), rtol=1e-12)
    assert "blackbod" in grid.metadata["caution"].lower()
    with pytest.raises(InputError, match="not regular"):
        PhotometryGrid.from_frame(table.drop(index=5))
    with pytest.raises(InputError, match="duplicate"):
        PhotometryGrid.from_frame(table.iloc[[0, 0, 1]])


def test_grid_interpolation_accuracy(grid):
    # The fine log-Teff table interpolated linearly reproduces the independent synthesis between
    # nodes to 5e-4 mag (F99 implementations differ by <= 4e-4 in A_lambda/A_V, times A_V <= 0.6).
    t = np.array([3517.0, 7777.0, 15321.0, 51234.0])
    e = np.array([0.0, 0.07, 0.13, 0.2])
    ours = grid.magnitudes(t, e)
    theirs = ref.magnitudes(PASSBANDS, SYSTEMS, t, 1.0, e)
    np.testing.assert_allclose(ours, theirs, atol=5e-4)
