# Model tables, built once per configuration of the stage that uses them.


def user_photometry_table(wildcards):
    """The user's synthetic-photometry table, when the configuration asks for one."""
    lum = config["luminosity"]
    return {"user_table": lum["user_table"]["path"]} if lum["spectra"] == "user_table" else {}


def user_cooling_tracks(wildcards):
    """The user's cooling tracks, when either cooling model is 'user_tracks'."""
    cool = config["cooling"]
    wanted = "user_tracks" in (cool["model"], cool["compare_with"])
    return {"user_tracks": cool["user_tracks"]["path"]} if wanted else {}


rule photometry_model:
    input:
        unpack(user_photometry_table),
    output:
        f"{R}/models/photometry.parquet",
    log:
        f"{R}/logs/models/photometry.log",
    benchmark:
        f"{R}/benchmarks/models/photometry.tsv",
    params:
        settings=settings("photometry_model"),
    threads: 1
    script:
        "../scripts/model_photometry.py"


def envelope_table(wildcards):
    """The integrated envelope table, for the mass-radius relation and the numerical cooling model."""
    return {"envelope": f"{R}/models/envelope.parquet"}


rule envelope_model:
    output:
        f"{R}/models/envelope.parquet",
    log:
        f"{R}/logs/models/envelope.log",
    benchmark:
        f"{R}/benchmarks/models/envelope.tsv",
    params:
        settings=settings("envelope_model"),
    threads: 1
    script:
        "../scripts/model_envelope.py"


rule mass_radius_model:
    input:
        unpack(envelope_table),
    output:
        f"{R}/models/mass_radius.parquet",
    log:
        f"{R}/logs/models/mass_radius.log",
    benchmark:
        f"{R}/benchmarks/models/mass_radius.tsv",
    params:
        settings=settings("mass_radius_model"),
    threads: 1
    script:
        "../scripts/model_mass_radius.py"


rule cooling_model:
    input:
        unpack(user_cooling_tracks),
        unpack(envelope_table),
    output:
        f"{R}/models/cooling_{{which}}.parquet",
    log:
        f"{R}/logs/models/cooling_{{which}}.log",
    benchmark:
        f"{R}/benchmarks/models/cooling_{{which}}.tsv",
    params:
        settings=settings("cooling_model"),
    wildcard_constraints:
        which="primary|compare",
    threads: 1
    script:
        "../scripts/model_cooling.py"
