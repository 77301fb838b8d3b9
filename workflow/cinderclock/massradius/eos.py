"""Zero-temperature equation of state of white-dwarf matter: degenerate electrons plus ions.

Pressure of a fully degenerate electron gas of any degree of relativity (Chandrasekhar 1935,
MNRAS 95, 207; Chandrasekhar 1939, *An Introduction to the Study of Stellar Structure*, ch. X):

    P_e = A f(x),   f(x) = x (2 x^2 - 3) sqrt(1 + x^2) + 3 asinh(x),
    A   = m_e c^2 / (24 pi^2 lambda_e^3),   lambda_e = hbar / (m_e c),
    rho = B mu_e x^3,   B = m_u / (3 pi^2 lambda_e^3),

where x = p_F / (m_e c) is the Fermi momentum in units of m_e c and mu_e the mean molecular weight
per electron. The ions add mass but (at T = 0) no pressure.

Optional electrostatic correction: the leading (Wigner-Seitz lattice) term of Salpeter (1961,
ApJ 134, 669), in the form given by Shapiro & Teukolsky (1983, *Black Holes, White Dwarfs and
Neutron Stars*, section 2.4):

    E_C / V = -(9/10) (4 pi / 3)^(1/3) Z^(2/3) e^2 n_e^(4/3),   P_C = E_C / (3 V),

with e^2 = alpha hbar c (Gaussian units). Salpeter's smaller Thomas-Fermi, exchange and
correlation terms are left out (they change radii by well under one per cent at white-dwarf
densities; from memory). For a mixture the linear-mixing rule gives Z^(2/3) -> <Z^(5/3)> / <Z>
(number averages), see :func:`cinderclock.massradius.composition.CoreComposition.coulomb_charge`.

Caution: with the Coulomb term the total pressure vanishes at a small but finite density (about
10 g cm^-3 for carbon); that zero-pressure "surface" is where the zero-temperature model stops
being meaningful, not a physical surface. Real white dwarfs have a non-degenerate envelope there
(see :mod:`cinderclock.massradius.envelope`).
"""

from __future__ import annotations

import numpy as np

from ..constants import C_SI, E_CHARGE_SI, EPS0_SI, HBAR_SI, M_E_SI, M_U_SI
from ..relation import PublishedRelation, ValidRange

SALPETER_1961 = PublishedRelation(
    key="salpeter1961",
    reference="Salpeter, E. E. 1961, ApJ 134, 669 (energy and pressure of a zero-temperature plasma); "
              "lattice term as in Shapiro, S. L. & Teukolsky, S. A. 1983, Black Holes, White Dwarfs and "
              "Neutron Stars (Wiley), section 2.4; applied to white dwarfs by Hamada, T. & Salpeter, E. E. "
              "1961, ApJ 134, 683",
    ranges=(ValidRange("density", 1e2, 1e11, "g cm-3"),),
    note="leading Wigner-Seitz lattice term only (Thomas-Fermi, exchange and correlation terms omitted); "
         "assumes full pressure ionisation, poor below ~1e2 g cm^-3 (range of our choosing)",
)

# --- constants of the Chandrasekhar equation of state, cgs ------------------------------------
_CM = 100.0               # cm per m
_G = 1000.0               # g per kg
_ERG = 1e7                # erg per J

#: Reduced Compton wavelength of the electron, hbar / (m_e c), in cm.
LAMBDA_E_CM = HBAR_SI / (M_E_SI * C_SI) * _CM
#: Pressure scale A = m_e c^2 / (24 pi^2 lambda_e^3), in dyn cm^-2 (erg cm^-3).
PRESSURE_SCALE_CGS = M_E_SI * C_SI**2 * _ERG / (24.0 * np.pi**2 * LAMBDA_E_CM**3)
#: Density scale B = m_u / (3 pi^2 lambda_e^3), in g cm^-3 (multiply by mu_e): rho = B mu_e x^3.
DENSITY_SCALE_CGS = M_U_SI * _G / (3.0 * np.pi**2 * LAMBDA_E_CM**3)
#: Fine-structure constant alpha = e^2 / (4 pi eps0 hbar c).
FINE_STRUCTURE = E_CHARGE_SI**2 / (4.0 * np.pi * EPS0_SI * HBAR_SI * C_SI)
#: Coefficient of the lattice term in units of A: P_C / A = -COULOMB_KAPPA_UNIT Z^(2/3) x^4.
#: From P_C = -(3/10) (4 pi/3)^(1/3) Z^(2/3) alpha hbar c n_e^(4/3) with n_e = x^3 / (3 pi^2 lambda_e^3).
COULOMB_KAPPA_UNIT = 24.0 * np.pi**2 * 0.3 * (4.0 * np.pi / 3.0) ** (1.0 / 3.0) \
    * (3.0 * np.pi**2) ** (-4.0 / 3.0) * FINE_STRUCTURE


