# Select: white-dwarf candidates by structured cuts, per shard.


rule select:
    input:
        table=ingest_shard,
    output:
        table=f"{R}/select/{{shard}}.parquet",
        rejects=f"{R}/select/{{shard}}.rejects.parquet",
    log:
        f"{R}/logs/select/{{shard}}.log",
    benchmark:
        f"{R}/benchmarks/select/{{shard}}.tsv",
    params:
        settings=settings("select"),
    threads: 1
    script:
        "../scripts/select.py"
