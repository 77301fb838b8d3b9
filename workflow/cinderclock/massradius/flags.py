"""Quality flags on white-dwarf masses, with their thresholds as module constants.

Thresholds (defaults; the workflow may override them from its configuration):
"""

from __future__ import annotations

import numpy as np

#: Below ~0.45 Msun a white dwarf cannot have formed from a single star within the age of the
#: Galaxy; it is likely a helium-core product of binary evolution, and a single-star age (cooling
#: plus progenitor lifetime) is unreliable. Common practice.
LOW_MASS_MSUN = 0.45

#: Above ~1.05 Msun the core may be O/Ne rather than C/O, and a sizeable fraction of such stars
#: are merger products whose cooling age does not date a single progenitor. Common practice.
HIGH_MASS_MSUN = 1.05


def mass_flags(mass_msun, inside_mask, low_mass_msun=LOW_MASS_MSUN, high_mass_msun=HIGH_MASS_MSUN):
    """Boolean flags for a shard of masses.

    Parameters
    ----------
    mass_msun : array_like
        Masses in Msun (NaN where no mass was found).
    inside_mask : array_like of bool
        From :class:`cinderclock.massradius.grid.MassRadiusGrid` inversions.
    low_mass_msun, high_mass_msun : float
        Thresholds in Msun (defaults :data:`LOW_MASS_MSUN`, :data:`HIGH_MASS_MSUN`).

    Returns
    -------
    dict of numpy bool arrays
        ``outside_table`` (no mass from the table), ``low_mass`` (mass < low threshold; likely
        binary product, single-star age unreliable), ``high_mass`` (mass > high threshold;
        possible merger or O/Ne core).
    """
    m = np.asarray(mass_msun, dtype=float)
    inside = np.asarray(inside_mask, dtype=bool) & np.isfinite(m)
    return {
        "outside_table": ~inside,
        "low_mass": inside & (m < low_mass_msun),
        "high_mass": inside & (m > high_mass_msun),
    }
