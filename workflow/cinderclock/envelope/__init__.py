"""Integrated white-dwarf envelopes: T_c and radius as functions of mass, Teff and the layers.

Modules: :mod:`~.fermi` (electron gas), :mod:`~.eos` (ionization, equation-of-state table),
:mod:`~.opacity` (Rosseland and conductive opacity), :mod:`~.convection` (mixing length),
:mod:`~.structure` (atmosphere and envelope integration), :mod:`~.build` (radius iteration on a
grid), :mod:`~.table` (:class:`EnvelopeTable`, :func:`build_envelope_table`).
"""

from .table import TABLE_COLUMNS, EnvelopeTable, build_envelope_table  # noqa: F401
