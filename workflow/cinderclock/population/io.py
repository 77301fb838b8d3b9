"""Small atomic writers for the population steps' JSON and HTML outputs."""

from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np


def _plain(obj):
    if isinstance(obj, np.generic):
        return obj.item()
    if isinstance(obj, np.ndarray):
        return obj.tolist()
    raise TypeError(f"not JSON-serialisable: {type(obj).__name__}")


def write_text(text, path):
    """Write ``text`` to ``path`` atomically (temporary file, then rename)."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    tmp = path.with_name(f".{path.name}.partial-{os.getpid()}")
    try:
        tmp.write_text(text)
        os.replace(tmp, path)
    finally:
        if tmp.exists():
            tmp.unlink()


def _clean(obj):
    """Copy of ``obj`` with numpy values made plain and non-finite floats made None (JSON null)."""
    if isinstance(obj, dict):
        return {str(k): _clean(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_clean(v) for v in obj]
    if isinstance(obj, (np.generic, np.ndarray)):
        return _clean(_plain(obj))
    if isinstance(obj, float) and not np.isfinite(obj):
        return None
    return obj


def write_json(obj, path):
    """Write ``obj`` as indented JSON (NaN and infinities written as null) atomically."""
    text = json.dumps(_clean(obj), indent=1, sort_keys=True, allow_nan=False)
    write_text(text + "\n", path)
