# Population results: luminosity function (1/Vmax), population age (forward model and maximum
# likelihood), figures and the run summary of the report. Whole-table steps after the final merge.

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
