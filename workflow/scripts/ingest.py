"""Rule script: ingest the catalogue into shards (see cinderclock.stages.ingest and cinderclock.sharding)."""
from cinderclock.runner import run


def body(smk):
    from cinderclock.provenance import file_checksum
    from cinderclock.sharding import ingest_to_shards
    from cinderclock.tableio import write_json

    settings = smk.params.settings
    shards, rows_read = ingest_to_shards(settings, smk.params.shard_dir, smk.output.rejects,
                                         batch_rows=smk.params.batch_rows)
    manifest = {"catalogue": settings["catalogue"]["path"],
                "catalogue_sha256": file_checksum(smk.input.catalogue),
                "rows_read": int(rows_read),
                "shards": shards}
    write_json(manifest, smk.output.manifest)


run(snakemake, body)  # noqa: F821
