"""Rule script: build the cooling-model table."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_cooling_table

    table, specs, models = build_cooling_table(smk.params.settings)
    prov = stage_provenance("cooling_model", smk.params.settings, inputs=(), models=models)
    write_stage(table, smk.output[0], specs, prov, "cooling_model")


run(snakemake, body)  # noqa: F821
