"""Rule script: figures of the run, PNG and PDF (see cinderclock.population.figures)."""
from pathlib import Path

from cinderclock.runner import log, run


def body(smk):
    import json

    from cinderclock.population import figures
    from cinderclock.population.cooling_link import cooling_from_table
    from cinderclock.tableio import read_table

    settings = smk.params.settings
    table, _, _ = read_table(smk.input.table)
    lf, _, _ = read_table(smk.input.lf)
    model, _, _ = read_table(smk.input.model)
    profile, _, _ = read_table(smk.input.profile)
    phot, _, _ = read_table(smk.input.photometry)
    mr, _, _ = read_table(smk.input.mass_radius)
    cool_df, _, cool_meta = read_table(smk.input.cooling)
    fit = json.loads(Path(smk.input.fit).read_text())
    link = cooling_from_table(cool_df, cool_meta, smk.input.cooling)

    cmd = settings["population"]["figures"]["cmd"] or (settings.get("select") or {}).get("wd_region")
    keys = list(settings["bands"])
    colour, band = (cmd["colour"], cmd["magnitude"]) if cmd else (keys[:2], keys[0])
    tracks = figures.cmd_tracks(mr, phot, colour, band, settings["population"]["figures"]["track_masses_msun"],
                                age_yr=link.age_yr)
    stem = lambda p: Path(p).with_suffix("")  # noqa: E731
    figures.colour_magnitude(table, tracks, colour, band, stem(smk.output.cmd))
    figures.mass_distribution(table, stem(smk.output.mass))
    interval = fit["interval68_gyr"] if None not in fit["interval68_gyr"] else fit["likelihood_interval_gyr"]
    band68 = (fit["age_gyr"], *interval) if fit["age_gyr"] is not None and None not in interval else None
    figures.age_distributions(table, stem(smk.output.ages), population_age=band68)
    err = "phi_err_bootstrap" if settings["population"]["lf_errors"] == "bootstrap" else "phi_err_poisson"
    lf_summary = json.loads(Path(smk.input.lf_summary).read_text())
    vv = lf_summary["v_over_vmax"]
    note = None
    if vv.get("mean") is not None:
        note = (f"<V/V$_{{max}}$> = {vv['mean']:.3f} (expected 0.500 $\\pm$ {vv['sigma']:.3f})\n"
                f"{err.replace('phi_err_', '')} errors; lower bars capped at {figures.LOWER_BAR_DEX:g} dex")
    figures.luminosity_function(lf, stem(smk.output.lf), model=model, fit=fit, error_column=err, note=note)
    figures.age_fit(fit, profile, stem(smk.output.fit))
    log.info("wrote %d figures (PNG and PDF)", 5)


run(snakemake, body)  # noqa: F821
