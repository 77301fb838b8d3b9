"""Rule script: Vmax of every star and the binned luminosity function (see cinderclock.population)."""
from cinderclock.runner import log, run, stage_provenance, write_stage


def body(smk):
    from cinderclock.population.io import write_json
    from cinderclock.population.stages import LF_COLUMNS, STAR_COLUMNS, luminosity_function_stage
    from cinderclock.tableio import read_table

    table, _, meta = read_table(smk.input.table)   # all columns: which ones are needed depends on the settings
    stars, lf, summary = luminosity_function_stage(table, smk.params.settings)
    prov = stage_provenance("luminosity_function", smk.params.settings, [smk.input.table],
                            upstream=[meta.get("provenance", {})])
    write_stage(stars, smk.output.stars, STAR_COLUMNS, prov, "luminosity_function")
    write_stage(lf, smk.output.lf, LF_COLUMNS, prov, "luminosity_function")
    write_json(summary, smk.output.summary)
    if summary.get("empty"):
        log.warning("%s", summary["empty"])
        return
    v = summary["v_over_vmax"]
    log.info("%d stars used; <V/Vmax> = %.4f (0.5 +- %.4f)", v["n"], v["mean"], v["sigma"])


run(snakemake, body)  # noqa: F821
