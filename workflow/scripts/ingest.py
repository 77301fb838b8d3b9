"""Rule script: ingest the catalogue into shards (see cinderclock.stages.ingest)."""
import json

from cinderclock.runner import log, run


def body(smk):
    from cinderclock.provenance import file_checksum
    from cinderclock.sharding import write_shards
    from cinderclock.stages.ingest import load_and_ingest, shard_labels, shard_rejects

    settings = smk.params.settings
    table, rejects, specs = load_and_ingest(settings)
    log.info("read %d rows: %d accepted, %d rejected", len(table) + len(rejects), len(table), len(rejects))
    shards = write_shards(table, rejects, specs, shard_labels(table, settings), shard_rejects(rejects, settings),
                          smk.params.shard_dir, settings)
    manifest = {"catalogue": settings["catalogue"]["path"],
                "catalogue_sha256": file_checksum(smk.input.catalogue),
                "rows_read": int(len(table) + len(rejects)),
                "shards": shards}
    with open(smk.output.manifest, "w") as fh:
        json.dump(manifest, fh, indent=1, sort_keys=True)


run(snakemake, body)  # noqa: F821 (snakemake is injected by the script directive)
