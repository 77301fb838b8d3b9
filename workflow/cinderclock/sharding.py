"""Cutting the ingested catalogue into shards that are rewritten only when their content changes.

Each shard file records the SHA-256 of its data (``content_sha256`` in its ingest provenance).
When the catalogue is ingested again, a shard whose new content hashes the same is left untouched
(same bytes, same modification time), so Snakemake reruns later stages only for shards that
changed. Shards that no longer exist are removed.
"""

from __future__ import annotations

import hashlib
import logging
from pathlib import Path

import numpy as np
import pandas as pd

from .provenance import build, canonical_json
from .tableio import read_metadata, write_table

log = logging.getLogger("cinderclock")


def content_hash(df, specs):
    """SHA-256 of a table's values, column names and column descriptions (order-sensitive)."""
    h = hashlib.sha256()
    h.update(canonical_json({c: specs[c].__dict__ for c in df.columns}).encode())
    h.update(canonical_json([str(t) for t in df.dtypes]).encode())
    if len(df):
        h.update(pd.util.hash_pandas_object(df, index=False).to_numpy().tobytes())
    return h.hexdigest()


def _stored_hash(path):
    try:
        meta = read_metadata(path)
    except Exception:
        return None
    return meta.get("provenance", {}).get("stages", {}).get("ingest", {}).get("content_sha256")


def catalogue_label(spec):
    """Short name of the configured catalogue (a file, folder, pattern or list of files) for provenance."""
    if isinstance(spec, (list, tuple)):
        names = [Path(str(p)).name for p in spec]
        return names[0] if len(names) == 1 else f"{names[0]} ... {names[-1]} ({len(names)} files)"
    return Path(str(spec)).name


def ingest_provenance(settings):
    """Provenance block of the ingest tables: settings, catalogue and the photometric conversions."""
    from .stages.ingest_bands import conversions

    prov = build("ingest", settings, inputs=(), models=())
    prov["stages"]["ingest"]["catalogue"] = catalogue_label(settings["catalogue"]["path"])
    prov["stages"]["ingest"]["photometry_conversions"] = conversions(settings["bands"])
    return prov


def write_if_changed(df, path, specs, settings, extra_meta=None):
    """Write ``df`` to ``path`` unless the file already holds the same content. Returns True if written."""
    digest = content_hash(df, specs)
    path = Path(path)
    if path.exists() and _stored_hash(path) == digest:
        return False
    prov = ingest_provenance(settings)
    prov["stages"]["ingest"]["content_sha256"] = digest
    if extra_meta:
        prov.update(extra_meta)
    write_table(df, path, specs, prov, stage="ingest")
    return True


def _spill(df, folder, batch):
    import pyarrow as pa
    import pyarrow.parquet as pq

    folder.mkdir(parents=True, exist_ok=True)
    pq.write_table(pa.Table.from_pandas(df, preserve_index=False), folder / f"{batch:06d}.parquet")


def _read_pieces(folder):
    pieces = [pd.read_parquet(p) for p in sorted(folder.glob("*.parquet"))]
    return pieces


def harmonise_ids(frames, as_int):
    """Give every frame's ``star_id`` one type: int64 (-1 where a text is no integer) or text."""
    from .columns import ID
    from .stages.ingest import text_ids_to_int

    for f in frames:
        if as_int and f[ID].dtype.kind not in "iu":
            f[ID] = text_ids_to_int(f[ID])
        elif not as_int:
            f[ID] = f[ID].astype(str)
    return frames


