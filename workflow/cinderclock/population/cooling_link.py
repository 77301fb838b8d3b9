"""The two cooling look-ups the population model and figures need, from a run's cooling table.

The forward model needs ``log_lum_at_age(mass_msun, age_yr)`` (log10 L/Lsun of a white dwarf of
that mass after that cooling age) and the figures need ``age_yr(mass_msun, log_lum)``. Both come
from the cooling table the workflow writes to ``results/models/cooling_primary.parquet`` (long
format: ``mass_msun``, ``log_lum``, ``age_yr``; whatever the cooling model), read into a
:class:`cinderclock.cooling.grid.CoolingGrid`. :func:`mestel_link` gives the closed-form Mestel law
(for analytic checks), and any other model can be plugged in by building a :class:`CoolingLink`
from two callables.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError


@dataclass(frozen=True)
class CoolingLink:
    """Cooling look-ups with their provenance.

    Parameters
    ----------
    log_lum_at_age : callable
        ``(mass_msun, age_yr) -> log10 L/Lsun`` (NaN where the model has no value), vectorised.
    age_yr : callable
        ``(mass_msun, log_lum) -> cooling age in yr`` (NaN where the model has no value).
    name : str
        Model key.
    models : list of dict
        Provenance entries (name, reference, caution, ...).
    """

    log_lum_at_age: object
    age_yr: object
    name: str
    models: list = field(default_factory=list)


def mestel_link(coefficient_yr, models=None):
    """Mestel's law with the age coefficient ``coefficient_yr`` (yr)."""
    from ..cooling.mestel import MESTEL_1952, cooling_age_yr, luminosity_at_age

    coeff = float(coefficient_yr)
    entry = MESTEL_1952.as_model() | {"coefficient_yr": coeff, "caution": MESTEL_1952.note}
    return CoolingLink(lambda m, t: luminosity_at_age(m, t, coeff), lambda m, logl: cooling_age_yr(m, logl, coeff),
                       "mestel", list(models) if models else [entry])


def grid_link(grid, models=None):
    """Numerical cooling tracks held in a :class:`~cinderclock.cooling.grid.CoolingGrid`."""
    return CoolingLink(lambda m, t: grid.log_lum_at_age(m, t)[0], lambda m, logl: grid.age_yr(m, logl)[0],
                       grid.model.get("name", "cooling_tracks") if isinstance(grid.model, dict) else "cooling_tracks",
                       list(models) if models else ([grid.as_model()] if grid.as_model() else []))


def cooling_from_table(df, meta=None, path=None):
    """A :class:`CoolingLink` from the workflow's cooling-model table.

    Parameters
    ----------
    df : pandas.DataFrame
        The table of ``results/models/cooling_primary.parquet``.
    meta : dict, optional
        Its cinderclock metadata block; the model entries of its provenance are carried along.
    path : str, optional
        File name for error messages.
    """
    models = []
    if meta:
        for entry in (meta.get("provenance") or {}).get("stages", {}).values():
            models.extend(entry.get("models", []))
    if {"mass_msun", "log_lum", "age_yr"} <= set(df.columns):
        from ..cooling.grid import CoolingGrid

        return grid_link(CoolingGrid.from_frame(df), models or None)
    raise InputError("cooling table not recognised: expected tracks (mass_msun, log_lum, age_yr)", path)


def mbol_sun():
    """Absolute bolometric magnitude of the nominal Sun (IAU 2015 B2 and B3): 4.739996."""
    from ..constants import L_BOL0_W, L_SUN_W

    return float(-2.5 * np.log10(L_SUN_W / L_BOL0_W))
