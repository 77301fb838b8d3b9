"""Mestel's cooling law: an isothermal degenerate core leaking ion heat through a Kramers envelope.

Physics (Mestel 1952, MNRAS 112, 583; derivation as in Shapiro & Teukolsky 1983, section 4.1):

* The non-degenerate envelope is radiative with Kramers opacity kappa = kappa0 rho T^-3.5,
  kappa0 = 4.34e24 Z (1 + X) cm^2 g^-1. Hydrostatic equilibrium and radiative diffusion with the
  ideal-gas pressure give rho = sqrt(2 A / 8.5) (mu m_u / k) T^3.25 with
  A = 16 pi a c G M k / (3 kappa0 mu m_u L).
* The envelope meets the degenerate core where the electrons' ideal-gas pressure equals the
  non-relativistic degenerate pressure: rho* = mu_e (k T / (m_u K1))^(3/2),
  K1 = (3 pi^2)^(2/3) hbar^2 / (5 m_e m_u^(5/3)).
* Equating the two densities at the core temperature T_c gives L = C M T_c^(7/2).
* Only the ions store heat: U = (3/2) (M / (A m_u)) k T_c. Integrating dU/dt = -L from
  T_c = infinity gives t = (3 k / (5 A m_u)) C^(-2/7) M^(5/7) L^(-5/7), so L is proportional to
  t^(-7/5).

What it leaves out: neutrino losses (they dominate the cooling of hot white dwarfs), the latent
heat and Debye heat capacity of the crystallising core, the electrons' heat capacity, and
convective coupling of the envelope. Ages from this law are indicative; the envelope calibration
alone changes them by a factor of about two between published coefficients.
"""

from __future__ import annotations

import numpy as np

from ..constants import C_SI, G_SI, HBAR_SI, K_B_SI, L_SUN_W, M_E_SI, M_SUN_KG, M_U_SI, SIGMA_SB_SI, YR_S
from ..relation import PublishedRelation, ValidRange

MESTEL_1952 = PublishedRelation(
    key="mestel",
    reference="Mestel, L. 1952, MNRAS 112, 583; envelope constants as in Shapiro, S. L. & Teukolsky, "
              "S. A. 1983, Black Holes, White Dwarfs and Neutron Stars (Wiley), section 4.1",
    ranges=(ValidRange("log_lum", -5.5, -1.0, "dex(solLum)"), ValidRange("mass", 0.2, 1.3, "solMass")),
    note="ion heat only, no neutrinos, no crystallization; above log L/Lsun ~ -1 neutrino losses make "
         "it overestimate ages and below ~ -4 crystallization and Debye cooling change them "
         "(range of our choosing from those statements)",
)

#: Kramers bound-free opacity coefficient: kappa0 = KRAMERS_BF_CGS * Z * (1 + X) in cm^2 g^-1
#: (Shapiro & Teukolsky 1983, eq. 4.1.4 region; value from memory, consistent with Schwarzschild 1958).
KRAMERS_BF_CGS = 4.34e24

_CGS_LEN = 100.0          # cm per m
_CGS_MASS = 1000.0        # g per kg
_ERG = 1e7                # erg per J


def degeneracy_density_cgs(temperature_k, mu_e=2.0):
    """Density (g cm^-3) where the electron ideal-gas and degenerate pressures are equal.

    rho* = mu_e (k T / (m_u K1))^(3/2) with K1 = (3 pi^2)^(2/3) hbar^2 / (5 m_e m_u^(5/3)).
    """
    k1 = (3 * np.pi**2) ** (2.0 / 3.0) * HBAR_SI**2 / (5 * M_E_SI * M_U_SI ** (5.0 / 3.0))  # SI
    t = np.asarray(temperature_k, dtype=float)
    rho_si = mu_e * (K_B_SI * t / (M_U_SI * k1)) ** 1.5
    return rho_si * _CGS_MASS / _CGS_LEN**3


