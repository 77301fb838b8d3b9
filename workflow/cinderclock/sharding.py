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
from .reasons import REJECT_COLUMNS, metadata_block
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


def write_if_changed(df, path, specs, settings, extra_meta=None):
    """Write ``df`` to ``path`` unless the file already holds the same content. Returns True if written."""
    digest = content_hash(df, specs)
    path = Path(path)
    if path.exists() and _stored_hash(path) == digest:
        return False
    prov = build("ingest", settings, inputs=(), models=())
    prov["stages"]["ingest"]["content_sha256"] = digest
    prov["stages"]["ingest"]["catalogue"] = Path(settings["catalogue"]["path"]).name
    if extra_meta:
        prov.update(extra_meta)
    write_table(df, path, specs, prov, stage="ingest")
    return True


def write_shards(table, rejects, specs, labels, reject_labels, shard_dir, settings):
    """Write every shard's table and rejects; return the manifest entries.

    Parameters
    ----------
    table, rejects : pandas.DataFrame
        Accepted rows and rejected rows of the whole catalogue.
    specs : dict
        Column descriptions of ``table``.
    labels, reject_labels : ndarray of str
        Shard name of each row of ``table`` and of ``rejects``.
    shard_dir : path
        Folder for ``<shard>.parquet`` and ``<shard>.rejects.parquet``.
    settings : dict
        Ingest settings (recorded in provenance).
    """
    shard_dir = Path(shard_dir)
    shard_dir.mkdir(parents=True, exist_ok=True)
    names = sorted(set(np.asarray(labels).tolist()) | set(np.asarray(reject_labels).tolist()))
    manifest = {}
    written = 0
    for name in names:
        part = table.loc[np.asarray(labels) == name].reset_index(drop=True)
        rej = rejects.loc[np.asarray(reject_labels) == name].reset_index(drop=True)
        written += write_if_changed(part, shard_dir / f"{name}.parquet", specs, settings)
        written += write_if_changed(rej, shard_dir / f"{name}.rejects.parquet", REJECT_COLUMNS, settings,
                                    extra_meta=metadata_block())
        manifest[name] = {"rows": int(len(part)), "rejected": int(len(rej)),
                          "content_sha256": content_hash(part, specs)}
    for stale in shard_dir.glob("s*.parquet"):
        if stale.name.split(".")[0] not in manifest:
            stale.unlink()
            log.info("removed stale shard file %s", stale)
    log.info("%d shard(s); %d file(s) rewritten, the others unchanged", len(names), written)
    return manifest
