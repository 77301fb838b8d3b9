"""Cooling tables and vectorised look-ups.

The Mestel table is checked against Mestel's closed form (reference-values.md section 4, exact
algebra, D); radii against the T = 0 Chandrasekhar value (section 2, D); Teff against the
Stefan-Boltzmann law with IAU 2015 nominal L_sun and R_sun (astropy).
"""

import numpy as np
import pytest

from cinderclock.cooling import mestel
from cinderclock.cooling.composition import core_composition
from cinderclock.cooling.envelope import envelope_model
from cinderclock.cooling.grid import (STATUS_FAR_FUTURE, STATUS_INSIDE, STATUS_INVALID,
                                      STATUS_LUMINOSITY_OUTSIDE, STATUS_MASS_OUTSIDE)
from cinderclock.cooling.spread import model_spread
from cinderclock.cooling.table import FAINT_LIMIT_LOG_LUM, CoolingGrid, build_cooling_table, table_columns

MASSES = [0.5, 0.55, 0.6, 0.65, 0.7]


@pytest.fixture(scope="module")
def mestel_frame():
    return build_cooling_table("mestel", masses=MASSES)


@pytest.fixture(scope="module")
def mestel_grid(mestel_frame):
    return CoolingGrid.from_frame(mestel_frame)


@pytest.fixture(scope="module")
def k_coefficient():
    return mestel.age_coefficient_yr(core_composition("CO").abar, envelope_cgs=envelope_model("He").constant_cgs())


def test_mestel_table_lookup_matches_closed_form(mestel_grid, k_coefficient):
    # Bilinear look-up in (mass, log age): exact in log L for a power law; linear in mass costs
    # < 1e-3 relative at 0.05 Msun spacing (curvature of M^(5/7)).
    rng = np.random.default_rng(3)
    m = rng.uniform(0.5, 0.7, 20000)
    ll = rng.uniform(-5.4, 1.9, 20000)
    age, status = mestel_grid.age_yr(m, ll)
    assert np.all(status == STATUS_INSIDE)
    assert np.allclose(age, mestel.cooling_age_yr(m, ll, k_coefficient), rtol=1e-3)


def test_inverse_lookup(mestel_grid, k_coefficient):
    # log L at age against Mestel's inverse (exact algebra): tolerance 1e-3 dex.
    m = np.array([0.5, 0.6, 0.63, 0.7])
    t = np.array([1e8, 1e9, 3e9, 8e9])
    ll, status = mestel_grid.log_lum_at_age(m, t)
    assert np.all(status == STATUS_INSIDE)
    assert np.allclose(ll, mestel.luminosity_at_age(m, t, k_coefficient), atol=1e-3)
    # round trip on a track node (internal check)
    age, _ = mestel_grid.age_yr(0.6, -3.37)
    back, _ = mestel_grid.log_lum_at_age(0.6, age)
    assert back == pytest.approx(-3.37, abs=1e-4)


def test_status_codes(mestel_grid):
    m = np.array([0.6, 0.4, 0.6, 0.6, 0.6, np.nan])
    ll = np.array([-3.0, -3.0, 2.5, -7.0, -19.0, -3.0])
    age, status = mestel_grid.age_yr(m, ll)
    assert list(status) == [STATUS_INSIDE, STATUS_MASS_OUTSIDE, STATUS_LUMINOSITY_OUTSIDE, STATUS_FAR_FUTURE,
                            STATUS_LUMINOSITY_OUTSIDE, STATUS_INVALID]
    assert np.isfinite(age[[0, 3]]).all() and np.isnan(age[[1, 2, 4, 5]]).all()
    # far future ages are still the model's value (marked as extrapolation)
    _, s = mestel_grid.log_lum_at_age([0.6, 0.6, 0.6], [1e13, -5.0, 1e30])
    assert list(s) == [STATUS_FAR_FUTURE, STATUS_INVALID, STATUS_LUMINOSITY_OUTSIDE]


def test_far_future_reaches_1e_minus_17(mestel_grid, k_coefficient):
    # Issue item 6: cooling time to 1e-17 Lsun, marked as extrapolation. Mestel's closed form
    # (section 4, D) is the reference; tolerance 1e-3 as above.
    age, status = mestel_grid.age_yr(0.6, -17.0)
    assert status == STATUS_FAR_FUTURE
    assert age == pytest.approx(mestel.cooling_age_yr(0.6, -17.0, k_coefficient), rel=1e-3)


def test_table_columns_radius_and_teff(mestel_frame):
    df = mestel_frame
    assert set(table_columns()) - {"grey_boundary"} == set(df.columns)   # Mestel: zero-T radii, no grey flag
    assert df.attrs["cooling_model"]["reference"]
    assert np.all(df["far_future"] == (df["log_lum"] < FAINT_LIMIT_LOG_LUM))
    row = df[(df["mass_msun"] == 0.6) & np.isclose(df["log_lum"], -3.0)].iloc[0]
    # Section 2 (D): full T = 0 Chandrasekhar model, 0.6 Msun, mu_e = 2: R = 0.01271 Rsun (0.5 %)
    assert row["radius_rsun"] == pytest.approx(0.01271, rel=5e-3)
    # Stefan-Boltzmann with IAU 2015 nominal L_sun, R_sun (astropy), exact algebra
    from astropy import constants as c
    from astropy import units as u
    lum = 10 ** row["log_lum"] * c.L_sun
    teff = ((lum / (4 * np.pi * (row["radius_rsun"] * c.R_sun) ** 2 * c.sigma_sb)) ** 0.25).to(u.K).value
    assert row["teff_k"] == pytest.approx(teff, rel=1e-10)


def test_table_writes_with_tableio(tmp_path, mestel_frame):
    # Internal check: the table is self-describing Parquet through cinderclock.tableio.
    from cinderclock.tableio import read_table, write_table

    path = tmp_path / "cooling.parquet"
    write_table(mestel_frame, path, table_columns(), {"models": [mestel_frame.attrs["cooling_model"]]})
    back, specs, meta = read_table(path)
    assert specs["age_yr"].unit == "yr"
    grid = CoolingGrid.from_frame(back)
    assert grid.age_yr(0.6, -3.0)[0] == pytest.approx(CoolingGrid.from_frame(mestel_frame).age_yr(0.6, -3.0)[0])


def test_numerical_table_and_model_spread(mestel_grid):
    df = build_cooling_table("numerical", masses=[0.55, 0.6, 0.65])
    grid = CoolingGrid.from_frame(df)
    assert df["crystallized_fraction"].between(0, 1).all()
    m = np.array([0.58, 0.6, 0.62, 0.8])
    ll = np.array([-2.0, -3.0, -4.0, -3.0])
    out = model_spread(grid, mestel_grid, m, ll)
    ok = out["status"] == STATUS_INSIDE
    assert list(ok) == [True, True, True, False]
    assert np.allclose(out["spread_yr"][ok], np.abs(out["age_secondary_yr"] - out["age_yr"])[ok])
    assert np.isnan(out["spread_yr"][3])
    # teff interpolation inside the table is positive and decreases with luminosity (internal)
    teff = grid.interpolate("teff_k", 0.6, [-1.0, -2.0, -3.0])
    assert np.all(np.diff(teff) < 0)
