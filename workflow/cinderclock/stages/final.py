"""Final: one per-star table and one rejects table for the whole catalogue, and the stage counts.

Row conservation is checked here: rows read = rows in the final table + rows rejected. A
mismatch is a bug, and the stage stops rather than hand over an incomplete table.
"""

from __future__ import annotations

import json
from collections import Counter

from ..errors import CinderclockError
from ..provenance import merge_stages, settings_hash
from ..reasons import REJECT_COLUMNS, metadata_block
from ..tableio import StreamingTableWriter, read_metadata, read_table, write_json, write_table

STAGE = "final"
#: Stage order of the chain, for the counts.
STAGE_ORDER = ("ingest", "select", "luminosity", "mass", "cooling", "uncertainty")


def _provenance(blocks, extra):
    from .. import __version__

    stages = merge_stages(*blocks)
    return {"package": "cinderclock", "package_version": __version__,
            "config_hash": settings_hash({k: v["settings_hash"] for k, v in stages.items()}),
            "stages": stages, **extra}


def _ids_are_integers(table_paths, reject_paths):
    """Whether the run's identifiers are integers: the type of the first non-empty table that has them."""
    import pyarrow as pa
    import pyarrow.parquet as pq

    from ..columns import ID

    for p in list(table_paths) + list(reject_paths):
        pf = pq.ParquetFile(p)
        if pf.metadata.num_rows:
            return pa.types.is_integer(pf.schema_arrow.field(ID).type)
    return False


def merge(table_paths, reject_paths, manifest_path, out_table, out_rejects, out_counts):
    """Merge shard tables and rejects; write the final tables and the counts (JSON)."""
    with open(manifest_path) as fh:
        manifest = json.load(fh)
    extra = {"catalogue": manifest["catalogue"], "catalogue_sha256": manifest["catalogue_sha256"]}

    metas = [read_metadata(p) for p in table_paths]
    specs = {}
    for m in metas:
        for name, spec in m.get("columns", {}).items():
            specs.setdefault(name, spec)
    from ..tableio import column_specs_from_json

    specs = column_specs_from_json(specs)
    prov = _provenance([m.get("provenance", {}) for m in metas], extra) | metadata_block()
    from ..sharding import harmonise_ids

    ids_int = _ids_are_integers(table_paths, reject_paths)      # one star_id type in results and rejects
    n_final = 0
    if table_paths:
        with StreamingTableWriter(out_table, specs, prov, stage=STAGE) as w:
            for p in table_paths:
                df, _, _ = read_table(p)
                n_final += len(df)
                w.write(df)
    else:                                    # every row was rejected: an empty table with the key columns
        import pandas as pd

        from ..columns import BASE_COLUMNS, ID, INPUT_QUANTITIES

        specs = {ID: INPUT_QUANTITIES["star_id"].spec, **BASE_COLUMNS}
        empty = pd.DataFrame({c: pd.Series([], dtype="int64") for c in specs})
        empty[ID] = pd.Series([], dtype="int64" if ids_int else object)
        write_table(empty, out_table, specs, prov, stage=STAGE)

    reasons = Counter()
    by_stage = Counter()
    n_rej = 0
    rmetas = [read_metadata(p) for p in reject_paths]
    rprov = _provenance([m.get("provenance", {}) for m in rmetas], extra) | metadata_block()
    with StreamingTableWriter(out_rejects, REJECT_COLUMNS, rprov, stage=STAGE) as w:
        for p in reject_paths:
            df, _, _ = read_table(p)
            df = harmonise_ids([df], ids_int)[0]
            n_rej += len(df)
            reasons.update(zip(df["stage"], df["reason"]))
            by_stage.update(df["stage"])
            w.write(df)

    rows_read = manifest["rows_read"]
    if rows_read != n_final + n_rej:
        raise CinderclockError(f"row conservation failed: {rows_read} rows read, {n_final} in the results and "
                               f"{n_rej} rejected")
    kept, remaining = {}, rows_read
    for stage in STAGE_ORDER:
        remaining -= by_stage.get(stage, 0)
        kept[stage] = remaining
    counts = {
        "rows_read": rows_read,
        "rows_in_results": n_final,
        "rows_rejected": n_rej,
        "kept_after_stage": kept,
        "rejected_by_stage": dict(sorted(by_stage.items())),
        "rejected_by_reason": {f"{s}/{r}": n for (s, r), n in sorted(reasons.items())},
        "shards": len(manifest["shards"]),
    }
    write_json(counts, out_counts)
    return counts
