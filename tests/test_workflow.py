"""End to end: the Snakemake workflow on a small invented catalogue in a temporary folder.

Checks row conservation, self-describing outputs, that a second run has nothing to do, and that
changing only the cooling settings reruns only the cooling stage and what follows.
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
from pathlib import Path

import pytest
import yaml

from cinderclock.provenance import file_checksum
from cinderclock.simulate import make_catalogue, write_csv
from cinderclock.tableio import read_metadata, read_table

ROOT = Path(__file__).resolve().parents[1]


def snakemake(workdir, *args):
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(workdir), "--cores", "2", *args]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=600)


def planned_jobs(workdir):
    """Rule -> job count of a dry run (empty when there is nothing to do)."""
    out = snakemake(workdir, "-n")
    assert out.returncode == 0, out.stderr
    text = out.stdout + out.stderr
    if "Nothing to be done" in text:
        return {}
    stats = text.split("Job stats:")[1]
    return {m.group(1): int(m.group(2)) for m in re.finditer(r"^(\w+)\s+(\d+)\s*$", stats, re.M) if m.group(1) != "total"}


@pytest.fixture(scope="module")
def run_dir(tmp_path_factory):
    wd = tmp_path_factory.mktemp("wf")
    cat, _ = make_catalogue(600, seed=11)
    write_csv(cat, wd / "catalogue.csv", malformed_lines=(5,))
    with open(ROOT / "config" / "config.yaml") as fh:
        cfg = yaml.safe_load(fh)
    cfg["catalogue"]["path"] = "catalogue.csv"
    cfg["shards"]["rows_per_shard"] = 250          # three shards
    (wd / "config").mkdir()
    with open(wd / "config" / "config.yaml", "w") as fh:
        yaml.safe_dump(cfg, fh)
    out = snakemake(wd)
    assert out.returncode == 0, out.stderr[-3000:]
    return wd


def test_rows_are_conserved(run_dir):
    table, _, _ = read_table(run_dir / "results/final/white_dwarfs.parquet")
    rejects, _, _ = read_table(run_dir / "results/final/rejects.parquet")
    counts = json.loads((run_dir / "results/final/stage_counts.json").read_text())
    n_input = 600                                   # one of them cut short by write_csv: a malformed row
    assert counts["rows_read"] == n_input
    assert len(table) + len(rejects) == n_input
    rows = set(table["input_row"]) | set(rejects["input_row"])
    assert rows == set(range(n_input)) and len(rows) == n_input   # every row exactly once
    assert counts["shards"] == 3
    assert {"malformed_row", "duplicate_id", "not_a_number"} <= set(rejects["reason"])


def test_outputs_describe_themselves(run_dir):
    path = run_dir / "results/final/white_dwarfs.parquet"
    meta = read_metadata(path)
    import pyarrow.parquet as pq

    schema = pq.read_schema(path)
    for field in schema:
        md = field.metadata or {}
        assert md.get(b"description"), field.name
        assert b"unit" in md
    assert schema.field("mass_msun").metadata[b"unit"] == b"solMass"
    prov = meta["provenance"]
    assert prov["package_version"] and len(prov["config_hash"]) == 64
    assert prov["catalogue_sha256"] == file_checksum(run_dir / "catalogue.csv")
    assert {"ingest", "select", "luminosity", "mass", "cooling"} <= set(prov["stages"])
    refs = json.dumps(prov["stages"]["cooling_model"]["models"])
    assert "Itoh" in refs and "Potekhin" in refs and "Chandrasekhar" in json.dumps(prov["stages"]["mass_radius_model"]["models"])


def test_second_run_has_nothing_to_do(run_dir):
    assert planned_jobs(run_dir) == {}


def test_envelope_change_reruns_both_models_and_everything_after_them(run_dir):
    """The envelope is shared: a new layer choice rebuilds the envelope, mass-radius and cooling tables."""
    cfg_path = run_dir / "config" / "config.yaml"
    original = cfg_path.read_text()
    cfg = yaml.safe_load(original)
    cfg["envelope"]["hydrogen_layer"] = "thin"
    cfg_path.write_text(yaml.safe_dump(cfg))
    try:
        jobs = planned_jobs(run_dir)
    finally:
        cfg_path.write_text(original)
    assert {"envelope_model": 1, "mass_radius_model": 1, "cooling_model": 1, "mass": 3, "cooling": 3}.items() \
        <= jobs.items()
    assert "photometry_model" not in jobs and "luminosity" not in jobs


def test_cooling_change_reruns_only_cooling_and_after(run_dir):
    cfg_path = run_dir / "config" / "config.yaml"
    original = cfg_path.read_text()
    cfg = yaml.safe_load(original)
    cfg["cooling"]["physics"]["ne22_mass_fraction"] = 0.02
    cfg_path.write_text(yaml.safe_dump(cfg))
    try:
        jobs = planned_jobs(run_dir)
    finally:
        cfg_path.write_text(original)
    assert jobs == {"cooling_model": 1, "cooling": 3, "uncertainty": 3, "final": 1, "handoff": 1,
                    "luminosity_function": 1, "population_age": 1, "star_formation_history": 1, "figures": 1, "run_summary": 1, "all": 1}


def test_changed_row_reruns_only_its_shard(run_dir):
    # A new catalogue in which one row of the middle shard changed: only that shard's stages rerun.
    cat_path = run_dir / "catalogue.csv"
    original = cat_path.read_text()
    lines = original.split("\n")
    fields = lines[300].split(",")
    fields[5] = "1.234"                             # proper motion of data row 299 (shard s0001)
    lines[300] = ",".join(fields)
    cat_path.write_text("\n".join(lines))
    try:
        out = snakemake(run_dir)
        assert out.returncode == 0, out.stderr[-2000:]
        ran = re.findall(r"^(?:local)?(?:rule|checkpoint) (\w+):", out.stdout + out.stderr, re.M)
        shards = re.findall(r"wildcards: shard=(s\d{4})", out.stdout + out.stderr)
        assert sorted(ran) == sorted(["ingest", "select", "luminosity", "mass", "cooling", "uncertainty", "final",
                                      "handoff", "luminosity_function", "population_age", "star_formation_history", "figures", "run_summary",
                                      "all"])
        assert set(shards) == {"s0001"}
    finally:
        cat_path.write_text(original)
        assert snakemake(run_dir).returncode == 0
