"""Pre-white-dwarf lifetimes of progenitor stars.

The configuration chooses a set of formulae and the phase they run to (``progenitor.lifetime``):

``{formulae: hurley2000, until: agb_end}`` (default)
    The full pre-white-dwarf life from the analytic formulae of Hurley, Pols & Tout (2000):
    main sequence, Hertzsprung gap, giant branch, core helium burning and the asymptotic giant
    branch up to the point where the core has grown to the white dwarf's mass
    (:mod:`cinderclock.progenitor.hurley`), at any metallicity Z = 1e-4 to 0.03.
``until: giant_branch_base`` / ``until: main_sequence``
    The same formulae stopped at the base of the giant branch (eq. 4) or at the end of the main
    sequence (eqs. 5-7). Both leave out the giant, core-helium-burning and AGB phases, about
    10-20 % of the pre-white-dwarf life (compare the phases in
    :meth:`cinderclock.progenitor.hurley.HurleyFormulae.phases`).
``{formulae: power_law}``
    t = 10 Gyr (M / Msun)^-2.5 (Hansen, Kawaler & Trimble, *Stellar Interiors*, eq. 1.88): an
    order-of-magnitude main-sequence scaling without metallicity.

Cautions: single-star evolution without rotation, one mixing prescription (the Pols et al. 1998
models); lifetimes of stars below ~1 Msun exceed the age of the Galaxy.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..errors import ConfigError
from ..relation import PublishedRelation, ValidRange
from .hurley import Z_RANGE, HurleyFormulae

_HURLEY_REF = "Hurley, J. R., Pols, O. R. & Tout, C. A. 2000, MNRAS 315, 543"
_HURLEY_CHECK = ("coefficients of Appendix A checked against two independent public implementations of the "
                 "formulae that agree digit for digit (the paper's appendix text was not readable here); the "
                 "Z = 0.02 main-sequence values against values derived from the paper's eqs. 4-7; every phase end "
                 "against a general-purpose population-synthesis package on PyPI (tests/test_progenitor_hurley.py)")
#: Initial-mass range we apply: white-dwarf progenitors inside the mass range the formulae were fitted on
#: (our choice of the upper end: stars above about 8 Msun do not leave white dwarfs).
_HURLEY_MASS = ValidRange("mass", 0.5, 8.0, "solMass")
_HURLEY_Z = ValidRange("metallicity", Z_RANGE[0], Z_RANGE[1], "")

HURLEY2000 = PublishedRelation(
    key="hurley2000_ms",
    reference=_HURLEY_REF,
    ranges=(_HURLEY_MASS, _HURLEY_Z),
    note="main-sequence lifetime only: leaves out the giant, core-helium-burning and AGB phases",
    source_location="eqs. 4-7; Appendix A (a1-a10)",
    verified=True,
    verification=_HURLEY_CHECK,
)
HURLEY2000_BGB = PublishedRelation(
    key="hurley2000_bgb",
    reference=_HURLEY_REF,
    ranges=HURLEY2000.ranges,
    note="to the base of the giant branch: leaves out the giant, core-helium-burning and AGB phases",
    source_location="eq. 4; Appendix A (a1-a5)",
    verified=True,
    verification=_HURLEY_CHECK,
)
HURLEY2000_AGB = PublishedRelation(
    key="hurley2000_agb",
    reference=_HURLEY_REF,
    ranges=HURLEY2000.ranges,
    note="full pre-white-dwarf lifetime; the AGB ends when the core reaches the white dwarf's mass from "
         "the initial-final mass relation",
    source_location="eqs. 2-7, 10, 37-40, 43, 49, 56-57, 66, 69-73, 79; Appendix A",
    verified=True,
    verification=_HURLEY_CHECK,
)
RULE_OF_THUMB = PublishedRelation(
    key="power_law",
    reference="Hansen, C. J., Kawaler, S. D. & Trimble, V. 2004, Stellar Interiors, 2nd ed. (Springer)",
    ranges=(ValidRange("mass", 0.8, 8.0, "solMass"),),
    note="order-of-magnitude main-sequence scaling t = 10 Gyr (M/Msun)^-2.5; range of our choosing",
    source_location="eq. 1.88",
    verified=True,
    verification="formula as quoted by /work/shared/reference-values.md section 7 (C2)",
)


@lru_cache(maxsize=16)
def hurley_formulae(metallicity):
    """Cached :class:`~cinderclock.progenitor.hurley.HurleyFormulae` at one metallicity."""
    return HurleyFormulae(metallicity)


def hurley_tbgb_myr(mass_msun, metallicity=0.02):
    """Time to the base of the giant branch (Myr), Hurley et al. (2000) eq. 4."""
    return hurley_formulae(float(metallicity)).t_bgb(np.asarray(mass_msun, dtype=float))


def hurley_tms_myr(mass_msun, metallicity=0.02):
    """Main-sequence lifetime (Myr), Hurley et al. (2000) eqs. 4-7.

    Parameters
    ----------
    mass_msun : array_like
        Zero-age main-sequence mass in Msun.
    metallicity : float
        Z, 1e-4 to 0.03.
    """
    return hurley_formulae(float(metallicity)).t_ms(np.asarray(mass_msun, dtype=float))


def hurley_agb_end_myr(mass_msun, metallicity=0.02, final_mass_msun=None):
    """Full pre-white-dwarf lifetime (Myr): to the end of the AGB at the white dwarf's mass."""
    if final_mass_msun is None:
        raise ConfigError("the lifetime to the end of the AGB needs the white dwarf's mass (from the IFMR)")
    return hurley_formulae(float(metallicity)).phases(mass_msun, final_mass_msun)["t_agb_end"]


