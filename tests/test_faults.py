"""Faults: a run killed mid-stage leaves nothing a later stage would accept; reruns give the same data.

* ``write_table`` and ``StreamingTableWriter`` are atomic: a writer that fails or is killed leaves
  the target absent (or as it was) and at most a temporary ``.<name>.partial-<pid>`` that no stage
  reads and that the next write of the same target removes.
* The whole workflow, killed with SIGKILL while a per-shard stage is writing, leaves only complete,
  self-describing Parquet files; after ``--unlock`` and ``--rerun-incomplete`` it completes and
  its data are byte-identical to those of an uninterrupted run (same inputs, same seed).

The end-to-end test runs the workflow twice on a 200,000-row invented catalogue in shards of
100,000 rows (about 50 s on one core); it is marked slow.
"""

from __future__ import annotations

import hashlib
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow.parquet as pq
import pytest
import yaml

from cinderclock.errors import InputError
from cinderclock.tableio import META_KEY, Column, StreamingTableWriter, read_metadata, read_table, write_table

ROOT = Path(__file__).resolve().parents[1]
ENV = dict(os.environ, PYTHONPATH=os.pathsep.join([str(ROOT / "workflow"), os.environ.get("PYTHONPATH", "")]),
           OMP_NUM_THREADS="1")
SPEC = {"x": Column("mag", "a number", "phot.mag"), "y": Column("", "another", "")}


def frame(n, seed=0):
    rng = np.random.default_rng(seed)
    return pd.DataFrame({"x": rng.normal(size=n), "y": rng.integers(0, 10, n)})


def partials(folder):
    return sorted(p for p in Path(folder).rglob(".*.partial-*"))


# ------------------------------------------------------------------------- atomic writes


def test_a_failed_write_leaves_the_old_table_and_no_temporary(tmp_path, monkeypatch):
    import pyarrow.parquet as pq_mod

    target = tmp_path / "t.parquet"
    write_table(frame(10), target, SPEC, {"run": 1})
    before = target.read_bytes()
    real = pq_mod.write_table

    def half_then_fail(table, where, **kw):
        real(table.slice(0, 3), where, **kw)         # something reached the disk...
        raise OSError("disk full")                     # ...then the writer died

    monkeypatch.setattr(pq_mod, "write_table", half_then_fail)
    with pytest.raises(OSError):
        write_table(frame(50), target, SPEC, {"run": 2})
    assert target.read_bytes() == before               # the old table is intact
    assert partials(tmp_path) == []


def test_a_failed_streaming_write_creates_nothing(tmp_path):
    target = tmp_path / "merged.parquet"
    with pytest.raises(RuntimeError):
        with StreamingTableWriter(target, SPEC, {}, stage="final") as w:
            w.write(frame(100))
            raise RuntimeError("killed between shards")
    assert not target.exists() and partials(tmp_path) == []


_KILL_ME = """
import sys
sys.path.insert(0, {workflow!r})
import numpy as np, pandas as pd
from cinderclock.tableio import Column, write_table
n = 4_000_000
df = pd.DataFrame({{"x": np.random.default_rng(1).normal(size=n), "y": np.arange(n)}})
print("ready", flush=True)
write_table(df, {target!r}, {{"x": Column("mag", "a", ""), "y": Column("", "b", "")}}, {{}})
"""


def test_a_writer_killed_mid_write_leaves_no_table_and_its_temporary_is_cleaned(tmp_path):
    target = tmp_path / "big.parquet"
    proc = subprocess.Popen([sys.executable, "-c", _KILL_ME.format(workflow=str(ROOT / "workflow"),
                                                                   target=str(target))],
                            stdout=subprocess.PIPE, env=ENV)
    assert proc.stdout.readline().strip() == b"ready"
    deadline = time.time() + 60
    while not partials(tmp_path) and proc.poll() is None and time.time() < deadline:
        time.sleep(0.002)
    proc.kill()
    proc.wait()
    left = partials(tmp_path)
    assert left, "the writer finished before it could be killed"
    assert not target.exists()                                   # nothing under the target's name
    assert left[0].name.startswith(".big.parquet.partial-")
    with pytest.raises(InputError):                              # and the temporary is no table
        read_table(left[0])
    write_table(frame(5), target, SPEC, {})                      # the next write of the target...
    assert partials(tmp_path) == [] and len(read_table(target)[0]) == 5   # ...removes it


