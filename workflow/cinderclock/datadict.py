"""What a cinderclock table says about itself, and its data dictionary in Markdown.

:func:`describe` reads the self-description of any table cinderclock writes - a Parquet file, or
one of its FITS, VOTable or ECSV exports (:mod:`cinderclock.export`) - without loading the data
of a Parquet file. :func:`data_dictionary` turns it into a Markdown document for collaborators:
every column with type, unit, UCD and description, the quality-flag bits, the reject reasons,
the models with their references and cautions, and the provenance of the run.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path

from .errors import InputError
from .tableio import Column

#: File suffix -> kind of table file.
KINDS = {".parquet": "parquet", ".pq": "parquet", ".fits": "fits", ".fit": "fits", ".vot": "votable",
         ".xml": "votable", ".votable": "votable", ".ecsv": "ecsv"}


@dataclass
class TableDescription:
    """Self-description of one table file.

    Attributes
    ----------
    path : str
    kind : str
        ``parquet``, ``fits``, ``votable`` or ``ecsv``.
    n_rows : int
    columns : dict of str to Column
        Unit (astropy string), description and UCD of every column, in file order.
    dtypes : dict of str to str
        Storage type of every column.
    meta : dict
        The ``cinderclock`` metadata block (``schema_version``, ``stage``, ``columns``,
        ``provenance``); empty for a file cinderclock did not write.
    """

    path: str
    kind: str
    n_rows: int
    columns: dict
    dtypes: dict
    meta: dict = field(default_factory=dict)

    @property
    def schema_version(self):
        return self.meta.get("schema_version")

    @property
    def stage(self):
        return self.meta.get("stage")

    @property
    def provenance(self):
        return self.meta.get("provenance") or {}

    def stages(self):
        """``{stage: entry}`` of the provenance in workflow order (metadata JSON keeps keys sorted)."""
        from .config import STAGE_SECTIONS

        order = {name: i for i, name in enumerate(STAGE_SECTIONS)}
        stages = self.provenance.get("stages", {})
        return {k: stages[k] for k in sorted(stages, key=lambda k: (order.get(k, len(order)), k))}

    def models(self):
        """``(stage, model entry)`` for every model recorded in the provenance, in workflow order."""
        return [(stage, m) for stage, entry in self.stages().items()
                for m in entry.get("models", []) if m.get("reference")]

    def cautions(self):
        """``(stage, text)`` of every caution recorded with the provenance's entries, without repeats."""
        out = []
        for stage, entry in self.stages().items():
            for m in entry.get("models", []):
                for c in ([m["caution"]] if m.get("caution") else []) + list(m.get("cautions") or []):
                    if c and (stage, c) not in out:
                        out.append((stage, c))
        return out

    def cited_models(self):
        """``(reference, [model names], bibtex fields or None)`` of every model with a reference, in
        workflow order, one row per distinct reference (collected generically from the provenance's
        model entries, so a newly registered model appears without changes here)."""
        rows = {}
        for _, m in self.models():
            ref = m.get("reference")
            if not ref:
                continue
            if ref not in rows:
                rows[ref] = ([], m.get("bibtex"))
            if m.get("name") and m["name"] not in rows[ref][0]:
                rows[ref][0].append(m["name"])
        return [(ref, names, bib) for ref, (names, bib) in rows.items()]

    def references(self):
        """Model references of the run, de-duplicated, in workflow order."""
        from .provenance import references

        return references({"stages": self.stages()})

    def flag_bits(self):
        """``{name: (bit, meaning)}`` from the metadata (empty if absent)."""
        bits = self.provenance.get("flag_bits") or self.meta.get("flag_bits") or {}
        return {n: (int(v["bit"]), v["meaning"]) for n, v in sorted(bits.items(), key=lambda kv: kv[1]["bit"])}

    def reasons(self):
        """``{code: meaning}`` of the reject reasons from the metadata (empty if absent), in stage order."""
        from .reasons import REASONS

        reasons = self.provenance.get("reasons") or self.meta.get("reasons") or {}
        order = {code: i for i, code in enumerate(REASONS)}
        return {c: reasons[c] for c in sorted(reasons, key=lambda c: (order.get(c, len(order)), c))}


def _kind(path):
    kind = KINDS.get(Path(path).suffix.lower())
    if kind is None:
        raise InputError(f"cannot tell the table format from the name; expected one of "
                         f"{', '.join(sorted(set(KINDS)))}", path)
    return kind


