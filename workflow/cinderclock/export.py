"""Exports of cinderclock tables to FITS, VOTable and ECSV, through astropy, keeping the units.

Each export carries, in the form its format allows:

* per column: the unit, the description and the IVOA UCD of the Parquet field metadata;
* for the table: the schema version and the whole ``cinderclock`` metadata block (provenance,
  column descriptions, flag bits, reject reasons), plus a note of the Parquet file it came from.

How each format holds them:

========  ===========================================  =============================================
format    units and column metadata                    table metadata
========  ===========================================  =============================================
FITS      ``TUNITn`` (FITS-standard unit strings),     keywords ``CCSCHEMA``, ``CCSTAGE`` and
          description as the ``TTYPEn`` comment and    ``CCMETA`` (the block as JSON, in long-string
          with the UCD in astropy's column header      ``CONTINUE`` cards)
========  ===========================================  =============================================
VOTable   version 1.3, FIELD ``unit`` (CDS unit        ``INFO`` elements ``schema_version``,
          syntax, which that version prescribes),      ``cinderclock`` (the block as JSON) and one
          ``ucd`` and ``DESCRIPTION``; BINARY2         ``model_reference`` per model reference
          serialisation
ECSV      astropy unit strings, description and        ``cinderclock`` key of the YAML header
          ``ucd`` in the column meta
========  ===========================================  =============================================

Logarithmic units: ``dex(cm / s2)`` (log g) and ``dex(solLum)`` (log L) are written as
``[cm/s2]`` and ``[solLum]`` in VOTable (CDS syntax, which VOTable 1.3 prescribes; astropy reads
them back as the same units) and an uncertainty in dex as ``[-]`` (astropy shows it as
``dex(---)``, which equals ``dex``). In FITS no unit string for a logarithm reads back in astropy
without a warning, so log columns carry no ``TUNITn``: astropy's serialized-column block (COMMENT
cards) holds their unit, which astropy restores on reading, and the column comment quotes the FITS
standard's function notation (``log(solLum)``) for other readers.

Every export is written atomically (temporary file in the same folder, then renamed).
"""

from __future__ import annotations

import json
import re
import warnings
from pathlib import Path

import numpy as np

from .errors import InputError
from .tableio import atomic_write

#: Export format -> default file suffix.
FORMATS = {"fits": ".fits", "votable": ".vot", "ecsv": ".ecsv"}

#: FITS keywords holding the schema version, the stage and the metadata block (JSON).
FITS_SCHEMA_KEY, FITS_STAGE_KEY, FITS_META_KEY = "CCSCHEMA", "CCSTAGE", "CCMETA"
#: VOTable INFO names.
VOT_SCHEMA_INFO, VOT_META_INFO, VOT_REFERENCE_INFO = "schema_version", "cinderclock", "model_reference"
#: ECSV header key.
ECSV_META_KEY = "cinderclock"

_LOG_FUNCTION = re.compile(r"^\s*log\((.*)\)\s*$")


def astropy_unit(text):
    """astropy unit of a cinderclock unit string (None for dimensionless/empty).

    A bare ``dex`` (a difference of logarithms, e.g. the uncertainty of log g) becomes
    ``dex(1)``, the same unit written in a form every format understands.
    """
    from astropy import units as u

    if text is None or str(text).strip() == "":
        return None
    unit = u.Unit(str(text))
    if unit == u.dex and not isinstance(unit, u.FunctionUnitBase):
        unit = u.dex(u.one)
    return unit


def unit_string(text, fmt):
    """The unit ``text`` (astropy string) written for one export format ("fits", "cds" or "generic")."""
    from astropy import units as u

    unit = astropy_unit(text)
    if unit is None:
        return ""
    try:
        return unit.to_string(fmt)
    except ValueError:
        pass
    if fmt == "fits" and isinstance(unit, u.FunctionUnitBase) and unit.function_unit == u.dex:
        phys = unit.physical_unit
        return "dex" if phys == u.one else f"log({phys.to_string('fits')})"
    return unit.to_string()


