"""Core compositions for the structure equations: see :mod:`cinderclock.composition` (shared with
the cooling model). ``CORE_COMPOSITIONS`` lists the cores the mass-radius table offers."""

from ..composition import CORES, CoreComposition, core_composition  # noqa: F401

#: Cores offered by the mass-radius table.
CORE_COMPOSITIONS = {k: CORES[k] for k in ("He", "CO", "ONe")}
