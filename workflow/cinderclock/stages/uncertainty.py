"""Uncertainty: Monte Carlo percentiles of every derived quantity (see :mod:`cinderclock.montecarlo`)."""

from __future__ import annotations

from .. import columns as C
from ..montecarlo import PERCENTILES, QUANTITIES, summarise
from ..reasons import set_flag
from ..tableio import Column

STAGE = "uncertainty"


def column_specs():
    """Descriptions of the columns this stage adds."""
    specs = {"mc_off_table_frac": Column("", "Fraction of Monte Carlo draws without a cooling age (off the "
                                             "model tables or a non-positive parallax draw)", "stat.value")}
    for q, (unit, what) in QUANTITIES.items():
        for p in PERCENTILES:
            label = {16.0: "16th percentile", 50.0: "median", 84.0: "84th percentile"}[p]
            specs[f"{q}_p{int(p)}"] = Column(unit, f"Monte Carlo {label} of the {what}",
                                             {16.0: "stat.min", 50.0: "stat.median", 84.0: "stat.max"}[p])
    return specs


def uncertainty(table, settings, mass_radius, cooling):
    """Add Monte Carlo percentiles and the off-table fraction (no columns when ``draws`` is 0)."""
    unc = settings["uncertainty"]
    out = table.copy()
    if int(unc["draws"]) <= 0 or len(out) == 0:
        return out
    for name, values in summarise(out, mass_radius, cooling, settings).items():
        out[name] = values
    out[C.FLAGS] = set_flag(out[C.FLAGS].to_numpy(), "mc_off_table",
                            out["mc_off_table_frac"].to_numpy() > unc["max_off_table_fraction"])
    return out
