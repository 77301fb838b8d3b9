# Helpers shared by the rule files: results folder, per-stage settings, shard lists.
import json
import sys

from cinderclock.config import stage_settings

R = config["results_dir"]


wildcard_constraints:
    shard=r"(s\d{4}|p\d{6})",


def settings(stage):
    """The configuration sections a stage depends on (passed as its params)."""
    return stage_settings(config, stage)


def ingest_shard(wildcards):
    """Input function: an ingested shard (known once the ingest checkpoint has run)."""
    checkpoints.ingest.get()
    return f"{R}/ingest/shards/{wildcards.shard}.parquet"


def shard_names():
    """Names of the shards listed by the ingest manifest."""
    with open(checkpoints.ingest.get().output.manifest) as fh:
        return sorted(json.load(fh)["shards"])


def per_shard(*patterns):
    """Input function for the merge: each pattern formatted for every shard."""

    def files(wildcards):
        return [p.format(R=R, shard=s) for p in patterns for s in shard_names()]

    return files


def catalogue_parts():
    """The catalogue's files (one file, a folder, a pattern or a list); one line and stop if there are none."""
    from cinderclock.catalogue import resolve_parts
    from cinderclock.errors import CinderclockError

    try:
        return resolve_parts(config["catalogue"]["path"])
    except CinderclockError as exc:
        sys.stderr.write(f"cinderclock: {exc}\n")
        raise SystemExit(1) from None
