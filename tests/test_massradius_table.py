"""Finite-temperature envelope, the (mass, Teff) table, its vectorised inversion and mass flags.

Sources are named beside each check; status marks refer to /work/shared/reference-values.md.
The envelope is a simplified Mestel/Kramers model: its checks are physical trends, the
consistency with the cooling module's envelope, and internal checks of the solver.
"""

import io

import numpy as np
import pandas as pd
import pytest

from cinderclock.constants import G_SI, K_B_SI, L_SUN_W, M_SUN_KG, M_U_SI, R_SUN_M
from cinderclock.cooling.mestel import envelope_constant_cgs
from cinderclock.massradius import flags, nauenberg
from cinderclock.massradius.composition import CORE_COMPOSITIONS
from cinderclock.massradius.envelope import finite_temperature_radius
from cinderclock.massradius.table import (COLUMNS_BY_ENVELOPE, MassRadiusGrid, _zero_t_radius_function,
                                          build_mass_radius_table)

CO = CORE_COMPOSITIONS["CO"]


@pytest.fixture(scope="module")
def r0_co():
    return _zero_t_radius_function(CO.mu_e, CO.coulomb_charge, True)


@pytest.fixture(scope="module")
def thick():
    """Default table: integrated envelope (cinderclock.envelope), thick hydrogen layer."""
    return build_mass_radius_table("CO", "thick", coulomb=True)


@pytest.fixture(scope="module")
def kramers_thick():
    return build_mass_radius_table("CO", "thick", coulomb=True, envelope="kramers")


@pytest.fixture(scope="module")
def grid(thick):
    return MassRadiusGrid.from_frame(thick)


@pytest.fixture(scope="module")
def kramers_grid(kramers_thick):
    return MassRadiusGrid.from_frame(kramers_thick)


# ---------------------------------------------------------------- envelope physics --------------

@pytest.mark.parametrize("hydrogen", ["thick", "thin"])
@pytest.mark.parametrize("mass", [0.45, 0.6, 1.0, 1.25])
def test_hot_star_larger_and_converges_as_it_cools(r0_co, hydrogen, mass):
    """Finite-temperature radius exceeds the zero-temperature one and falls back to it as Teff
    drops (Shapiro & Teukolsky 1983, sec. 4.1: Delta R ~ k T_c / (mu m_u g) with T_c -> 0 as the
    star cools). Common practice: hot white dwarfs are measurably larger. Bound at 100 K: the
    excess scales as T_c ~ Teff^(8/7), so it is < 0.2 % there."""
    teff = np.array([100.0, 300.0, 1000.0, 3000.0, 10000.0, 30000.0])
    r0 = r0_co(mass)
    out = finite_temperature_radius(mass, teff, r0, hydrogen, CO.mu_e, CO.coulomb_charge)
    excess = out["radius_rsun"] / r0 - 1.0
    assert np.all(excess > 0)
    assert np.all(np.diff(excess) > 0)
    assert excess[0] < 2e-3


def test_thick_hydrogen_layer_is_larger(kramers_thick):
    """Kramers envelope (explicit choice). Hydrogen (mu = 0.5) is lighter than the helium-rich gas
    below (mu = 1.4), so a thick layer gives a thicker envelope (hydrostatic scale height
    ~ kT / (mu m_u g); common practice: thick-H models are larger than thin-H ones at the same mass
    and Teff)."""
    thick = kramers_thick
    thin = build_mass_radius_table("CO", "thin", coulomb=True, envelope="kramers")
    ok = np.isfinite(thick["radius_rsun"]) & np.isfinite(thin["radius_rsun"])
    assert ok.sum() > 10000
    assert np.all(thick["radius_rsun"][ok] >= thin["radius_rsun"][ok])
    assert np.all(thin["radius_rsun"][ok] > thin["radius_zero_t_rsun"][ok])


def test_solution_satisfies_mestel_relation(r0_co):
    """Internal check of the self-consistent solve: L = 4 pi R^2 sigma Teff^4 equals
    C M T_c^3.5 with C from the cooling module (cinderclock.cooling.mestel, same envelope)."""
    m = np.array([0.5, 0.7, 0.9, 1.1])
    t = np.array([6000.0, 15000.0, 25000.0, 50000.0])
    out = finite_temperature_radius(m, t, r0_co(m), "thick", CO.mu_e, CO.coulomb_charge)
    lum_cgs = 10.0 ** out["log_lum"] * L_SUN_W * 1e7
    c = envelope_constant_cgs(X=0.0, Z=0.1, mu=1.4, mu_e=2.0)
    np.testing.assert_allclose(lum_cgs, c * m * out["core_temp_k"] ** 3.5, rtol=1e-10)
    # Shapiro & Teukolsky 1983 sec. 4.1: C ~ 2e6 for X = 0, Z = 0.1, mu = 1.4 (reference-values
    # section 4, M/D, 5 %); re-derived 5.79e5 mu / (mu_e^2 Z (1 + X)) = 2.03e6
    assert c == pytest.approx(2.0e6, rel=0.05)


