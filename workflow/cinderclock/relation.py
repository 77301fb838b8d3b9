"""Published relations with their stated range of validity kept as data and checked.

A relation is a function of one or more physical quantities taken from a paper. Each carries its
reference and the box in which the paper calibrated it; callers decide whether a value outside
that box raises (``strict``) or is returned with a flag.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import ModelRangeError


@dataclass(frozen=True)
class ValidRange:
    """Closed interval ``[low, high]`` of one input quantity, in ``unit``."""

    quantity: str
    low: float
    high: float
    unit: str = ""

    def inside(self, values):
        """Boolean array: True where ``values`` lies inside the interval (NaN is outside)."""
        v = np.asarray(values, dtype=float)
        return (v >= self.low) & (v <= self.high)


@dataclass(frozen=True)
class PublishedRelation:
    """Identity, reference and valid ranges of a published relation.

    Parameters
    ----------
    key : str
        Name used in configuration files.
    reference : str
        Full bibliographic reference.
    ranges : tuple of ValidRange
        Calibrated range of each input.
    note : str
        Caveats a user should read.
    source_location : str
        Where in the reference the coefficients stand (table, equation, page).
    verified : bool or None
        True: the coefficients were checked against the source (or sources quoting it, as
        ``verification`` says); False: they were not, and the data dictionary and README say so;
        None: not yet reviewed.
    verification : str
        How the values were checked (or why they could not be).
    bibtex : dict, optional
        Fields of the reference for BibTeX export: ``authors`` (list of "Last, F."), ``year``,
        ``journal``, ``volume``, ``page`` (first page or article id), optional ``title``.
    """

    key: str
    reference: str
    ranges: tuple = field(default_factory=tuple)
    note: str = ""
    source_location: str = ""
    verified: bool | None = None
    verification: str = ""
    bibtex: dict | None = None

    def inside(self, **values):
        """True where every named input lies inside its valid range."""
        ok = None
        for r in self.ranges:
            if r.quantity in values:
                inside = r.inside(values[r.quantity])
                ok = inside if ok is None else ok & inside
        return ok

    def check(self, strict=False, **values):
        """Return the in-range mask; with ``strict`` raise if any finite value is outside."""
        ok = self.inside(**values)
        if strict and ok is not None:
            finite = np.ones_like(ok, dtype=bool)
            for name, v in values.items():
                finite &= np.isfinite(np.asarray(v, dtype=float))
            bad = finite & ~ok
            if np.any(bad):
                spans = ", ".join(f"{r.quantity} in [{r.low}, {r.high}] {r.unit}".strip() for r in self.ranges)
                raise ModelRangeError(f"{self.key}: {int(bad.sum())} value(s) outside the valid range ({spans}); "
                                      f"see {self.reference}")
        return ok

    def as_model(self):
        """Provenance entry for this relation (what ``cinderclock cite`` and the data dictionary read)."""
        entry = {"name": self.key, "reference": self.reference,
                 "valid_range": {r.quantity: [r.low, r.high, r.unit] for r in self.ranges}}
        if self.source_location:
            entry["source_location"] = self.source_location
        if self.verified is not None:
            entry["verified"] = bool(self.verified)
        if self.verification:
            entry["verification"] = self.verification
        bib = self.bibtex or bibtex_fields(self.reference)
        if bib:
            entry["bibtex"] = bib
        return entry


def bibtex_fields(reference):
    """BibTeX fields of a reference from the package's bibliography (None if it is not listed)."""
    from .bibliography import lookup

    return lookup(reference)
