"""Cooling: cooling age from mass and luminosity, progenitor mass and lifetime, total age.

The cooling age is interpolated on the cooling table of the configured model (numerical energy
budget, Mestel's law, or the user's tracks). Luminosities fainter than the table's calibrated
range get an extrapolated age and the ``cooling_extrapolated`` flag; masses or luminosities
outside the table get no age and the ``cooling_off_table`` flag. With ``compare_with`` set, a
second model's age gives ``cool_age_spread_gyr``: how much of the age is model choice.

The total age adds the main-sequence (and giant-branch, depending on the formula) lifetime of the
progenitor, whose mass comes from inverting the configured initial-final mass relation.
"""

from __future__ import annotations

import numpy as np

from .. import columns as C
from ..constants import GYR_S, YR_S
from ..reasons import set_flag
from ..tableio import Column

STAGE = "cooling"
_YR_TO_GYR = YR_S / GYR_S

COLUMNS = {
    "cool_age_gyr": Column("Gyr", "Cooling age: time since the star became a white dwarf", "time.age"),
    "cool_age_status": Column("", "Cooling-table look-up: inside, far_future (extrapolated), mass_outside, "
                                  "luminosity_outside or invalid", "meta.code"),
    "cool_age_spread_gyr": Column("Gyr", "Absolute difference between the cooling ages of the adopted and the "
                                         "comparison model", "time.age;stat.stdev"),
    "prog_mass_msun": Column("solMass", "Initial (progenitor) mass from the inverted initial-final mass relation",
                             "phys.mass"),
    "prog_life_gyr": Column("Gyr", "Lifetime of the progenitor before it became a white dwarf", "time.age"),
    "total_age_gyr": Column("Gyr", "Total age: cooling age plus progenitor lifetime", "time.age"),
}


def cooling(table, settings, grid, compare=None):
    """Add cooling age, progenitor mass and lifetime, and total age.

    Parameters
    ----------
    table : pandas.DataFrame
        Output of the mass stage.
    settings : dict
        ``{"cooling": ..., "progenitor": ...}``.
    grid : cinderclock.cooling.grid.CoolingGrid
        Adopted cooling model.
    compare : cinderclock.cooling.grid.CoolingGrid, optional
        Comparison model for the spread column.
    """
    from ..cooling.grid import STATUS_FAR_FUTURE, STATUS_NAMES
    from ..progenitor.total_age import (FLAG_IFMR_RANGE, FLAG_LIFETIME_RANGE, FLAG_LIFETIME_UNCERTAIN,
                                        FLAG_OLDER_THAN_UNIVERSE, total_age)

    prog = settings["progenitor"]
    out = table.copy()
    bits = out[C.FLAGS].to_numpy()
    m = out["mass_msun"].to_numpy(dtype=float)
    logl = out["log_lum"].to_numpy(dtype=float)
    if compare is not None:
        from ..cooling.spread import model_spread

        both = model_spread(grid, compare, m, logl)
        age_yr, status = both["age_yr"], both["status"]
    else:
        age_yr, status = grid.age_yr(m, logl)
    has_inputs = np.isfinite(m) & np.isfinite(logl)
    bits = set_flag(bits, "cooling_off_table", ~np.isfinite(age_yr))
    bits = set_flag(bits, "cooling_extrapolated", status == STATUS_FAR_FUTURE)
    if "grey_boundary" in grid.columns:
        with np.errstate(invalid="ignore"):
            grey = grid.interpolate("grey_boundary", m, logl) > 0.5
        bits = set_flag(bits, "grey_boundary", has_inputs & grey)
    if settings["cooling"]["model"] == "mestel":
        # Mestel's law ignores neutrinos (bright end) and crystallization (faint end): flag its range
        from ..cooling.mestel import MESTEL_1952

        bits = set_flag(bits, "cooling_out_of_range", has_inputs & ~MESTEL_1952.inside(mass=m, log_lum=logl))
    out["cool_age_gyr"] = age_yr * _YR_TO_GYR
    out["cool_age_status"] = np.vectorize(STATUS_NAMES.get, otypes=[object])(status) if len(out) else \
        np.array([], dtype=object)
    if compare is not None:
        out["cool_age_spread_gyr"] = both["spread_yr"] * _YR_TO_GYR

    tot = total_age(m, age_yr, ifmr=prog["ifmr"], lifetime=prog["lifetime"], metallicity=prog["metallicity"])
    f = tot["flags"]
    bits = set_flag(bits, "ifmr_out_of_range", np.isfinite(m) & ((f & FLAG_IFMR_RANGE) > 0))
    bits = set_flag(bits, "progenitor_uncertain", (f & (FLAG_LIFETIME_RANGE | FLAG_LIFETIME_UNCERTAIN)) > 0)
    bits = set_flag(bits, "older_than_universe", (f & FLAG_OLDER_THAN_UNIVERSE) > 0)
    out["prog_mass_msun"] = tot["initial_mass_msun"]
    out["prog_life_gyr"] = tot["progenitor_lifetime_yr"] * _YR_TO_GYR
    out["total_age_gyr"] = tot["total_age_yr"] * _YR_TO_GYR
    out[C.FLAGS] = bits
    return out


def progenitor_models(settings):
    """Provenance entries of the IFMR and lifetime formula in use."""
    from ..progenitor.total_age import models

    prog = settings["progenitor"]
    return models(prog["ifmr"], prog["lifetime"], prog["metallicity"])