def test_thin_envelope_limit_of_thickness(r0_co):
    """Internal check against the hand formula of the module docstring in the thin-envelope limit
    (massive, cool star, thin H layer): Delta R = [4.25 k ((T_H - Teff) / mu_H + (T_c - T_H) / mu)
    - 2.5 k T_c / mu_e] / (m_u g), the last term being the non-relativistic T = 0 enthalpy of the
    layer the envelope replaces. Tolerance 1 %: second-order terms in Delta R / R and the
    Coulomb and relativistic corrections to that enthalpy."""
    m, t = 1.0, 5000.0
    r0 = float(r0_co(m))
    out = finite_temperature_radius(m, t, r0, "thin", CO.mu_e, None)   # no Coulomb shift of the surface
    tc = float(out["core_temp_k"])
    g = G_SI * m * M_SUN_KG / (r0 * R_SUN_M) ** 2
    th = float(out["hydrogen_base_temp_k"])
    assert t < th < tc
    dr = (4.25 * K_B_SI * ((th - t) / 0.5 + (tc - th) / 1.4) - 2.5 * K_B_SI * tc / 2.0) / (M_U_SI * g)
    assert (float(out["radius_rsun"]) - r0) * R_SUN_M == pytest.approx(dr, rel=1e-2)


# ---------------------------------------------------------------- table ------------------------

def test_table_layout_and_parquet(thick):
    """The long table has one row per (mass, Teff), plain float columns all described for
    tableio, JSON-ready settings and model references, and survives a Parquet round trip."""
    import json

    assert list(thick.columns) == list(COLUMNS_BY_ENVELOPE["integrated"])
    assert all(dt == np.float64 for dt in thick.dtypes)
    n_m, n_t = thick["mass_msun"].nunique(), thick["teff_k"].nunique()
    assert len(thick) == n_m * n_t
    json.dumps(thick.attrs)
    assert {m["name"] for m in thick.attrs["models"]} >= {"chandrasekhar1939", "salpeter1961",
                                                          "integrated_envelope_H"}
    assert all(m["reference"] for m in thick.attrs["models"])
    buf = io.BytesIO()
    thick.to_parquet(buf)
    back = pd.read_parquet(io.BytesIO(buf.getvalue()))
    pd.testing.assert_frame_equal(back, thick)


def test_radius_falls_with_mass_at_every_teff(thick):
    """At fixed Teff the radius decreases with mass (Chandrasekhar 1939; holds for the
    finite-temperature models too: lower mass means lower gravity and a thicker envelope)."""
    piv = thick.pivot(index="mass_msun", columns="teff_k", values="radius_rsun")
    d = np.diff(piv.to_numpy(), axis=0)
    assert np.all(d[np.isfinite(d)] < 0)


@pytest.mark.parametrize("mass", [0.6, 1.0])
def test_cool_table_near_nauenberg(grid, mass):
    """At 3000 K the table (C/O, Coulomb, thick H) lies within a few per cent of Nauenberg's T = 0
    closed form (C2): the Coulomb term shrinks the core by ~5 % and the envelope adds ~2 % at this
    Teff (both model statements; loose 6 % bound)."""
    r = grid.radius(mass, 3000.0)
    assert abs(r / nauenberg.radius_rsun(mass) - 1.0) < 0.06


# ---------------------------------------------------------------- inversion --------------------

def test_round_trip_mass_logg_mass(grid):
    """Internal check: mass -> log g -> mass and mass -> radius -> mass through the vectorised
    inversion return the input to 1e-4 Msun (linear interpolation on a 0.005 Msun grid)."""
    rng = np.random.default_rng(7)
    m = rng.uniform(0.5, 1.3, 5000)
    t = np.exp(rng.uniform(np.log(4000.0), np.log(40000.0), 5000))
    g = grid.logg(m, t)
    mass, radius, inside = grid.mass_from_logg(g, t)
    assert inside.all()
    np.testing.assert_allclose(mass, m, atol=1e-4)
    np.testing.assert_allclose(radius, grid.radius(m, t), rtol=2e-4)
    r = grid.radius(m, t)
    mass2, logg2, inside2 = grid.mass_from_radius(r, t)
    assert inside2.all()
    np.testing.assert_allclose(mass2, m, atol=1e-4)
    np.testing.assert_allclose(logg2, g, atol=1e-4)


