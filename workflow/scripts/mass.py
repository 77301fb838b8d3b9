"""Rule script: masses and radii on one shard (see cinderclock.stages.mass)."""
from cinderclock.runner import run, stage_provenance, write_stage


def body(smk):
    from cinderclock.stages.mass import COLUMNS, STAGE, mass
    from cinderclock.stages.models import load_mass_radius
    from cinderclock.tableio import read_table

    table, specs, meta = read_table(smk.input.table)
    model_table, _, model_meta = read_table(smk.input.mass_radius)
    out = mass(table, smk.params.settings, load_mass_radius(model_table))
    prov = stage_provenance(STAGE, smk.params.settings, [smk.input.table, smk.input.mass_radius],
                            upstream=[meta["provenance"], model_meta["provenance"]])
    write_stage(out, smk.output.table, specs | COLUMNS, prov, STAGE)


run(snakemake, body)  # noqa: F821
