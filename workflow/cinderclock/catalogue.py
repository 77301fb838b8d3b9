"""Reading survey catalogues: CSV, Parquet, FITS and VOTable, with the units they carry.

Readers return the raw columns the configuration asks for, under the user's own names, plus the
unit each file declares for them (FITS TUNIT, VOTable unit attributes, astropy-written Parquet
or cinderclock field metadata). Every fault is raised as :class:`cinderclock.errors.InputError`
naming the file and, where it applies, the row and column.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import InputError

FORMATS = ("csv", "parquet", "fits", "votable")
_SUFFIXES = {
    ".csv": "csv", ".txt": "csv", ".tsv": "csv", ".gz": None,
    ".parquet": "parquet", ".pq": "parquet",
    ".fits": "fits", ".fit": "fits", ".fts": "fits",
    ".vot": "votable", ".xml": "votable", ".votable": "votable",
}


@dataclass
class RawCatalogue:
    """Columns read from a catalogue file.

    Attributes
    ----------
    data : pandas.DataFrame
        The requested columns under the user's names, one row per readable input row.
    rows : numpy.ndarray of int64
        Position of each row of ``data`` in the file (0-based, header excluded).
    units : dict of str to str
        Unit declared by the file for a column, where it declares one.
    malformed : list of (int, str)
        Rows that could not be parsed at all (position, raw text): CSV rows with a wrong field count.
    """

    path: str
    data: pd.DataFrame
    rows: np.ndarray
    units: dict = field(default_factory=dict)
    malformed: list = field(default_factory=list)


def detect_format(path, fmt="auto"):
    """Format name from the configuration or, for ``auto``, from the file name."""
    if fmt != "auto":
        return fmt
    suffixes = [s.lower() for s in Path(path).suffixes]
    for s in reversed(suffixes):
        kind = _SUFFIXES.get(s)
        if kind:
            return kind
    raise InputError(f"cannot tell the file format from the name; set catalogue.format to one of {', '.join(FORMATS)}",
                     path)


def _check_columns(path, available, wanted):
    missing = [c for c in wanted if c not in available]
    if missing:
        shown = ", ".join(list(available)[:20])
        raise InputError(f"column(s) {', '.join(repr(m) for m in missing)} named in the configuration are not in the "
                         f"file; it has: {shown}{' ...' if len(available) > 20 else ''}", path)


def _read_astropy(path, wanted, fmt):
    import warnings

    from astropy.table import Table

    kind = {"fits": "fits", "votable": "votable", "parquet": "parquet"}[fmt]
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            table = Table.read(path, format=kind)
    except Exception as exc:
        hint, size = "", Path(path).stat().st_size
        if fmt == "fits" and size % 2880:           # FITS files are whole 2880-byte blocks
            hint = f"; its size ({size} bytes) is not a multiple of 2880, so it is probably truncated"
        raise InputError(f"not a readable {fmt.upper() if fmt != 'votable' else 'VOTable'} file "
                         f"({exc.__class__.__name__}: {str(exc).splitlines()[0] if str(exc) else ''}){hint}",
                         path) from None
    _check_columns(path, table.colnames, wanted)
    units = {c: str(table[c].unit) for c in wanted if getattr(table[c], "unit", None) is not None}
    cols = {}
    for c in wanted:
        col = table[c]
        if getattr(col, "mask", None) is not None and np.any(col.mask):
            if col.dtype.kind in "fiu":
                values = np.asarray(col.filled(np.nan) if col.dtype.kind == "f" else col.astype(float).filled(np.nan))
            else:
                values = np.asarray(col.astype(str).filled(""), dtype=object)
        else:
            values = np.asarray(col)
        if values.dtype.kind in "SU":
            values = values.astype(str).astype(object)
        if values.dtype.byteorder not in ("=", "|"):
            values = values.astype(values.dtype.newbyteorder("="))
        cols[c] = values
    data = pd.DataFrame(cols)
    return data, np.arange(len(data), dtype=np.int64), units, []


def _csv_batches(path, wanted, batch_rows):
    """CSV in record batches, with global row positions and the malformed rows of each batch."""
    import pyarrow as pa
    import pyarrow.csv as pcsv

    malformed = []

    def on_invalid(row):
        malformed.append((int(row.number) - 2 if row.number is not None else -1, row.text))
        return "skip"

    delimiter = "\t" if str(path).lower().endswith((".tsv", ".tsv.gz")) else ","
    try:
        header = pcsv.open_csv(path, parse_options=pcsv.ParseOptions(delimiter=delimiter,
                                                                     invalid_row_handler=lambda row: "skip"),
                               read_options=pcsv.ReadOptions(use_threads=False, block_size=1 << 16)).schema.names
    except (pa.ArrowInvalid, StopIteration) as exc:
        if "Empty CSV file" in str(exc) or isinstance(exc, StopIteration):
            raise InputError("the catalogue is empty (no header line)", path) from None
        raise InputError(f"cannot read the CSV header ({exc})", path) from None
    _check_columns(path, header, wanted)
    # block size chosen so that a block holds roughly batch_rows rows of ~200 bytes
    reader = pcsv.open_csv(
        path,
        read_options=pcsv.ReadOptions(use_threads=False, block_size=max(1 << 16, min(1 << 28, 200 * batch_rows))),
        parse_options=pcsv.ParseOptions(delimiter=delimiter, invalid_row_handler=on_invalid),
        convert_options=pcsv.ConvertOptions(include_columns=list(wanted), column_types={c: pa.string() for c in wanted},
                                            strings_can_be_null=True),
    )
    # The parser runs ahead of the batches handed out, so malformed rows may be reported before the
    # batch they belong to: good rows are numbered by skipping every malformed position known so far.
    start = 0
    bad_rows = np.zeros(0, dtype=np.int64)
    while True:
        try:
            batch = reader.read_next_batch()
        except StopIteration:
            break
        except pa.ArrowInvalid as exc:
            raise InputError(f"cannot parse the CSV file ({exc})", path) from None
        new_bad, malformed[:] = list(malformed), []
        bad_rows = np.union1d(bad_rows, np.asarray([r for r, _ in new_bad], dtype=np.int64))
        k = batch.num_rows
        span = np.arange(start, start + k + int(np.sum(bad_rows >= start)), dtype=np.int64)
        rows = span[~np.isin(span, bad_rows)][:k]
        start = int(rows[-1]) + 1 if k else start
        yield batch.to_pandas(), rows, {}, new_bad
    if malformed:                       # reported after the last batch
        yield pd.DataFrame({c: pd.Series([], dtype=object) for c in wanted}), np.zeros(0, np.int64), {}, list(malformed)


def _parquet_batches(path, wanted, batch_rows):
    import pyarrow.parquet as pq

    try:
        pf = pq.ParquetFile(path)
        schema = pf.schema_arrow
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None
    _check_columns(path, schema.names, wanted)
    if schema.metadata and b"table_meta_yaml" in schema.metadata:   # written by astropy: keep its units
        yield _read_astropy(path, wanted, "parquet")
        return
    units = {}
    for f in schema:
        unit = (f.metadata or {}).get(b"unit")
        if unit and f.name in wanted:
            units[f.name] = unit.decode()
    start = 0
    try:
        for batch in pf.iter_batches(batch_size=batch_rows, columns=list(wanted)):
            df = batch.to_pandas()
            yield df, np.arange(start, start + len(df), dtype=np.int64), units, []
            start += len(df)
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None


def iter_catalogue(path, wanted, fmt="auto", batch_rows=262144):
    """Read the catalogue in batches of about ``batch_rows`` rows (memory stays bounded).

    CSV and Parquet are streamed (pyarrow); FITS and VOTable are read whole by astropy (FITS
    memory-mapped) and then cut into batches.

    Yields
    ------
    RawCatalogue
        One per batch, with row positions counted over the whole file.
    """
    path = str(path)
    if not Path(path).exists():
        raise InputError("the catalogue file does not exist", path)
    if Path(path).stat().st_size == 0:
        raise InputError("the catalogue is empty (zero bytes)", path)
    kind = detect_format(path, fmt)
    wanted = list(dict.fromkeys(wanted))
    if kind == "csv":
        batches = _csv_batches(path, wanted, batch_rows)
    elif kind == "parquet":
        batches = _parquet_batches(path, wanted, batch_rows)
    elif kind in ("fits", "votable"):
        data, rows, units, _ = _read_astropy(path, wanted, kind)
        batches = ((data.iloc[s:s + batch_rows].reset_index(drop=True), rows[s:s + batch_rows], units, [])
                   for s in range(0, max(len(data), 1), batch_rows))
    else:
        raise InputError(f"unknown catalogue format '{kind}'; use one of {', '.join(FORMATS)}", path)
    total = 0
    for data, rows, units, malformed in batches:
        total += len(data) + len(malformed)
        if len(data) or malformed:
            yield RawCatalogue(path=path, data=data, rows=rows, units=units, malformed=malformed)
    if total == 0:
        raise InputError("the catalogue has a header but no data rows", path)


def read_catalogue(path, wanted, fmt="auto"):
    """Read the columns ``wanted`` (user names) from a catalogue file, whole.

    Parameters
    ----------
    path : str or Path
        CSV (comma- or tab-separated, optionally gzipped), Parquet, FITS (first table HDU) or VOTable.
    wanted : list of str
        Column names as they appear in the file.
    fmt : str
        ``auto`` or one of :data:`FORMATS`.

    Returns
    -------
    RawCatalogue
        See :func:`iter_catalogue` for the batched form the workflow uses.
    """
    parts = list(iter_catalogue(path, wanted, fmt, batch_rows=1 << 22))
    data = pd.concat([p.data for p in parts], ignore_index=True) if len(parts) > 1 else parts[0].data
    return RawCatalogue(path=str(path), data=data, rows=np.concatenate([p.rows for p in parts]),
                        units=parts[0].units, malformed=[m for p in parts for m in p.malformed])
