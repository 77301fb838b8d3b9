"""Zero-temperature white-dwarf structure: Chandrasekhar's equation, integrated numerically.

Hydrostatic equilibrium (Newtonian) with the exact pressure of a fully degenerate electron gas
(:mod:`cinderclock.massradius.eos`), optionally with the Salpeter (1961) lattice correction:

    dP/dr = -G m rho / r^2,   dm/dr = 4 pi r^2 rho,   P = A [f(x) - kappa x^4],   rho = B mu_e x^3.

With y = sqrt(1 + x^2) (Chandrasekhar's variable), r = a xi, m = M0 mu,
a = sqrt(A / (4 pi G)) / (B mu_e) and M0 = 4 pi a^3 B mu_e this becomes

    dy/dxi = -mu / (xi^2 D),   dmu/dxi = xi^2 x^3,   D = 8 - 4 kappa y / x   (D = 8 without ions),

which for kappa = 0 is Chandrasekhar's (1939, ch. XI) equation. We integrate with y itself as
the independent variable, running from the centre (y_c) to the surface (y_s = 1, or the
zero-pressure point with the Coulomb term), using u = xi^2 and q = mu^(2/3) as unknowns so that
the right-hand side stays finite at the centre. Mapping y onto t in [0, 1] for every star puts
a whole sequence of central densities into ONE :func:`scipy.integrate.solve_ivp` call.

Limits the user should know (cautions):

* Newtonian gravity, no neutronisation (inverse beta decay), no general-relativistic
  instability: above about 1.3 Msun real white dwarfs become unstable before the limiting mass
  of this model is reached, and radii there are optimistic.
* Zero temperature: hot white dwarfs are measurably larger; see
  :mod:`cinderclock.massradius.envelope` for the finite-temperature envelope.
* The Coulomb correction is only the leading lattice term of Salpeter (1961).

References: Chandrasekhar, S. 1935, MNRAS 95, 207; Chandrasekhar, S. 1939, An Introduction to
the Study of Stellar Structure (University of Chicago Press), ch. XI; Salpeter, E. E. 1961,
ApJ 134, 669; Hamada, T. & Salpeter, E. E. 1961, ApJ 134, 683.
"""

from __future__ import annotations

import numpy as np

from ..constants import G_SI, M_SUN_KG, R_SUN_M
from ..relation import PublishedRelation, ValidRange
from .eos import DENSITY_SCALE_CGS, PRESSURE_SCALE_CGS, coulomb_kappa, pressure_from_x_cgs, zero_pressure_x

CHANDRASEKHAR_1939 = PublishedRelation(
    key="chandrasekhar1939",
    reference="Chandrasekhar, S. 1935, MNRAS 95, 207; Chandrasekhar, S. 1939, An Introduction to the Study "
              "of Stellar Structure (University of Chicago Press), ch. XI (zero-temperature white dwarfs "
              "with the exact degenerate-electron pressure), integrated numerically here",
    ranges=(ValidRange("mass", 0.05, 1.35, "solMass"),),
    note="Newtonian, T = 0, no neutronisation; above ~1.35 Msun (mu_e = 2) general relativity and inverse "
         "beta decay make real stars unstable before the model's limiting mass (upper end of our choosing)",
)

_G_CGS = G_SI * 1e3                     # cm^3 g^-1 s^-2
_M_SUN_G = M_SUN_KG * 1e3
_R_SUN_CM = R_SUN_M * 1e2

#: Length unit a for mu_e = 1, in cm (divide by mu_e): sqrt(A / (4 pi G)) / B.
LENGTH_UNIT_CM = np.sqrt(PRESSURE_SCALE_CGS / (4.0 * np.pi * _G_CGS)) / DENSITY_SCALE_CGS
#: Mass unit M0 for mu_e = 1, in g (divide by mu_e^2): 4 pi a^3 B.
MASS_UNIT_G = 4.0 * np.pi * LENGTH_UNIT_CM**3 * DENSITY_SCALE_CGS

#: Default central densities of a sequence, log10(rho_c / g cm^-3).
DEFAULT_LOG_RHO_C = np.linspace(4.0, 11.0, 141)

_T0 = 1e-9        # start of the integration, just off the centre (fractional distance in y)
_RTOL = 1e-10
_ATOL = 1e-16


def _kappa(ion_charge, coulomb):
    if not coulomb:
        return 0.0
    if ion_charge is None:
        raise ValueError("coulomb=True needs the (effective) ion charge")
    return coulomb_kappa(ion_charge)


