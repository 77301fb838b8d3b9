# Population results: luminosity function (1/Vmax), population age (forward model and maximum
# likelihood), star-formation history, optional per-star posterior draws, figures and the run
# summary of the report. Whole-table steps after the final merge.

rule luminosity_function:
    input:
        table=f"{R}/final/white_dwarfs.parquet",
    output:
        stars=f"{R}/population/vmax.parquet",
        lf=f"{R}/population/luminosity_function.parquet",
        summary=f"{R}/population/luminosity_function.json",
    log:
        f"{R}/logs/population/luminosity_function.log",
    benchmark:
        f"{R}/benchmarks/population/luminosity_function.tsv",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_lf.py"


rule population_age:
    input:
        stars=f"{R}/population/vmax.parquet",
        lf_summary=f"{R}/population/luminosity_function.json",
        cooling=f"{R}/models/cooling_primary.parquet",
    output:
        fit=f"{R}/population/age_fit.json",
        model=f"{R}/population/model_lf.parquet",
        profile=f"{R}/population/age_profile.parquet",
    log:
        f"{R}/logs/population/population_age.log",
    benchmark:
        f"{R}/benchmarks/population/population_age.tsv",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_age.py"


rule star_formation_history:
    input:
        stars=f"{R}/population/vmax.parquet",
        table=f"{R}/final/white_dwarfs.parquet",
        fit=f"{R}/population/age_fit.json",
        cooling=f"{R}/models/cooling_primary.parquet",
    output:
        sfh=f"{R}/population/sfh.parquet",
        correlation=f"{R}/population/sfh_correlation.parquet",
        summary=f"{R}/population/sfh.json",
        figure=report(f"{R}/figures/star_formation_history.png", caption="../report/star_formation_history.rst", category="Figures"),
        figure_pdf=f"{R}/figures/star_formation_history.pdf",
    log:
        f"{R}/logs/population/star_formation_history.log",
    benchmark:
        f"{R}/benchmarks/population/star_formation_history.tsv",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_sfh.py"


# Per-star Monte Carlo draws for collaborators (population.posterior_draws.enabled; off by default):
# the uncertainty stage's own draws, regenerated from its per-shard inputs with the same seeds.
rule posterior_draws:
    input:
        tables=per_shard("{R}/cooling/{shard}.parquet"),
        mass_radius=f"{R}/models/mass_radius.parquet",
        cooling=f"{R}/models/cooling_primary.parquet",
    output:
        draws=f"{R}/population/posterior_draws.parquet",
        dictionary=f"{R}/population/posterior_draws.md",
        summary=f"{R}/population/posterior_draws.json",
    log:
        f"{R}/logs/population/posterior_draws.log",
    benchmark:
        f"{R}/benchmarks/population/posterior_draws.tsv",
    params:
        settings=settings("uncertainty"),
        draws=config["population"]["posterior_draws"],
    threads: 1
    script:
        "../scripts/population_draws.py"


rule figures:
    input:
        table=f"{R}/final/white_dwarfs.parquet",
        lf=f"{R}/population/luminosity_function.parquet",
        lf_summary=f"{R}/population/luminosity_function.json",
        fit=f"{R}/population/age_fit.json",
        model=f"{R}/population/model_lf.parquet",
        profile=f"{R}/population/age_profile.parquet",
        photometry=f"{R}/models/photometry.parquet",
        mass_radius=f"{R}/models/mass_radius.parquet",
        cooling=f"{R}/models/cooling_primary.parquet",
    output:
        cmd=report(f"{R}/figures/colour_magnitude.png", caption="../report/colour_magnitude.rst", category="Figures"),
        mass=report(f"{R}/figures/mass_distribution.png", caption="../report/mass_distribution.rst", category="Figures"),
        ages=report(f"{R}/figures/age_distributions.png", caption="../report/age_distributions.rst", category="Figures"),
        lf=report(f"{R}/figures/luminosity_function.png", caption="../report/luminosity_function.rst", category="Figures"),
        fit=report(f"{R}/figures/age_fit.png", caption="../report/age_fit.rst", category="Figures"),
        cmd_pdf=f"{R}/figures/colour_magnitude.pdf",
        mass_pdf=f"{R}/figures/mass_distribution.pdf",
        ages_pdf=f"{R}/figures/age_distributions.pdf",
        lf_pdf=f"{R}/figures/luminosity_function.pdf",
        fit_pdf=f"{R}/figures/age_fit.pdf",
    log:
        f"{R}/logs/population/figures.log",
    benchmark:
        f"{R}/benchmarks/population/figures.tsv",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_figures.py"


rule run_summary:
    input:
        counts=f"{R}/final/stage_counts.json",
        table=f"{R}/final/white_dwarfs.parquet",
        lf=f"{R}/population/luminosity_function.json",
        fit=f"{R}/population/age_fit.json",
        sfh=f"{R}/population/sfh.json",
        draws=[f"{R}/population/posterior_draws.json"] if config["population"]["posterior_draws"]["enabled"] else [],
    output:
        report(f"{R}/report/run_summary.html", caption="../report/run_summary.rst", category="Run summary"),
    log:
        f"{R}/logs/population/run_summary.log",
    benchmark:
        f"{R}/benchmarks/population/run_summary.tsv",
    params:
        config=config,
    threads: 1
    script:
        "../scripts/population_summary.py"
