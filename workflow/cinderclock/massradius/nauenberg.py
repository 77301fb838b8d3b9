"""Zero-temperature mass-radius relation in the closed form of Nauenberg (1972).

Nauenberg fitted Chandrasekhar's fully degenerate, zero-temperature models with

    R / Rsun = (0.0225 / mu_e) * sqrt((M/M3)^(-2/3) - (M/M3)^(2/3)),   M3 = 5.816 / mu_e^2 Msun,

where mu_e is the mean molecular weight per electron (2 for He, C and O). It ignores the finite
temperature of the star (hot white dwarfs are a few per cent larger) and the Coulomb corrections
to the equation of state, so it is the baseline relation only.
"""

from __future__ import annotations

import numpy as np

from ..constants import G_SI, M_SUN_KG, R_SUN_M
from ..relation import PublishedRelation, ValidRange

NAUENBERG_1972 = PublishedRelation(
    key="nauenberg1972",
    reference="Nauenberg, M. 1972, ApJ 175, 417 (analytic fit to Chandrasekhar's T = 0 models)",
    ranges=(ValidRange("mass", 0.1, 1.38, "solMass"),),
    note="zero temperature, no Coulomb corrections; hot white dwarfs are a few per cent larger; "
         "range stated for mu_e = 2 (our choice: the fit degrades far below 0.1 Msun and the radius "
         "collapses towards M3 = 1.454 Msun)",
)


def m3_msun(mu_e=2.0):
    """Limiting mass of the fit, M3 = 5.816 / mu_e^2, in solar masses."""
    return 5.816 / mu_e**2


def radius_rsun(mass_msun, mu_e=2.0):
    """Radius in solar radii of a zero-temperature white dwarf of the given mass (NaN beyond M3).

    Parameters
    ----------
    mass_msun : array_like
        Mass in solar masses.
    mu_e : float
        Mean molecular weight per electron.
    """
    x = np.asarray(mass_msun, dtype=float) / m3_msun(mu_e)
    with np.errstate(invalid="ignore", divide="ignore"):
        arg = x ** (-2.0 / 3.0) - x ** (2.0 / 3.0)
        r = (0.0225 / mu_e) * np.sqrt(np.where(arg > 0, arg, np.nan))
    return np.where((x > 0) & (x < 1), r, np.nan)


def logg_cgs(mass_msun, radius_rsun_):
    """Surface gravity log10(g / cm s^-2) from mass (Msun) and radius (Rsun)."""
    m = np.asarray(mass_msun, dtype=float) * M_SUN_KG
    r = np.asarray(radius_rsun_, dtype=float) * R_SUN_M
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.log10(G_SI * m / r**2 * 100.0)


class NauenbergInverse:
    """Vectorised inversion of the Nauenberg relation by interpolation on a fine mass grid.

    log g rises and radius falls monotonically with mass, so both invert by ``np.interp`` on one
    table, with no per-star root finding.
    """

    def __init__(self, mu_e=2.0, n=4000):
        rel = NAUENBERG_1972.ranges[0]
        self.mu_e = mu_e
        self.mass = np.linspace(rel.low, rel.high, n)
        self.radius = radius_rsun(self.mass, mu_e)
        self.logg = logg_cgs(self.mass, self.radius)

    def mass_from_logg(self, logg):
        """Mass (Msun) from log g (cgs); NaN outside the tabulated range."""
        g = np.asarray(logg, dtype=float)
        return np.interp(g, self.logg, self.mass, left=np.nan, right=np.nan)

    def mass_from_radius(self, radius_rsun_):
        """Mass (Msun) from radius (Rsun); NaN outside the tabulated range."""
        r = np.asarray(radius_rsun_, dtype=float)
        # radius falls with mass: interpolate on the reversed arrays
        return np.interp(r, self.radius[::-1], self.mass[::-1], left=np.nan, right=np.nan)
