"""Rule script: distance, Teff and luminosity on one shard (see cinderclock.stages.luminosity)."""
from cinderclock.runner import run, stage_provenance, write_rejects, write_stage


def body(smk):
    from cinderclock.stages.luminosity import STAGE, column_specs, luminosity, luminosity_models
    from cinderclock.stages.models import load_photometry
    from cinderclock.tableio import read_table

    table, specs, meta = read_table(smk.input.table)
    model_table, _, model_meta = read_table(smk.input.photometry)
    settings = smk.params.settings
    grid = load_photometry(model_table)
    out, rejects = luminosity(table, settings, grid)
    models = luminosity_models(settings, grid.metadata, out)
    prov = stage_provenance(STAGE, settings, [smk.input.table, smk.input.photometry], models=models,
                            upstream=[meta["provenance"], model_meta["provenance"]])
    write_stage(out, smk.output.table, specs | column_specs(settings["bands"]), prov, STAGE)
    write_rejects(rejects, smk.output.rejects, prov, STAGE)


run(snakemake, body)  # noqa: F821
