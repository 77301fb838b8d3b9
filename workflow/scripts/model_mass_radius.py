"""Rule script: build the mass-radius table."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_mass_radius_table

    table, specs, models = build_mass_radius_table(smk.params.settings)
    prov = stage_provenance("mass_radius_model", smk.params.settings, inputs=(), models=models)
    write_stage(table, smk.output[0], specs, prov, "mass_radius_model")


run(snakemake, body)  # noqa: F821
