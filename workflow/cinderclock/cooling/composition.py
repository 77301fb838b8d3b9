"""Core compositions for the cooling model: see :mod:`cinderclock.composition` (shared with the
mass-radius relation)."""

from ..composition import CORES, CoreComposition, core_composition  # noqa: F401
