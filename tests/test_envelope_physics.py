"""Envelope micro-physics (cinderclock.envelope): Fermi-Dirac gas, Saha ionization, adiabatic
gradient, opacities, mixing length. Sources beside each check; "from memory" values are loose."""

import numpy as np
import pytest
from scipy.integrate import quad

from cinderclock.constants import H_SI, K_B_SI, M_E_SI
from cinderclock.envelope.convection import mlt_excess, temperature_gradient
from cinderclock.envelope.eos import HELIUM, HYDROGEN, eos_table, gas_state
from cinderclock.envelope.fermi import electron_gas, fermi_three_halves
from cinderclock.envelope.opacity import hminus_bf_cross_section, radiative_opacity

K = K_B_SI * 1e7
H = H_SI * 1e7
ME = M_E_SI * 1e3


@pytest.mark.parametrize("eta", [-20.0, -2.0, 0.0, 3.0, 30.0, 149.0, 300.0])
def test_fermi_three_halves_against_quadrature(eta):
    """F_3/2 against scipy's adaptive quadrature of its definition (general-purpose library);
    1e-6 covers the table interpolation and the Sommerfeld tail above eta = 150."""
    ref = quad(lambda x: x**1.5 / (np.exp(min(x - eta, 700.0)) + 1.0), 0.0, max(eta, 0.0) + 80.0,
               points=[max(eta, 0.0)] if eta > 0 else None, limit=400, epsabs=0, epsrel=1e-12)[0]
    assert fermi_three_halves(eta) == pytest.approx(ref, rel=1e-6)


def test_electron_gas_limits():
    """Non-degenerate limit P = n_e k T (classical ideal gas) and strongly degenerate
    non-relativistic limit P = (3 pi^2)^(2/3) hbar^2 n^(5/3) / (5 m_e) (e.g. Shapiro & Teukolsky
    1983, sec. 2.3; common practice). Tolerances: 1e-6 (Antia's inverse fit, 4e-9, and the
    table) and 1e-3 (relativistic correction 2.4e-4 at x = 0.026; thermal part at T = 1e3 K nil)."""
    n, t = 1e10, 1e6
    assert electron_gas(n, t)["pressure"] == pytest.approx(n * K * t, rel=1e-6)
    n = 1e25                       # x = p_F / m_e c = 0.026: relativistic correction (5/14) x^2 = 2.4e-4
    hbar = H / (2 * np.pi)
    p_deg = (3 * np.pi**2) ** (2 / 3) * hbar**2 * n ** (5 / 3) / (5 * ME)
    out = electron_gas(n, 1e3)
    assert out["eta"] > 1e3
    assert out["pressure"] == pytest.approx(p_deg, rel=1e-3)


@pytest.mark.parametrize("temperature", [8000.0, 10000.0, 12000.0, 16000.0])
def test_hydrogen_saha_at_low_density(temperature):
    """Textbook Saha equation for hydrogen, n_e n_p / n_H = (2 pi m_e k T / h^2)^(3/2)
    exp(-13.598 eV / kT) (g_p / g_H = 1/2 times the electron's 2; e.g. Rybicki & Lightman 1979,
    eq. 9.45). At rho = 1e-12 g cm^-3 the gas is non-degenerate and the occupation probabilities
    are 1 - 1e-12, so the two agree to the bisection and Antia-fit accuracy (1e-5)."""
    st = gas_state(1e-12, temperature, HYDROGEN)
    f = st["fractions"]
    n_h, n_p, n_e = f[..., 0] * st["n_nuc"], f[..., 1] * st["n_nuc"], st["n_e"]
    rhs = (2 * np.pi * ME * K * temperature / H**2) ** 1.5 * np.exp(-13.598 * 1.602176634e-12 / (K * temperature))
    assert float(n_e * n_p / n_h) == pytest.approx(rhs, rel=1e-5)


def test_pressure_ionization_at_high_density():
    """Hard-sphere occupation probabilities (after Hummer & Mihalas 1988) ionise the gas fully at
    high density where thermal ionization alone would leave He II: at 1e3 g cm^-3 and 5e5 K (the
    deep helium layer of a cool white dwarf) He is > 99.9 % He III (common practice: pressure
    ionization above ~1-10 g cm^-3). Known limit: colder than ~1e5 K at such densities the
    degenerate electrons' e^-eta wins and the Saha form recombines the gas (see eos docstring)."""
    st = gas_state(1e3, 5e5, HELIUM)
    assert st["fractions"][..., 2] > 0.999


