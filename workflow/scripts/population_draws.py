"""Rule script: per-star Monte Carlo draws for collaborators, thinned and size-bounded, with their data
dictionary (see cinderclock.population.draws)."""
from pathlib import Path

from cinderclock.runner import log, run, stage_provenance


def body(smk):
    import pyarrow.parquet as pq

    from cinderclock.datadict import data_dictionary
    from cinderclock.population.draws import DRAW_COLUMNS, effective_thin, shard_draws
    from cinderclock.population.io import write_json, write_text
    from cinderclock.stages.models import load_cooling, load_mass_radius
    from cinderclock.tableio import StreamingTableWriter, read_metadata, read_table

    settings, opts = smk.params.settings, smk.params.draws
    paths = list(smk.input.tables)
    n_stars = sum(pq.ParquetFile(p).metadata.num_rows for p in paths)
    k = int(settings["uncertainty"]["draws"])
    thin = effective_thin(n_stars, max(k, 1), opts["thin"], opts["max_rows"])
    if thin != int(opts["thin"]):
        log.warning("thinning raised from %d to %d to keep %d stars within max_rows = %d", opts["thin"], thin,
                    n_stars, opts["max_rows"])
    mr_table, _, _ = read_table(smk.input.mass_radius)
    cool_table, _, _ = read_table(smk.input.cooling)
    mass_radius, cooling = load_mass_radius(mr_table), load_cooling(cool_table)
    prov = stage_provenance("posterior_draws", {**settings, "posterior_draws": opts | {"effective_thin": thin}},
                            paths + [smk.input.mass_radius, smk.input.cooling],
                            upstream=[read_metadata(p).get("provenance", {}) for p in paths[:1]])
    rows = 0
    import pandas as pd

    with StreamingTableWriter(smk.output.draws, DRAW_COLUMNS, prov, stage="posterior_draws") as w:
        w.write(pd.DataFrame({c: pd.Series([], dtype={"draw": "int32", "star_id": "int64"}.get(c, "float64")) for c in DRAW_COLUMNS}))
        for p in paths:
            table, _, _ = read_table(p)
            for frame in shard_draws(table, mass_radius, cooling, settings, thin):
                rows += len(frame)
                w.write(frame)
    write_text(data_dictionary(smk.output.draws, "Data dictionary: posterior_draws.parquet"), smk.output.dictionary)
    write_json({"stars": n_stars, "draws_per_star": k, "thin": thin, "rows": rows,
                "path": str(Path(smk.output.draws))}, smk.output.summary)
    if k <= 0:
        log.warning("uncertainty.draws is 0: the posterior-draws table is empty")
    log.info("wrote %d draws of %d stars (every %d-th draw) to %s", rows, n_stars, thin, smk.output.draws)


run(snakemake, body)  # noqa: F821
