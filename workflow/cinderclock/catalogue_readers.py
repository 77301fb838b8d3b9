"""Readers of one catalogue file: CSV (optionally gzipped), ECSV, Parquet, FITS and VOTable.

Each reader yields batches ``(data, rows, units, malformed, types)`` with row positions counted
from 0 within the file (header excluded), the units the file declares for the wanted columns, the
rows that could not be parsed at all, and the data type the file declares for a column (ECSV,
Parquet, FITS, VOTable; CSV declares none). Every fault is an :class:`~cinderclock.errors.InputError`
naming the file.
"""

from __future__ import annotations

import gzip
import warnings
from pathlib import Path

import numpy as np
import pandas as pd

from .errors import InputError

#: Text that stands for "not measured" in CSV and ECSV files, besides an empty field (Gaia archive
#: exports write ``null``; common practice).
NULL_MARKERS = ("", "null", "NULL", "nan", "NaN")


def check_columns(path, available, wanted):
    """One-line error if a configured column is missing from a file."""
    missing = [c for c in wanted if c not in available]
    if missing:
        shown = ", ".join(list(available)[:20])
        raise InputError(f"column(s) {', '.join(repr(m) for m in missing)} named in the configuration are not in the "
                         f"file; it has: {shown}{' ...' if len(available) > 20 else ''}", path)


def _open_text(path):
    return gzip.open(path, "rt", errors="replace") if str(path).lower().endswith(".gz") else \
        open(path, errors="replace")


def ecsv_header(path):
    """The ECSV header of a file, or None if the file has none.

    Returns
    -------
    dict or None
        ``{"lines": number of '#' lines, "delimiter": str, "columns": {name: {"unit", "datatype"}}}``.
    """
    import yaml

    try:
        with _open_text(path) as fh:
            first = fh.readline()
            if not first.startswith("# %ECSV"):
                return None
            lines = [first]
            body = []
            for line in fh:
                if not line.startswith("#"):
                    break
                lines.append(line)
                body.append(line[2:] if line.startswith("# ") else line[1:])
    except (OSError, EOFError, gzip.BadGzipFile) as exc:
        raise InputError(f"cannot read the file ({exc.__class__.__name__}: {exc})", path) from None
    try:
        text = "".join(body)
        meta = yaml.safe_load(text[text.index("---") + 3:] if "---" in text else text) or {}
    except (yaml.YAMLError, ValueError) as exc:
        raise InputError(f"the ECSV header is not valid YAML ({str(exc).splitlines()[0]})", path) from None
    cols = {}
    for entry in meta.get("datatype", []) or []:
        if isinstance(entry, dict) and "name" in entry:
            cols[entry["name"]] = {"unit": entry.get("unit"), "datatype": entry.get("datatype", "string")}
    return {"lines": len(lines), "delimiter": meta.get("delimiter", " "), "columns": cols}


def read_astropy(path, wanted, fmt):
    """FITS (first table HDU), VOTable or astropy-written Parquet, read whole with astropy."""
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
    check_columns(path, table.colnames, wanted)
    units = {c: str(table[c].unit) for c in wanted if getattr(table[c], "unit", None) is not None}
    types = {c: table[c].dtype.kind for c in wanted}
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
    return data, np.arange(len(data), dtype=np.int64), units, [], types


