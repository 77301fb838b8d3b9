#!/usr/bin/env python
"""End-to-end benchmark of the cinderclock workflow on invented catalogues.

For each catalogue size (default 1e4, 1e5, 1e6 rows, generated with the sample generator, no
faulty rows) the workflow runs in a scratch folder with the default configuration (100 Monte Carlo
draws, 250,000 rows per shard, 2 cores). The script prints, per stage: wall time summed over its
jobs (from Snakemake's benchmark files), the largest resident memory of any of its jobs, rows per
second, and the ratio to an I/O floor measured in the same run: reading the stage's input Parquet
tables and writing them back with pyarrow, with no computation. It then measures a rerun with
nothing to do on a 64-shard run, and runs the tests marked slow (kept out of the quick suite).

    python benchmarks/run_benchmark.py                     # 1e4, 1e5, 1e6
    python benchmarks/run_benchmark.py --sizes 10000 100000 --keep /tmp/cc-bench

Figures are printed, not asserted: performance claims come from this script, never from a test.
"""

from __future__ import annotations

import argparse
import glob
import os
import platform
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import pandas as pd
import pyarrow.parquet as pq
import yaml

ROOT = Path(__file__).resolve().parents[1]
STAGES = ["ingest", "select", "luminosity", "mass", "cooling", "uncertainty", "final", "handoff"]
#: stage -> glob of its main input tables, relative to the results folder
STAGE_INPUTS = {"ingest": None, "select": "ingest/shards/*.parquet", "luminosity": "select/s*[0-9].parquet",
                "mass": "luminosity/s*[0-9].parquet", "cooling": "mass/*.parquet",
                "uncertainty": "cooling/*.parquet", "final": "uncertainty/*.parquet"}


def machine():
    cpu = "unknown cpu"
    try:
        for line in open("/proc/cpuinfo"):
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    mem = os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES") / 2**30
    return f"{cpu}, {os.cpu_count()} cores, {mem:.0f} GiB, {platform.system()} {platform.release()}, " \
           f"Python {platform.python_version()}"


def prepare(workdir, rows, rows_per_shard, draws=100):
    workdir.mkdir(parents=True, exist_ok=True)
    cat = workdir / "catalogue.parquet"
    subprocess.run([sys.executable, str(ROOT / "sample_catalog" / "make_sample.py"), "--rows", str(rows),
                    "--out", str(cat), "--no-faults", "--mestel"], check=True, capture_output=True)
    cfg = yaml.safe_load((ROOT / "config" / "config.yaml").read_text())
    cfg["catalogue"]["path"] = "catalogue.parquet"
    cfg["shards"]["rows_per_shard"] = rows_per_shard
    cfg["uncertainty"]["draws"] = draws
    (workdir / "config").mkdir(exist_ok=True)
    (workdir / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))


def snakemake(workdir, *extra):
    t = time.perf_counter()
    out = subprocess.run([sys.executable, "-m", "snakemake", "-s", str(ROOT / "Snakefile"), "-d", str(workdir),
                          "--cores", "2", "-q", *extra], capture_output=True, text=True)
    if out.returncode:
        sys.exit(f"snakemake failed in {workdir}:\n{out.stderr[-3000:]}")
    return time.perf_counter() - t


def io_floor(results, pattern):
    """Seconds to read the tables matching ``pattern`` and write them back (pyarrow, no computation)."""
    if pattern is None:
        return float("nan")
    t = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        for i, f in enumerate(sorted(glob.glob(str(results / pattern)))):
            pq.write_table(pq.read_table(f), Path(tmp) / f"{i}.parquet", compression="zstd")
    return time.perf_counter() - t


