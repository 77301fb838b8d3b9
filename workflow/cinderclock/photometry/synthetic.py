"""Synthetic magnitudes of model spectra through passbands, as matrix products.

For a photon-counting detector the AB magnitude of a spectrum f_lambda through a response S is

    m_AB = -2.5 log10( int f_lambda S lambda dlambda / int f_nu,AB (c / lambda^2) S lambda dlambda ),

with f_nu,AB = 3631 Jy (Oke & Gunn 1983, ApJ 266, 713). On each band's own wavelength grid the
integral is a dot product with trapezoid weights w = S lambda dlambda, computed once per band, so
the magnitudes of many spectra are one matrix product.
"""

from __future__ import annotations

import numpy as np

from ..constants import C_SI, H_SI, JY_SI, K_B_SI

AB_ZERO_POINT_JY = 3631.0


def trapezoid_weights(x):
    """Weights w with sum(w * y) equal to the trapezoid integral of y over the grid x."""
    x = np.asarray(x, dtype=float)
    dx = np.diff(x)
    w = np.zeros_like(x)
    w[:-1] += dx / 2
    w[1:] += dx / 2
    return w


class BandWeights:
    """Integration weights of one passband, ready to apply to spectra on its wavelength grid."""

    def __init__(self, passband):
        self.passband = passband
        lam = passband.wavelength_m
        self.wavelength_m = lam
        self.weights = passband.response * lam * trapezoid_weights(lam)       # m^2
        f_ab = AB_ZERO_POINT_JY * JY_SI * C_SI / lam**2                       # W m^-3
        self.ab_norm = float(np.dot(f_ab, self.weights))

    def ab_magnitude(self, flux_lambda):
        """AB magnitudes of spectra sampled on this band's grid.

        Parameters
        ----------
        flux_lambda : ndarray, shape (..., n_wavelength)
            f_lambda in W m^-3 (W m^-2 per m of wavelength).
        """
        with np.errstate(divide="ignore", invalid="ignore"):
            return -2.5 * np.log10(flux_lambda @ self.weights / self.ab_norm)


def planck_lambda(wavelength_m, temperature_k):
    """Blackbody specific intensity B_lambda in W m^-2 m^-1 sr^-1.

    ``temperature_k`` of shape (n,) and ``wavelength_m`` of shape (m,) broadcast to (n, m).
    """
    lam = np.asarray(wavelength_m, dtype=float)[None, :]
    t = np.asarray(temperature_k, dtype=float)[:, None]
    x = H_SI * C_SI / (lam * K_B_SI * t)
    with np.errstate(over="ignore"):
        return 2 * H_SI * C_SI**2 / lam**5 / np.expm1(x)
