# Uncertainty: Monte Carlo percentiles through the whole chain, per shard.


rule uncertainty:
    input:
        table=f"{R}/cooling/{{shard}}.parquet",
        mass_radius=f"{R}/models/mass_radius.parquet",
        cooling=f"{R}/models/cooling_primary.parquet",
    output:
        table=f"{R}/uncertainty/{{shard}}.parquet",
    log:
        f"{R}/logs/uncertainty/{{shard}}.log",
    benchmark:
        f"{R}/benchmarks/uncertainty/{{shard}}.tsv",
    params:
        settings=settings("uncertainty"),
    threads: 1
    script:
        "../scripts/uncertainty.py"
