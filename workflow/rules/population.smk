# Population results: luminosity function (1/Vmax), population age (forward model and maximum
# likelihood), figures and the run summary of the report. Whole-table steps after the final merge.

POP = f"{R}/population"
FIG = f"{R}/figures"


rule luminosity_function:
    input:
        table=f"{R}/final/white_dwarfs.parquet",
    output:
        stars=f"{POP}/vmax.parquet",
        lf=f"{POP}/luminosity_function.parquet",
        summary=f"{POP}/luminosity_function.json",
    log:
        f"{R}/logs/population/luminosity_function.log",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_lf.py"


rule population_age:
    input:
        stars=f"{POP}/vmax.parquet",
        cooling=f"{R}/models/cooling.parquet",
    output:
        fit=f"{POP}/age_fit.json",
        model=f"{POP}/model_lf.parquet",
        profile=f"{POP}/age_profile.parquet",
    log:
        f"{R}/logs/population/population_age.log",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_age.py"


rule figures:
    input:
        table=f"{R}/final/white_dwarfs.parquet",
        lf=f"{POP}/luminosity_function.parquet",
        lf_summary=f"{POP}/luminosity_function.json",
        fit=f"{POP}/age_fit.json",
        model=f"{POP}/model_lf.parquet",
        profile=f"{POP}/age_profile.parquet",
        photometry=f"{R}/models/photometry.parquet",
        mass_radius=f"{R}/models/mass_radius.parquet",
        cooling=f"{R}/models/cooling.parquet",
    output:
        cmd=report(f"{FIG}/colour_magnitude.png", caption="../report/colour_magnitude.rst", category="Figures"),
        mass=report(f"{FIG}/mass_distribution.png", caption="../report/mass_distribution.rst", category="Figures"),
        ages=report(f"{FIG}/age_distributions.png", caption="../report/age_distributions.rst", category="Figures"),
        lf=report(f"{FIG}/luminosity_function.png", caption="../report/luminosity_function.rst", category="Figures"),
        fit=report(f"{FIG}/age_fit.png", caption="../report/age_fit.rst", category="Figures"),
        cmd_pdf=f"{FIG}/colour_magnitude.pdf",
        mass_pdf=f"{FIG}/mass_distribution.pdf",
        ages_pdf=f"{FIG}/age_distributions.pdf",
        lf_pdf=f"{FIG}/luminosity_function.pdf",
        fit_pdf=f"{FIG}/age_fit.pdf",
    log:
        f"{R}/logs/population/figures.log",
    params:
        settings=settings("population"),
    threads: 1
    script:
        "../scripts/population_figures.py"


rule run_summary:
    input:
        counts=f"{R}/final/stage_counts.json",
        table=f"{R}/final/white_dwarfs.parquet",
        lf=f"{POP}/luminosity_function.json",
        fit=f"{POP}/age_fit.json",
    output:
        report(f"{R}/report/run_summary.html", caption="../report/run_summary.rst", category="Run summary"),
    log:
        f"{R}/logs/population/run_summary.log",
    params:
        config=config,
    threads: 1
    script:
        "../scripts/population_summary.py"
