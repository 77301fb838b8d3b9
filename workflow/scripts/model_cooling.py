"""Rule script: build a cooling table (the adopted model, or the comparison model)."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import build_cooling_table

    user = smk.input.get("user_tracks") if hasattr(smk.input, "get") else None
    envelope = smk.input.get("envelope") if hasattr(smk.input, "get") else None
    table, specs, models = build_cooling_table(smk.params.settings, which=smk.wildcards.which,
                                               user_tracks_path=user, envelope_path=envelope)
    inputs = [p for p in (user, envelope) if p]
    prov = stage_provenance("cooling_model", smk.params.settings, inputs=inputs, models=models)
    write_stage(table, smk.output[0], specs, prov, "cooling_model")


run(snakemake, body)  # noqa: F821
