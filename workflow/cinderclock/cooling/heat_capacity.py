"""Heat capacities of a white-dwarf core: ions (liquid or Debye solid) and degenerate electrons.

Ions
    * Liquid: the ideal-gas value 3/2 k_B per ion (the numerical model's default is the Coulomb
      liquid of :mod:`~cinderclock.cooling.ocp`; this value is kept for ``coulomb_liquid=False``).
    * Solid (option ``lattice="debye"``; the default is the quantum lattice of
      :mod:`~cinderclock.cooling.ocp`): Debye theory, c_v = 3 k_B D(theta_D / T) per ion with the Debye function
      D(x) = (3 / x^3) int_0^x t^4 e^t / (e^t - 1)^2 dt, which tends to 1 (Dulong-Petit) for
      T >> theta_D and to (4 pi^4 / 5) x^-3 for T << theta_D, i.e. c_v = 233.78 k_B (T/theta_D)^3.
      theta_D is set in :mod:`cinderclock.cooling.crystallization`.

Electrons
    A degenerate Fermi gas of any relativity has, per electron, c_v = pi^2 k_B (k_B T / m_e c^2)
    sqrt(1 + x^2) / x^2 with x = p_F / (m_e c) (Sommerfeld expansion; in the non-relativistic limit
    this is (pi^2 / 2) k_B (k_B T / E_F)). Where the electrons are not degenerate it would exceed
    the ideal-gas value; we join the two harmonically, c_e = 1 / (1/c_deg + 1/(3/2 k_B)), a smooth
    bridge of our choosing that is exact in both limits.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..constants import C_SI, HBAR_SI, K_B_SI, M_E_SI, M_U_SI

_DEBYE_X_MIN = 1e-3          # below: series D(x) = 1 - x^2/20 + x^4/560
_DEBYE_X_MAX = 60.0          # above: D(x) = (4 pi^4 / 5) / x^3 to double precision


@lru_cache(maxsize=1)
def _debye_table():
    """log10 x and log10 D(x) on a fine log grid, by 64-point Gauss-Legendre quadrature (once)."""
    log_x = np.linspace(np.log10(_DEBYE_X_MIN), np.log10(_DEBYE_X_MAX), 6001)
    x = 10.0**log_x
    u, w = np.polynomial.legendre.leggauss(64)
    u = 0.5 * (u + 1.0)
    w = 0.5 * w
    t = x[:, None] * u[None, :]
    f = t**4 / (4.0 * np.sinh(0.5 * t) ** 2)
    integral = x * (f @ w)
    return log_x, np.log10(3.0 * integral / x**3)


def debye_function(x):
    """Debye heat-capacity function D(x) = c_v / (3 N k_B), with x = theta_D / T.

    Accurate to about 1e-7 (log-log interpolation of a Gauss-Legendre table), with the exact
    limiting forms outside 1e-3 < x < 60.

    Parameters
    ----------
    x : array_like
        theta_D / T, >= 0 (infinite x gives 0).
    """
    x = np.asarray(x, dtype=float)
    log_x_tab, log_d_tab = _debye_table()
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        lx = np.log10(x)
        mid = 10.0 ** np.interp(lx, log_x_tab, log_d_tab)
        series = 1.0 - x**2 / 20.0 + x**4 / 560.0
        tail = (4.0 * np.pi**4 / 5.0) / x**3
    return np.where(x < _DEBYE_X_MIN, series, np.where(x > _DEBYE_X_MAX, tail, mid))


def ion_heat_capacity_kb(temperature_k, debye_temperature_k, solid):
    """Ion heat capacity per ion, in units of k_B.

    Parameters
    ----------
    temperature_k : array_like
        Temperature in K.
    debye_temperature_k : array_like
        Debye temperature of the lattice in K (used where ``solid``).
    solid : array_like of bool
        True where the ions are crystalline.
    """
    t = np.asarray(temperature_k, dtype=float)
    x = np.asarray(debye_temperature_k, dtype=float) / t
    return np.where(solid, 3.0 * debye_function(x), 1.5)


def fermi_momentum_mec(rho_cgs, ye):
    """Electron Fermi momentum in units of m_e c, for density (g cm^-3) and electron fraction Y_e."""
    n_e = np.asarray(rho_cgs, dtype=float) * 1000.0 * ye / M_U_SI          # electrons m^-3
    return HBAR_SI * np.cbrt(3.0 * np.pi**2 * n_e) / (M_E_SI * C_SI)


def electron_heat_capacity_kb(temperature_k, rho_cgs, ye, degenerate_only=False):
    """Electron heat capacity per electron, in units of k_B.

    Parameters
    ----------
    temperature_k : array_like
        Temperature in K.
    rho_cgs : array_like
        Density in g cm^-3.
    ye : float
        Electrons per atomic mass unit (1 / mu_e).
    degenerate_only : bool
        Return the pure degenerate (Sommerfeld) value without the bridge to 3/2.
    """
    x = fermi_momentum_mec(rho_cgs, ye)
    theta = K_B_SI * np.asarray(temperature_k, dtype=float) / (M_E_SI * C_SI**2)   # k T / m_e c^2
    with np.errstate(divide="ignore", invalid="ignore"):
        c_deg = np.pi**2 * theta * np.sqrt(1.0 + x**2) / x**2
        if degenerate_only:
            return c_deg
        return 1.0 / (1.0 / c_deg + 1.0 / 1.5)
