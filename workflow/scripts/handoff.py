"""Rule script: exports and data dictionary of the final tables (see cinderclock.export, cinderclock.datadict)."""
from pathlib import Path

from cinderclock.runner import log, run


def body(smk):
    from cinderclock.datadict import combined_dictionary
    from cinderclock.export import export_table
    from cinderclock.tableio import atomic_write

    for fmt in ("fits", "votable"):
        out = export_table(smk.input.table, fmt, smk.output[fmt], overwrite=True)
        log.info("wrote %s", out)
    text = combined_dictionary([smk.input.table, smk.input.rejects])
    atomic_write(smk.output.dictionary, lambda tmp: Path(tmp).write_text(text))
    log.info("wrote %s", smk.output.dictionary)


run(snakemake, body)  # noqa: F821 (snakemake is injected by the script directive)