def parse_unit(text):
    """Read back a unit string written by any export (generic, CDS, FITS or FITS log()) as an astropy unit.

    Returns None for an empty string and the text itself if no reading applies.
    """
    from astropy import units as u

    if text is None:
        return None
    text = str(text).strip()
    if text in ("", "---"):
        return None
    m = _LOG_FUNCTION.match(text)
    if m:
        inner = parse_unit(m.group(1))
        return u.dex(inner if inner is not None else u.one) if not isinstance(inner, str) else text
    for fmt in ("generic", "fits", "cds", "vounit"):
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                return astropy_unit(u.Unit(text, format=fmt, parse_strict="raise").to_string())
        except (ValueError, TypeError):
            continue
    return text


def _column_data(column):
    """numpy data (and mask, or None) of one pyarrow column, in types every format can hold."""
    import numpy as np
    import pyarrow as pa

    typ = column.type
    if pa.types.is_string(typ) or pa.types.is_large_string(typ) or pa.types.is_dictionary(typ):
        values = column.cast(pa.large_string()) if pa.types.is_dictionary(typ) else column
        mask = np.asarray(values.is_null().to_numpy(zero_copy_only=False), dtype=bool)
        data = np.asarray(values.fill_null("").to_numpy(zero_copy_only=False)).astype(str)
        return data, (mask if mask.any() else None)
    if pa.types.is_integer(typ) or pa.types.is_boolean(typ):
        if column.null_count:
            mask = np.asarray(column.is_null().to_numpy(zero_copy_only=False), dtype=bool)
            data = np.asarray(column.fill_null(0).to_numpy(zero_copy_only=False))
            return data, mask
        return np.asarray(column.to_numpy(zero_copy_only=False)), None
    if pa.types.is_floating(typ):
        return np.asarray(column.to_numpy(zero_copy_only=False), dtype=typ.to_pandas_dtype()), None
    raise InputError(f"column of type {typ} cannot be exported")


def to_astropy(path, columns=None):
    """Read a cinderclock Parquet table as an :class:`astropy.table.Table` with units and metadata.

    Parameters
    ----------
    path : str or Path
        A Parquet file written by cinderclock.
    columns : list of str, optional
        Read only these columns.

    Returns
    -------
    table : astropy.table.Table
        Columns with ``unit`` (astropy), ``description`` and ``meta["ucd"]``; ``table.meta`` holds
        the ``cinderclock`` block under :data:`ECSV_META_KEY`.
    block : dict
        The ``cinderclock`` metadata block (empty if the file has none).
    """
    import pyarrow.parquet as pq
    from astropy.table import Column, MaskedColumn, Table

    from .tableio import read_metadata

    block = read_metadata(path)
    try:
        arrow = pq.read_table(path, columns=columns)
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None
    specs = block.get("columns", {})
    out = Table()
    for field, column in zip(arrow.schema, arrow.columns):
        md = {k.decode(): v.decode() for k, v in (field.metadata or {}).items()}
        spec = specs.get(field.name, {})
        unit_text = md.get("unit", spec.get("unit", ""))
        description = md.get("description", spec.get("description", ""))
        ucd = md.get("ucd", spec.get("ucd", ""))
        data, mask = _column_data(column.combine_chunks() if column.num_chunks != 1 else column.chunk(0))
        try:
            unit = astropy_unit(unit_text)
        except ValueError:
            raise InputError(f"unit {unit_text!r} is not an astropy unit", path, column=field.name) from None
        kwargs = {"name": field.name, "unit": unit, "description": description or None,
                  "meta": {"ucd": ucd} if ucd else {}}
        out.add_column(MaskedColumn(data, mask=mask, **kwargs) if mask is not None else Column(data, **kwargs))
    out.meta[ECSV_META_KEY] = block
    return out, block


def _with_source(block, path):
    """The block with a note of the Parquet file an export was made from."""
    from . import __version__
    from .provenance import file_checksum

    block = json.loads(json.dumps(block))
    block["exported_from"] = {"file": Path(path).name, "sha256": file_checksum(path),
                              "by": f"cinderclock {__version__}"}
    return block


