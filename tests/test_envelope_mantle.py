"""Core material below the helium layer (cinderclock.envelope.mantle) and the core temperature it
gives. Sources beside each check."""

import numpy as np
import pytest

from cinderclock.composition import core_composition
from cinderclock.constants import K_B_SI, M_U_SI
from cinderclock.envelope.mantle import mantle_opacity, mantle_state
from cinderclock.massradius.eos import degenerate_pressure_cgs

CO = core_composition("CO")
K = K_B_SI * 1e7          # erg/K
M_U = M_U_SI * 1e3        # g


def test_ideal_gas_limit():
    """Hot, thin matter: P = (n_e + n_i) k T (classical ideal gas; Coulomb and degeneracy terms
    below 1e-3 at 1e-3 g cm^-3 and 1e8 K). n_e = rho Y_e / m_u, n_i = rho / (abar m_u)."""
    rho, t = 1e-3, 1e8
    n = rho / M_U * (CO.ye + 1.0 / CO.abar)
    assert float(mantle_state(rho, t, CO)["pressure"]) == pytest.approx(n * K * t, rel=1e-3)


@pytest.mark.parametrize("rho", [1e4, 1e6, 1e8])
def test_cold_limit_is_the_core_models_pressure(rho):
    """Cold dense matter (1e4 K): Chandrasekhar's (1939) T = 0 electron pressure with the Salpeter
    (1961) lattice term, as in the zero-temperature core the envelope is matched to. 1 %: our
    Coulomb interpolation approaches the ion-sphere limit -0.9 Gamma only as Gamma^(-1/2), worth
    ~10 % of the lattice term (itself a few per cent of P) at these couplings."""
    p = float(mantle_state(rho, 1e4, CO)["pressure"])
    assert p == pytest.approx(degenerate_pressure_cgs(rho, CO.mu_e, CO.coulomb_charge), rel=1e-2)


def test_free_free_scales_with_sum_z2():
    """Kramers free-free (Rybicki & Lightman 1979, eq. 5.18b) is proportional to n_e sum n_j Z_j^2:
    in non-degenerate matter where it dominates Thomson scattering, pure oxygen is more opaque
    than pure carbon by (n_e sum n Z^2)_O / (...)_C = (8/16)(64/16) / ((6/12)(36/12)) = 4/3."""
    rho, t = 1e2, 3e6                  # non-degenerate, free-free >> Thomson
    kr = []
    for key in ("O", "C"):
        st = mantle_state(np.array([rho]), np.array([t]), core_composition(key))
        kr.append(mantle_opacity(st, np.array([t]), np.array([rho]))[1][0])
    # Thomson adds the same n_e sigma_T / rho to both (Y_e = 1/2): a few per cent at this point
    assert kr[0] / kr[1] == pytest.approx(4.0 / 3.0, rel=0.05)


def test_conduction_weaker_for_higher_charge():
    """Electron-ion relaxation rate ~ n_i Z^2 Lambda per electron n_e ~ n_i Z (degenerate limit,
    Potekhin et al. 1999, A&A 346, 345, eqs. 6-7: tau ~ 1 / (Z Lambda)): at equal density and T,
    oxygen conducts worse than carbon, by about 8/6 up to the logarithm."""
    rho, t = 1e6, 3e7
    kc = []
    for key in ("O", "C"):
        st = mantle_state(np.array([rho]), np.array([t]), core_composition(key))
        kc.append(mantle_opacity(st, np.array([t]), np.array([rho]))[2][0])
    assert 1.15 < kc[0] / kc[1] < 1.5


def test_neutrino_and_photon_losses_cross_between_20000_and_30000_k():
    """Winget et al. (2004, ApJ 602, L109, abstract; reference-values section 7, F): plasmon
    neutrinos dominate the losses of model white dwarfs down to Teff ~ 25,000 K. With the Itoh et
    al. (1996) emissivities of cinderclock.cooling.neutrinos integrated over the 0.6 Msun
    zero-temperature core at the envelope's T_c (isothermal core, our approximation), the two
    losses must cross between 20,000 and 30,000 K (the window of the issue's validation list)."""
    from cinderclock.constants import L_SUN_W, M_SUN_KG
    from cinderclock.cooling.neutrinos import emissivity_erg_g_s
    from cinderclock.envelope.build import solve_grid
    from cinderclock.massradius.chandrasekhar import structure_profile

    prof = structure_profile(0.6, CO.mu_e, CO.coulomb_charge, coulomb=True, n_points=600)
    teff = np.array([20000.0, 30000.0])
    out = solve_grid(np.array([0.6]), teff, "H", 1e-4, 1e-2, "CO", 1.0)
    ratio = []
    for j in range(teff.size):
        tc = 10.0 ** out["log_tc"][0, j]
        eps = emissivity_erg_g_s(prof["rho_cgs"], np.full(prof["rho_cgs"].shape, tc), CO.abar, CO.zbar)
        l_nu = np.trapezoid(eps, prof["mass_msun"] * M_SUN_KG * 1e3) / (L_SUN_W * 1e7)
        ratio.append(np.log10(l_nu) - out["log_lum"][0, j])
    assert ratio[0] < 0.0 < ratio[1]
