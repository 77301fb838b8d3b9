"""Reading survey catalogues: CSV, ECSV, Parquet, FITS and VOTable, whole or split into parts.

Readers return the raw columns the configuration asks for, under the user's own names, plus the
unit each file declares for them (FITS TUNIT, VOTable unit attributes, astropy-written Parquet
or cinderclock field metadata). Every fault is raised as :class:`cinderclock.errors.InputError`
naming the file and, where it applies, the row and column.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import InputError

FORMATS = ("csv", "ecsv", "parquet", "fits", "votable")
_SUFFIXES = {
    ".csv": "csv", ".txt": "csv", ".tsv": "csv", ".gz": None, ".ecsv": "ecsv",
    ".parquet": "parquet", ".pq": "parquet",
    ".fits": "fits", ".fit": "fits", ".fts": "fits",
    ".vot": "votable", ".xml": "votable", ".votable": "votable",
}
#: File names taken from a directory: the data suffixes above, not .txt (archive folders hold
#: checksum and read-me text files) and not hidden or underscore-prefixed files.
_FOLDER_SUFFIXES = (".csv", ".csv.gz", ".tsv", ".tsv.gz", ".ecsv", ".ecsv.gz", ".parquet", ".pq", ".fits",
                    ".fit", ".fts", ".vot", ".xml", ".votable")


class PartsError(InputError):
    """Faults in several parts of a split release: one line per part, each naming its file."""

    def __init__(self, errors):
        self.errors = list(errors)
        super().__init__(self.errors[0].detail, self.errors[0].path, self.errors[0].row, self.errors[0].column)

    def __str__(self):
        if len(self.errors) == 1:
            return str(self.errors[0])
        return f"{len(self.errors)} catalogue parts are unreadable:\n" + "\n".join(str(e) for e in self.errors)


@dataclass
class RawCatalogue:
    """Columns read from one batch of a catalogue file.

    Attributes
    ----------
    path : str
        The file (the part of a split release) the batch comes from.
    data : pandas.DataFrame
        The requested columns under the user's names, one row per readable input row.
    rows : numpy.ndarray of int64
        Position of each row over the whole catalogue (all parts in order, 0-based, headers excluded).
    units : dict of str to str
        Unit declared by the file for a column, where it declares one.
    malformed : list of (int, str)
        Rows that could not be parsed at all (position over the whole catalogue, raw text).
    file_rows : numpy.ndarray of int64, optional
        Position of each row within its file (defaults to ``rows``).
    types : dict of str to str
        numpy kind (``i``, ``f``, ``U``, ...) the file declares for a column (none for CSV).
    first_row : int
        Position over the whole catalogue of the file's first row.
    """

    path: str
    data: pd.DataFrame
    rows: np.ndarray
    units: dict = field(default_factory=dict)
    malformed: list = field(default_factory=list)
    file_rows: np.ndarray = None
    types: dict = field(default_factory=dict)
    first_row: int = 0
    row_paths: np.ndarray = None

    def __post_init__(self):
        if self.file_rows is None:
            self.file_rows = np.asarray(self.rows, dtype=np.int64) - self.first_row

    def where(self, i):
        """(file, row within the file) of data row ``i``, for messages."""
        return (str(self.row_paths[i]) if self.row_paths is not None else self.path), int(self.file_rows[i])


def _natural_key(path):
    return [int(t) if t.isdigit() else t for t in re.split(r"(\d+)", str(path))]


def resolve_parts(spec):
    """The files of a catalogue: one file, a directory, a glob pattern, or a list of these.

    Returns
    -------
    list of str
        Files in reading order: a list keeps its order; the files of a directory or a glob are
        sorted by name with numbers compared as numbers (``part_2`` before ``part_10``).
    """
    import glob

    items = list(spec) if isinstance(spec, (list, tuple)) else [spec]
    if not items:
        raise InputError("catalogue.path is an empty list")
    parts = []
    for item in items:
        item = str(item)
        p = Path(item)
        if p.is_dir():
            found = sorted((str(f) for f in p.iterdir() if f.is_file() and not f.name.startswith((".", "_"))
                            and f.name.lower().endswith(_FOLDER_SUFFIXES)), key=_natural_key)
            if not found:
                raise InputError(f"the catalogue folder holds no catalogue files (looked for "
                                 f"{', '.join(_FOLDER_SUFFIXES)})", item)
        elif any(ch in item for ch in "*?["):
            found = sorted((f for f in glob.glob(item) if Path(f).is_file()), key=_natural_key)
            if not found:
                raise InputError("no file matches the catalogue pattern", item)
        else:
            if not p.exists():
                raise InputError("the catalogue file does not exist", item)
            found = [item]
        parts += [f for f in found if f not in parts]
    return parts


def sniff_format(path):
    """Format of a file from its name; CSV files whose first line opens an ECSV header are ECSV."""
    suffixes = [s.lower() for s in Path(path).suffixes]
    kind = None
    for s in reversed(suffixes):
        kind = _SUFFIXES.get(s)
        if kind:
            break
    if kind == "csv":
        from .catalogue_readers import ecsv_header

        try:
            if ecsv_header(path) is not None:
                return "ecsv"
        except InputError:
            return "csv"
    return kind


def detect_format(path, fmt="auto"):
    """Format name from the configuration or, for ``auto``, from the file name (and ECSV header)."""
    if fmt != "auto":
        if fmt == "csv" and Path(path).exists() and Path(path).is_file():
            return sniff_format(path) if sniff_format(path) == "ecsv" else "csv"
        return fmt
    kind = sniff_format(path)
    if kind:
        return kind
    raise InputError(f"cannot tell the file format from the name; set catalogue.format to one of {', '.join(FORMATS)}",
                     path)


def part_formats(parts, fmt="auto"):
    """Format of every part; a release must be of one format (CSV and ECSV parts may mix)."""
    kinds = [detect_format(p, fmt) for p in parts]
    family = {"ecsv": "csv"}
    first = family.get(kinds[0], kinds[0])
    for p, k in zip(parts, kinds):
        if family.get(k, k) != first:
            raise InputError(f"the parts of a catalogue must share one format: {Path(parts[0]).name} is {kinds[0]}, "
                             f"this part is {k}", p)
    return kinds


def iter_catalogue(path, wanted, fmt="auto", batch_rows=262144):
    """Read the catalogue in batches of about ``batch_rows`` rows (memory stays bounded).

    ``path`` is a file, a directory, a glob pattern or a list (see :func:`resolve_parts`); the parts
    are read in order as one dataset, row positions running on from one part to the next. CSV,
    ECSV and Parquet are streamed (pyarrow); FITS and VOTable parts are read whole by astropy
    (FITS memory-mapped) and then cut into batches. A part that cannot be read does not stop the
    reading of the others: at the end one :class:`PartsError` lists every bad part, one line each.

    Yields
    ------
    RawCatalogue
        One per batch.
    """
    from .catalogue_readers import file_batches

    parts = resolve_parts(path)
    kinds = part_formats(parts, fmt)
    wanted = list(dict.fromkeys(wanted))
    total, errors, first_units = 0, [], {}
    for part, kind in zip(parts, kinds):
        start, n_part = total, 0
        try:
            if Path(part).stat().st_size == 0:
                raise InputError("the catalogue is empty (zero bytes)", part)
            for data, rows, units, malformed, types in file_batches(part, kind, wanted, batch_rows):
                n_part += len(data) + len(malformed)
                for col, unit in units.items():
                    if first_units.setdefault(col, (unit, part))[0] != unit:
                        raise InputError(f"column '{col}' is in {unit!r} here but in {first_units[col][0]!r} in "
                                         f"{Path(first_units[col][1]).name}", part, column=col)
                if errors or not (len(data) or malformed):
                    continue                    # after a bad part only look for further faults
                yield RawCatalogue(path=part, data=data, rows=rows + start, units=units,
                                   malformed=[(r + start, t) for r, t in malformed], file_rows=rows, types=types,
                                   first_row=start)
        except InputError as exc:
            errors.append(exc)
        total = start + n_part
    if errors:
        raise PartsError(errors)
    if total == 0:
        raise InputError("the catalogue has a header but no data rows", parts[0] if len(parts) == 1 else path)


def read_catalogue(path, wanted, fmt="auto"):
    """Read the columns ``wanted`` (user names) from a catalogue, whole.

    Parameters
    ----------
    path : str, Path or list
        A file, a directory, a glob pattern or a list of files (see :func:`resolve_parts`) of CSV
        (comma- or tab-separated, optionally gzipped), ECSV, Parquet, FITS (first table HDU) or VOTable.
    wanted : list of str
        Column names as they appear in the file.
    fmt : str
        ``auto`` or one of :data:`FORMATS`.

    Returns
    -------
    RawCatalogue
        See :func:`iter_catalogue` for the batched form the workflow uses.
    """
    batches = list(iter_catalogue(path, wanted, fmt, batch_rows=1 << 22))
    if len(batches) == 1:
        return batches[0]
    data = pd.concat([b.data for b in batches], ignore_index=True)
    paths = np.concatenate([np.full(len(b.data), b.path, dtype=object) for b in batches])
    single = len({b.path for b in batches}) == 1
    return RawCatalogue(path=batches[0].path if single else str(path), data=data,
                        rows=np.concatenate([b.rows for b in batches]), units=batches[0].units,
                        malformed=[m for b in batches for m in b.malformed],
                        file_rows=np.concatenate([b.file_rows for b in batches]), types=batches[0].types,
                        row_paths=None if single else paths)
