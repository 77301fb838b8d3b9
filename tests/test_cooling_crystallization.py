"""Coupling parameter, melting temperature, ion plasma temperature and heat capacities.

Check values from /work/shared/reference-values.md section 5 (status D: derived exactly with
astropy constants from the coupling-parameter formula of Raffelt 1996, eq. D.16, and the melting
value Gamma_m = 175 of Potekhin & Chabrier 2000).
"""

import numpy as np
import pytest

from cinderclock.cooling import crystallization as cr
from cinderclock.cooling import heat_capacity as hc


def test_coupling_coefficient_numeric_form():
    # Section 5 (D): Gamma = 2.275e5 Z^2 (rho/A)^(1/3) / T; tolerance 1e-3 as listed (the
    # published numeric form has four significant figures).
    for core, z, a in [("C", 6, 12), ("O", 8, 16), ("He", 2, 4)]:
        expected = 2.275e5 * z**2 / a ** (1.0 / 3.0)
        assert cr.coupling_coefficient_cgs(core) == pytest.approx(expected, rel=1e-3)


# (core, rho g cm^-3, Gamma_m, T_cryst K) -- section 5, status D, tolerance rel 1e-3 as listed.
T_CRYST = [
    ("C", 3.2e6, 175.0, 3.01e6),   # centre of the 0.6 Msun T = 0 model
    ("C", 3.2e6, 178.0, 2.96e6),   # older Gamma_m of Stringfellow, DeWitt & Slattery 1990
    ("O", 3.2e6, 175.0, 4.86e6),
    ("C", 1.0e6, 175.0, 2.04e6),
]


@pytest.mark.parametrize("core, rho, gamma_m, t_cryst", T_CRYST)
def test_crystallization_temperature(core, rho, gamma_m, t_cryst):
    # The quoted values have three significant figures: allow half a unit of the last digit.
    assert cr.melting_temperature_k(rho, core, gamma_m) == pytest.approx(t_cryst, abs=0.005e6)
    # consistency: the coupling parameter at that temperature is Gamma_m
    t = cr.melting_temperature_k(rho, core, gamma_m)
    assert cr.coupling_parameter(rho, t, core) == pytest.approx(gamma_m, rel=1e-12)


def test_melting_gamma_is_potekhin_chabrier():
    # Potekhin & Chabrier 2000 (PRE 62, 8554): Gamma_m = 175.0 +- 0.4.
    assert cr.GAMMA_MELT == 175.0
    # latent heat 0.77 kT per ion (Salaris et al. 1997; from memory, +-0.05 in section 5)
    assert cr.LATENT_HEAT_KT == pytest.approx(0.77, abs=0.05)


def test_ion_plasma_temperature():
    # Section 5 (D): T_p = 3.916e6 K at Z/A = 1/2, rho = 1e6 g cm^-3; rel 1e-3.
    assert cr.ion_plasma_temperature_k(1e6, "C") == pytest.approx(3.916e6, rel=1e-3)
    assert cr.ion_plasma_temperature_k(1e6, "CO") == pytest.approx(3.916e6, rel=1e-3)
    # scaling with rho^(1/2) (Omega_p^2 proportional to n_i)
    assert cr.ion_plasma_temperature_k(4e6, "O") == pytest.approx(2 * 3.916e6, rel=1e-3)


def test_crystallized_fraction_grows_outward():
    # Internal check on a synthetic profile rho = rho_c (1 - q): the solid is the inner sphere
    # where rho > rho_melt(T), so q_solid = 1 - rho_melt / rho_c exactly.
    q = np.linspace(0, 1, 2001)
    rho_c = 3.2e6
    rho = rho_c * (1 - q)
    t = np.array([4e6, 3.0e6, 2.0e6, 1.0e6])
    got = cr.crystallized_mass_fraction(t, q, rho, "C")
    expected = np.clip(1 - cr.melting_density_cgs(t, "C") / rho_c, 0, 1)
    assert np.allclose(got, expected, atol=1e-9)
    assert got[0] == 0.0 and np.all(np.diff(got) > 0)


def test_debye_function_limits_and_quadrature():
    from scipy.integrate import quad

    # High-T limit: Dulong-Petit, D -> 1 - x^2/20 (exact series).
    assert hc.debye_function(1e-4) == pytest.approx(1.0, abs=1e-9)
    # Low-T limit (section 5, D): c_v = 233.78 k (T/theta_D)^3 per ion, i.e. D = (4 pi^4/5) / x^3.
    x = 80.0
    assert 3 * hc.debye_function(x) == pytest.approx(233.78 / x**3, rel=1e-4)
    # Intermediate values against direct quadrature (scipy), tolerance 1e-6.
    for x in (0.3, 1.0, 3.0, 10.0, 40.0):
        exact = 3 / x**3 * quad(lambda t: t**4 * np.exp(-t) / (1 - np.exp(-t)) ** 2, 0, x)[0]
        assert hc.debye_function(x) == pytest.approx(exact, rel=1e-6)


def test_ion_heat_capacity_liquid_and_solid():
    # Standard (section 5, D): 3/2 k per ion in the ideal liquid, 3 k in the classical solid.
    c = hc.ion_heat_capacity_kb(np.array([1e7, 1e9]), np.array([1e6, 1e6]), np.array([False, True]))
    assert c[0] == 1.5
    assert c[1] == pytest.approx(3.0, rel=1e-5)


def test_electron_heat_capacity_nonrelativistic_limit():
    """Degenerate electrons: c_v = (pi^2/2) k (kT / E_F) per electron when p_F << m_e c.

    Standard Sommerfeld result (common practice). E_F = p_F^2 / 2 m_e with
    p_F = hbar (3 pi^2 n_e)^(1/3). Tolerance 1e-3 for x_F = 0.02 (relativistic correction ~x^2/2).
    """
    from astropy import constants as c

    rho, ye, t = 10.0, 0.5, 1.0                  # very degenerate at 1 K
    n_e = rho * 1e3 * ye / c.u.si.value
    p_f = c.hbar.si.value * np.cbrt(3 * np.pi**2 * n_e)
    e_f = p_f**2 / (2 * c.m_e.si.value)
    expected = 0.5 * np.pi**2 * c.k_B.si.value * t / e_f
    got = hc.electron_heat_capacity_kb(t, rho, ye, degenerate_only=True)
    assert got == pytest.approx(expected, rel=1e-3)
    # the bridged value never exceeds the ideal-gas 3/2 and tends to it when hot
    hot = hc.electron_heat_capacity_kb(1e12, 1.0, 0.5)
    assert 1.45 < hot <= 1.5