def envelope_constant_cgs(X=0.0, Z=0.1, mu=1.4, mu_e=2.0):
    """C in L = C (M/Msun) T_c^(7/2), with L in erg s^-1 and T_c in K.

    Parameters
    ----------
    X, Z : float
        Hydrogen and metal mass fractions of the envelope (they set the Kramers opacity).
    mu : float
        Mean molecular weight of the envelope gas.
    mu_e : float
        Mean molecular weight per electron at the core boundary.
    """
    a_rad = 4 * SIGMA_SB_SI / C_SI                       # J m^-3 K^-4
    # kappa [cm^2 g^-1] = kappa0 rho[g cm^-3] T^-3.5  ->  in SI, kappa [m^2 kg^-1] = kappa0_si rho[kg m^-3] T^-3.5
    # 1 cm^2 g^-1 = 0.1 m^2 kg^-1 and 1 g cm^-3 = 1e3 kg m^-3
    kappa0_si = KRAMERS_BF_CGS * Z * (1 + X) * 0.1 * 1e-3
    # rho* in SI at T = 1 K scaling: rho* = B T^1.5
    b = degeneracy_density_cgs(1.0, mu_e) * _CGS_LEN**3 / _CGS_MASS
    # rho_env = sqrt(2 A / 8.5) (mu m_u / k) T^3.25,  A = 16 pi a c G M k / (3 kappa0 mu m_u L)
    # rho_env = rho*  =>  L = (2/8.5) 16 pi a c G M k / (3 kappa0 mu m_u) (mu m_u / k)^2 T^6.5 / (b^2 T^3)
    coeff_si = (2 / 8.5) * 16 * np.pi * a_rad * C_SI * G_SI * M_SUN_KG * K_B_SI / (3 * kappa0_si * mu * M_U_SI) \
        * (mu * M_U_SI / K_B_SI) ** 2 / b**2               # W K^-3.5 per solar mass
    return coeff_si * _ERG


def age_coefficient_yr(ion_mass_number=12.0, envelope_cgs=None, **envelope):
    """Coefficient k in t = k (M/Msun)^(5/7) (L/Lsun)^(-5/7), in years.

    Parameters
    ----------
    ion_mass_number : float
        Mean mass number A of the core ions (12 for carbon, 16 for oxygen).
    envelope_cgs : float, optional
        The envelope constant C (erg s^-1 K^-3.5 per Msun); computed with
        :func:`envelope_constant_cgs` from ``envelope`` keywords if not given.
    """
    c = envelope_cgs if envelope_cgs is not None else envelope_constant_cgs(**envelope)
    c_si = c / _ERG / M_SUN_KG                              # W K^-3.5 kg^-1
    # t = (3 k / (5 A m_u)) C^(-2/7) M^(5/7) L^(-5/7), evaluated at M = 1 Msun, L = 1 Lsun
    t_s = (3 * K_B_SI / (5 * ion_mass_number * M_U_SI)) * c_si ** (-2.0 / 7.0) * M_SUN_KG ** (5.0 / 7.0) \
        * L_SUN_W ** (-5.0 / 7.0)
    return t_s / YR_S


def cooling_age_yr(mass_msun, log_lum, coefficient_yr):
    """Mestel cooling age in years.

    Parameters
    ----------
    mass_msun : array_like
        White-dwarf mass in solar masses.
    log_lum : array_like
        log10 of the luminosity in solar units.
    coefficient_yr : float
        k in t = k (M/Msun)^(5/7) (L/Lsun)^(-5/7) (see :func:`age_coefficient_yr`).
    """
    m = np.asarray(mass_msun, dtype=float)
    logl = np.asarray(log_lum, dtype=float)
    with np.errstate(invalid="ignore"):
        return coefficient_yr * m ** (5.0 / 7.0) * 10.0 ** (-5.0 / 7.0 * logl)


def luminosity_at_age(mass_msun, age_yr, coefficient_yr):
    """Inverse of :func:`cooling_age_yr`: log10 L/Lsun reached after ``age_yr`` years."""
    m = np.asarray(mass_msun, dtype=float)
    t = np.asarray(age_yr, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return -1.4 * np.log10(t / (coefficient_yr * m ** (5.0 / 7.0)))
