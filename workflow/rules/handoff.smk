# Hand-off: the final table exported to FITS and VOTable (units, UCDs, descriptions and provenance
# kept) and a Markdown data dictionary of both final tables. Nothing downstream reads these files;
# they are for collaborators (see docs/handoff.md). ECSV, a text format that is slow and large for
# big tables, is written on demand: cinderclock export <table> --format ecsv.


rule handoff:
    input:
        table=f"{R}/final/white_dwarfs.parquet",
        rejects=f"{R}/final/rejects.parquet",
    output:
        fits=f"{R}/final/white_dwarfs.fits",
        votable=f"{R}/final/white_dwarfs.vot",
        dictionary=f"{R}/final/data_dictionary.md",
    log:
        f"{R}/logs/final/handoff.log",
    benchmark:
        f"{R}/benchmarks/handoff.tsv",
    params:
        settings={},
    threads: 1
    script:
        "../scripts/handoff.py"
