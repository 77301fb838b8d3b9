"""Rule script: ingest the catalogue into shards (see cinderclock.stages.ingest and cinderclock.sharding)."""
from cinderclock.runner import run


def body(smk):
    import hashlib
    from pathlib import Path

    from cinderclock.provenance import file_checksum
    from cinderclock.sharding import ingest_to_shards
    from cinderclock.tableio import write_json

    settings = smk.params.settings
    parts = []
    shards, rows_read = ingest_to_shards(settings, smk.params.shard_dir, smk.output.rejects,
                                         batch_rows=smk.params.batch_rows, parts_out=parts)
    sums = {str(p): file_checksum(p) for p in smk.input.catalogue}
    for p in parts:
        p["sha256"] = sums.get(str(p["file"])) or file_checksum(p["file"])
        p["file"] = str(p["file"])
    # one file: its checksum; a split release: the checksum of the parts' checksums, in order
    digest = parts[0]["sha256"] if len(parts) == 1 else \
        hashlib.sha256("".join(p["sha256"] for p in parts).encode()).hexdigest()
    manifest = {"catalogue": settings["catalogue"]["path"],
                "catalogue_sha256": digest,
                "parts": [dict(p, file=Path(p["file"]).name) for p in parts],
                "rows_read": int(rows_read),
                "shards": shards}
    write_json(manifest, smk.output.manifest)


run(snakemake, body)  # noqa: F821
