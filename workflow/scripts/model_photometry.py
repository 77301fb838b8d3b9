"""Rule script: build the synthetic-photometry table of the configured bands."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_photometry_table

    table, specs, models = build_photometry_table(smk.params.settings)
    prov = stage_provenance("photometry_model", smk.params.settings, inputs=(), models=models)
    write_stage(table, smk.output[0], specs, prov, "photometry_model")


run(snakemake, body)  # noqa: F821
