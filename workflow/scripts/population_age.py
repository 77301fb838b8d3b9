"""Rule script: population age from the faint end of the luminosity function (see cinderclock.population)."""
from cinderclock.runner import log, run, stage_provenance, write_stage


def body(smk):
    from cinderclock.population.cooling_link import cooling_from_table
    from cinderclock.population.io import write_json
    from cinderclock.population.stages import MODEL_COLUMNS, PROFILE_COLUMNS, population_age_stage
    from cinderclock.tableio import read_table

    import json
    from pathlib import Path

    stars, _, meta = read_table(smk.input.stars)
    lf_summary = json.loads(Path(smk.input.lf_summary).read_text())
    cool_df, _, cool_meta = read_table(smk.input.cooling)
    link = cooling_from_table(cool_df, cool_meta, smk.input.cooling)
    summary, model, profile = population_age_stage(stars, link, smk.params.settings, lf_summary)
    upstream = [meta.get("provenance", {}), cool_meta.get("provenance", {})]
    prov = stage_provenance("population_age", smk.params.settings, [smk.input.stars, smk.input.cooling],
                            models=summary["models"], upstream=upstream)
    write_stage(model, smk.output.model, MODEL_COLUMNS, prov, "population_age")
    write_stage(profile, smk.output.profile, PROFILE_COLUMNS, prov, "population_age")
    write_json(summary | {"settings": smk.params.settings}, smk.output.fit)
    if summary["age_gyr"] is None:
        log.warning("%s", summary["cautions"][0])
    else:
        lo, hi = (f"{v:.3f}" if v is not None else "n/a" for v in summary["interval68_gyr"])
        g = summary["goodness_of_fit"]
        log.info("population age %.3f Gyr (68 %%: %s - %s) from %d stars; deviance %.1f / %d, p = %.3g",
                 summary["age_gyr"], lo, hi, summary["n_stars_in_fit"], g["deviance"], g["dof"], g["p_value"])
    for w in summary["warnings"]:
        log.warning("%s: %s", w["code"], w["message"])


run(snakemake, body)  # noqa: F821
