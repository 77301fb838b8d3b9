"""Rule script: ingest the catalogue into shards (see cinderclock.stages.ingest and cinderclock.sharding)."""
import json

from cinderclock.runner import run


def body(smk):
    from cinderclock.provenance import file_checksum
    from cinderclock.sharding import ingest_to_shards

    settings = smk.params.settings
    shards, rows_read = ingest_to_shards(settings, smk.params.shard_dir, smk.output.rejects,
                                         batch_rows=smk.params.batch_rows)
    manifest = {"catalogue": settings["catalogue"]["path"],
                "catalogue_sha256": file_checksum(smk.input.catalogue),
                "rows_read": int(rows_read),
                "shards": shards}
    with open(smk.output.manifest, "w") as fh:
        json.dump(manifest, fh, indent=1, sort_keys=True)


run(snakemake, body)  # noqa: F821
