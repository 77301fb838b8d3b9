"""Model systematics: the spread of cooling ages between two cooling models.

Cooling ages depend on the model (envelope calibration, heat capacities, neutrinos,
crystallization) by tens of per cent, often more than the photometric error. Evaluating a second
model and recording the difference lets users see that systematic per star.
"""

from __future__ import annotations

import numpy as np

from .grid import STATUS_FAR_FUTURE

#: Suggested output column for the spread (yr).
SPREAD_COLUMN = "cooling_age_model_spread_yr"


def model_spread(primary, secondary, mass_msun, log_lum):
    """Cooling ages from two models and their absolute difference.

    Parameters
    ----------
    primary, secondary : CoolingGrid
        The adopted model and the comparison model.
    mass_msun : array_like
        Mass in Msun.
    log_lum : array_like
        log10 L/Lsun.

    Returns
    -------
    dict of ndarray
        ``age_yr`` and ``status`` from the primary model, ``age_secondary_yr`` and
        ``status_secondary`` from the second, ``spread_yr`` = |age_secondary - age| (NaN where
        either model has no age) and ``spread_dex`` = |log10(age_secondary / age)|.
    """
    age, status = primary.age_yr(mass_msun, log_lum)
    age2, status2 = secondary.age_yr(mass_msun, log_lum)
    both = (status <= STATUS_FAR_FUTURE) & (status2 <= STATUS_FAR_FUTURE)
    with np.errstate(invalid="ignore", divide="ignore"):
        spread = np.where(both, np.abs(age2 - age), np.nan)
        dex = np.where(both, np.abs(np.log10(age2 / age)), np.nan)
    return {"age_yr": age, "status": status, "age_secondary_yr": age2, "status_secondary": status2,
            "spread_yr": spread, "spread_dex": dex}
