"""Initial mass functions: number of stars born per unit initial mass, as piecewise power laws.

xi(M) dM ~ M^(-alpha) dM on each segment, continuous at the joins.

``salpeter``
    alpha = 2.35 (Salpeter, E. E. 1955, ApJ 121, 161) over roughly 0.4-10 Msun: slope and range as
    Kroupa 2001 (MNRAS 322, 231, sect. 2) quotes Salpeter's result; white-dwarf progenitors (about
    0.8-8 Msun) lie inside it.
``kroupa``
    alpha = 0.3 (0.01-0.08 Msun), 1.3 (0.08-0.5 Msun), 2.3 (above 0.5 Msun) (Kroupa, P. 2001,
    MNRAS 322, 231, eq. 2: alpha_2 = 2.3 for 0.5-1 Msun and alpha_3 = 2.3 above 1 Msun, checked
    against two public copies of the arXiv text, astro-ph/0009005; the upper mass limit of
    100 Msun is our choice). Over the white-dwarf progenitor range it differs from Salpeter only
    by the slope 2.3 against 2.35.

Integrals over mass intervals are analytic, so the forward model weighs each progenitor-mass cell
exactly; sampling uses the inverse of the tabulated cumulative number.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ConfigError
from ..relation import PublishedRelation, ValidRange

SALPETER_1955 = PublishedRelation(
    key="salpeter",
    reference="Salpeter, E. E. 1955, ApJ 121, 161 (dN/dM ~ M^-2.35)",
    ranges=(ValidRange("initial_mass", 0.4, 10.0, "solMass"),),
    note="single power law",
    source_location="the paper's power law of the creation function (exponent 1.35 per unit log mass); "
                    "slope 2.35 and range 0.4-10 Msun as quoted in Kroupa 2001, MNRAS 322, 231, sect. 2",
    verified=True,
    verification="C2: slope and mass range checked through Kroupa 2001 (sect. 2, beside Fig. 1), which quotes "
                 "alpha = 2.35 for 0.4 < m < 10 Msun (Salpeter 1955); reference checked against its ADS record "
                 "1955ApJ...121..161S",
)
KROUPA_2001 = PublishedRelation(
    key="kroupa",
    reference="Kroupa, P. 2001, MNRAS 322, 231 (segments alpha = 0.3, 1.3, 2.3 joined at 0.08 and 0.5 Msun)",
    ranges=(ValidRange("initial_mass", 0.01, 100.0, "solMass"),),
    note="three power-law segments; above 1 Msun the slope is uncertain (alpha_3 = 2.3 +- 0.7, eq. 2); the "
         "upper limit 100 Msun is our choice",
    source_location="eq. 2 (alpha_0 = 0.3, 0.01-0.08; alpha_1 = 1.3, 0.08-0.5; alpha_2 = 2.3, 0.5-1; "
                    "alpha_3 = 2.3, above 1 Msun)",
    verified=True,
    verification="C2: eq. 2 slopes and break masses checked against two independent public copies of the "
                 "paper's arXiv text (astro-ph/0009005)",
)


@dataclass(frozen=True)
class PowerLawIMF:
    """A continuous piecewise power-law IMF.

    Parameters
    ----------
    relation : PublishedRelation
        Identity, reference and valid range (quantity ``initial_mass``).
    breaks : tuple of float
        Masses (Msun) where the slope changes, ascending (may be empty).
    alphas : tuple of float
        Slopes alpha (xi ~ M^-alpha), one more than ``breaks``.
    """

    relation: PublishedRelation
    breaks: tuple
    alphas: tuple

    @property
    def key(self):
        return self.relation.key

    def _coefficients(self):
        """Normalisation of each segment so that xi is continuous (xi = c_j M^-alpha_j)."""
        c = [1.0]
        for b, a0, a1 in zip(self.breaks, self.alphas[:-1], self.alphas[1:]):
            c.append(c[-1] * b ** (a1 - a0))
        return np.asarray(c)

    def density(self, mass_msun):
        """xi(M), un-normalised (number per Msun, continuous at the breaks)."""
        m = np.asarray(mass_msun, dtype=float)
        j = np.searchsorted(np.asarray(self.breaks, dtype=float), m, side="right")
        c = self._coefficients()[j]
        a = np.asarray(self.alphas, dtype=float)[j]
        return c * m ** (-a)

    def cumulative(self, mass_msun):
        """int_0^M xi dM' measured from the first break (or from 0.01 Msun), un-normalised.

        Only differences of this function are meaningful.
        """
        m = np.asarray(mass_msun, dtype=float)
        edges = np.concatenate([[self.relation.ranges[0].low], np.asarray(self.breaks, dtype=float)])
        c = self._coefficients()
        a = np.asarray(self.alphas, dtype=float)
        total = np.zeros(m.shape)
        for j in range(len(a)):
            lo = edges[j]
            hi = np.inf if j == len(a) - 1 else self.breaks[j]
            x = np.clip(m, lo, hi)
            total = total + c[j] * _power_integral(lo, x, a[j])
        return total

    def number_between(self, m_lo, m_hi):
        """int_(m_lo)^(m_hi) xi dM, un-normalised (vectorised)."""
        return self.cumulative(m_hi) - self.cumulative(m_lo)

    def sample(self, rng, n, m_lo, m_hi):
        """Draw ``n`` initial masses (Msun) between ``m_lo`` and ``m_hi``."""
        grid = np.geomspace(m_lo, m_hi, 4097)
        cdf = self.number_between(m_lo, grid)
        cdf = cdf / cdf[-1]
        return np.exp(np.interp(rng.uniform(size=n), cdf, np.log(grid)))

    def as_model(self):
        return self.relation.as_model() | {"caution": self.relation.note}


def _power_integral(lo, hi, alpha):
    """int_lo^hi M^-alpha dM (hi may be an array)."""
    if np.isclose(alpha, 1.0):
        return np.log(hi / lo)
    return (np.asarray(hi, dtype=float) ** (1.0 - alpha) - lo ** (1.0 - alpha)) / (1.0 - alpha)


SALPETER = PowerLawIMF(SALPETER_1955, (), (2.35,))
KROUPA = PowerLawIMF(KROUPA_2001, (0.08, 0.5), (0.3, 1.3, 2.3))

#: IMFs by configuration key.
IMFS = {f.key: f for f in (SALPETER, KROUPA)}


def get_imf(key):
    """The IMF of a configuration key (raises ConfigError naming the choices)."""
    if isinstance(key, PowerLawIMF):
        return key
    try:
        return IMFS[key]
    except KeyError:
        raise ConfigError(f"population.imf.kind: unknown initial mass function {key!r}; choose one of "
                          f"{sorted(IMFS)}") from None