def ingest_to_shards(settings, shard_dir, rejects_path, batch_rows=262144, parts_out=None):
    """Ingest the configured catalogue batch by batch into shard files; return the manifest entries.

    Memory stays bounded by one batch plus the largest shard: each batch is vetted and its rows are
    spilled to per-shard pieces on disk; repeated identifiers are then found over the whole
    catalogue (first occurrence kept), and each shard is assembled and written only if its content
    changed.

    Parameters
    ----------
    settings : dict
        Ingest settings (``catalogue``, ``bands``, ``shards``).
    shard_dir : path
        Folder of the ``<shard>.parquet`` files.
    rejects_path : path
        The ingest stage's rejects table.
    batch_rows : int
        Rows per read batch.
    parts_out : list, optional
        Receives one ``{"file", "first_row", "rows"}`` entry per catalogue part.

    Returns
    -------
    shards : dict
        ``{shard: {"rows": n, "content_sha256": ...}}``.
    rows_read : int
    """
    import shutil

    from .catalogue import iter_catalogue
    from .columns import ID, ROW
    from .reasons import REJECT_COLUMNS, concat_rejects, make_rejects, metadata_block
    from .stages.ingest import STAGE, ingest, shard_labels, wanted_columns

    shard_dir = Path(shard_dir)
    spill = shard_dir / ".spill"
    shutil.rmtree(spill, ignore_errors=True)
    specs, rows_read, parts, id_kinds = {}, 0, {}, set()
    cat = settings["catalogue"]
    for b, raw in enumerate(iter_catalogue(cat["path"], wanted_columns(settings), cat.get("format", "auto"),
                                           batch_rows=batch_rows)):
        rows_read += len(raw.data) + len(raw.malformed)
        entry = parts.setdefault(raw.path, {"file": raw.path, "first_row": int(raw.first_row), "rows": 0})
        entry["rows"] += len(raw.data) + len(raw.malformed)
        table, rejects, sp = ingest(raw, settings, dedupe=False)
        if len(raw.data):
            id_kinds.add(bool(table.attrs.get("id_is_int", table[ID].dtype.kind in "iu")))
        specs.update(sp)
        labels, off_sky = shard_labels(table, settings)
        if off_sky.any():
            rejects = concat_rejects([rejects, make_rejects(table.loc[off_sky, ID], table.loc[off_sky, ROW], STAGE,
                                                            "no_position", "no finite RA/Dec for the sky shards")])
            table, labels = table.loc[~off_sky].reset_index(drop=True), labels[~off_sky]
        for name in np.unique(labels):
            _spill(table.loc[labels == name], spill / str(name), b)
        if len(rejects):
            _spill(rejects, spill / "_rejects", b)
    # one identifier type for the whole catalogue: integers only if every batch had integer identifiers
    as_int = id_kinds == {True}

    # repeated identifiers over the whole catalogue (all parts): keep the first occurrence
    names = sorted(p.name for p in spill.glob("*") if p.is_dir() and p.name != "_rejects")
    import pyarrow.parquet as pq

    ids = [pq.read_table(p, columns=[ID, ROW]).to_pandas() for n in names for p in sorted((spill / n).glob("*.parquet"))]
    dup_rows = np.zeros(0, dtype=np.int64)
    if ids:
        allids = pd.concat(harmonise_ids(ids, as_int), ignore_index=True).sort_values(ROW, kind="stable")
        dup_rows = allids.loc[allids[ID].duplicated(keep="first"), ROW].to_numpy()

    manifest, written, dup_frames = {}, 0, []
    for name in names:
        part = pd.concat(harmonise_ids(_read_pieces(spill / name), as_int), ignore_index=True)
        part = part.sort_values(ROW, kind="stable").reset_index(drop=True)
        is_dup = np.isin(part[ROW].to_numpy(), dup_rows)
        if is_dup.any():
            d = part.loc[is_dup]
            where = [_locate(r, parts) for r in d[ROW]]
            dup_frames.append(make_rejects(d[ID], d[ROW], STAGE, "duplicate_id",
                                           [f"identifier {v!r} appeared earlier (this row: {f}, row {r})"
                                            for v, (f, r) in zip(d[ID].astype(str), where)]))
            part = part.loc[~is_dup].reset_index(drop=True)
        if len(part) == 0:
            continue
        written += write_if_changed(part, shard_dir / f"{name}.parquet", specs, settings)
        manifest[name] = {"rows": int(len(part)), "content_sha256": content_hash(part, specs)}

    pieces = _read_pieces(spill / "_rejects") if (spill / "_rejects").exists() else []
    rejects = concat_rejects(harmonise_ids(pieces + dup_frames, as_int))
    rejects = harmonise_ids([rejects], as_int)[0].sort_values("input_row", kind="stable").reset_index(drop=True)
    prov = ingest_provenance(settings)
    prov["stages"]["ingest"]["parts"] = [{"file": Path(p["file"]).name, "first_row": p["first_row"], "rows": p["rows"]}
                                         for p in parts.values()]
    write_table(rejects, rejects_path, REJECT_COLUMNS, dict(prov, **metadata_block()), stage="ingest")

    for stale in shard_dir.glob("*.parquet"):
        if stale.name.split(".")[0] not in manifest:
            stale.unlink()
            log.info("removed stale shard file %s", stale)
    shutil.rmtree(spill, ignore_errors=True)
    log.info("%d rows read; %d shard(s); %d rewritten, the others unchanged; %d rejected", rows_read,
             len(manifest), written, len(rejects))
    if parts_out is not None:
        parts_out.extend(parts.values())
    return manifest, rows_read


def _locate(row, parts):
    """(file name, row within the file) of a position over the whole catalogue."""
    for p in parts.values():
        if p["first_row"] <= row < p["first_row"] + p["rows"]:
            return Path(p["file"]).name, int(row - p["first_row"])
    return "?", int(row)
