"""Initial-final mass relations (IFMR): white-dwarf mass from progenitor mass, and the inverse.

Every relation here is piecewise linear in the initial mass, M_f = a_k M_i + b_k on segment k,
with positive slopes, so the inverse M_i(M_f) is piecewise linear too and is evaluated
vectorised. Each relation is a :class:`cinderclock.relation.PublishedRelation` whose valid
range is the initial-mass range the paper calibrated; the matching final-mass range follows from
the relation. Outside it the functions return NaN (or, on request, the end segments continued)
together with an in-range mask: they never extrapolate silently.

Relations (coefficients as quoted by secondary sources that agree; mark C2 in the project's
reference list):

``cummings2018_mist``
    Cummings et al. 2018, ApJ 866, 21, with MIST isochrone ages: 0.080 Mi + 0.489 (0.83-2.85),
    0.187 Mi + 0.184 (2.85-3.60), 0.107 Mi + 0.471 (3.60-7.20). The default.
``cummings2018_parsec``
    Same paper, PARSEC ages: 0.0873 Mi + 0.476 (0.87-2.80), 0.181 Mi + 0.210 (2.80-3.65),
    0.0835 Mi + 0.565 (3.65-8.20).
``kalirai2008``
    Kalirai et al. 2008, ApJ 676, 594: (0.109 +- 0.007) Mi + (0.394 +- 0.025). Secondary sources
    disagree on the intercept (0.394 or 0.428); not checked against the paper, so this relation is
    *not* the default. Range 1.16-6.5 Msun from memory.
``catalan2008``
    Catalan et al. 2008, MNRAS 387, 1693: 0.096 Mi + 0.429 (Mi <= 2.7), 0.137 Mi + 0.318
    (Mi > 2.7). Calibrated range 1.0-6.5 Msun from memory (not checked).

Where the quoted segments do not meet exactly (PARSEC: Mf drops by 0.0036 Msun at Mi = 2.80 and
by 0.0009 at 3.65; MIST: gaps below 0.001), the inverse takes the upper segment for a final mass
that two segments share; this moves Mi by at most ~0.04 Msun.

Cautions: IFMRs are least constrained at low initial mass (Mi < ~1.5 Msun), where a small error in
the white-dwarf mass maps to a large error in the progenitor mass and lifetime; white dwarfs
below ~0.5 Msun may come from binary evolution and have no single-star progenitor at all.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ConfigError
from ..relation import PublishedRelation, ValidRange


@dataclass(frozen=True)
class PiecewiseLinearIFMR:
    """A piecewise-linear initial-final mass relation.

    Parameters
    ----------
    relation : PublishedRelation
        Identity, reference and calibrated initial-mass range (quantity ``initial_mass``).
    segments : tuple of (float, float, float, float)
        ``(mi_low, mi_high, slope, intercept)`` per segment, ascending and contiguous in Mi.
    """

    relation: PublishedRelation
    segments: tuple

    @property
    def key(self):
        return self.relation.key

    def _arrays(self):
        lo, hi, a, b = (np.array(v, dtype=float) for v in zip(*self.segments))
        return lo, hi, a, b

    @property
    def initial_range(self):
        """(low, high) calibrated initial mass, Msun."""
        r = self.relation.ranges[0]
        return r.low, r.high

    @property
    def final_range(self):
        """(low, high) final mass at the ends of the calibrated range, Msun."""
        lo, hi = self.initial_range
        return float(self.final_mass(lo, extrapolate=True)[0]), float(self.final_mass(hi, extrapolate=True)[0])

    def final_mass(self, initial_mass_msun, extrapolate=False):
        """White-dwarf mass (Msun) of a progenitor of ``initial_mass_msun``.

        Returns
        -------
        final_mass : ndarray
            NaN outside the calibrated range unless ``extrapolate`` (end segments continued).
        in_range : ndarray of bool
        """
        mi = np.asarray(initial_mass_msun, dtype=float)
        lo, hi, a, b = self._arrays()
        k = np.clip(np.searchsorted(lo, mi, side="right") - 1, 0, lo.size - 1)
        mf = a[k] * mi + b[k]
        ok = self.relation.inside(initial_mass=mi)
        return (mf if extrapolate else np.where(ok, mf, np.nan)), ok

    def initial_mass(self, final_mass_msun, extrapolate=False):
        """Progenitor mass (Msun) of a white dwarf of ``final_mass_msun`` (inverse relation).

        Returns
        -------
        initial_mass : ndarray
            NaN outside the calibrated final-mass range unless ``extrapolate``.
        in_range : ndarray of bool
        """
        mf = np.asarray(final_mass_msun, dtype=float)
        lo, hi, a, b = self._arrays()
        mf_lo = a * lo + b
        k = np.clip(np.searchsorted(mf_lo, mf, side="right") - 1, 0, lo.size - 1)
        mi = (mf - b[k]) / a[k]
        # segments meet only to the quoted precision: inside the relation, keep Mi on its segment
        interior = (k > 0) | (mi >= lo[0])
        interior &= (k < lo.size - 1) | (mi <= hi[-1])
        mi = np.where(interior, np.clip(mi, lo[k], hi[k]), mi)
        f_lo, f_hi = self.final_range
        ok = (mf >= f_lo) & (mf <= f_hi)
        return (mi if extrapolate else np.where(ok, mi, np.nan)), ok

    def as_model(self):
        """Provenance entry."""
        return self.relation.as_model()


CUMMINGS2018_MIST = PiecewiseLinearIFMR(
    PublishedRelation(
        key="cummings2018_mist",
        reference="Cummings, J. D., Kalirai, J. S., Tremblay, P.-E., Ramirez-Ruiz, E. & Choi, J. 2018, "
                  "ApJ 866, 21 (MIST-based progenitor masses)",
        ranges=(ValidRange("initial_mass", 0.83, 7.20, "solMass"),),
        note="three linear segments; least constrained below Mi ~ 1.5 Msun",
    ),
    ((0.83, 2.85, 0.080, 0.489), (2.85, 3.60, 0.187, 0.184), (3.60, 7.20, 0.107, 0.471)),
)

CUMMINGS2018_PARSEC = PiecewiseLinearIFMR(
    PublishedRelation(
        key="cummings2018_parsec",
        reference="Cummings, J. D., Kalirai, J. S., Tremblay, P.-E., Ramirez-Ruiz, E. & Choi, J. 2018, "
                  "ApJ 866, 21 (PARSEC-based progenitor masses)",
        ranges=(ValidRange("initial_mass", 0.87, 8.20, "solMass"),),
        note="three linear segments; least constrained below Mi ~ 1.5 Msun",
    ),
    ((0.87, 2.80, 0.0873, 0.476), (2.80, 3.65, 0.181, 0.210), (3.65, 8.20, 0.0835, 0.565)),
)

KALIRAI2008 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="kalirai2008",
        reference="Kalirai, J. S., Hansen, B. M. S., Kelson, D. D., Reitzel, D. B., Rich, R. M. & "
                  "Richer, H. B. 2008, ApJ 676, 594",
        ranges=(ValidRange("initial_mass", 1.16, 6.5, "solMass"),),
        note="intercept 0.394 as in most secondary sources; one source quotes 0.428 -- unresolved, "
             "not checked against the paper; calibrated range from memory",
    ),
    ((1.16, 6.5, 0.109, 0.394),),
)

CATALAN2008 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="catalan2008",
        reference="Catalan, S., Isern, J., Garcia-Berro, E. & Ribas, I. 2008, MNRAS 387, 1693",
        ranges=(ValidRange("initial_mass", 1.0, 6.5, "solMass"),),
        note="two linear segments meeting at Mi = 2.7 Msun; calibrated range from memory (not checked)",
    ),
    ((1.0, 2.7, 0.096, 0.429), (2.7, 6.5, 0.137, 0.318)),
)

#: IFMRs by configuration key.
IFMRS = {r.key: r for r in (CUMMINGS2018_MIST, CUMMINGS2018_PARSEC, KALIRAI2008, CATALAN2008)}
#: Default IFMR.
DEFAULT_IFMR = "cummings2018_mist"


def get_ifmr(key=DEFAULT_IFMR):
    """The IFMR of a configuration key (raises ConfigError naming the choices)."""
    if isinstance(key, PiecewiseLinearIFMR):
        return key
    try:
        return IFMRS[key]
    except KeyError:
        raise ConfigError(f"unknown initial-final mass relation '{key}'; choose one of {sorted(IFMRS)}") from None