def test_table_matches_direct_model(kramers_grid, r0_co):
    """Internal check (Kramers choice): the interpolated radius at off-grid points agrees with the
    envelope model evaluated directly, to 5e-4 relative (grid spacing 0.005 Msun and 0.014 dex in Teff)."""
    grid = kramers_grid
    rng = np.random.default_rng(3)
    m = rng.uniform(0.5, 1.3, 500)
    t = np.exp(rng.uniform(np.log(3000.0), np.log(60000.0), 500))
    exact = finite_temperature_radius(m, t, r0_co(m), "thick", CO.mu_e, CO.coulomb_charge)["radius_rsun"]
    approx = grid.radius(m, t)
    ok = np.isfinite(exact) & np.isfinite(approx)
    assert ok.mean() > 0.95
    np.testing.assert_allclose(approx[ok], exact[ok], rtol=5e-4)


def test_outside_table_is_flagged(grid):
    """Out-of-range inputs give NaN and inside = False rather than an extrapolation."""
    logg = np.array([8.0, 8.0, 8.0, 11.0, 5.0, np.nan, 8.0])
    teff = np.array([10000.0, 1000.0, 500000.0, 10000.0, 10000.0, 10000.0, np.nan])
    mass, radius, inside = grid.mass_from_logg(logg, teff)
    assert inside.tolist() == [True, False, False, False, False, False, False]
    assert np.isnan(mass[1:]).all() and np.isnan(radius[1:]).all()
    assert np.isnan(grid.radius(np.array([0.05, 1.5]), 10000.0)).all()


def test_solve_prefers_logg_then_photometric_radius(grid):
    """Route choice: log g where finite, else the photometric radius (issue 3, item 3)."""
    teff = np.array([12000.0, 12000.0, 12000.0])
    r = grid.radius(0.8, 12000.0)
    out = grid.solve(teff, logg_cgs=np.array([grid.logg(0.6, 12000.0), np.nan, np.nan]),
                     radius_rsun=np.array([np.nan, r, np.nan]))
    assert out["route"].tolist() == [1, 2, 0]
    np.testing.assert_allclose(out["mass_msun"][:2], [0.6, 0.8], atol=1e-4)
    assert out["inside"].tolist() == [True, True, False]


def test_table_refuses_grids_outside_model_ranges():
    """Valid ranges are data and checked: no table beyond the Newtonian T = 0 model's mass range
    or the envelope model's Teff range (both envelope choices)."""
    from cinderclock.errors import ModelRangeError

    for env in ("integrated", "kramers"):
        with pytest.raises(ModelRangeError):
            build_mass_radius_table("CO", "thick", True, np.array([0.6, 1.40]), np.array([5000.0, 9000.0]),
                                    envelope=env)
        with pytest.raises(ModelRangeError):
            build_mass_radius_table("CO", "thick", True, np.array([0.6, 0.7]), np.array([5000.0, 300000.0]),
                                    envelope=env)


def test_mass_flags():
    """Thresholds 0.45 and 1.05 Msun (common practice) applied to a shard."""
    assert flags.LOW_MASS_MSUN == 0.45 and flags.HIGH_MASS_MSUN == 1.05
    m = np.array([0.30, 0.60, 1.20, np.nan])
    f = flags.mass_flags(m, np.array([True, True, True, False]))
    assert f["low_mass"].tolist() == [True, False, False, False]
    assert f["high_mass"].tolist() == [False, False, True, False]
    assert f["outside_table"].tolist() == [False, False, False, True]


def test_core_trend_at_finite_temperature():
    """Hamada & Salpeter (1961) composition trend carried into the table: at the same mass and
    Teff a higher-Z core is smaller (He > C/O > O/Ne), from the Coulomb term (from memory; only
    the ordering is checked)."""
    mass_grid = np.array([0.40, 0.45, 0.50])
    teff_grid = np.array([8000.0, 12000.0])
    r = {core: build_mass_radius_table(core, "thin", True, mass_grid, teff_grid)["radius_rsun"].to_numpy()
         for core in ("He", "CO", "ONe")}
    assert np.all(r["He"] > r["CO"]) and np.all(r["CO"] > r["ONe"])


def test_regular_inverse_agrees_with_the_exact_inversion(grid):
    # internal check: the resampled inversion used for Monte Carlo draws stays within 1e-4 Msun of
    # the exact one wherever both give a mass, and gives a mass almost everywhere the exact one does
    rng = np.random.default_rng(3)
    teff = np.exp(rng.uniform(np.log(4000.0), np.log(80000.0), 20000))
    mass = rng.uniform(0.4, 1.2, teff.size)
    for kind, value in (("logg", grid.logg(mass, teff)), ("radius", grid.radius(mass, teff))):
        exact = (grid.mass_from_logg if kind == "logg" else grid.mass_from_radius)(value, teff)[0]
        fast = grid.fast_inverse(kind)(value, teff)
        both = np.isfinite(exact) & np.isfinite(fast)
        assert np.max(np.abs(exact[both] - fast[both])) < 1e-4
        assert both.sum() >= 0.99 * np.isfinite(exact).sum()
        assert not (np.isfinite(fast) & ~np.isfinite(exact)).any()
