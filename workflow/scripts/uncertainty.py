"""Rule script: Monte Carlo uncertainties on one shard (see cinderclock.stages.uncertainty)."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.models import load_cooling, load_mass_radius
    from cinderclock.stages.uncertainty import STAGE, column_specs, uncertainty
    from cinderclock.tableio import read_table

    table, specs, meta = read_table(smk.input.table)
    mr_table, _, _ = read_table(smk.input.mass_radius)
    cool_table, _, _ = read_table(smk.input.cooling)
    out = uncertainty(table, smk.params.settings, load_mass_radius(mr_table), load_cooling(cool_table))
    prov = stage_provenance(STAGE, smk.params.settings, [smk.input.table], upstream=[meta["provenance"]])
    write_stage(out, smk.output.table, specs | {c: s for c, s in column_specs().items() if c in out}, prov, STAGE)


run(snakemake, body)  # noqa: F821
