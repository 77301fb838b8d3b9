"""Shared fixtures: the repository root, the default configuration, small invented catalogues."""

from __future__ import annotations

import copy
import os
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

# Workflow runs started by the tests (snakemake subprocesses) import this checkout's package, even
# where an editable install points at another copy.
os.environ["PYTHONPATH"] = os.pathsep.join([str(ROOT / "workflow")] +
                                           [p for p in os.environ.get("PYTHONPATH", "").split(os.pathsep) if p])


@pytest.fixture(scope="session")
def root():
    return ROOT


@pytest.fixture(scope="session")
def _default_config():
    from cinderclock.config import load_config

    return load_config(ROOT / "config" / "config.yaml")


@pytest.fixture
def config(_default_config):
    """A fresh copy of the validated default configuration (catalogue path made absolute)."""
    cfg = copy.deepcopy(_default_config)
    cfg["catalogue"]["path"] = str(ROOT / cfg["catalogue"]["path"])
    return cfg


@pytest.fixture(scope="session")
def small_catalogue():
    """An invented Lanternfall catalogue of 400 rows with its truth table (demo data, not a reference)."""
    from cinderclock.simulate import make_catalogue

    return make_catalogue(400, seed=7)