def csv_batches(path, wanted, batch_rows, ecsv=None):
    """CSV (or the data part of an ECSV file) in record batches, values as text.

    Row positions count data rows of the file; malformed rows (wrong field count) are returned with
    their position and raw text, and the good rows are numbered around them.
    """
    import pyarrow as pa
    import pyarrow.csv as pcsv

    malformed = []
    skip = ecsv["lines"] if ecsv else 0

    def on_invalid(row):
        malformed.append((int(row.number) - 2 - skip if row.number is not None else -1, row.text))
        return "skip"

    if ecsv:
        delimiter = ecsv["delimiter"]
    else:
        delimiter = "\t" if str(path).lower().endswith((".tsv", ".tsv.gz")) else ","
    try:
        header = pcsv.open_csv(path, parse_options=pcsv.ParseOptions(delimiter=delimiter,
                                                                     invalid_row_handler=lambda row: "skip"),
                               read_options=pcsv.ReadOptions(use_threads=False, block_size=1 << 16,
                                                             skip_rows=skip)).schema.names
    except (pa.ArrowInvalid, StopIteration, OSError, EOFError) as exc:
        if "Empty CSV file" in str(exc) or isinstance(exc, StopIteration):
            raise InputError("the catalogue is empty (no header line)", path) from None
        raise InputError(f"cannot read the CSV header ({exc.__class__.__name__}: {exc})", path) from None
    check_columns(path, header, wanted)
    units, types = {}, {}
    if ecsv:
        for c in wanted:
            spec = ecsv["columns"].get(c, {})
            if spec.get("unit"):
                units[c] = str(spec["unit"])
            dt = str(spec.get("datatype", "string"))
            types[c] = "i" if dt.startswith(("int", "uint")) else "f" if dt.startswith("float") else \
                "b" if dt == "bool" else "U"
    # block size chosen so that a block holds roughly batch_rows rows of ~200 bytes
    reader = pcsv.open_csv(
        path,
        read_options=pcsv.ReadOptions(use_threads=False, block_size=max(1 << 16, min(1 << 28, 200 * batch_rows)),
                                      skip_rows=skip),
        parse_options=pcsv.ParseOptions(delimiter=delimiter, invalid_row_handler=on_invalid),
        convert_options=pcsv.ConvertOptions(include_columns=list(wanted), column_types={c: pa.string() for c in wanted},
                                            strings_can_be_null=True, null_values=list(NULL_MARKERS)),
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
        except (pa.ArrowInvalid, OSError, EOFError) as exc:
            raise InputError(f"cannot parse the CSV file ({exc.__class__.__name__}: {exc})", path) from None
        new_bad, malformed[:] = list(malformed), []
        bad_rows = np.union1d(bad_rows, np.asarray([r for r, _ in new_bad], dtype=np.int64))
        k = batch.num_rows
        span = np.arange(start, start + k + int(np.sum(bad_rows >= start)), dtype=np.int64)
        rows = span[~np.isin(span, bad_rows)][:k]
        start = int(rows[-1]) + 1 if k else start
        yield batch.to_pandas(), rows, units, new_bad, types
    if malformed:                       # reported after the last batch
        yield (pd.DataFrame({c: pd.Series([], dtype=object) for c in wanted}), np.zeros(0, np.int64), units,
               list(malformed), types)


def parquet_batches(path, wanted, batch_rows):
    """Parquet in record batches (astropy-written files are read whole, to keep their units)."""
    import pyarrow.parquet as pq

    try:
        pf = pq.ParquetFile(path)
        schema = pf.schema_arrow
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None
    check_columns(path, schema.names, wanted)
    if schema.metadata and b"table_meta_yaml" in schema.metadata:   # written by astropy: keep its units
        yield read_astropy(path, wanted, "parquet")
        return
    units = {}
    for f in schema:
        unit = (f.metadata or {}).get(b"unit")
        if unit and f.name in wanted:
            units[f.name] = unit.decode()
    types = {c: np.dtype(schema.field(c).type.to_pandas_dtype()).kind for c in wanted}
    start = 0
    try:
        for batch in pf.iter_batches(batch_size=batch_rows, columns=list(wanted)):
            df = batch.to_pandas()
            yield df, np.arange(start, start + len(df), dtype=np.int64), units, [], types
            start += len(df)
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None


def file_batches(path, kind, wanted, batch_rows):
    """Batches of one file of format ``kind`` (see the module docstring)."""
    if kind == "csv":
        return csv_batches(path, wanted, batch_rows)
    if kind == "ecsv":
        header = ecsv_header(path)
        if header is None:
            raise InputError("the file has no ECSV header (first line '# %ECSV ...')", path)
        return csv_batches(path, wanted, batch_rows, ecsv=header)
    if kind == "parquet":
        return parquet_batches(path, wanted, batch_rows)
    data, rows, units, _, types = read_astropy(path, wanted, kind)
    return ((data.iloc[s:s + batch_rows].reset_index(drop=True), rows[s:s + batch_rows], units, [], types)
            for s in range(0, max(len(data), 1), batch_rows))
