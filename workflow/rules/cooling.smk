# Cooling: cooling age, progenitor and total age from mass and luminosity, per shard.


def cooling_tables(wildcards):
    """The adopted cooling table, and the comparison table when one is configured."""
    tables = {"cooling": f"{R}/models/cooling_primary.parquet"}
    if config["cooling"]["compare_with"]:
        tables["compare"] = f"{R}/models/cooling_compare.parquet"
    return tables


rule cooling:
    input:
        unpack(cooling_tables),
        table=f"{R}/mass/{{shard}}.parquet",
    output:
        table=f"{R}/cooling/{{shard}}.parquet",
    log:
        f"{R}/logs/cooling/{{shard}}.log",
    benchmark:
        f"{R}/benchmarks/cooling/{{shard}}.tsv",
    params:
        settings=settings("cooling"),
    threads: 1
    script:
        "../scripts/cooling.py"