def _x_of_y(y):
    # x = sqrt(y^2 - 1) without losing digits near y = 1
    return np.sqrt(np.maximum((y - 1.0) * (y + 1.0), 0.0))


def _integrate(x_c, kappa, x_surface, dense=False):
    """Integrate a set of stars with central Fermi parameters ``x_c`` in one solve_ivp call.

    Returns the solve_ivp result, y_c and delta (y = y_c - t delta).
    """
    from scipy.integrate import solve_ivp

    x_c = np.atleast_1d(np.asarray(x_c, dtype=float))
    n = x_c.size
    y_c = np.sqrt(1.0 + x_c**2)
    y_s = np.sqrt(1.0 + x_surface**2)
    if np.any(x_c <= x_surface):
        raise ValueError("central density at or below the zero-pressure density")
    delta = y_c - y_s
    d_c = 8.0 - 4.0 * kappa * y_c / x_c

    def rhs(t, s):
        u = s[:n]
        q = s[n:]
        y = y_c - t * delta
        x = _x_of_y(y)
        if kappa > 0.0:
            d = 8.0 - 4.0 * kappa * y / np.maximum(x, x_surface)
        else:
            d = 8.0
        ratio = u / q
        du = delta * 2.0 * ratio**1.5 * d
        dq = delta * (2.0 / 3.0) * ratio**2 * x**3 * d
        return np.concatenate([du, dq])

    # leading terms of the central series: y_c - y = x_c^3 xi^2 / (6 D_c),  mu = x_c^3 xi^3 / 3
    u0 = 6.0 * d_c * _T0 * delta / x_c**3
    q0 = (x_c**3 / 3.0) ** (2.0 / 3.0) * u0
    sol = solve_ivp(rhs, (_T0, 1.0), np.concatenate([u0, q0]), method="DOP853",
                    rtol=_RTOL, atol=_ATOL, dense_output=dense)
    if not sol.success:
        raise RuntimeError(f"Chandrasekhar integration failed: {sol.message}")
    return sol, y_c, delta


def zero_temperature_sequence(mu_e=2.0, ion_charge=None, coulomb=False, log_rho_c=DEFAULT_LOG_RHO_C):
    """Masses and radii of zero-temperature white dwarfs over a range of central densities.

    Parameters
    ----------
    mu_e : float
        Mean molecular weight per electron (2 for He, C/O, O/Ne cores).
    ion_charge : float or None
        Effective ion charge Z of the core (see
        :attr:`cinderclock.massradius.composition.CoreComposition.coulomb_charge`); needed only
        with ``coulomb=True``.
    coulomb : bool
        Include the Salpeter (1961) lattice correction to the pressure.
    log_rho_c : array_like
        log10 of the central densities in g cm^-3.

    Returns
    -------
    dict of numpy arrays
        ``rho_c_cgs`` (g cm^-3), ``mass_msun`` (Msun), ``radius_rsun`` (Rsun), all of the length
        of ``log_rho_c``. Mass rises and radius falls with central density.

    Notes
    -----
    Newtonian, T = 0, no neutronisation: see the module docstring for the cautions. The mass
    tends to Chandrasekhar's limit 5.8252 / mu_e^2 Msun (ideal gas) as rho_c grows.
    """
    kappa = _kappa(ion_charge, coulomb)
    x_s = zero_pressure_x(ion_charge if kappa > 0 else None)
    log_rho_c = np.atleast_1d(np.asarray(log_rho_c, dtype=float))
    rho_c = 10.0**log_rho_c
    x_c = np.cbrt(rho_c / (DENSITY_SCALE_CGS * mu_e))
    sol, _, _ = _integrate(x_c, kappa, x_s)
    n = x_c.size
    xi = np.sqrt(sol.y[:n, -1])
    mu = sol.y[n:, -1] ** 1.5
    return {
        "rho_c_cgs": rho_c,
        "mass_msun": mu * MASS_UNIT_G / mu_e**2 / _M_SUN_G,
        "radius_rsun": xi * LENGTH_UNIT_CM / mu_e / _R_SUN_CM,
    }


def _single_mass_msun(log_rho_c, mu_e, kappa, x_s):
    x_c = np.cbrt(10.0**log_rho_c / (DENSITY_SCALE_CGS * mu_e))
    sol, _, _ = _integrate(np.array([x_c]), kappa, x_s)
    return float(sol.y[1, -1] ** 1.5 * MASS_UNIT_G / mu_e**2 / _M_SUN_G)


