"""Provenance blocks: what produced a table, from which inputs, with which settings and models.

A block is plain JSON::

    {"package": "cinderclock", "package_version": "0.1.0",
     "config_hash": "<sha256 of all stage settings seen so far>",
     "stages": {"select": {"settings": {...}, "settings_hash": "...",
                           "inputs": {"<file name>": "<sha256>"},
                           "models": [{"name": ..., "reference": ...}]}, ...}}

Each stage copies the ``stages`` entries of its inputs and adds its own, so the final table
records the whole chain. No timestamps or host names are recorded: the same inputs and settings
give the same block.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path


def canonical_json(obj):
    """JSON text with sorted keys and no whitespace variation (the form that is hashed)."""
    return json.dumps(obj, sort_keys=True, separators=(",", ":"), default=str)


def settings_hash(settings):
    """SHA-256 (hex) of a settings mapping in canonical JSON form."""
    return hashlib.sha256(canonical_json(settings).encode()).hexdigest()


def file_checksum(path, chunk=1 << 22):
    """SHA-256 (hex) of a file's bytes, read in chunks."""
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        while block := fh.read(chunk):
            h.update(block)
    return h.hexdigest()


def merge_stages(*blocks):
    """Union of the ``stages`` entries of several provenance blocks.

    Per-shard entries of one stage differ only in their input checksums; those are merged into
    one mapping so that a table built from many shards lists every input once.
    """
    stages = {}
    for block in blocks:
        for name, entry in (block or {}).get("stages", {}).items():
            if name not in stages:
                stages[name] = json.loads(json.dumps(entry))
            else:
                stages[name].setdefault("inputs", {}).update(entry.get("inputs", {}))
    return stages


def build(stage, settings, inputs=(), models=(), upstream=(), checksum_inputs=True):
    """Make the provenance block of a stage's output.

    Parameters
    ----------
    stage : str
        Stage name.
    settings : dict
        The stage's settings exactly as the workflow passed them.
    inputs : iterable of path
        Files read; their SHA-256 is recorded.
    models : iterable of dict
        Model choices, each with at least ``name`` and ``reference``.
    upstream : iterable of dict
        Provenance blocks of the input tables.
    checksum_inputs : bool
        Record input checksums (on by default).
    """
    from . import __version__

    stages = merge_stages(*upstream)
    entry = {
        "settings": settings,
        "settings_hash": settings_hash(settings),
        "inputs": {Path(p).name: file_checksum(p) for p in inputs} if checksum_inputs else {},
        "models": list(models),
    }
    stages[stage] = entry
    return {
        "package": "cinderclock",
        "package_version": __version__,
        "config_hash": settings_hash({k: v["settings_hash"] for k, v in stages.items()}),
        "stages": stages,
    }


def references(block):
    """All model references recorded in a provenance block, de-duplicated, in stage order."""
    seen = []
    for entry in block.get("stages", {}).values():
        for model in entry.get("models", []):
            ref = model.get("reference")
            if ref and ref not in seen:
                seen.append(ref)
    return seen
