# Luminosity: distance, Teff and bolometric luminosity, per shard.


rule luminosity:
    input:
        table=f"{R}/select/{{shard}}.parquet",
        photometry=f"{R}/models/photometry.parquet",
    output:
        table=f"{R}/luminosity/{{shard}}.parquet",
        rejects=f"{R}/luminosity/{{shard}}.rejects.parquet",
    log:
        f"{R}/logs/luminosity/{{shard}}.log",
    benchmark:
        f"{R}/benchmarks/luminosity/{{shard}}.tsv",
    params:
        settings=settings("luminosity"),
    threads: 1
    script:
        "../scripts/luminosity.py"
