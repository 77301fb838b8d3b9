"""Crystallization of the ion plasma: coupling parameter, melting temperature, latent heat.

The ions of a white-dwarf core form a one-component plasma in a neutralising electron background.
Its state is set by the Coulomb coupling parameter (Raffelt 1996, *Stars as Laboratories for
Fundamental Physics*, eq. D.16)

    Gamma = (Z e)^2 / (a k_B T),   a = (3 / (4 pi n_i))^(1/3)         (Gaussian units),

which in cgs numbers is Gamma = 2.275e5 Z^2 (rho / A)^(1/3) / T. For a mixture we use the
linear-mixing form Gamma = <Z^(5/3)> e^2 / (a_e k_B T) with the electron-sphere radius a_e
(common practice); for a pure composition the two forms are identical.

The plasma freezes at Gamma_m = 175 (Potekhin & Chabrier 2000, PRE 62, 8554; the older value 178
of Stringfellow, DeWitt & Slattery 1990 is available as :data:`GAMMA_MELT_SDS1990`). On freezing
each ion releases a latent heat of about 0.77 k_B T_m (Salaris et al. 1997, ApJ 486, 413).

Mixtures freeze here as if they were a one-component plasma of mean charge (linear mixing); the
C/O phase diagram and the energy of phase separation are in :mod:`~cinderclock.cooling.phasesep`,
the latent heat from the free energies in :mod:`~cinderclock.cooling.ocp`.
"""

from __future__ import annotations

import numpy as np

from ..constants import E_CHARGE_SI, EPS0_SI, HBAR_SI, K_B_SI, M_U_SI
from .composition import core_composition

#: Coupling parameter at melting (Potekhin & Chabrier 2000, PRE 62, 8554).
GAMMA_MELT = 175.0
#: Older melting value (Stringfellow, DeWitt & Slattery 1990, PRA 41, 1105).
GAMMA_MELT_SDS1990 = 178.0
#: Latent heat of crystallization per ion in units of k_B T_m (Salaris et al. 1997, ApJ 486, 413).
LATENT_HEAT_KT = 0.77
#: Debye temperature of the ion lattice in units of the ion plasma temperature (bcc Coulomb
#: lattice; common practice in white-dwarf cooling, value from memory -- a documented choice).
DEBYE_TO_PLASMA = 0.45

_CGS_DENSITY = 1000.0        # kg m^-3 per g cm^-3


def coupling_coefficient_cgs(core="C"):
    """Coefficient k in Gamma = k (rho / g cm^-3)^(1/3) / (T / K) for a core composition.

    Computed from CODATA constants: k = <Z^(5/3)> e^2 / (4 pi eps0 k_B) (4 pi Y_e / (3 m_u))^(1/3),
    with rho converted to kg m^-3. For carbon this is 2.275e5 * 36 / 12^(1/3).
    """
    comp = core_composition(core)
    n_e_per_rho = comp.ye / M_U_SI * _CGS_DENSITY                     # electrons m^-3 per g cm^-3
    inv_a_e = (4.0 * np.pi * n_e_per_rho / 3.0) ** (1.0 / 3.0)         # m^-1 per (g cm^-3)^(1/3)
    return comp.z53 * E_CHARGE_SI**2 / (4.0 * np.pi * EPS0_SI * K_B_SI) * inv_a_e


def coupling_parameter(rho_cgs, temperature_k, core="C"):
    """Ion coupling parameter Gamma (dimensionless).

    Parameters
    ----------
    rho_cgs : array_like
        Density in g cm^-3.
    temperature_k : array_like
        Temperature in K.
    core : str or CoreComposition
        Core composition (see :data:`cinderclock.cooling.composition.CORES`).
    """
    rho = np.asarray(rho_cgs, dtype=float)
    t = np.asarray(temperature_k, dtype=float)
    return coupling_coefficient_cgs(core) * np.cbrt(rho) / t


def melting_temperature_k(rho_cgs, core="C", gamma_melt=GAMMA_MELT):
    """Temperature (K) below which the ions at density ``rho_cgs`` (g cm^-3) are crystalline."""
    return coupling_coefficient_cgs(core) * np.cbrt(np.asarray(rho_cgs, dtype=float)) / gamma_melt


def melting_density_cgs(temperature_k, core="C", gamma_melt=GAMMA_MELT):
    """Density (g cm^-3) above which the ions are crystalline at ``temperature_k`` (K)."""
    t = np.asarray(temperature_k, dtype=float)
    return (gamma_melt * t / coupling_coefficient_cgs(core)) ** 3


def ion_plasma_temperature_k(rho_cgs, core="C"):
    """Ion plasma temperature T_p = hbar Omega_p / k_B in K.

    Omega_p^2 = sum_i n_i Z_i^2 e^2 / (eps0 A_i m_u) (SI). For Z/A = 1/2,
    T_p = 7.83e6 K (Z/A) (rho / 1e6 g cm^-3)^(1/2).
    """
    comp = core_composition(core)
    rho = np.asarray(rho_cgs, dtype=float) * _CGS_DENSITY
    n_ion = rho * comp.ions_per_mu / M_U_SI
    omega2 = n_ion * comp.z2_over_a * E_CHARGE_SI**2 / (EPS0_SI * M_U_SI)
    return HBAR_SI * np.sqrt(omega2) / K_B_SI


def debye_temperature_k(rho_cgs, core="C", debye_to_plasma=DEBYE_TO_PLASMA):
    """Debye temperature (K) of the ion lattice, ``debye_to_plasma`` times the plasma temperature."""
    return debye_to_plasma * ion_plasma_temperature_k(rho_cgs, core)


def crystallized_mass_fraction(temperature_k, mass_fraction, rho_cgs, core="C", gamma_melt=GAMMA_MELT):
    """Fraction of the star's mass that is crystalline at core temperature ``temperature_k``.

    Density falls outward, so the solid is the inner sphere where rho > rho_melt(T).

    Parameters
    ----------
    temperature_k : array_like
        Isothermal core temperature(s) in K, any shape.
    mass_fraction : numpy.ndarray
        Enclosed mass fraction m(r)/M of the structure profile, increasing from 0 to 1.
    rho_cgs : numpy.ndarray
        Density (g cm^-3) at the same points, decreasing outward.

    Returns
    -------
    numpy.ndarray
        Crystallized mass fraction, same shape as ``temperature_k``.
    """
    rho_m = melting_density_cgs(temperature_k, core, gamma_melt)
    # rho decreases with mass fraction: interpolate on the reversed (increasing) arrays
    return np.interp(rho_m, np.asarray(rho_cgs)[::-1], np.asarray(mass_fraction)[::-1],
                     left=1.0, right=0.0)
