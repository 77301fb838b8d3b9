"""Rule script: star-formation history in lookback-time bins, its table, summary and figure (see
cinderclock.population.sfh_fit)."""
import json
from pathlib import Path

from cinderclock.runner import log, run, stage_provenance, write_stage


def body(smk):
    from cinderclock.population.cooling_link import cooling_from_table
    from cinderclock.population.io import write_json
    from cinderclock.population.sfh_figure import star_formation_history
    from cinderclock.population.sfh_stage import CORRELATION_COLUMNS, SFH_COLUMNS, sfh_stage
    from cinderclock.tableio import read_table

    settings = smk.params.settings
    stars, _, meta = read_table(smk.input.stars)
    final = None
    if settings["population"]["sfh_inference"]["from_total_ages"]:
        import pyarrow.parquet as pq

        names = set(pq.ParquetFile(smk.input.table).schema_arrow.names)
        wanted = [c for c in ("total_age_gyr", "total_age_gyr_p16", "total_age_gyr_p84") if c in names]
        final, _, _ = read_table(smk.input.table, columns=wanted) if wanted else (None, None, None)
    cool_df, _, cool_meta = read_table(smk.input.cooling)
    link = cooling_from_table(cool_df, cool_meta, smk.input.cooling)
    fit = json.loads(Path(smk.input.fit).read_text())
    sfh, corr, summary = sfh_stage(stars, link, settings, age_fit=fit, final=final)
    prov = stage_provenance("star_formation_history", settings, [smk.input.stars, smk.input.fit, smk.input.cooling],
                            models=summary["models"], upstream=[meta.get("provenance", {}),
                                                                cool_meta.get("provenance", {})])
    write_stage(sfh, smk.output.sfh, SFH_COLUMNS, prov, "star_formation_history")
    write_stage(corr, smk.output.correlation, CORRELATION_COLUMNS, prov, "star_formation_history")
    write_json(summary, smk.output.summary)
    star_formation_history(sfh, summary, Path(smk.output.figure).with_suffix(""))
    if not summary["fitted"]:
        log.warning("%s", summary["not_fitted"])
    else:
        log.info("star-formation history in %d lookback bins from %d stars (%s)",
                 len(summary["lookback_edges_gyr"]) - 1, summary["stars_in_fit"], ", ".join(summary["methods"]))
    for w in summary["warnings"]:
        log.warning("%s: %s", w["code"], w["message"])


run(snakemake, body)  # noqa: F821
