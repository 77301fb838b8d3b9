"""Rule script: cooling and total ages on one shard (see cinderclock.stages.cooling)."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.cooling import COLUMNS, STAGE, cooling, progenitor_models
    from cinderclock.stages.models import load_cooling
    from cinderclock.tableio import read_table

    table, specs, meta = read_table(smk.input.table)
    model_table, _, model_meta = read_table(smk.input.cooling)
    inputs, upstream = [smk.input.table, smk.input.cooling], [meta["provenance"], model_meta["provenance"]]
    compare = None
    if "compare" in smk.input.keys():
        cmp_table, _, cmp_meta = read_table(smk.input.compare)
        compare = load_cooling(cmp_table)
        inputs.append(smk.input.compare)
        upstream.append({"stages": {"cooling_model_compare": cmp_meta["provenance"]["stages"]["cooling_model"]}})
    out = cooling(table, smk.params.settings, load_cooling(model_table), compare)
    prov = stage_provenance(STAGE, smk.params.settings, inputs, models=progenitor_models(smk.params.settings),
                            upstream=upstream)
    specs = specs | {c: s for c, s in COLUMNS.items() if c in out.columns}
    write_stage(out, smk.output.table, specs, prov, STAGE)


run(snakemake, body)  # noqa: F821
