"""Parquet tables that describe themselves: column units, descriptions, UCDs and provenance.

Every table cinderclock writes carries

* per field, Arrow field metadata ``unit``, ``description`` and ``ucd`` (IVOA UCD1+ words);
* in the schema metadata, the key ``cinderclock`` holding JSON with ``schema_version``, the same
  column descriptions (so tools that drop field metadata still see them) and ``provenance``.

Writes are atomic: the table goes to a temporary file in the same folder and is renamed over the
target only when complete, so a run killed mid-write never leaves a partial file behind that a
later stage would accept. The temporary is named ``.<name>.partial-<pid>``: no stage reads such a
name, and the next write of the same target deletes any left by a killed writer.
"""

from __future__ import annotations

import json
import os
from dataclasses import asdict, dataclass
from pathlib import Path

from .errors import InputError

META_KEY = b"cinderclock"


@dataclass(frozen=True)
class Column:
    """Description of one table column.

    Parameters
    ----------
    unit : str
        Unit in astropy's string form ("" for dimensionless, "mag", "K", "pc", "solMass", ...).
    description : str
        One sentence a collaborator can read without asking.
    ucd : str
        IVOA UCD1+ word(s), e.g. ``"pos.parallax"``; empty if none fits.
    """

    unit: str
    description: str
    ucd: str = ""


def column_specs_from_json(data):
    """Rebuild ``{name: Column}`` from its JSON form."""
    return {name: Column(**spec) for name, spec in data.items()}


def _remove_stale_partials(path):
    """Delete temporaries of ``path`` left behind by a writer that was killed (kill -9, power loss)."""
    import glob

    own = f".{path.name}.partial-{os.getpid()}"
    for stale in path.parent.glob(f".{glob.escape(path.name)}.partial-*"):
        if stale.name != own:
            stale.unlink(missing_ok=True)


