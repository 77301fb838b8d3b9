# Cooling: cooling age from mass and luminosity, per shard.


rule cooling:
    input:
        table=f"{R}/mass/{{shard}}.parquet",
        cooling=f"{R}/models/cooling.parquet",
    output:
        table=f"{R}/cooling/{{shard}}.parquet",
    log:
        f"{R}/logs/cooling/{{shard}}.log",
    params:
        settings=settings("cooling"),
    threads: 1
    script:
        "../scripts/cooling.py"