def stage_figures(results):
    rows = {}
    for stage in STAGES:
        files = glob.glob(str(results / "benchmarks" / f"{stage}.tsv")) + \
            glob.glob(str(results / "benchmarks" / stage / "*.tsv"))
        if not files:
            continue
        b = pd.concat([pd.read_csv(f, sep="\t") for f in files])
        rows[stage] = {"jobs": len(files), "seconds": float(b["s"].sum()), "max_rss_mb": float(b["max_rss"].max())}
    for group in ("models", "population"):
        files = glob.glob(str(results / "benchmarks" / group / "*.tsv"))
        if files:
            b = pd.concat([pd.read_csv(f, sep="\t") for f in files])
            rows[group] = {"jobs": len(files), "seconds": float(b["s"].sum()), "max_rss_mb": float(b["max_rss"].max())}
    return rows


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[10_000, 100_000, 1_000_000])
    ap.add_argument("--rows-per-shard", type=int, default=250_000, help="default: the configuration's default")
    ap.add_argument("--draws", type=int, default=100)
    ap.add_argument("--keep", type=Path, default=None, help="keep the scratch folders here")
    ap.add_argument("--skip-slow-tests", action="store_true", help="do not run the tests marked slow")
    args = ap.parse_args(argv)
    base = args.keep or Path(tempfile.mkdtemp(prefix="cinderclock-bench-"))
    print(f"machine: {machine()}")
    print(f"config: default, {args.draws} Monte Carlo draws, {args.rows_per_shard} rows per shard, --cores 2\n")
    summary = []
    for n in args.sizes:
        wd = base / f"n{n}"
        shutil.rmtree(wd, ignore_errors=True)
        prepare(wd, n, args.rows_per_shard, args.draws)
        wall = snakemake(wd)
        res = wd / "results"
        figs = stage_figures(res)
        kept = pq.read_metadata(res / "final" / "white_dwarfs.parquet").num_rows
        print(f"== {n:,} rows: end-to-end wall time {wall:.1f} s ({n / wall:,.0f} rows/s); {kept:,} stars in the "
              f"results")
        print(f"{'stage':<12}{'jobs':>5}{'job s':>9}{'rows/s':>12}{'I/O floor s':>13}{'ratio':>8}{'peak MB':>9}")
        total_s = total_floor = 0.0
        for stage, f in figs.items():
            floor = io_floor(res, STAGE_INPUTS.get(stage))
            ratio = f["seconds"] / floor if floor == floor and floor > 0 else float("nan")
            if floor == floor:
                total_s += f["seconds"]
                total_floor += floor
            print(f"{stage:<12}{f['jobs']:>5}{f['seconds']:>9.1f}{n / f['seconds']:>12,.0f}{floor:>13.2f}"
                  f"{ratio:>8.1f}{f['max_rss_mb']:>9.0f}")
        print(f"{'stages with an I/O floor':<26}{total_s:>9.1f} s against {total_floor:.2f} s: "
              f"ratio {total_s / total_floor:.1f}\n")
        summary.append((n, wall, max(f["max_rss_mb"] for f in figs.values())))
    print("linearity (wall seconds per million rows):")
    for n, wall, rss in summary:
        print(f"  {n:>9,} rows: {wall:7.1f} s  -> {wall / n * 1e6:7.1f} s per 1e6 rows; peak job memory {rss:.0f} MB")

    # rerun with nothing to do on 64 shards
    wd = base / "noop64"
    shutil.rmtree(wd, ignore_errors=True)
    prepare(wd, 6400, 100, draws=0)
    snakemake(wd)
    t = snakemake(wd)
    print(f"\nrerun with nothing to do, 64 shards: {t:.2f} s")

    # the long checks kept out of the quick test suite (kill -9 mid-run, full hand-off run)
    if not args.skip_slow_tests:
        t0 = time.perf_counter()
        out = subprocess.run([sys.executable, "-m", "pytest", "-q", "-m", "slow", str(ROOT / "tests")],
                             capture_output=True, text=True, cwd=ROOT)
        last = out.stdout.strip().splitlines()[-1] if out.stdout.strip() else out.stderr[-500:]
        print(f"slow tests (pytest -m slow): {last} [{time.perf_counter() - t0:.0f} s]")
    if not args.keep:
        shutil.rmtree(base, ignore_errors=True)


if __name__ == "__main__":
    main()
