# Final: merge the shards into one per-star table and one rejects table, with stage counts.


rule final:
    input:
        manifest=f"{R}/ingest/manifest.json",
        tables=per_shard("{R}/uncertainty/{shard}.parquet"),
        ingest_rejects=f"{R}/ingest/rejects.parquet",
        rejects=per_shard(
            "{R}/select/{shard}.rejects.parquet",
            "{R}/luminosity/{shard}.rejects.parquet",
        ),
    output:
        table=f"{R}/final/white_dwarfs.parquet",
        rejects=f"{R}/final/rejects.parquet",
        counts=f"{R}/final/stage_counts.json",
    log:
        f"{R}/logs/final/white_dwarfs.log",
    benchmark:
        f"{R}/benchmarks/final.tsv",
    params:
        settings={},
    threads: 1
    script:
        "../scripts/final.py"
