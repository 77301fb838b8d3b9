"""cinderclock: white-dwarf candidates from survey catalogues to physical parameters and ages.

The package is the science behind the Snakemake workflow at the repository root. Every module is
importable on its own; :mod:`cinderclock.api` runs the whole per-star chain on an in-memory table.

Imports are kept lazy (nothing heavy at package import) because the workflow pays the start-up
cost once per shard and stage.
"""

__version__ = "0.1.0"

#: Version of the layout of every table cinderclock writes (columns, metadata keys). Bump it when a
#: column is renamed or removed or a metadata key changes meaning.
SCHEMA_VERSION = "1.0"
