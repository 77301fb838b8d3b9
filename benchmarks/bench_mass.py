"""Speed of the mass lookup: 1,000,000 (log g, Teff) rows and 1,000,000 (radius, Teff) rows.

Run from the repository root (single core):

    OMP_NUM_THREADS=1 python benchmarks/bench_mass.py [n_rows]

Prints the one-off table build time and, for each inversion, the best of three wall-clock times
and the rows per second. Target (issue 3): mass lookup on 1e6 rows in under 5 s on one core.
"""

import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "workflow"))

import numpy as np  # noqa: E402

from cinderclock.massradius.table import MassRadiusGrid, build_mass_radius_table  # noqa: E402


def best_of(fn, repeat=3):
    times = []
    out = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def main(n=1_000_000):
    t0 = time.perf_counter()
    df = build_mass_radius_table("CO", "thick", coulomb=True)
    t_build = time.perf_counter() - t0
    t0 = time.perf_counter()
    grid = MassRadiusGrid.from_frame(df)
    t_grid = time.perf_counter() - t0
    print(f"table build (CO, thick H, Coulomb; {len(df)} rows): {t_build:.2f} s; interpolator: {t_grid:.3f} s")

    rng = np.random.default_rng(12345)
    teff = np.exp(rng.uniform(np.log(4000.0), np.log(80000.0), n))
    logg = rng.uniform(7.0, 9.2, n)
    radius = 10.0 ** rng.uniform(np.log10(0.004), np.log10(0.02), n)

    t, (mass, _, inside) = best_of(lambda: grid.mass_from_logg(logg, teff))
    print(f"mass_from_logg   {n:>9d} rows: {t:.3f} s  ({n / t:,.0f} rows/s; {inside.mean():.1%} inside table)")
    t, (mass, _, inside) = best_of(lambda: grid.mass_from_radius(radius, teff))
    print(f"mass_from_radius {n:>9d} rows: {t:.3f} s  ({n / t:,.0f} rows/s; {inside.mean():.1%} inside table)")
    t, _ = best_of(lambda: grid.radius(np.clip(mass, 0.2, 1.3), teff))
    print(f"radius(mass, T)  {n:>9d} rows: {t:.3f} s  ({n / t:,.0f} rows/s)")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000)
