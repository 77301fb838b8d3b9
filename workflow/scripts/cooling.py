"""Rule script: cooling ages on one shard (see cinderclock.stages.cooling)."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.cooling import COLUMNS, STAGE, cooling
    from cinderclock.stages.models import CoolingModel
    from cinderclock.tableio import read_table

    table, specs, meta = read_table(smk.input.table)
    model_table, _, model_meta = read_table(smk.input.cooling)
    out = cooling(table, smk.params.settings, CoolingModel(model_table))
    prov = stage_provenance(STAGE, smk.params.settings, [smk.input.table, smk.input.cooling],
                            upstream=[meta["provenance"], model_meta["provenance"]])
    write_stage(out, smk.output.table, specs | COLUMNS, prov, STAGE)


run(snakemake, body)  # noqa: F821
