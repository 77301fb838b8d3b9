"""Total ages of white dwarfs: cooling age plus the lifetime of the progenitor star.

    M_f  --(inverse IFMR)-->  M_i  --(lifetime formula)-->  t_prog;   t_total = t_cool + t_prog.

Flags (bit field, :data:`FLAG_NAMES`):

``ifmr_range`` (1)
    The white-dwarf mass lies outside the final-mass range the IFMR was calibrated on (progenitor
    mass NaN unless extrapolation was requested).
``lifetime_range`` (2)
    The progenitor mass lies outside the lifetime formula's range.
``lifetime_uncertain`` (4)
    The progenitor lifetime is too uncertain to quote: the progenitor mass is below
    :data:`LOW_PROGENITOR_MASS_MSUN` (lifetimes of 10 Gyr or more, comparable to the age of the
    Galaxy, where the IFMR is least constrained; common practice), or, when a mass error is
    given, the lifetime's relative error propagated from it exceeds
    :data:`LIFETIME_REL_ERROR_LIMIT`.
``older_than_universe`` (8)
    The total age exceeds the age of the Universe (:data:`AGE_OF_UNIVERSE_YR`).
"""

from __future__ import annotations

import numpy as np

from .ifmr import DEFAULT_IFMR, get_ifmr
from .lifetimes import DEFAULT_LIFETIME, get_lifetime

FLAG_IFMR_RANGE = 1
FLAG_LIFETIME_RANGE = 2
FLAG_LIFETIME_UNCERTAIN = 4
FLAG_OLDER_THAN_UNIVERSE = 8
FLAG_NAMES = {FLAG_IFMR_RANGE: "ifmr_range", FLAG_LIFETIME_RANGE: "lifetime_range",
              FLAG_LIFETIME_UNCERTAIN: "lifetime_uncertain", FLAG_OLDER_THAN_UNIVERSE: "older_than_universe"}

#: Progenitor mass (Msun) below which the progenitor lifetime is flagged as too uncertain:
#: t_MS(1 Msun) ~ 10-11 Gyr is comparable to the age of the Galaxy and the IFMRs are least
#: constrained there (common practice; threshold of our choosing).
LOW_PROGENITOR_MASS_MSUN = 1.0
#: Largest relative error of the progenitor lifetime (propagated from the white-dwarf mass error)
#: that is not flagged (our choice: beyond 50 % the total age is dominated by that error).
LIFETIME_REL_ERROR_LIMIT = 0.5
#: Age of the Universe in years: Planck 2018 cosmology as in astropy (``Planck18.age(0)``,
#: 13.787 Gyr; Planck Collaboration 2020, A&A 641, A6).
AGE_OF_UNIVERSE_YR = 13.787e9

_DERIV_STEP_MSUN = 1e-3


def total_age(final_mass_msun, cooling_age_yr, ifmr=DEFAULT_IFMR, lifetime=DEFAULT_LIFETIME, metallicity=0.02,
              final_mass_err_msun=None, extrapolate=False):
    """Progenitor mass, progenitor lifetime and total age of white dwarfs.

    Parameters
    ----------
    final_mass_msun : array_like
        White-dwarf mass in Msun.
    cooling_age_yr : array_like
        Cooling age in years.
    ifmr : dict, str or PiecewiseLinearIFMR
        Initial-final mass relation: ``{relation, isochrones}`` (see
        :func:`cinderclock.progenitor.ifmr.get_ifmr`).
    lifetime : dict, str or LifetimeModel
        Lifetime formula: ``{formulae, until}`` (see :func:`cinderclock.progenitor.lifetimes.get_lifetime`).
    metallicity : float
        Progenitor metallicity Z (Hurley et al. formulae: 1e-4 to 0.03).
    final_mass_err_msun : array_like, optional
        1-sigma error of the white-dwarf mass, propagated linearly to the progenitor lifetime.
    extrapolate : bool
        Continue the IFMR's end segments outside its calibrated range (still flagged).

    Returns
    -------
    dict of ndarray
        ``initial_mass_msun``, ``progenitor_lifetime_yr``, ``progenitor_lifetime_err_yr`` (NaN
        without a mass error), ``total_age_yr``, ``flags`` (int16 bit field).
    """
    rel = get_ifmr(ifmr)
    life = get_lifetime(lifetime)
    mf = np.asarray(final_mass_msun, dtype=float)
    t_cool = np.asarray(cooling_age_yr, dtype=float)
    mi, ifmr_ok = rel.initial_mass(mf, extrapolate=extrapolate)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        mf_for_life = mf if life.needs_final_mass else None
        t_prog, life_ok = life.lifetime_yr(mi, metallicity, mf_for_life)
        t_prog = np.where(mi > 0, t_prog, np.nan)
        total = t_cool + t_prog
        flags = np.zeros(np.broadcast(mf, t_cool).shape, dtype=np.int16)
        flags |= np.where(ifmr_ok, 0, FLAG_IFMR_RANGE).astype(np.int16)
        flags |= np.where(np.isfinite(mi) & ~life_ok, FLAG_LIFETIME_RANGE, 0).astype(np.int16)
        uncertain = np.isfinite(mi) & (mi < LOW_PROGENITOR_MASS_MSUN)
        t_err = np.full(flags.shape, np.nan)
        if final_mass_err_msun is not None:
            err = np.asarray(final_mass_err_msun, dtype=float)
            h = _DERIV_STEP_MSUN
            mi_p, _ = rel.initial_mass(mf + h, extrapolate=True)
            mi_m, _ = rel.initial_mass(mf - h, extrapolate=True)
            tp, _ = life.lifetime_yr(mi_p, metallicity, None if mf_for_life is None else mf + h)
            tm, _ = life.lifetime_yr(mi_m, metallicity, None if mf_for_life is None else mf - h)
            t_err = np.where(np.isfinite(t_prog), np.abs((tp - tm) / (2 * h)) * err, np.nan)
            uncertain |= np.isfinite(t_prog) & (t_err > LIFETIME_REL_ERROR_LIMIT * t_prog)
        flags |= np.where(uncertain, FLAG_LIFETIME_UNCERTAIN, 0).astype(np.int16)
        flags |= np.where(total > AGE_OF_UNIVERSE_YR, FLAG_OLDER_THAN_UNIVERSE, 0).astype(np.int16)
    return {"initial_mass_msun": mi, "progenitor_lifetime_yr": t_prog, "progenitor_lifetime_err_yr": t_err,
            "total_age_yr": total, "flags": flags}


def models(ifmr=DEFAULT_IFMR, lifetime=DEFAULT_LIFETIME, metallicity=0.02):
    """Provenance entries of the chosen IFMR and lifetime formula (the metallicity with the lifetime)."""
    return [get_ifmr(ifmr).as_model(), get_lifetime(lifetime).as_model(metallicity)]