def _describe_parquet(path):
    import pyarrow.parquet as pq

    from .tableio import read_metadata

    meta = read_metadata(path)
    try:
        n_rows = pq.ParquetFile(path).metadata.num_rows
    except Exception as exc:
        raise InputError(f"not a readable Parquet file ({exc.__class__.__name__}: {exc})", path) from None
    schema = pq.read_schema(path)
    specs = meta.get("columns", {})
    columns, dtypes = {}, {}
    for f in schema:
        md = {k.decode(): v.decode() for k, v in (f.metadata or {}).items()}
        spec = specs.get(f.name, {})
        columns[f.name] = Column(md.get("unit", spec.get("unit", "")),
                                 md.get("description", spec.get("description", "")),
                                 md.get("ucd", spec.get("ucd", "")))
        dtypes[f.name] = plain_type(f.type)
    return TableDescription(str(path), "parquet", n_rows, columns, dtypes, meta)


def plain_type(arrow_type):
    """Plain name of a column type: string, float64, float32, int64, ..., bool."""
    import pyarrow as pa

    t = arrow_type
    if pa.types.is_dictionary(t):
        t = t.value_type
    if pa.types.is_string(t) or pa.types.is_large_string(t):
        return "string"
    if pa.types.is_boolean(t):
        return "bool"
    if pa.types.is_floating(t) or pa.types.is_integer(t):
        return str(t.to_pandas_dtype().__name__) if hasattr(t.to_pandas_dtype(), "__name__") else str(t)
    return str(t)


def _describe_export(path, kind):
    import warnings

    from astropy.table import Table

    from .export import ECSV_META_KEY, FITS_META_KEY, VOT_META_INFO

    meta = {}
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")       # log units in FITS: read back below
            if kind == "votable":
                from astropy.io.votable import parse

                vot = parse(str(path))
                element = vot.get_first_table()
                for info in element.infos:
                    if info.name == VOT_META_INFO:
                        meta = json.loads(info.value)
                table = element.to_table()
            else:
                table = Table.read(path, format={"fits": "fits", "ecsv": "ascii.ecsv"}[kind])
    except Exception as exc:
        raise InputError(f"not a readable {kind.upper() if kind != 'votable' else 'VOTable'} file "
                         f"({exc.__class__.__name__}: {str(exc).splitlines()[0] if str(exc) else ''})", path) from None
    if kind == "fits" and FITS_META_KEY in table.meta:
        meta = json.loads(table.meta[FITS_META_KEY])
    elif kind == "ecsv":
        meta = table.meta.get(ECSV_META_KEY, {}) or {}
    specs = meta.get("columns", {})
    columns, dtypes = {}, {}
    for name in table.colnames:
        col = table[name]
        spec = specs.get(name)
        if spec:                                        # the block is authoritative
            columns[name] = Column(spec.get("unit", ""), spec.get("description", ""), spec.get("ucd", ""))
        else:
            from .export import parse_unit

            unit = parse_unit(str(col.unit)) if col.unit is not None else None
            text = "" if unit is None else unit if isinstance(unit, str) else unit.to_string()
            columns[name] = Column(text, col.description or "", (col.meta or {}).get("ucd", ""))
        kind_char = col.dtype.kind
        dtypes[name] = "string" if kind_char in "USO" else "bool" if kind_char == "b" else col.dtype.name
    return TableDescription(str(path), kind, len(table), columns, dtypes, meta)


def describe(path):
    """Read the self-description of a cinderclock table (Parquet, or a FITS/VOTable/ECSV export).

    Raises
    ------
    InputError
        File missing, of an unknown kind, or unreadable (one line naming the file).
    """
    if not Path(path).exists():
        raise InputError("file not found", path)
    kind = _kind(path)
    return _describe_parquet(path) if kind == "parquet" else _describe_export(path, kind)


# ----------------------------------------------------------------------------------- Markdown


def _cell(text):
    """Text safe inside a Markdown table cell."""
    return str(text).replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def _code(text):
    return f"`{text}`" if text else ""


def data_dictionary(path, title=None):
    """Markdown data dictionary of a cinderclock table.

    Parameters
    ----------
    path : str or Path
        The table (Parquet, or a FITS/VOTable/ECSV export).
    title : str, optional
        First heading (default: the file name).

    Returns
    -------
    str
        Markdown: summary, columns (type, unit, UCD, description), quality flags, reject reasons,
        models with references and cautions, and per-stage settings hashes.
    """
    d = describe(path)
    return dictionary_markdown(d, title)


