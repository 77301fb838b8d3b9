"""Rule script: integrate the envelope on a (mass, Teff) grid (shared by the mass and cooling models)."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_envelope_table

    table, specs, models = build_envelope_table(smk.params.settings)
    prov = stage_provenance("envelope_model", smk.params.settings, inputs=(), models=models)
    write_stage(table, smk.output[0], specs, prov, "envelope_model")


run(snakemake, body)  # noqa: F821
