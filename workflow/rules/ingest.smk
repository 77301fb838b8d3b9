# Ingest: read the catalogue in batches, map and convert columns, vet rows, cut into shards.
# Shards are rewritten only when their content changes, so later stages rerun only for them.
# The catalogue may be one file or a split release (folder, pattern or list): every part is an input.


checkpoint ingest:
    input:
        catalogue=catalogue_parts(),
    output:
        manifest=f"{R}/ingest/manifest.json",
        rejects=f"{R}/ingest/rejects.parquet",
    log:
        f"{R}/logs/ingest/manifest.log",
    benchmark:
        f"{R}/benchmarks/ingest.tsv",
    params:
        settings=settings("ingest"),
        shard_dir=f"{R}/ingest/shards",
        batch_rows=262144,
    threads: 1
    script:
        "../scripts/ingest.py"
