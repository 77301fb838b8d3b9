"""Initial-final mass relations (IFMR): white-dwarf mass from progenitor mass, and the inverse.

Every relation here is piecewise linear in the initial mass, M_f = a_k M_i + b_k on segment k,
with positive slopes, so the inverse M_i(M_f) is piecewise linear too and is evaluated
vectorised. Each relation is a :class:`cinderclock.relation.PublishedRelation` whose valid
range is the initial-mass range the paper calibrated; the matching final-mass range follows from
the relation. Outside it the functions return NaN (or, on request, the end segments continued)
together with an in-range mask: they never extrapolate silently.

The configuration names a relation by its study and, where the study gives several, the
isochrone set its progenitor ages rest on (``progenitor.ifmr: {relation: ..., isochrones: ...}``);
:data:`STUDIES` lists them. Coefficients and how each was checked are in the relation's metadata
(``source_location``, ``verified``, ``verification``) and in the README.

Where the quoted segments do not meet exactly (Cummings PARSEC: Mf drops by 0.0036 Msun at
Mi = 2.80 and by 0.0009 at 3.65; MIST: gaps below 0.001), the inverse takes the upper segment for
a final mass that two segments share; this moves Mi by at most ~0.04 Msun.

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


_CUMMINGS_REF = "Cummings, J. D., Kalirai, J. S., Tremblay, P.-E., Ramirez-Ruiz, E. & Choi, J. 2018, ApJ 866, 21"
_CUMMINGS_CHECK = ("coefficients from three secondary sources that agree (/work/shared/reference-values.md section 7, "
                   "C2); consistent with the paper's abstract: slopes 0.08, 0.19 (2.85-3.6 Msun) and 0.11, mass "
                   "lost 33 % of M_i at 0.83 Msun and 83 % at 7.5 Msun")

CUMMINGS2018_MIST = PiecewiseLinearIFMR(
    PublishedRelation(
        key="cummings2018_mist",
        reference=_CUMMINGS_REF + " (MIST-based progenitor masses)",
        ranges=(ValidRange("initial_mass", 0.83, 7.20, "solMass"),),
        note="three linear segments; least constrained below Mi ~ 1.5 Msun",
        source_location="piecewise-linear fit with MIST ages (equation numbers not checked)",
        verified=True,
        verification=_CUMMINGS_CHECK,
    ),
    ((0.83, 2.85, 0.080, 0.489), (2.85, 3.60, 0.187, 0.184), (3.60, 7.20, 0.107, 0.471)),
)

CUMMINGS2018_PARSEC = PiecewiseLinearIFMR(
    PublishedRelation(
        key="cummings2018_parsec",
        reference=_CUMMINGS_REF + " (PARSEC-based progenitor masses)",
        ranges=(ValidRange("initial_mass", 0.87, 8.20, "solMass"),),
        note="three linear segments; least constrained below Mi ~ 1.5 Msun",
        source_location="piecewise-linear fit with PARSEC ages (equation numbers not checked)",
        verified=True,
        verification="coefficients from secondary sources (/work/shared/reference-values.md section 7, C2)",
    ),
    ((0.87, 2.80, 0.0873, 0.476), (2.80, 3.65, 0.181, 0.210), (3.65, 8.20, 0.0835, 0.565)),
)

KALIRAI2008 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="kalirai2008",
        reference="Kalirai, J. S., Hansen, B. M. S., Kelson, D. D., Reitzel, D. B., Rich, R. M. & "
                  "Richer, H. B. 2008, ApJ 676, 594",
        ranges=(ValidRange("initial_mass", 1.16, 6.5, "solMass"),),
        note="single linear fit; lower end 1.16 Msun as in the paper's abstract",
        source_location="linear fit of the paper's IFMR section (equation number not checked)",
        verified=False,
        verification="UNVERIFIED: secondary sources disagree on the intercept (0.394 or 0.428; 0.394 used); the "
                     "lower end of the range (1.16 Msun) is in the abstract, the upper end (6.5 Msun) is not checked",
    ),
    ((1.16, 6.5, 0.109, 0.394),),
)

KALIRAI2009 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="kalirai2009",
        reference="Kalirai, J. S., Davis, D. S., Richer, H. B., et al. 2009, ApJ 705, 408",
        ranges=(ValidRange("initial_mass", 0.8, 6.5, "solMass"),),
        note="single linear fit including the globular-cluster white dwarfs at the low-mass end",
        source_location="linear fit (equation number not checked)",
        verified=False,
        verification="coefficients from one secondary source (/work/shared/reference-values.md section 7, C2); "
                     "calibrated range (0.8-6.5 Msun) not checked against the paper: UNVERIFIED range",
    ),
    ((0.8, 6.5, 0.101, 0.463),),
)

CATALAN2008 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="catalan2008",
        reference="Catalan, S., Isern, J., Garcia-Berro, E. & Ribas, I. 2008, MNRAS 387, 1693",
        ranges=(ValidRange("initial_mass", 1.0, 6.5, "solMass"),),
        note="two linear segments meeting at Mi = 2.7 Msun",
        source_location="two-segment linear fit (equation number not checked)",
        verified=False,
        verification="coefficients from one secondary source (/work/shared/reference-values.md section 7, C2); "
                     "calibrated range 1.0-6.5 Msun not checked against the paper: UNVERIFIED range",
    ),
    ((1.0, 2.7, 0.096, 0.429), (2.7, 6.5, 0.137, 0.318)),
)

SALARIS2009 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="salaris2009",
        reference="Salaris, M., Serenelli, A., Weiss, A. & Miller Bertolami, M. 2009, ApJ 692, 1013",
        ranges=(ValidRange("initial_mass", 1.7, 6.5, "solMass"),),
        note="two linear segments meeting at Mi = 4 Msun; semi-empirical, with the paper's own isochrones",
        source_location="two-segment linear fit (equation number not checked)",
        verified=False,
        verification="first segment 0.134 Mi + 0.331 (1.7-4 Msun) from a secondary source "
                     "(/work/shared/reference-values.md section 7, C2); upper slope 0.047 from the same source, its "
                     "intercept 0.679 set by continuity at 4 Msun (the source's ~0.679 agrees); upper end of the range "
                     "(6.5 Msun) UNVERIFIED",
    ),
    ((1.7, 4.0, 0.134, 0.331), (4.0, 6.5, 0.047, 0.134 * 4.0 + 0.331 - 0.047 * 4.0)),
)

WILLIAMS2009 = PiecewiseLinearIFMR(
    PublishedRelation(
        key="williams2009",
        reference="Williams, K. A., Bolte, M. & Koester, D. 2009, ApJ 693, 355",
        ranges=(ValidRange("initial_mass", 2.5, 6.5, "solMass"),),
        note="single linear fit to young open clusters",
        source_location="linear fit (equation number not checked)",
        verified=False,
        verification="UNVERIFIED: slope 0.129 and intercept 0.339 and the calibrated range are not confirmed "
                     "against the paper or a secondary source",
    ),
    ((2.5, 6.5, 0.129, 0.339),),
)

#: Studies and their isochrone variants: relation -> {isochrones: IFMR}; ``None`` is a study's only variant.
STUDIES = {
    "cummings2018": {"mist": CUMMINGS2018_MIST, "parsec": CUMMINGS2018_PARSEC},
    "kalirai2008": {None: KALIRAI2008},
    "kalirai2009": {None: KALIRAI2009},
    "catalan2008": {None: CATALAN2008},
    "salaris2009": {None: SALARIS2009},
    "williams2009": {None: WILLIAMS2009},
}
#: Every IFMR by internal key.
IFMRS = {v.key: v for variants in STUDIES.values() for v in variants.values()}
#: Default IFMR (see the README for the reasons).
DEFAULT_IFMR = {"relation": "cummings2018", "isochrones": "mist"}


def get_ifmr(spec=None):
    """The IFMR of a configuration choice (raises ConfigError naming the choices).

    Parameters
    ----------
    spec : dict, str or PiecewiseLinearIFMR
        ``{relation, isochrones}`` as in ``progenitor.ifmr``; an internal key of :data:`IFMRS`;
        or a relation (returned as is). None: :data:`DEFAULT_IFMR`.
    """
    if isinstance(spec, PiecewiseLinearIFMR):
        return spec
    if spec is None:
        spec = DEFAULT_IFMR
    if isinstance(spec, dict):
        study = spec.get("relation", DEFAULT_IFMR["relation"])
        variants = STUDIES.get(study)
        if variants is None:
            raise ConfigError(f"progenitor.ifmr.relation: unknown relation {study!r}; choose one of {sorted(STUDIES)}")
        iso = spec.get("isochrones")
        if iso is None and None not in variants:
            iso = "mist" if "mist" in variants else sorted(variants)[0]
        if iso not in variants:
            if None in variants:
                raise ConfigError(f"progenitor.ifmr.isochrones: relation {study!r} comes in one version only; "
                                  f"leave isochrones unset (null)")
            raise ConfigError(f"progenitor.ifmr.isochrones: relation {study!r} has isochrone sets "
                              f"{sorted(k for k in variants if k)}; got {iso!r}")
        return variants[iso]
    try:
        return IFMRS[spec]
    except (KeyError, TypeError):
        raise ConfigError(f"unknown initial-final mass relation '{spec}'; choose one of {sorted(IFMRS)}") from None
