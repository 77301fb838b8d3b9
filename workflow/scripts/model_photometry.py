"""Rule script: build the synthetic-photometry table of the configured bands."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_photometry_table

    user = smk.input.get("user_table") if hasattr(smk.input, "get") else None
    table, specs, models = build_photometry_table(smk.params.settings, user_table_path=user)
    prov = stage_provenance("photometry_model", smk.params.settings, inputs=[user] if user else (), models=models)
    write_stage(table, smk.output[0], specs, prov, "photometry_model")


run(snakemake, body)  # noqa: F821