def _try_format(unit, fmt):
    """``unit`` written in format ``fmt``, or None if astropy cannot write it there."""
    try:
        return unit.to_string(fmt)
    except ValueError:
        return None


def _write_fits(table, block, tmp):
    from astropy import units as u
    from astropy.io import fits
    from astropy.table import MaskedColumn, QTable

    t = table.copy(copy_data=False)
    t.meta.clear()
    log_units, dex_columns = {}, {}
    for name in t.colnames:
        col = t[name]
        if isinstance(col.unit, u.FunctionUnitBase) or col.unit == u.dex:
            # No FITS unit string for a logarithm reads back in astropy without a warning: write the
            # column as a logarithmic quantity, whose unit astropy keeps in its serialized-column block,
            # and quote the FITS standard's function notation in the column comment.
            log_units[name] = unit_string(col.unit.to_string(), "fits")
            if not isinstance(col, MaskedColumn):
                dex_columns[name] = u.Dex(np.asarray(col), col.unit) if col.unit != u.dex else np.asarray(col) * u.dex
    if dex_columns:
        t = QTable(t, copy=False)
        for name, q in dex_columns.items():
            q.info.description = table[name].description
            q.info.meta = dict(table[name].meta or {})
            t.replace_column(name, q)
    t.meta[FITS_SCHEMA_KEY] = str(block.get("schema_version", ""))
    t.meta[FITS_STAGE_KEY] = str(block.get("stage") or "")
    t.meta[FITS_META_KEY] = json.dumps(block, sort_keys=True)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")              # long-string and HIERARCH notes from astropy
        t.write(tmp, format="fits", overwrite=True)
        with fits.open(tmp, mode="update") as hdul:
            header = hdul[1].header
            names = [header.get(f"TTYPE{i}") for i in range(1, header.get("TFIELDS", 0) + 1)]
            for i, name in enumerate(names, start=1):
                description = (table[name].description or "") if name in table.colnames else ""
                if name in log_units:
                    description = f"[{log_units[name]}] {description}"
                header.comments[f"TTYPE{i}"] = description[: 80 - 33]
            header.comments[FITS_META_KEY] = "cinderclock metadata block (JSON)"