def rule_of_thumb_myr(mass_msun):
    """t = 10 Gyr (M/Msun)^-2.5, in Myr (Hansen, Kawaler & Trimble, eq. 1.88)."""
    return 1.0e4 * np.asarray(mass_msun, dtype=float) ** -2.5


@dataclass(frozen=True)
class LifetimeModel:
    """A progenitor-lifetime formula with its published identity."""

    relation: PublishedRelation
    function: object
    uses_metallicity: bool = False
    needs_final_mass: bool = False

    @property
    def key(self):
        return self.relation.key

    def lifetime_yr(self, mass_msun, metallicity=0.02, final_mass_msun=None):
        """Lifetime in years and the in-range mask for initial masses ``mass_msun`` (Msun).

        ``final_mass_msun`` (the white dwarf's mass) is needed by the lifetime to the end of the AGB.
        """
        m = np.asarray(mass_msun, dtype=float)
        if self.needs_final_mass:
            t = self.function(m, metallicity, final_mass_msun)
        else:
            t = self.function(m, metallicity) if self.uses_metallicity else self.function(m)
        return t * 1e6, self.relation.inside(mass=m)

    def as_model(self, metallicity=None):
        entry = self.relation.as_model()
        if self.uses_metallicity and metallicity is not None:
            entry["metallicity"] = float(metallicity)
        return entry


#: Lifetime formulae by internal key.
LIFETIMES = {
    "hurley2000_agb": LifetimeModel(HURLEY2000_AGB, hurley_agb_end_myr, uses_metallicity=True, needs_final_mass=True),
    "hurley2000_bgb": LifetimeModel(HURLEY2000_BGB, hurley_tbgb_myr, uses_metallicity=True),
    "hurley2000_ms": LifetimeModel(HURLEY2000, hurley_tms_myr, uses_metallicity=True),
    "power_law": LifetimeModel(RULE_OF_THUMB, rule_of_thumb_myr),
}
#: Earlier names kept for the Python API.
_ALIASES = {"hurley2000": "hurley2000_ms", "rule_of_thumb": "power_law"}
#: (formulae, until) of the configuration -> internal key.
_CHOICES = {("hurley2000", "agb_end"): "hurley2000_agb", ("hurley2000", "giant_branch_base"): "hurley2000_bgb",
            ("hurley2000", "main_sequence"): "hurley2000_ms", ("power_law", "main_sequence"): "power_law"}
DEFAULT_LIFETIME = {"formulae": "hurley2000", "until": "agb_end"}


def get_lifetime(spec=None):
    """The lifetime model of a configuration choice.

    Parameters
    ----------
    spec : dict, str or LifetimeModel
        ``{formulae, until}`` as in ``progenitor.lifetime``, an internal key of :data:`LIFETIMES`,
        or a model (returned as is). None: :data:`DEFAULT_LIFETIME`.
    """
    if isinstance(spec, LifetimeModel):
        return spec
    if spec is None:
        spec = DEFAULT_LIFETIME
    if isinstance(spec, dict):
        formulae = spec.get("formulae", DEFAULT_LIFETIME["formulae"])
        until = spec.get("until") or ("main_sequence" if formulae == "power_law" else DEFAULT_LIFETIME["until"])
        key = _CHOICES.get((formulae, until))
        if key is None:
            raise ConfigError(f"progenitor.lifetime: formulae {formulae!r} cannot run until {until!r}; choose one of "
                              + ", ".join(f"{f}/{u}" for f, u in _CHOICES))
        return LIFETIMES[key]
    key = _ALIASES.get(spec, spec)
    try:
        return LIFETIMES[key]
    except (KeyError, TypeError):
        raise ConfigError(f"unknown progenitor lifetime '{spec}'; choose one of {sorted(LIFETIMES)}") from None
