"""Internal checks of the workflow profiles (workflow/profiles/{slurm,local}/config.yaml).

These are consistency checks of our own configuration files, not science: the profiles must parse,
name only rules that exist (Snakemake silently ignores resources set for an unknown rule, so a
renamed rule would quietly lose its resources), agree with each other, and be accepted by
Snakemake itself, which must then apply the per-rule resources.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
import yaml

ROOT = Path(__file__).resolve().parents[1]
PROFILES = {name: ROOT / "workflow" / "profiles" / name / "config.yaml" for name in ("slurm", "local")}
RESOURCE_KEYS = {"mem_mb", "runtime"}      # what the profiles promise for every rule


def load_profile(name):
    with open(PROFILES[name]) as fh:
        return yaml.safe_load(fh)


def workflow_rules():
    """Rule and checkpoint names declared in workflow/rules/*.smk."""
    names = set()
    for path in sorted((ROOT / "workflow" / "rules").glob("*.smk")):
        names |= set(re.findall(r"^(?:rule|checkpoint)\s+(\w+)\s*:", path.read_text(), re.M))
    return names


def test_rule_files_declare_rules():
    # internal check: the parser below finds the stages (guards against a test that cannot fail)
    assert {"ingest", "final"} <= workflow_rules()


@pytest.mark.parametrize("name", sorted(PROFILES))
def test_profile_names_only_existing_rules(name):
    # internal check: every rule named in set-resources / set-threads exists in workflow/rules/
    profile = load_profile(name)
    rules = workflow_rules()
    for key in ("set-resources", "set-threads"):
        unknown = set(profile[key]) - rules
        assert not unknown, f"{PROFILES[name]}: {key} names unknown rules {sorted(unknown)}"


@pytest.mark.parametrize("name", sorted(PROFILES))
def test_profile_resources_are_complete_and_positive(name):
    # internal check: defaults cover rules added later; each named rule has memory and time limits
    profile = load_profile(name)
    assert RESOURCE_KEYS <= set(profile["default-resources"])
    for rule, res in profile["set-resources"].items():
        assert RESOURCE_KEYS <= set(res), f"{rule}: missing {RESOURCE_KEYS - set(res)}"
        for key in RESOURCE_KEYS:
            assert isinstance(res[key], int) and res[key] > 0, (rule, key, res[key])
    for rule, threads in profile["set-threads"].items():
        assert isinstance(threads, int) and threads >= 1, (rule, threads)
    assert set(profile["set-threads"]) == set(profile["set-resources"])


def test_local_profile_matches_slurm_profile():
    # internal check: the local profile is the SLURM one run on one machine (same resources)
    slurm, local = load_profile("slurm"), load_profile("local")
    assert slurm["executor"] == "slurm" and local["executor"] == "local"
    for key in ("default-resources", "set-resources", "set-threads"):
        slurm_part = {k: v for k, v in slurm[key].items() if not k.startswith("slurm_")}
        assert slurm_part == local[key], key


def test_local_memory_pool_fits_every_job():
    # internal check: locally a job whose mem_mb exceeds the pool (resources: mem_mb) never starts
    local = load_profile("local")
    largest = max([local["default-resources"]["mem_mb"]]
                  + [res["mem_mb"] for res in local["set-resources"].values()])
    assert local["resources"]["mem_mb"] >= largest


@pytest.fixture(scope="module")
def workdir(tmp_path_factory):
    """A working folder with the default configuration and the sample catalogue."""
    wd = tmp_path_factory.mktemp("profile")
    shutil.copytree(ROOT / "config", wd / "config")
    (wd / "sample_catalog").symlink_to(ROOT / "sample_catalog")
    return wd


@pytest.mark.parametrize("name", sorted(PROFILES))
def test_snakemake_applies_profile(name, workdir):
    # internal check: Snakemake accepts every key of the profile and applies the per-rule resources
    if name == "slurm":
        pytest.importorskip("snakemake_executor_plugin_slurm")
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(workdir),
           "--workflow-profile", str(PROFILES[name].parent), "--dry-run"]
    out = subprocess.run(cmd, capture_output=True, text=True, timeout=300)
    text = out.stdout + out.stderr
    assert out.returncode == 0, text[-3000:]
    # Before the ingest checkpoint has run the plan holds ingest and the final merge.
    expected = load_profile(name)["set-resources"]
    for rule in ("ingest", "final"):
        block = re.search(rf"^(?:local)?(?:rule|checkpoint) {rule}:\n(.*?)(?:\n\n|\Z)", text, re.M | re.S)
        assert block, f"{rule} not in the dry run:\n{text[-2000:]}"
        for key in RESOURCE_KEYS:
            assert re.search(rf"\b{key}={expected[rule][key]}\b", block.group(1)), (rule, key, block.group(1))