def atomic_write(path, write):
    """Call ``write(tmp)`` on a temporary next to ``path``, flush it to disk, then rename it to ``path``.

    The temporary is ``.<name>.partial-<pid>``; temporaries left by killed writers are removed
    first. If ``write`` raises, neither the target nor the temporary changes the folder.
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    _remove_stale_partials(path)
    tmp = path.with_name(f".{path.name}.partial-{os.getpid()}")
    try:
        write(tmp)
        with open(tmp, "rb") as fh:
            os.fsync(fh.fileno())
        os.replace(tmp, path)
    finally:
        if tmp.exists():
            tmp.unlink()
    return path


def write_json(obj, path):
    """Write a JSON document atomically, with the cinderclock schema version added."""
    from . import SCHEMA_VERSION

    text = json.dumps({"schema_version": SCHEMA_VERSION, **obj}, indent=1, sort_keys=True)
    return atomic_write(path, lambda tmp: Path(tmp).write_text(text))


def _described_schema(arrow_schema, columns, provenance, stage):
    """``arrow_schema`` with per-field unit/description/UCD and the ``cinderclock`` metadata block."""
    import pyarrow as pa

    from . import SCHEMA_VERSION

    fields = []
    for field in arrow_schema:
        spec = columns[field.name]
        if pa.types.is_null(field.type):
            # an empty (or all-missing) text column: pandas cannot tell its type, so it stays text
            # (typed columns stay typed in empty tables, and every export format can write it)
            field = field.with_type(pa.string())
        fields.append(field.with_metadata({b"unit": spec.unit.encode(), b"description": spec.description.encode(),
                                           b"ucd": spec.ucd.encode()}))
    block = {"schema_version": SCHEMA_VERSION, "stage": stage,
             "columns": {f.name: asdict(columns[f.name]) for f in arrow_schema}, "provenance": provenance}
    return pa.schema(fields, metadata={META_KEY: json.dumps(block, sort_keys=True).encode()})


def write_table(df, path, columns, provenance, *, stage=None):
    """Write ``df`` to Parquet at ``path`` atomically, with column and provenance metadata.

    Parameters
    ----------
    df : pandas.DataFrame
        The table. Every column must be described in ``columns``.
    path : str or Path
        Target file. Its folder is created if needed.
    columns : dict of str to Column
        Description of each column (extra entries are ignored).
    provenance : dict
        JSON-serialisable provenance block (see :mod:`cinderclock.provenance`).
    stage : str, optional
        Name of the stage writing the table, recorded in the metadata.
    """
    import pyarrow as pa
    import pyarrow.parquet as pq

    missing = [c for c in df.columns if c not in columns]
    if missing:
        raise ValueError(f"columns without a description: {missing}")
    table = pa.Table.from_pandas(df, preserve_index=False)
    table = table.cast(_described_schema(table.schema, columns, provenance, stage))
    atomic_write(path, lambda tmp: pq.write_table(table, tmp, compression="zstd"))


def read_metadata(path):
    """Return the ``cinderclock`` metadata block of a Parquet file (empty dict if absent)."""
    import pyarrow.parquet as pq

    try:
        schema = pq.read_schema(path)
    except Exception as exc:  # pyarrow raises several types for damaged files
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None
    raw = (schema.metadata or {}).get(META_KEY)
    return json.loads(raw) if raw else {}


def read_table(path, columns=None):
    """Read a cinderclock Parquet table.

    Parameters
    ----------
    path : str or Path
        File to read.
    columns : list of str, optional
        Read only these columns.

    Returns
    -------
    df : pandas.DataFrame
    specs : dict of str to Column
        Descriptions of the columns read.
    meta : dict
        The whole metadata block (``schema_version``, ``stage``, ``provenance``, ...).
    """
    import pyarrow.parquet as pq

    meta = read_metadata(path)
    try:
        table = pq.read_table(path, columns=columns)
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None
    df = table.to_pandas()
    specs = column_specs_from_json(meta.get("columns", {}))
    specs = {c: specs[c] for c in df.columns if c in specs}
    return df, specs, meta


class StreamingTableWriter:
    """Write a large table shard by shard, atomically, with the same metadata as :func:`write_table`.

    Use as a context manager; call :meth:`write` with each DataFrame. Every frame is cast to the
    schema of the first non-empty frame (so empty shards with untyped columns do not break it).
    The target appears only when the context exits without an exception.
    """

    def __init__(self, path, columns, provenance, stage=None):
        self.path = Path(path)
        self.columns = columns
        self.provenance = provenance
        self.stage = stage
        self._writer = None
        self._schema = None
        self._pending = []
        self._tmp = self.path.with_name(f".{self.path.name}.partial-{os.getpid()}")

    def __enter__(self):
        self.path.parent.mkdir(parents=True, exist_ok=True)
        _remove_stale_partials(self.path)
        return self

    def _schema_for(self, df):
        import pyarrow as pa

        schema = pa.Table.from_pandas(df, preserve_index=False).schema
        return _described_schema(schema, self.columns, self.provenance, self.stage)

    def write(self, df):
        import pyarrow as pa
        import pyarrow.parquet as pq

        if self._writer is None:
            if len(df) == 0:
                self._pending.append(df)
                return
            self._schema = self._schema_for(df)
            self._writer = pq.ParquetWriter(self._tmp, self._schema, compression="zstd")
            for p in self._pending:
                self.write(p)
            self._pending = []
        if len(df):
            self._writer.write_table(pa.Table.from_pandas(df, preserve_index=False).cast(self._schema))

    def __exit__(self, exc_type, exc, tb):
        try:
            if exc_type is None:
                if self._writer is None:               # nothing but empty frames: an empty table
                    frame = self._pending[0] if self._pending else None
                    if frame is None:
                        raise ValueError("no frames written")
                    write_table(frame, self.path, self.columns, self.provenance, stage=self.stage)
                    return False
                self._writer.close()
                with open(self._tmp, "rb") as fh:
                    os.fsync(fh.fileno())
                os.replace(self._tmp, self.path)
            elif self._writer is not None:
                self._writer.close()
        finally:
            if self._tmp.exists():
                self._tmp.unlink()
        return False
