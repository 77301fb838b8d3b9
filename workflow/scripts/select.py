"""Rule script: candidate selection on one shard (see cinderclock.stages.select)."""
from cinderclock.runner import run, stage_provenance, write_rejects, write_stage


def body(smk):
    from cinderclock.stages.select import STAGE, ZERO_POINT_COLUMN, select
    from cinderclock.tableio import read_table

    table, specs, meta = read_table(smk.input.table)
    kept, rejects = select(table, smk.params.settings)
    prov = stage_provenance(STAGE, smk.params.settings, [smk.input.table], upstream=[meta["provenance"]])
    write_stage(kept, smk.output.table, {**specs, **ZERO_POINT_COLUMN}, prov, STAGE)
    write_rejects(rejects, smk.output.rejects, prov, STAGE)


run(snakemake, body)  # noqa: F821
