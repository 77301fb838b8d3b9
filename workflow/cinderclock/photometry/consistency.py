"""Over-luminosity flag: photometric radius against the radius expected from the mass-radius relation.

Where spectroscopy gives Teff and log g, a mass-radius relation gives the radius R_exp the star
should have. The photometric fit (at the spectroscopic Teff) gives R_phot from the solid angle and
distance. An unresolved pair of white dwarfs adds the flux of the companion, so R_phot comes out too
large: for two identical stars the flux doubles and R_phot = sqrt(2) R_exp (exact: flux scales as
R^2 at fixed Teff and distance). Such over-luminous stars are candidate double white dwarfs.

The flag needs both a large ratio and a significant one:

    R_phot / R_exp > min_ratio   and   (R_phot - R_exp) / sigma > n_sigma,

with sigma the photometric radius error and the expected-radius error added in quadrature.
Defaults: ``min_ratio = 2**0.25 = 1.189``, the geometric midpoint between a single star (1) and an
equal twin (sqrt 2), our choice; ``n_sigma = 3`` (common practice for a detection).

Caution: the flag inherits every systematic of both radii: blackbody model spectra for DA stars,
the distance prior at low parallax S/N, and the errors of spectroscopic log g. Flagged stars are
candidates only.
"""

from __future__ import annotations

import numpy as np

#: Default ratio threshold: geometric midpoint between 1 and sqrt(2) (our choice).
DEFAULT_MIN_RATIO = 2.0**0.25
#: Default significance threshold in standard deviations (common practice).
DEFAULT_N_SIGMA = 3.0


def overluminosity(radius_phot_rsun, radius_phot_err_rsun, radius_expected_rsun, radius_expected_err_rsun=0.0,
                   min_ratio=DEFAULT_MIN_RATIO, n_sigma=DEFAULT_N_SIGMA):
    """Compare photometric and expected radii and flag over-luminous stars.

    Parameters
    ----------
    radius_phot_rsun, radius_phot_err_rsun : array_like
        Photometric radius and its error, solar radii.
    radius_expected_rsun, radius_expected_err_rsun : array_like
        Radius from the mass-radius relation at the spectroscopic log g (and Teff), and its
        error, solar radii.
    min_ratio : float
        Smallest ratio R_phot / R_exp flagged.
    n_sigma : float
        Smallest significance (R_phot - R_exp) / sigma flagged.

    Returns
    -------
    dict of ndarray
        ``radius_ratio``, ``excess_mag`` (5 log10 of the ratio: how much brighter the star is than
        a single star of the expected radius), ``excess_significance`` and ``overluminous`` (bool;
        False where any input is missing).
    """
    rp = np.asarray(radius_phot_rsun, dtype=float)
    sp = np.asarray(radius_phot_err_rsun, dtype=float)
    re = np.asarray(radius_expected_rsun, dtype=float)
    se = np.asarray(radius_expected_err_rsun, dtype=float)
    rp, sp, re, se = np.broadcast_arrays(rp, sp, re, se)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = rp / re
        sigma = np.sqrt(sp**2 + se**2)
        signif = np.where(sigma > 0, (rp - re) / sigma, np.nan)
        excess = 5.0 * np.log10(ratio)
    flag = np.isfinite(ratio) & np.isfinite(signif) & (ratio > min_ratio) & (signif > n_sigma)
    return {"radius_ratio": ratio, "excess_mag": excess, "excess_significance": signif,
            "overluminous": flag}