def coulomb_kappa(ion_charge=None):
    """Dimensionless strength kappa of the lattice term, P_C / A = -kappa x^4 (0 if no ions given).

    Parameters
    ----------
    ion_charge : float or None
        Effective ion charge Z (for a mixture, Z such that Z^(2/3) = <Z^(5/3)>/<Z>). ``None`` or 0
        switches the correction off.
    """
    if ion_charge is None or ion_charge == 0:
        return 0.0
    return COULOMB_KAPPA_UNIT * float(ion_charge) ** (2.0 / 3.0)


def chandrasekhar_f(x):
    """Chandrasekhar's function f(x) = x (2x^2 - 3) sqrt(1 + x^2) + 3 asinh(x), dimensionless.

    Below x = 0.1 a Taylor series (8/5 x^5 - 4/7 x^7 + ...) replaces the closed form, which loses
    all its digits to cancellation there. Limits: f -> (8/5) x^5 (non-relativistic), f -> 2 x^4
    (ultra-relativistic).
    """
    x = np.asarray(x, dtype=float)
    small = np.abs(x) < 0.1
    xs = np.where(small, x, 0.0)
    x2 = xs * xs
    series = xs**5 * (8.0 / 5.0 + x2 * (-4.0 / 7.0 + x2 * (1.0 / 3.0 + x2 * (-5.0 / 22.0 + x2 * 35.0 / 208.0))))
    xl = np.where(small, 1.0, x)
    closed = xl * (2.0 * xl * xl - 3.0) * np.sqrt(1.0 + xl * xl) + 3.0 * np.arcsinh(xl)
    return np.where(small, series, closed)


def fermi_parameter(rho_cgs, mu_e=2.0):
    """Fermi momentum over m_e c, x = (rho / (B mu_e))^(1/3), from density in g cm^-3."""
    return np.cbrt(np.asarray(rho_cgs, dtype=float) / (DENSITY_SCALE_CGS * mu_e))


def density_cgs(x, mu_e=2.0):
    """Mass density in g cm^-3 at Fermi parameter ``x`` (rho = B mu_e x^3)."""
    return DENSITY_SCALE_CGS * mu_e * np.asarray(x, dtype=float) ** 3


def pressure_from_x_cgs(x, ion_charge=None):
    """Pressure in dyn cm^-2 at Fermi parameter ``x``: A [f(x) - kappa x^4] (kappa = 0 without ions).

    Parameters
    ----------
    x : array_like
        p_F / (m_e c).
    ion_charge : float or None
        Effective ion charge for the Salpeter (1961) lattice correction; ``None`` for the ideal
        (Chandrasekhar) gas.
    """
    x = np.asarray(x, dtype=float)
    return PRESSURE_SCALE_CGS * (chandrasekhar_f(x) - coulomb_kappa(ion_charge) * x**4)


def degenerate_pressure_cgs(rho_cgs, mu_e=2.0, ion_charge=None):
    """Zero-temperature pressure (dyn cm^-2) of white-dwarf matter at density ``rho_cgs`` (g cm^-3).

    Parameters
    ----------
    rho_cgs : array_like
        Mass density in g cm^-3.
    mu_e : float
        Mean molecular weight per electron (2 for He, C, O, Ne, Mg).
    ion_charge : float or None
        Effective ion charge for the Salpeter (1961) lattice correction; ``None`` for the exact
        ideal degenerate electron gas.
    """
    return pressure_from_x_cgs(fermi_parameter(rho_cgs, mu_e), ion_charge)


def coulomb_pressure_cgs(rho_cgs, mu_e=2.0, ion_charge=6.0):
    """Lattice (Wigner-Seitz) pressure correction P_C in dyn cm^-2 (negative), Salpeter (1961)."""
    x = fermi_parameter(rho_cgs, mu_e)
    return -PRESSURE_SCALE_CGS * coulomb_kappa(ion_charge) * x**4


def zero_pressure_x(ion_charge=None):
    """Fermi parameter where the Coulomb-corrected pressure vanishes (0 for the ideal gas).

    Solves f(x) = kappa x^4 (at small x, x ~ 5 kappa / 8) by a few Newton steps.
    """
    kappa = coulomb_kappa(ion_charge)
    if kappa == 0.0:
        return 0.0
    x = 5.0 * kappa / 8.0
    for _ in range(50):
        g = chandrasekhar_f(x) - kappa * x**4
        dg = 8.0 * x**4 / np.sqrt(1.0 + x * x) - 4.0 * kappa * x**3
        step = g / dg
        x -= step
        if abs(step) < 1e-15 * x:
            break
    return float(x)
