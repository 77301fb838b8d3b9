"""Electron gas of arbitrary degeneracy for the envelope equation of state.

The number density fixes the degeneracy parameter eta = mu_e / (k T) (chemical potential without
the rest mass) through the non-relativistic Fermi-Dirac integral of order 1/2,

    n_e = (2 m_e k T)^(3/2) / (2 pi^2 hbar^3) F_{1/2}(eta),   F_k(eta) = int_0^inf x^k / (e^(x - eta) + 1) dx,

inverted with Antia's (1993, ApJS 84, 101) rational fit that the package already uses for the
neutrino rates (:func:`cinderclock.cooling.neutrinos.inverse_fermi_half`). The pressure is the
exact zero-temperature pressure of Chandrasekhar (any degree of relativity,
:func:`cinderclock.massradius.eos.pressure_from_x_cgs`) plus the thermal part of the
non-relativistic gas,

    P_e = P_Ch(n_e) + [P_NR(eta, T) - P_NR(n_e, T = 0)],   P_NR = (2/3) (2 m_e k T)^(3/2) k T F_{3/2}(eta) / (2 pi^2 hbar^3),

so the gas is exact in the non-degenerate limit (where the relativistic correction is nil at
envelope temperatures, k T << m_e c^2) and in the zero-temperature limit. F_{3/2} is tabulated
once by quadrature and continued by its non-degenerate series (eta < -30) and the Sommerfeld
expansion (eta > 150). Entropy density s_e = k [(5/2) P_NR / (k T) - eta n_e] (non-relativistic
thermal part; the zero-temperature part carries none).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..constants import C_SI, HBAR_SI, K_B_SI, M_E_SI
from ..cooling.neutrinos import inverse_fermi_half
from ..massradius.eos import LAMBDA_E_CM, pressure_from_x_cgs

K_B = K_B_SI * 1e7                      # erg K^-1
HBAR = HBAR_SI * 1e7                    # erg s
M_E = M_E_SI * 1e3                      # g
C_LIGHT = C_SI * 1e2                    # cm s^-1
#: n_e = QUANTUM_DENSITY T^(3/2) F_{1/2}(eta): (2 m_e k)^(3/2) / (2 pi^2 hbar^3), cm^-3 K^-3/2.
QUANTUM_DENSITY = (2.0 * M_E * K_B) ** 1.5 / (2.0 * np.pi**2 * HBAR**3)

_ETA_LO, _ETA_HI = -30.0, 150.0


@lru_cache(maxsize=1)
def _f32_spline():
    """Cubic spline of log F_{3/2} on a grid of eta (trapezoid rule in t = sqrt(x), spectrally accurate)."""
    from scipy.interpolate import CubicSpline

    eta = np.linspace(_ETA_LO, _ETA_HI, 3601)
    out = np.empty_like(eta)
    for k0 in range(0, eta.size, 400):
        e = eta[k0:k0 + 400, None]
        tmax = np.sqrt(np.maximum(e, 0.0) + 60.0)
        t = np.linspace(0.0, 1.0, 3001)[None, :] * tmax
        with np.errstate(over="ignore"):
            f = 2.0 * t**4 / (np.exp(t * t - e) + 1.0)
        out[k0:k0 + 400] = np.log(np.trapezoid(f, t, axis=1))
    return CubicSpline(eta, out)


def fermi_three_halves(eta):
    """Fermi-Dirac integral F_{3/2}(eta) = int_0^inf x^(3/2) / (e^(x - eta) + 1) dx (not divided by Gamma).

    Relative accuracy about 1e-7 (table in eta with cubic interpolation in between, series beyond).
    """
    eta = np.asarray(eta, dtype=float)
    val = np.exp(_f32_spline()(np.clip(eta, _ETA_LO, _ETA_HI)))
    e = np.minimum(eta, _ETA_LO)
    low = 0.75 * np.sqrt(np.pi) * np.exp(e) * (1.0 - np.exp(e) / 2.0**2.5)
    h = np.maximum(eta, _ETA_HI)
    # Sommerfeld: F_{3/2} = (2/5) eta^(5/2) [1 + (5 pi^2 / 8) eta^-2 - (7 pi^4 / 384) eta^-4]
    high = 0.4 * h**2.5 * (1.0 + 5.0 * np.pi**2 / 8.0 / h**2 - 7.0 * np.pi**4 / 384.0 / h**4)
    return np.where(eta < _ETA_LO, low, np.where(eta > _ETA_HI, high, val))


def electron_gas(n_e, temperature_k):
    """Degeneracy parameter, pressure and entropy density of the electrons.

    Parameters
    ----------
    n_e : array_like
        Free-electron number density in cm^-3 (> 0).
    temperature_k : array_like
        Temperature in K.

    Returns
    -------
    dict of arrays
        ``eta`` (mu / kT, dimensionless), ``pressure`` (dyn cm^-2), ``pressure_nr`` (thermal
        non-relativistic part, dyn cm^-2) and ``entropy`` (erg K^-1 cm^-3).
    """
    n_e = np.asarray(n_e, dtype=float)
    t = np.asarray(temperature_k, dtype=float)
    eta = inverse_fermi_half(n_e / (QUANTUM_DENSITY * t**1.5))
    p_nr = (2.0 / 3.0) * QUANTUM_DENSITY * t**1.5 * K_B * t * fermi_three_halves(eta)
    p_nr0 = (3.0 * np.pi**2) ** (2.0 / 3.0) * HBAR**2 / (5.0 * M_E) * n_e ** (5.0 / 3.0)
    x = LAMBDA_E_CM * np.cbrt(3.0 * np.pi**2 * n_e)
    pressure = pressure_from_x_cgs(x) + np.maximum(p_nr - p_nr0, 0.0)
    entropy = K_B * (2.5 * p_nr / (K_B * t) - eta * n_e)
    return {"eta": eta, "pressure": pressure, "pressure_nr": p_nr, "entropy": entropy, "fermi_x": x}
