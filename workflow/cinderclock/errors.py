"""Errors that reach the user as one clear line, never as a traceback."""

from __future__ import annotations


class CinderclockError(Exception):
    """Base class: a problem the user can fix, reported as one line."""

    def __str__(self):
        # messages quoted from libraries (pyarrow, astropy) may span lines: keep the report to one
        return " ".join(super().__str__().split())


class InputError(CinderclockError):
    """A fault in an input file, located by file, row and column where that applies.

    Parameters
    ----------
    message : str
        What is wrong, in words a user can act on.
    path : str, optional
        The file the fault is in.
    row : int, optional
        Zero-based data row (not counting the header) of the first offending value.
    column : str, optional
        The column, as named in the user's file.
    """

    def __init__(self, message, path=None, row=None, column=None):
        self.path = None if path is None else str(path)
        self.row = row
        self.column = column
        self.detail = message
        super().__init__(self._format())

    def _format(self):
        where = []
        if self.path:
            where.append(self.path)
        if self.row is not None:
            where.append(f"row {self.row}")
        if self.column is not None:
            where.append(f"column '{self.column}'")
        prefix = ", ".join(where)
        return f"{prefix}: {self.detail}" if prefix else self.detail


class ConfigError(CinderclockError):
    """A fault in the configuration, naming the key."""


class ModelRangeError(CinderclockError):
    """A published relation was asked for a value outside its stated range of validity."""