def test_same_seed_same_catalogue_and_same_chain_results(config):
    # internal check of determinism: no hidden randomness or ordering in the per-star chain
    from cinderclock.api import ModelSet, run_chain
    from cinderclock.simulate import make_catalogue

    a, _ = make_catalogue(300, seed=9)
    b, _ = make_catalogue(300, seed=9)
    pd.testing.assert_frame_equal(a, b, check_exact=True)
    models = ModelSet.build(config)
    r1, r2 = run_chain(a, config, models), run_chain(b, config, models)
    pd.testing.assert_frame_equal(r1.table, r2.table, check_exact=True)
    pd.testing.assert_frame_equal(r1.rejects, r2.rejects, check_exact=True)


# ------------------------------------------------------------------------- the whole workflow


def snakemake(workdir, *args, **kw):
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(workdir), "--cores", "1",
           *args]
    return cmd if kw.get("command_only") else subprocess.run(cmd, capture_output=True, text=True, timeout=600,
                                                             env=ENV)


@pytest.fixture(scope="module")
def catalogue(tmp_path_factory):
    from cinderclock.simulate import make_catalogue

    cat, _ = make_catalogue(200_000, seed=20261201, malformed=False)
    path = tmp_path_factory.mktemp("catalogue") / "catalogue.parquet"
    cat.to_parquet(path, index=False)
    return path


