# Mass: mass and radius from log g or the photometric radius, per shard.


rule mass:
    input:
        table=f"{R}/luminosity/{{shard}}.parquet",
        mass_radius=f"{R}/models/mass_radius.parquet",
    output:
        table=f"{R}/mass/{{shard}}.parquet",
    log:
        f"{R}/logs/mass/{{shard}}.log",
    benchmark:
        f"{R}/benchmarks/mass/{{shard}}.tsv",
    params:
        settings=settings("mass"),
    threads: 1
    script:
        "../scripts/mass.py"
