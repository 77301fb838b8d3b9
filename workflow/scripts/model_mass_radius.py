"""Rule script: build the mass-radius table."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_mass_radius_table

    envelope = smk.input.get("envelope") if hasattr(smk.input, "get") else None
    table, specs, models = build_mass_radius_table(smk.params.settings, envelope_path=envelope)
    prov = stage_provenance("mass_radius_model", smk.params.settings, inputs=[envelope] if envelope else (),
                            models=models)
    write_stage(table, smk.output[0], specs, prov, "mass_radius_model")


run(snakemake, body)  # noqa: F821
