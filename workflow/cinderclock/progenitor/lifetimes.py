"""Pre-white-dwarf lifetimes of progenitor stars.

``hurley2000`` (default)
    Main-sequence lifetime of Hurley, Pols & Tout (2000, MNRAS 315, 543), eqs. 4-7:

        t_BGB = (a1 + a2 M^4 + a3 M^5.5 + M^7) / (a4 M^2 + a5 M^7)   [Myr]
        t_MS  = max(mu, x) t_BGB,   mu = max(0.5, 1 - 0.01 max(a6 / M^a7, a8 + a9 / M^a10)),
        x     = max(0.95, min(0.95 - 0.03 (zeta + 0.30103), 0.99)),  zeta = log10(Z / 0.02).

    The coefficients a1..a10 depend on metallicity through polynomials in zeta given in the
    paper's appendix. Only their Z = 0.02 values have been confirmed (through secondary sources):
    a1..a10 = 1593.890, 2706.708, 146.6143, 0.04141960, 0.3426349, 19.49814, 4.903830,
    0.05212154, 1.312179, 0.8073972. **This implementation therefore accepts Z = 0.02 only**;
    other metallicities raise :class:`~cinderclock.errors.ConfigError` until the zeta terms are
    checked against the paper.
``hurley2000_bgb``
    The same paper's time to the base of the giant branch, t_BGB: closer to the full
    pre-white-dwarf lifetime than t_MS (the later giant phases add roughly another 10 %, from
    memory).
``rule_of_thumb``
    t = 10 Gyr (M / Msun)^-2.5 (Hansen, Kawaler & Trimble, *Stellar Interiors*, eq. 1.88).

Cautions: main-sequence lifetimes omit the giant-branch and AGB phases (~10-15 % of the total,
from memory); the fits assume single-star evolution without rotation and with one mixing
prescription; lifetimes of stars below ~1 Msun exceed the age of the Galaxy.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ConfigError
from ..relation import PublishedRelation, ValidRange

#: Metallicity at which the Hurley et al. (2000) coefficients have been confirmed.
HURLEY_CONFIRMED_Z = 0.02

# Hurley, Pols & Tout (2000), appendix: a1..a10 at Z = 0.02 (zeta = 0).
_HURLEY_A_Z002 = (1593.890, 2706.708, 146.6143, 0.04141960, 0.3426349,
                  19.49814, 4.903830, 0.05212154, 1.312179, 0.8073972)

HURLEY2000 = PublishedRelation(
    key="hurley2000",
    reference="Hurley, J. R., Pols, O. R. & Tout, C. A. 2000, MNRAS 315, 543, eqs. 4-7",
    ranges=(ValidRange("mass", 0.5, 50.0, "solMass"), ValidRange("metallicity", 0.02, 0.02, "")),
    note="fits to the Pols et al. (1998) models of 0.5-50 Msun (range from memory); only the Z = 0.02 "
         "coefficients are confirmed, so the metallicity range is that single value",
)
HURLEY2000_BGB = PublishedRelation(
    key="hurley2000_bgb",
    reference="Hurley, J. R., Pols, O. R. & Tout, C. A. 2000, MNRAS 315, 543, eq. 4 (t_BGB)",
    ranges=HURLEY2000.ranges,
    note=HURLEY2000.note,
)
RULE_OF_THUMB = PublishedRelation(
    key="rule_of_thumb",
    reference="Hansen, C. J., Kawaler, S. D. & Trimble, V. 2004, Stellar Interiors, 2nd ed., eq. 1.88 "
              "(t = 10 Gyr (M/Msun)^-2.5)",
    ranges=(ValidRange("mass", 0.8, 8.0, "solMass"),),
    note="order-of-magnitude scaling; range of our choosing (roughly the white-dwarf progenitors)",
)


def _check_metallicity(metallicity):
    if not np.isclose(metallicity, HURLEY_CONFIRMED_Z, rtol=0, atol=1e-12):
        raise ConfigError(f"Hurley et al. (2000) lifetimes are implemented for Z = {HURLEY_CONFIRMED_Z} only "
                          f"(got Z = {metallicity}): their metallicity terms are not yet confirmed")


def hurley_tbgb_myr(mass_msun, metallicity=0.02):
    """Time to the base of the giant branch (Myr), Hurley et al. (2000) eq. 4, at Z = 0.02."""
    _check_metallicity(metallicity)
    a1, a2, a3, a4, a5 = _HURLEY_A_Z002[:5]
    m = np.asarray(mass_msun, dtype=float)
    return (a1 + a2 * m**4 + a3 * m**5.5 + m**7) / (a4 * m**2 + a5 * m**7)


def hurley_tms_myr(mass_msun, metallicity=0.02):
    """Main-sequence lifetime (Myr), Hurley et al. (2000) eqs. 4-7, at Z = 0.02.

    Parameters
    ----------
    mass_msun : array_like
        Zero-age main-sequence mass in Msun.
    metallicity : float
        Z; only 0.02 is accepted (see the module docstring).
    """
    _check_metallicity(metallicity)
    a6, a7, a8, a9, a10 = _HURLEY_A_Z002[5:]
    m = np.asarray(mass_msun, dtype=float)
    zeta = np.log10(metallicity / 0.02)
    x = max(0.95, min(0.95 - 0.03 * (zeta + 0.30103), 0.99))
    mu = np.maximum(0.5, 1.0 - 0.01 * np.maximum(a6 / m**a7, a8 + a9 / m**a10))
    return np.maximum(mu, x) * hurley_tbgb_myr(m, metallicity)


def rule_of_thumb_myr(mass_msun):
    """t = 10 Gyr (M/Msun)^-2.5, in Myr (Hansen, Kawaler & Trimble, eq. 1.88)."""
    return 1.0e4 * np.asarray(mass_msun, dtype=float) ** -2.5


@dataclass(frozen=True)
class LifetimeModel:
    """A progenitor-lifetime formula with its published identity."""

    relation: PublishedRelation
    function: object
    uses_metallicity: bool = False

    @property
    def key(self):
        return self.relation.key

    def lifetime_yr(self, mass_msun, metallicity=0.02):
        """Lifetime in years and the in-range mask for initial masses ``mass_msun`` (Msun)."""
        m = np.asarray(mass_msun, dtype=float)
        t = self.function(m, metallicity) if self.uses_metallicity else self.function(m)
        return t * 1e6, self.relation.inside(mass=m)

    def as_model(self):
        return self.relation.as_model()


#: Lifetime formulae by configuration key.
LIFETIMES = {
    "hurley2000": LifetimeModel(HURLEY2000, hurley_tms_myr, uses_metallicity=True),
    "hurley2000_bgb": LifetimeModel(HURLEY2000_BGB, hurley_tbgb_myr, uses_metallicity=True),
    "rule_of_thumb": LifetimeModel(RULE_OF_THUMB, rule_of_thumb_myr),
}
DEFAULT_LIFETIME = "hurley2000"


def get_lifetime(key=DEFAULT_LIFETIME):
    """The lifetime model of a configuration key (raises ConfigError naming the choices)."""
    if isinstance(key, LifetimeModel):
        return key
    try:
        return LIFETIMES[key]
    except KeyError:
        raise ConfigError(f"unknown progenitor lifetime '{key}'; choose one of {sorted(LIFETIMES)}") from None
