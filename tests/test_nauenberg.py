"""Nauenberg (1972) zero-temperature mass-radius relation against values derived from its formula."""

import numpy as np
import pytest

from cinderclock.massradius.nauenberg import NAUENBERG_1972, NauenbergInverse, logg_cgs, m3_msun, radius_rsun

# Values marked D in the project's reference list: computed exactly from the published formula
# R/Rsun = (0.0225/mu_e) sqrt((M/M3)^(-2/3) - (M/M3)^(2/3)), M3 = 5.816/mu_e^2 (Nauenberg 1972,
# ApJ 175, 417, quoted identically by two secondary sources) with IAU/CODATA constants.
# (mass Msun, mu_e, radius Rsun, log g, rel. tol on R, abs. tol on log g)
TABLE = [
    (0.6, 2.0, 0.012578, 8.017, 1e-4, 1e-3),   # R = 8750 km
    (1.0, 2.0, 0.00799, 8.633, 2e-4, 1e-3),    # R = 5558 km (5 figures quoted: tolerance 2e-4)
]


@pytest.mark.parametrize("mass,mu_e,radius,logg,rtol,gtol", TABLE)
def test_published_formula_values(mass, mu_e, radius, logg, rtol, gtol):
    r = radius_rsun(mass, mu_e)
    assert r == pytest.approx(radius, rel=rtol)
    assert logg_cgs(mass, r) == pytest.approx(logg, abs=gtol)


def test_limiting_mass_of_the_fit():
    # M3 = 5.816 / mu_e^2 (Nauenberg 1972): 1.454 Msun for mu_e = 2.
    assert m3_msun(2.0) == pytest.approx(1.454, rel=1e-12)
    assert np.isnan(radius_rsun(1.5, 2.0))


def test_heavier_is_smaller():
    # Degenerate stars shrink as mass grows (Chandrasekhar 1931; a property of the relation).
    m = np.linspace(0.2, 1.35, 50)
    assert np.all(np.diff(radius_rsun(m)) < 0)


def test_inversion_round_trip():
    # internal check: the tabulated inversion returns the mass that produced log g and radius
    inv = NauenbergInverse()
    m = np.linspace(0.3, 1.3, 101)
    r = radius_rsun(m)
    assert np.allclose(inv.mass_from_logg(logg_cgs(m, r)), m, atol=2e-4)
    assert np.allclose(inv.mass_from_radius(r), m, atol=2e-4)


def test_valid_range_is_data_and_checked():
    ok = NAUENBERG_1972.inside(mass=np.array([0.05, 0.6, 1.4]))
    assert ok.tolist() == [False, True, False]
