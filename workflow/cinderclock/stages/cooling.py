"""Cooling: cooling age of each white dwarf from its mass and luminosity."""

from __future__ import annotations

import numpy as np

from .. import columns as C
from ..constants import GYR_S, YR_S
from ..reasons import set_flag
from ..tableio import Column

STAGE = "cooling"

COLUMNS = {
    "cool_age_gyr": Column("Gyr", "Cooling age: time since the white dwarf left the tip of its cooling track",
                           "time.age"),
}


def cooling(table, settings, model):
    """Add the cooling age.

    Parameters
    ----------
    table : pandas.DataFrame
        Output of the mass stage.
    settings : dict
        ``{"cooling": ...}``.
    model : cinderclock.stages.models.CoolingModel
    """
    out = table.copy()
    bits = out[C.FLAGS].to_numpy()
    m = out["mass_msun"].to_numpy(dtype=float)
    logl = out["log_lum"].to_numpy(dtype=float)
    age_yr, inside = model.age_yr(m, logl)
    age = age_yr * (YR_S / GYR_S)
    bits = set_flag(bits, "cooling_off_table", ~np.isfinite(age))
    bits = set_flag(bits, "cooling_out_of_range", np.isfinite(age) & ~inside)
    out["cool_age_gyr"] = age
    out[C.FLAGS] = bits
    return out
