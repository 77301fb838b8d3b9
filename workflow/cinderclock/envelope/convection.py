"""Mixing-length convection (Boehm-Vitense 1958) in the form of Kippenhahn, Weigert & Weiss.

With the mixing length l = alpha H_P, the local gravity g, the pressure scale height
H_P = P / (rho g), c_P, delta = -(d ln rho / d ln T)_P and the opacity kappa, Kippenhahn,
Weigert & Weiss (2012, *Stellar Structure and Evolution*, 2nd ed., section 7.2, eqs. 7.12-7.18)
write the efficiency parameter

    U = 3 a c T^3 / (c_P rho^2 kappa l^2) * sqrt(8 H_P / (g delta))

and the actual gradient nabla through xi = sqrt(nabla - nabla_ad + U^2), the real root of
(xi - U)^3 + (8 U / 9) (xi^2 - U^2 - W) = 0 with W = nabla_rad - nabla_ad. We solve it for
y = xi - U (y^3 + (8U/9) y^2 + (16 U^2 / 9) y - (8 U / 9) W = 0: one positive root) by Cardano's
formula polished by Newton steps, so nabla - nabla_ad = y (2 U + y) keeps its digits in both
limits: U -> 0 gives nabla -> nabla_ad (efficient convection, deep layers), U -> infinity gives
nabla -> nabla_rad (inefficient, thin photospheric layers). Eddies are taken optically thick (no
correction for radiative losses of optically thin eddies in the atmosphere).

This is the original ("ML1"-like) set of geometric constants of that textbook; the white-dwarf
literature often quotes "ML2" (Bohm & Cassinelli 1971), which is more efficient at the same
alpha, so alpha values of the two are not interchangeable. The Schwarzschild criterion
nabla_rad > nabla_ad selects convective layers (no composition-gradient term).
"""

from __future__ import annotations

import numpy as np

#: Default mixing-length parameter alpha = l / H_P (our choice of order unity; see module docstring).
DEFAULT_ALPHA = 1.0


def mlt_excess(u, w):
    """nabla - nabla_ad from the efficiency U (>= 0) and W = nabla_rad - nabla_ad (> 0)."""
    u = np.asarray(u, dtype=float)
    w = np.asarray(w, dtype=float)
    a = 8.0 * u / 9.0
    b = 16.0 * u * u / 9.0
    c = -a * w
    p = b - a * a / 3.0
    q = 2.0 * a**3 / 27.0 - a * b / 3.0 + c
    disc = np.sqrt(np.maximum(q * q / 4.0 + p**3 / 27.0, 0.0))
    y = np.cbrt(-q / 2.0 + disc) + np.cbrt(-q / 2.0 - disc) - a / 3.0
    # Newton polish; the cubic is increasing for y > 0. Start no higher than the bounds
    y = np.clip(y, 0.0, None)
    y = np.where(u > 1e3, np.minimum(w / (2.0 * np.maximum(u, 1e-300)), w), y)
    for _ in range(3):
        f = y**3 + a * y * y + b * y + c
        df = 3.0 * y * y + 2.0 * a * y + b
        y = np.where(df > 0, np.clip(y - f / np.where(df > 0, df, 1.0), 0.0, None), y)
    return np.minimum(y * (2.0 * u + y), w)


def temperature_gradient(nabla_rad, nabla_ad, u):
    """Actual gradient: nabla_rad where radiative (Schwarzschild), the MLT gradient where convective.

    Returns (nabla, convective) arrays.
    """
    w = nabla_rad - nabla_ad
    conv = w > 0
    excess = mlt_excess(np.where(conv, u, 1.0), np.where(conv, w, 1.0))
    return np.where(conv, nabla_ad + excess, nabla_rad), conv
