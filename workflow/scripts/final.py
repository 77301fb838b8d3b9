"""Rule script: merge the shards into the final tables (see cinderclock.stages.final)."""
from cinderclock.runner import log, run


def body(smk):
    from cinderclock.stages.final import merge

    counts = merge(list(smk.input.tables), [smk.input.ingest_rejects] + list(smk.input.rejects), smk.input.manifest,
                   smk.output.table, smk.output.rejects, smk.output.counts)
    log.info("rows read %d = %d in results + %d rejected", counts["rows_read"], counts["rows_in_results"],
             counts["rows_rejected"])


run(snakemake, body)  # noqa: F821
