"""Bolometric corrections of blackbody spectra, tabulated once on a Teff grid.

The bolometric magnitude follows IAU 2015 Resolution B2: M_bol = -2.5 log10(L / L0) with
L0 = 3.0128e28 W, and for an observed irradiance m_bol = -2.5 log10(F / f0),
f0 = L0 / (4 pi (10 pc)^2) = 2.518021e-8 W m^-2. A star of radius R at distance d has
F = sigma T^4 (R/d)^2 and, if it radiates as a blackbody, f_lambda = pi B_lambda(T) (R/d)^2; the
ratio (R/d)^2 cancels in BC_X = m_bol - m_X.

Caution: white dwarfs are not blackbodies; see :data:`cinderclock.photometry.cautions.BLACKBODY_CAUTION`.
Hydrogen-atmosphere (DA) stars have a Balmer jump and strong Balmer lines, so blackbody colours and
corrections are biased, most in blue bands. The bias carries into Teff estimated from colours and
into the luminosity.
"""

from __future__ import annotations

import numpy as np

from ..constants import L_BOL0_W, PC_M, SIGMA_SB_SI
from .passbands import load_passband, vega_minus_ab
from .synthetic import BandWeights, planck_lambda

#: Irradiance of m_bol = 0, W m^-2 (IAU 2015 Resolution B2).
F0_W_M2 = L_BOL0_W / (4 * np.pi * (10 * PC_M) ** 2)


def bolometric_magnitude_from_flux(flux_w_m2):
    """Apparent bolometric magnitude of an irradiance (W m^-2), IAU 2015 B2."""
    return -2.5 * np.log10(np.asarray(flux_w_m2, dtype=float) / F0_W_M2)


def unit_solid_angle_mbol(teff_k):
    """Apparent bolometric magnitude of a star of Teff (K) with (R/d)^2 = 1: F = sigma T^4 (IAU 2015 B2)."""
    t = np.asarray(teff_k, dtype=float)
    return bolometric_magnitude_from_flux(SIGMA_SB_SI * t**4)


def absolute_bolometric_magnitude(log_lum_lsun):
    """M_bol from log10 L/Lsun, IAU 2015 B2 (M_bol,sun = 4.74 for the nominal L_sun)."""
    from ..constants import L_SUN_W

    return -2.5 * (np.asarray(log_lum_lsun, dtype=float) + np.log10(L_SUN_W / L_BOL0_W))


def log_lum_from_mbol(mbol):
    """log10 L/Lsun from the absolute bolometric magnitude (IAU 2015 B2)."""
    from ..constants import L_SUN_W

    return -0.4 * np.asarray(mbol, dtype=float) - np.log10(L_SUN_W / L_BOL0_W)


def blackbody_magnitudes(teff_k, passband_names, systems):
    """Synthetic magnitudes of blackbodies of unit solid angle through each band.

    Returns an array of shape (n_teff, n_band): m_X for f_lambda = pi B_lambda(T) (i.e. (R/d)^2 = 1),
    in the requested system ("ab" or "vega") of each band.
    """
    teff = np.asarray(teff_k, dtype=float)
    out = np.empty((teff.size, len(passband_names)))
    for j, (name, system) in enumerate(zip(passband_names, systems)):
        bw = BandWeights(load_passband(name))
        flux = np.pi * planck_lambda(bw.wavelength_m, teff)
        out[:, j] = bw.ab_magnitude(flux)
        if system == "vega":
            out[:, j] += vega_minus_ab(name)
    return out


def blackbody_bc_table(teff_k, passband_names, systems):
    """Bolometric corrections BC_X = m_bol - m_X of blackbodies, shape (n_teff, n_band)."""
    teff = np.asarray(teff_k, dtype=float)
    mbol = bolometric_magnitude_from_flux(SIGMA_SB_SI * teff**4)
    return mbol[:, None] - blackbody_magnitudes(teff, passband_names, systems)
