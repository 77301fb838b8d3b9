"""Run the per-star chain on an in-memory table: for notebooks, tests and quick looks.

Example
-------
>>> import pandas as pd
>>> from cinderclock.api import run_chain
>>> from cinderclock.config import load_config
>>> config = load_config("config/config.yaml")
>>> result = run_chain(pd.read_csv("sample_catalog/lanternfall_dr1.csv"), config)   # doctest: +SKIP
>>> result.table[["star_id", "mass_msun", "cool_age_gyr"]].head()                   # doctest: +SKIP

The chain is the one the workflow runs, stage by stage, with the same functions and settings; it
builds the model tables in memory instead of reading them from ``results/models``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .catalogue import RawCatalogue, read_catalogue
from .config import stage_settings, validate
from .reasons import concat_rejects
from .stages import models as M
from .stages.cooling import cooling
from .stages.ingest import ingest, wanted_columns
from .stages.luminosity import luminosity
from .stages.mass import mass
from .stages.select import select
from .stages.uncertainty import uncertainty


@dataclass
class ChainResult:
    """Output of :func:`run_chain`."""

    table: pd.DataFrame
    rejects: pd.DataFrame
    counts: dict = field(default_factory=dict)
    models: dict = field(default_factory=dict)


@dataclass
class ModelSet:
    """The model tables of one configuration, ready for lookups."""

    photometry: object
    mass_radius: object
    cooling: object
    compare: object
    references: dict

    @classmethod
    def build(cls, config):
        lum = config["luminosity"]
        user = lum["user_table"]["path"] if lum["spectra"] == "user_table" else None
        p_tab, _, p_ref = M.build_photometry_table(stage_settings(config, "photometry_model"), user_table_path=user)
        e_tab, _, _ = M.build_envelope_table(stage_settings(config, "envelope_model"))
        envelope = M.load_envelope(e_tab)
        m_tab, _, m_ref = M.build_mass_radius_table(stage_settings(config, "mass_radius_model"), envelope=envelope)
        cool = config["cooling"]
        tracks = (cool.get("user_tracks") or {}).get("path")
        c_tab, _, c_ref = M.build_cooling_table(stage_settings(config, "cooling_model"), user_tracks_path=tracks,
                                                envelope=envelope)
        compare = None
        if cool["compare_with"]:
            k_tab, _, _ = M.build_cooling_table(stage_settings(config, "cooling_model"), "compare", tracks,
                                                envelope=envelope)
            compare = M.load_cooling(k_tab)
        return cls(M.load_photometry(p_tab), M.load_mass_radius(m_tab), M.load_cooling(c_tab), compare,
                   {"photometry": p_ref, "mass_radius": m_ref, "cooling": c_ref})


def _raw_from_frame(df, config):
    wanted = wanted_columns(stage_settings(config, "ingest"))
    missing = [c for c in wanted if c not in df.columns]
    if missing:
        from .errors import InputError
        raise InputError(f"column(s) {', '.join(map(repr, missing))} named in the configuration are not in the table",
                         "<in-memory table>")
    data = df[list(dict.fromkeys(wanted))].reset_index(drop=True)
    return RawCatalogue(path="<in-memory table>", data=data, rows=np.arange(len(data), dtype=np.int64))


def run_chain(catalogue, config, models=None):
    """Run ingest, select, luminosity, mass, cooling and uncertainty on one table.

    Parameters
    ----------
    catalogue : pandas.DataFrame or str
        The catalogue (user's column names, as mapped in ``config['catalogue']['columns']``), or a
        path to a catalogue file.
    config : dict
        Configuration (validated and completed with defaults here).
    models : ModelSet, optional
        Pre-built model tables (built from ``config`` if not given).

    Returns
    -------
    ChainResult
    """
    validate(config)
    if isinstance(catalogue, pd.DataFrame):
        raw = _raw_from_frame(catalogue, config)
    else:
        raw = read_catalogue(catalogue, wanted_columns(stage_settings(config, "ingest")),
                             config["catalogue"].get("format", "auto"))
    models = models or ModelSet.build(config)
    counts = {"input": len(raw.data) + len(raw.malformed)}
    t, r0, _ = ingest(raw, stage_settings(config, "ingest"))
    counts["ingest"] = len(t)
    t, r1 = select(t, stage_settings(config, "select"))
    counts["select"] = len(t)
    t, r2 = luminosity(t, stage_settings(config, "luminosity"), models.photometry)
    counts["luminosity"] = len(t)
    t = mass(t, stage_settings(config, "mass"), models.mass_radius)
    t = cooling(t, stage_settings(config, "cooling"), models.cooling, models.compare)
    t = uncertainty(t, stage_settings(config, "uncertainty"), models.mass_radius, models.cooling)
    counts["final"] = len(t)
    return ChainResult(table=t, rejects=concat_rejects([r0, r1, r2]), counts=counts, models=models.references)