def dictionary_markdown(d, title=None, level=1):
    """Markdown for a :class:`TableDescription` (see :func:`data_dictionary`); ``level`` of the first heading."""
    h = "#" * level
    prov = d.provenance
    out = [f"{h} {title or 'Data dictionary: ' + Path(d.path).name}", ""]
    if d.meta:
        out.append(f"Written by {prov.get('package', 'cinderclock')} {prov.get('package_version', '?')}, "
                   f"table schema version {d.schema_version}, stage `{d.stage}`; "
                   f"{d.n_rows} rows, {len(d.columns)} columns.")
        if prov.get("config_hash"):
            out.append(f"Configuration hash (all stage settings): `{prov['config_hash']}`.")
        if prov.get("catalogue"):
            out.append(f"Input catalogue: `{Path(prov['catalogue']).name}`, SHA-256 "
                       f"`{prov.get('catalogue_sha256', '?')}`.")
        if d.meta.get("exported_from"):
            src = d.meta["exported_from"]
            out.append(f"Exported from `{src.get('file')}` (SHA-256 `{src.get('sha256')}`) by {src.get('by')}.")
    else:
        out.append(f"{d.n_rows} rows, {len(d.columns)} columns. This file carries no cinderclock metadata "
                   "(it was not written by cinderclock, or the metadata was stripped).")
    out += ["", f"{h}# Columns", "", "| column | type | unit | UCD | description |", "|---|---|---|---|---|"]
    for name, spec in d.columns.items():
        out.append(f"| `{name}` | {_cell(d.dtypes.get(name, ''))} | {_cell(_code(spec.unit))} | "
                   f"{_cell(_code(spec.ucd))} | {_cell(spec.description)} |")
    out.append("")
    out.append("Units are astropy unit strings: `dex(X)` is log10 of a quantity in unit X, `dex` alone a "
               "difference of such logarithms, `mag` a magnitude; an empty unit means a pure number or text.")
    bits = d.flag_bits() if "quality_bits" in d.columns else {}
    if bits:
        out += ["", f"{h}# Quality flags (`quality_bits`)", "",
                "A star's `quality_bits` is the sum of 2^bit over the flags set. "
                "In numpy: `(quality_bits >> bit) & 1`.", "", "| bit | name | meaning |", "|---|---|---|"]
        out += [f"| {b} | `{n}` | {_cell(m)} |" for n, (b, m) in bits.items()]
    reasons = d.reasons() if "reason" in d.columns else {}
    if reasons:
        out += ["", f"{h}# Reject reasons (`reason`)", "",
                "Every input row is either in the results table or in the rejects table with one of these codes.",
                "", "| reason | meaning |", "|---|---|"]
        out += [f"| `{r}` | {_cell(m)} |" for r, m in reasons.items()]
    models = d.models()
    if models:
        out += ["", f"{h}# Models and references", "",
                "| # | stage | model | reference | where in the source | checked against the source |",
                "|---|---|---|---|---|---|"]
        for i, (st, m) in enumerate(models, start=1):
            checked = {True: "verified", False: "UNVERIFIED"}.get(m.get("verified"), "not reviewed")
            if m.get("verification"):
                checked += f": {m['verification']}"
            out.append(f"| {i} | {st} | `{m.get('name', '')}` | {_cell(m.get('reference', ''))} | "
                       f"{_cell(m.get('source_location', ''))} | {_cell(checked)} |")
    cautions = d.cautions()
    if cautions:
        out += ["", "Cautions recorded with the models:", ""]
        out += [f"* {st}: {_cell(c)}" for st, c in cautions]
    stages = d.stages()
    if stages:
        out += ["", f"{h}# Stages", "", "| stage | settings hash | inputs |", "|---|---|---|"]
        for name, entry in stages.items():
            inputs = ", ".join(f"`{k}`" for k in sorted(entry.get("inputs", {})))
            out.append(f"| {name} | `{entry.get('settings_hash', '')[:16]}` | {inputs} |")
        out += ["", "Settings hashes are SHA-256 of each stage's settings (first 16 hex digits shown); the full "
                "settings are in the file's metadata (`cinderclock inspect --json`)."]
    return "\n".join(out) + "\n"


def combined_dictionary(paths, title="Data dictionary"):
    """One Markdown document describing several tables of a run (e.g. the results and the rejects)."""
    parts = [f"# {title}", "",
             "Generated by cinderclock from the metadata the tables carry; one section per table.", ""]
    for p in paths:
        parts.append(dictionary_markdown(describe(p), f"`{Path(p).name}`", level=2))
    return "\n".join(parts)