@pytest.mark.parametrize("symbol, log_t, log_p", [("He", 6.5, 12.0), ("H", 6.0, 10.0), ("H", 3.5, 4.0)])
def test_adiabatic_gradient_of_ideal_monatomic_gas(symbol, log_t, log_p):
    """nabla_ad = 2/5 for a fully ionised (or fully neutral) non-degenerate monatomic ideal gas
    (Kippenhahn, Weigert & Weiss 2012, eq. 6.1x; common practice). Tolerance 0.005: numerical
    derivative on the 0.025 x 0.06 dex table."""
    tab = eos_table(symbol)
    i = int(np.argmin(np.abs(tab.log_t - log_t)))
    j = int(np.argmin(np.abs(tab.log_p - log_p)))
    assert tab.nabla_ad[i, j] == pytest.approx(0.4, abs=0.005)


def test_hydrogen_ionization_zone_lowers_nabla_ad():
    """In the hydrogen ionization zone nabla_ad drops well below 0.4 (to ~0.1; Kippenhahn, Weigert
    & Weiss 2012, sec. 14.3, Fig. 14.x; common practice)."""
    tab = eos_table("H")
    i = int(np.argmin(np.abs(tab.log_t - 4.0)))
    j = int(np.argmin(np.abs(tab.log_p - 4.0)))
    assert tab.nabla_ad[i, j] < 0.15


def test_kramers_free_free_and_thomson_limits():
    """Rosseland mean of fully (pressure-)ionised helium against Kramers' free-free law plus Thomson
    scattering, kappa = 3.68e22 (1 + X)(X + Y) rho T^-3.5 + 0.2 (1 + X) cm^2 g^-1 (g_ff = 1;
    e.g. Hansen, Kawaler & Trimble 2004, eqs. 4.xx; from memory of the coefficient). At rho = 1e4,
    T = 1e7 the electrons are degenerate (eta ~ 9), and Pauli blocking can only lower free-free
    absorption, so the Kramers sum is an upper bound and Thomson a lower one (1 % slack); at
    lower density He II survives and adds bound-free, so no clean Kramers point exists for He.
    Thomson scattering alone for hot thin hydrogen, 0.2 (1 + X) = 0.40 (1 %)."""
    t, rho = 1e7, 1e4
    st = gas_state(rho, t, HELIUM)
    k = float(radiative_opacity(st, np.array(t), np.array(rho), HELIUM))
    assert 0.2 * 0.99 < k < 1.01 * (3.68e22 * rho * t**-3.5 + 0.2)
    assert k > 1.5 * 0.2                      # free-free still matters there
    st = gas_state(1e-8, 1e7, HYDROGEN)
    assert float(radiative_opacity(st, np.array(1e7), np.array(1e-8), HYDROGEN)) == pytest.approx(0.40, rel=0.01)


def test_hminus_cross_section_peak():
    """H- photodetachment peaks near 8,500 A at about 4e-17 cm^2 (Wishart 1979 as plotted in
    Gray 2005, Fig. 8.x; from memory, 10 %) and vanishes beyond the 16,419 A threshold."""
    lam = np.linspace(4000.0, 16000.0, 2401)
    s = hminus_bf_cross_section(lam)
    assert lam[np.argmax(s)] == pytest.approx(8500.0, abs=700.0)
    assert s.max() == pytest.approx(4.0e-17, rel=0.1)
    assert hminus_bf_cross_section(np.array([17000.0]))[0] == 0.0


@pytest.mark.parametrize("u, w", [(1e-9, 0.3), (1e-3, 0.3), (1.0, 0.3), (1e6, 0.3)])
def test_mlt_cubic_and_limits(u, w):
    """Kippenhahn, Weigert & Weiss (2012) eq. 7.18: (xi - U)^3 + (8U/9)(xi^2 - U^2 - W) = 0 with
    xi^2 = nabla - nabla_ad + U^2; efficient limit nabla -> nabla_ad, inefficient nabla -> nabla_rad."""
    ex = float(mlt_excess(u, w))
    xi = np.sqrt(ex + u * u)
    resid = (xi - u) ** 3 + (8 * u / 9) * (xi * xi - u * u - w)
    assert abs(resid) <= 1e-9 * max(1.0, u**3)
    assert 0.0 < ex <= w
    if u < 1e-8:
        assert ex < 1e-4
    if u > 1e5:
        assert ex == pytest.approx(w, rel=1e-4)
    nab, conv = temperature_gradient(np.array([0.2, 0.9]), np.array([0.4, 0.4]), np.array([u, u]))
    assert not conv[0] and conv[1] and nab[0] == 0.2