def workdir(base, catalogue):
    base.mkdir(parents=True, exist_ok=True)
    (base / "catalogue.parquet").symlink_to(catalogue)
    cfg = yaml.safe_load((ROOT / "config" / "config.yaml").read_text())
    cfg["catalogue"]["path"] = "catalogue.parquet"
    cfg["shards"]["rows_per_shard"] = 100_000                     # two shards
    cfg["luminosity"]["teff_grid"]["step_dex"] = 0.005             # a smaller model table: quicker
    cfg["uncertainty"]["draws"] = 20                               # fewer Monte Carlo draws: quicker
    (base / "config").mkdir()
    (base / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    return base


HANDOFF = ["results/final/white_dwarfs.fits", "results/final/white_dwarfs.vot", "results/final/data_dictionary.md"]


@pytest.fixture(scope="module")
def reference_run(tmp_path_factory, catalogue):
    """An uninterrupted run of the whole workflow."""
    wd = workdir(tmp_path_factory.mktemp("uninterrupted"), catalogue)
    cmd = [sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(wd), "--cores", "1", "all"]
    out = subprocess.run(cmd, capture_output=True, text=True, timeout=600, env=ENV)
    assert out.returncode == 0, out.stderr[-3000:]
    return wd


def check_results_folder(results):
    """Every file is a complete, self-describing table (or log/manifest), or an unread temporary."""
    temporaries = []
    for path in sorted(p for p in results.rglob("*") if p.is_file()):
        rel = path.relative_to(results)
        if rel.parts[0] in ("logs", "benchmarks"):                 # job logs and Snakemake's timing files
            continue
        if path.name.startswith(".") and ".partial-" in path.name:
            temporaries.append(path)
        elif path.suffix == ".parquet":
            table = pq.read_table(path)                              # whole file: every page decodes
            meta = json.loads(table.schema.metadata[META_KEY])
            assert meta["schema_version"] and meta["provenance"]["package_version"], rel
            assert all((f.metadata or {}).get(b"description") for f in table.schema), rel
        elif path.suffix == ".json":
            json.loads(path.read_text())
        elif path.parent.name == "final" and path.suffix in (".fits", ".vot", ".md"):
            pass                                                     # hand-off files, checked on their own
        elif rel.parts[0] in ("figures", "report") and path.suffix in (".png", ".pdf", ".html"):
            pass                                                     # figures and report, checked elsewhere
        else:
            raise AssertionError(f"unexpected file {rel}")
    return temporaries


def column_digests(path):
    """SHA-256 of every column's Arrow buffers: equal digests mean byte-identical data."""
    table = pq.read_table(path)
    out = {}
    for name, col in zip(table.column_names, table.columns):
        h = hashlib.sha256()
        for buf in col.combine_chunks().buffers():
            if buf is not None:
                h.update(buf.to_pybytes())
        out[name] = h.hexdigest()
    return out


@pytest.mark.slow
def test_killed_run_leaves_no_partial_table_and_rerun_matches(tmp_path, catalogue, reference_run):
    wd = workdir(tmp_path / "killed", catalogue)
    with open(tmp_path / "killed.log", "w") as log:
        proc = subprocess.Popen(snakemake(wd, command_only=True), stdout=log, stderr=log, env=ENV,
                                start_new_session=True)
        caught, deadline = [], time.time() + 300
        stage_dirs = ("select", "luminosity", "mass", "cooling", "final")
        while proc.poll() is None and time.time() < deadline:
            caught = [p for p in partials(wd / "results") if p.parent.name in stage_dirs]
            if caught:
                break
            time.sleep(0.003)
        os.killpg(proc.pid, signal.SIGKILL)                         # the whole process group, jobs included
        proc.wait()
    assert caught, "the run ended before a per-shard stage was caught writing"
    assert not (wd / "results/final/white_dwarfs.parquet").exists()

    left = check_results_folder(wd / "results")
    # stages read tables under their own names only, and the killed writer's table does not exist
    for tmp in left:
        assert not tmp.with_name(tmp.name.split(".partial-")[0][1:]).exists(), tmp

    assert snakemake(wd, "--unlock").returncode == 0
    out = snakemake(wd, "--rerun-incomplete")
    assert out.returncode == 0, out.stderr[-3000:]
    assert check_results_folder(wd / "results") == []              # temporaries cleaned by the rewrite

    ref, new = reference_run / "results", wd / "results"
    tables = sorted(p.relative_to(ref) for p in ref.rglob("*.parquet") if not p.name.startswith("."))
    assert tables == sorted(p.relative_to(new) for p in new.rglob("*.parquet") if not p.name.startswith("."))
    # 3 model tables, 8 per shard (ingest shard, select + rejects, luminosity + rejects, mass, cooling,
    # uncertainty), the ingest rejects, the 2 final tables and 4 population tables
    assert len(tables) == 3 + 2 * 8 + 1 + 2 + 4
    for rel in tables:
        a, b = pq.read_table(ref / rel), pq.read_table(new / rel)
        assert a.equals(b), rel                                     # same values, types and order
        assert column_digests(ref / rel) == column_digests(new / rel), rel
        assert read_metadata(ref / rel) == read_metadata(new / rel), rel   # provenance too: no timestamps
    assert (ref / "final/stage_counts.json").read_text() == (new / "final/stage_counts.json").read_text()


@pytest.mark.slow
def test_every_table_of_a_run_describes_itself_and_hands_off(reference_run, capsys):
    from cinderclock import SCHEMA_VERSION
    from cinderclock.cli import main
    from cinderclock.datadict import describe

    results = reference_run / "results"
    assert check_results_folder(results) == []                    # every table complete, no temporaries
    for path in results.rglob("*.parquet"):
        assert read_metadata(path)["schema_version"] == SCHEMA_VERSION, path
    final = results / "final" / "white_dwarfs.parquet"
    n = pq.ParquetFile(final).metadata.num_rows
    fits = describe(results / "final" / "white_dwarfs.fits")
    assert fits.n_rows == n and fits.provenance == read_metadata(final)["provenance"]
    assert fits.meta["exported_from"]["file"] == "white_dwarfs.parquet"
    tail = (results / "final" / "white_dwarfs.vot").read_bytes()[-200_000:].decode("utf-8", "replace")
    assert 'name="schema_version" value="1.0"' in tail and 'name="cinderclock"' in tail   # INFOs after DATA
    md = (results / "final" / "data_dictionary.md").read_text()
    for name in pq.read_schema(final).names:
        assert f"| `{name}` |" in md, name
    assert main(["cite", str(final)]) == 0
    cited = capsys.readouterr().out
    assert "Mestel, L. 1952, MNRAS 112, 583" in cited and "Riello, M. et al. 2021, A&A 649, A3" in cited