def binary2_stream(table):
    """The VOTable BINARY2 serialisation of ``table``'s rows, built with numpy (no per-row Python loop).

    Follows the layout astropy writes (VOTable 1.3, section 5.5): per row, the null-flag bits
    (most significant bit first) then every field big-endian, masked entries holding whatever
    lies under the mask; fixed-size ``char`` fields padded with NUL bytes, ``unicodeChar`` as
    UCS-2. Returns None when a column has a type this fast path does not cover (booleans, arrays,
    non-BMP text); the caller then lets astropy write the rows (slowly: a Python loop per row).
    """
    import numpy as np

    n, ncol = len(table), len(table.columns)
    nulls = np.zeros((n, ncol), dtype=bool)
    parts = []
    for j, col in enumerate(table.itercols()):
        mask = np.asarray(getattr(col, "mask", np.zeros(n, bool)), dtype=bool).reshape(n) if n else np.zeros(0, bool)
        nulls[:, j] = mask
        data = np.asarray(getattr(col, "data", col))
        if getattr(data, "mask", None) is not None:
            data = np.asarray(data.data)
        kind = data.dtype.kind
        if data.ndim != 1:
            return None
        if kind == "f":
            values = data.astype(f">f{data.dtype.itemsize}")
        elif (kind == "i" and data.dtype.itemsize in (2, 4, 8)) or data.dtype == np.uint8:
            values = data.astype(data.dtype.newbyteorder(">"))
        elif kind == "S":
            values = data
        elif kind == "U":
            width = data.dtype.itemsize // 4
            codes = np.ascontiguousarray(data).view(np.uint32)
            if codes.size and codes.max() >= 0xD800:          # outside the part of UCS-2 we write
                return None
            values = codes.reshape(n, width).astype(">u2") if width else np.zeros((n, 0), ">u2")
        else:
            return None
        parts.append(values)
    record = [("nulls", "u1", ((ncol + 7) // 8,))]
    record += [(f"c{j}", p.dtype, p.shape[1:]) for j, p in enumerate(parts)]
    rows = np.empty(n, dtype=np.dtype(record))
    rows["nulls"] = np.packbits(nulls, axis=1, bitorder="big") if n else 0
    for j, p in enumerate(parts):
        rows[f"c{j}"] = p
    return rows.tobytes()


def _write_votable(table, block, tmp):
    import base64
    import io

    from astropy.io.votable.tree import Info, Resource, TableElement, VOTableFile

    from .provenance import references

    t = table.copy(copy_data=False)
    t.meta.clear()
    stream = binary2_stream(t) if len(t) else None
    vot = VOTableFile(version="1.3")        # 1.3: units in CDS syntax, which holds log units
    resource = Resource()
    vot.resources.append(resource)
    element = TableElement.from_table(vot, t[:1] if stream is not None else t)
    element.description = (f"cinderclock table (stage {block.get('stage')}, schema version "
                           f"{block.get('schema_version')}); provenance in INFO '{VOT_META_INFO}'")
    element.infos.append(Info(name=VOT_SCHEMA_INFO, value=str(block.get("schema_version", ""))))
    element.infos.append(Info(name=VOT_META_INFO, value=json.dumps(block, sort_keys=True)))
    for i, ref in enumerate(references(block.get("provenance", {})), start=1):
        element.infos.append(Info(ID=f"{VOT_REFERENCE_INFO}_{i}", name=VOT_REFERENCE_INFO, value=ref))
    resource.tables.append(element)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        if stream is None:
            vot.to_xml(str(tmp), tabledata_format="binary2")
            return
        skeleton = io.BytesIO()
        vot.to_xml(skeleton, tabledata_format="binary2")     # the one-row document: fields, infos, layout
    text = skeleton.getvalue()
    start = text.index(b'<STREAM encoding="base64">') + len(b'<STREAM encoding="base64">')
    stop = text.index(b"</STREAM>", start)
    with open(tmp, "wb") as fh:
        fh.write(text[:start])
        fh.write(base64.b64encode(stream))
        fh.write(text[stop:])


def _write_ecsv(table, block, tmp):
    t = table.copy(copy_data=False)
    t.meta.clear()
    t.meta[ECSV_META_KEY] = block
    t.write(tmp, format="ascii.ecsv", overwrite=True)


_WRITERS = {"fits": _write_fits, "votable": _write_votable, "ecsv": _write_ecsv}


def default_output(path, fmt):
    """Export path next to ``path``: same stem, the format's suffix."""
    return Path(path).with_suffix(FORMATS[fmt])


def export_table(path, fmt, out=None, overwrite=False):
    """Export a cinderclock Parquet table to FITS, VOTable or ECSV.

    Parameters
    ----------
    path : str or Path
        The Parquet table.
    fmt : {"fits", "votable", "ecsv"}
        Export format.
    out : str or Path, optional
        Output file (default: next to ``path``, see :func:`default_output`).
    overwrite : bool
        Replace an existing output file.

    Returns
    -------
    Path
        The file written.

    Raises
    ------
    InputError
        Unreadable input, unknown format, or an existing output without ``overwrite``.
    """
    if fmt not in FORMATS:
        raise InputError(f"unknown export format {fmt!r}; use one of {', '.join(FORMATS)}")
    if not Path(path).exists():
        raise InputError("file not found", path)
    out = Path(out) if out is not None else default_output(path, fmt)
    if out.resolve() == Path(path).resolve():
        raise InputError("the export would replace its own input; choose another output name", out)
    if out.exists() and not overwrite:
        raise InputError("the output file exists; pass overwrite (--overwrite) to replace it", out)
    table, block = to_astropy(path)
    block = _with_source(block, path)
    return atomic_write(out, lambda tmp: _WRITERS[fmt](table, block, tmp))