def central_density_for_mass(mass_msun, mu_e=2.0, ion_charge=6.0, coulomb=False):
    """Central density (g cm^-3) of the zero-temperature model of the given mass (Msun).

    Brackets on a coarse sequence, then refines with Brent's method to a relative mass error of
    about 1e-10. Raises ``ValueError`` at or above the limiting mass of the model.
    """
    from scipy.optimize import brentq

    kappa = _kappa(ion_charge, coulomb)
    x_s = zero_pressure_x(ion_charge if kappa > 0 else None)
    grid = np.linspace(2.0, 13.0, 45)
    seq = zero_temperature_sequence(mu_e, ion_charge, coulomb, grid)
    m = seq["mass_msun"]
    if not (m[0] < mass_msun < m[-1]):
        raise ValueError(f"mass {mass_msun} Msun outside the zero-temperature sequence "
                         f"[{m[0]:.4g}, {m[-1]:.5g}] Msun for mu_e = {mu_e}")
    i = int(np.searchsorted(m, mass_msun))
    lo, hi = grid[i - 1], grid[i]
    lr = brentq(lambda lr: _single_mass_msun(lr, mu_e, kappa, x_s) - mass_msun, lo, hi,
                xtol=1e-12, rtol=1e-12)
    return 10.0**lr


def structure_profile(mass_msun, mu_e=2.0, ion_charge=6, coulomb=False, n_points=400):
    """Interior profile of the zero-temperature white dwarf of a given mass.

    Parameters
    ----------
    mass_msun : float
        Total mass in Msun (below the limiting mass, 1.456 Msun for mu_e = 2 without Coulomb).
    mu_e : float
        Mean molecular weight per electron.
    ion_charge : float
        Effective ion charge Z (used only with ``coulomb=True``).
    coulomb : bool
        Include the Salpeter (1961) lattice correction.
    n_points : int
        Number of samples, spaced nearly uniformly in mass fraction from the centre (0) to the
        surface (1).

    Returns
    -------
    dict
        Arrays (length ``n_points``, centre first): ``mass_fraction`` (m_r / M, 0 to 1),
        ``mass_msun`` (m_r in Msun), ``radius_rsun`` (r in Rsun), ``rho_cgs`` (g cm^-3),
        ``pressure_cgs`` (dyn cm^-2), ``fermi_x`` (p_F / m_e c); and floats ``total_mass_msun``,
        ``total_radius_rsun``, ``rho_c_cgs``.

    Notes
    -----
    Zero temperature, Newtonian, no envelope: the outermost ~1e-4 of the mass is where a real
    star's non-degenerate envelope sits, so densities there are only indicative.
    """
    kappa = _kappa(ion_charge, coulomb)
    x_s = zero_pressure_x(ion_charge if kappa > 0 else None)
    rho_c = central_density_for_mass(float(mass_msun), mu_e, ion_charge, coulomb)
    x_c = np.cbrt(rho_c / (DENSITY_SCALE_CGS * mu_e))
    sol, y_c, delta = _integrate(np.array([x_c]), kappa, x_s, dense=True)

    def at(t):
        s = sol.sol(t)
        xi = np.sqrt(np.maximum(s[0], 0.0))
        mu = np.maximum(s[1], 0.0) ** 1.5
        x = _x_of_y(y_c[0] - t * delta[0])
        return xi, mu, x

    # choose t so that the samples are close to uniform in mass fraction
    t_fine = np.concatenate([[_T0], np.linspace(_T0, 1.0, 4001)[1:]])
    _, mu_fine, _ = at(t_fine)
    frac_fine = mu_fine / mu_fine[-1]
    target = np.linspace(0.0, 1.0, n_points)[1:]
    t = np.interp(target, frac_fine, t_fine)
    t[-1] = 1.0
    xi, mu, x = at(t)
    mu_tot = mu[-1]
    x = np.concatenate([[x_c], x])
    xi = np.concatenate([[0.0], xi])
    mu = np.concatenate([[0.0], mu])
    rho = DENSITY_SCALE_CGS * mu_e * x**3
    return {
        "mass_fraction": mu / mu_tot,
        "mass_msun": mu * MASS_UNIT_G / mu_e**2 / _M_SUN_G,
        "radius_rsun": xi * LENGTH_UNIT_CM / mu_e / _R_SUN_CM,
        "rho_cgs": rho,
        "pressure_cgs": pressure_from_x_cgs(x, ion_charge if kappa > 0 else None),
        "fermi_x": x,
        "total_mass_msun": float(mu_tot * MASS_UNIT_G / mu_e**2 / _M_SUN_G),
        "total_radius_rsun": float(xi[-1] * LENGTH_UNIT_CM / mu_e / _R_SUN_CM),
        "rho_c_cgs": float(rho_c),
    }
