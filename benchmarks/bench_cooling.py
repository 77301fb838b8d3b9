"""Benchmark of the cooling model: table build time and look-up time for a million stars.

Run on one core:  OMP_NUM_THREADS=1 python benchmarks/bench_cooling.py

Targets (issue 5): the default numerical table in under 60 s; ages of 1,000,000 stars in under 2 s.
"""

import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "workflow"))

import numpy as np  # noqa: E402

from cinderclock.cooling.table import DEFAULT_MASSES_MSUN, CoolingGrid, build_cooling_table  # noqa: E402


def timed(fn, *args, repeat=1, **kw):
    best = np.inf
    out = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn(*args, **kw)
        best = min(best, time.perf_counter() - t0)
    return out, best


def main():
    print(f"OMP_NUM_THREADS={os.environ.get('OMP_NUM_THREADS', 'unset')}")
    masses = DEFAULT_MASSES_MSUN
    frames = {}
    for envelope in ("He", "H"):
        df, t_build = timed(build_cooling_table, "numerical", masses=masses, envelope=envelope)
        frames[envelope] = df
        print(f"numerical table, envelope {envelope}: {masses.size} masses "
              f"{masses.min():.2f}-{masses.max():.2f} Msun, {len(df)} rows, built in {t_build:.2f} s")
    dm, t_mestel = timed(build_cooling_table, "mestel", masses=masses)
    print(f"Mestel table: {len(dm)} rows, built in {t_mestel:.3f} s")

    grid, t_grid = timed(CoolingGrid.from_frame, frames["He"])
    print(f"CoolingGrid.from_frame: {t_grid:.3f} s")
    n = 1_000_000
    rng = np.random.default_rng(42)
    m = rng.uniform(0.45, 1.2, n)
    ll = rng.uniform(-5.0, 0.0, n)
    (age, status), t_age = timed(grid.age_yr, m, ll, repeat=3)
    print(f"age_yr for {n:,} stars: {t_age:.3f} s (best of 3); statuses {np.bincount(status).tolist()}")
    (back, status2), t_inv = timed(grid.log_lum_at_age, m, age, repeat=3)
    print(f"log_lum_at_age for {n:,} stars: {t_inv:.3f} s (best of 3); "
          f"median round-trip error {np.median(np.abs(back - ll)):.1e} dex")
    teff, t_teff = timed(grid.interpolate, "teff_k", m, ll, repeat=3)
    print(f"interpolate('teff_k') for {n:,} stars: {t_teff:.3f} s (best of 3)")
    for envelope, frame in frames.items():
        a06, _ = CoolingGrid.from_frame(frame).age_yr(0.6, [-3.0, -4.0, -4.5])
        print(f"0.6 Msun, {envelope} envelope: age at log L = -3, -4, -4.5: "
              + ", ".join(f"{a / 1e9:.2f} Gyr" for a in a06))


if __name__ == "__main__":
    main()
