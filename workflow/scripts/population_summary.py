"""Rule script: the run summary page of the report (see cinderclock.population.summary)."""
from pathlib import Path

from cinderclock.runner import log, run


def body(smk):
    import json

    from cinderclock.population.io import write_text
    from cinderclock.population.summary import render
    from cinderclock.tableio import read_metadata

    counts = json.loads(Path(smk.input.counts).read_text())
    prov = read_metadata(smk.input.table).get("provenance", {})
    lf = json.loads(Path(smk.input.lf).read_text())
    fit = json.loads(Path(smk.input.fit).read_text())
    sfh = json.loads(Path(smk.input.sfh).read_text())
    draws = json.loads(Path(smk.input.draws[0]).read_text()) if smk.input.draws else None
    write_text(render(counts, prov, dict(smk.params.config), lf, fit, sfh, draws), smk.output[0])
    log.info("wrote %s", smk.output[0])


run(snakemake, body)  # noqa: F821
