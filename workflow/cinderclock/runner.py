"""Glue for the workflow's rule scripts: logging, one-line errors, tables with provenance.

A rule script is a few lines::

    from cinderclock.runner import run
    def body(smk): ...
    run(snakemake, body)

:func:`run` sends log records to the rule's log file and turns any
:class:`~cinderclock.errors.CinderclockError` into one line on standard error and in the log,
with exit status 1 and no traceback.
"""

from __future__ import annotations

import logging
import sys

from .errors import CinderclockError

log = logging.getLogger("cinderclock")


def run(smk, body):
    """Run ``body(smk)`` with logging to ``smk.log[0]`` and clean error reporting."""
    handlers = [logging.StreamHandler(sys.stderr)]
    if len(smk.log):
        handlers.append(logging.FileHandler(smk.log[0], mode="w"))
    logging.basicConfig(level=logging.INFO, format="%(asctime)s %(name)s [%(rule)s] %(message)s",
                        handlers=handlers, force=True)
    old_factory = logging.getLogRecordFactory()
    rule = getattr(smk, "rule", "?")

    def factory(*args, **kwargs):
        record = old_factory(*args, **kwargs)
        record.rule = rule
        return record

    logging.setLogRecordFactory(factory)
    try:
        body(smk)
    except CinderclockError as exc:
        log.error("%s", exc)
        sys.exit(1)


def stage_provenance(stage, settings, inputs, models=(), upstream=()):
    """Provenance block of a stage output (see :func:`cinderclock.provenance.build`)."""
    from .provenance import build

    return build(stage, settings, inputs=inputs, models=models, upstream=upstream)


def write_stage(df, path, specs, provenance, stage):
    """Write a stage table atomically with its descriptions and provenance."""
    from .tableio import write_table

    write_table(df, path, specs, provenance, stage=stage)
    log.info("wrote %d rows to %s", len(df), path)


def write_rejects(df, path, provenance, stage):
    """Write a rejects table (with the reason codes in its metadata)."""
    from .reasons import REJECT_COLUMNS, metadata_block
    from .tableio import write_table

    write_table(df, path, REJECT_COLUMNS, dict(provenance, **metadata_block()), stage=stage)
    log.info("wrote %d rejected rows to %s", len(df), path)
