"""Benchmark of the luminosity stage: distances, SED fit and over-luminosity flag on one core.

Target (issue 4, item 8): 1,000,000 stars x 5 bands in under 60 s on one core.

    OMP_NUM_THREADS=1 python benchmarks/bench_luminosity.py [--n 1000000] [--ebv per-star|constant]

The synthetic shard: Teff log-uniform 4,000-60,000 K, radius 0.008-0.02 Rsun, distance 10-300 pc,
parallax errors 0.02-1 mas giving a mix of high and low S/N (about a third below S/N 10, so
they take the EDSD branch), E(B-V) 0-0.2 per star, photometric errors 0.01-0.05 mag, 3% of magnitudes missing. The
photometry comes from the model table itself (this measures speed, not accuracy; accuracy is in
tests/test_photometry_sedfit.py). Prints the time of each step and the recovered-Teff scatter.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

os.environ.setdefault("OMP_NUM_THREADS", "1")
sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "workflow"))

import numpy as np  # noqa: E402

from cinderclock.constants import PC_M, R_SUN_M  # noqa: E402
from cinderclock.distance import distances  # noqa: E402
from cinderclock.photometry.consistency import overluminosity  # noqa: E402
from cinderclock.photometry.grid import PhotometryGrid  # noqa: E402
from cinderclock.photometry.sedfit import fit_sed  # noqa: E402
from cinderclock.photometry.table import build_photometry_table, default_ebv_grid_mag, default_teff_grid_k  # noqa: E402

BANDS = [
    {"key": "G", "passband": "gaiadr3-G", "system": "vega"},
    {"key": "BP", "passband": "gaiadr3-BP", "system": "vega"},
    {"key": "RP", "passband": "gaiadr3-RP", "system": "vega"},
    {"key": "g", "passband": "sdss2010-g", "system": "ab"},
    {"key": "r", "passband": "sdss2010-r", "system": "ab"},
]


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--n", type=int, default=1_000_000)
    ap.add_argument("--ebv", choices=("per-star", "constant"), default="per-star")
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args(argv)

    t0 = time.perf_counter()
    table = build_photometry_table(BANDS, default_teff_grid_k(3000, 150000, 0.002), default_ebv_grid_mag(0.5),
                                   law="G23", r_v=3.1)
    grid = PhotometryGrid.from_frame(table)
    t_table = time.perf_counter() - t0
    print(f"model table: {len(table)} rows x {len(BANDS)} bands, built in {t_table:.2f} s (once per configuration)")

    rng = np.random.default_rng(args.seed)
    n = args.n
    teff = 10 ** rng.uniform(np.log10(4000), np.log10(60000), n)
    radius = rng.uniform(0.008, 0.02, n)
    dist = rng.uniform(10, 300, n)
    plx_err = rng.uniform(0.02, 1.0, n)
    plx = 1000.0 / dist + plx_err * rng.standard_normal(n)
    ebv = rng.uniform(0, 0.2, n) if args.ebv == "per-star" else 0.05
    theta = (radius * R_SUN_M / (dist * PC_M)) ** 2
    mags = grid.magnitudes(teff, ebv) - 2.5 * np.log10(theta)[:, None]
    errs = rng.uniform(0.01, 0.05, mags.shape)
    mags += errs * rng.standard_normal(mags.shape)
    mags[rng.random(mags.shape) < 0.03] = np.nan
    print(f"shard: {n} stars x {len(BANDS)} bands, E(B-V) {args.ebv}")

    timings = {}
    t = time.perf_counter()
    d = distances(plx, plx_err, zero_point_mas=-0.017, min_snr_inverse=10.0, length_scale_pc=400.0)
    timings["distances"] = time.perf_counter() - t

    t = time.perf_counter()
    fit = fit_sed(mags, errs, grid, ebv=ebv, distance_pc=d["distance_pc"], distance_lo_pc=d["distance_lo_pc"],
                  distance_hi_pc=d["distance_hi_pc"], error_floor_mag=0.005)
    timings["sed_fit"] = time.perf_counter() - t

    t = time.perf_counter()
    flag = overluminosity(fit["radius_rsun"], fit["radius_err_rsun"], radius, 0.0003)
    timings["overluminosity"] = time.perf_counter() - t

    total = sum(timings.values())
    for k, v in timings.items():
        print(f"  {k:15s} {v:7.2f} s")
    print(f"  {'total':15s} {total:7.2f} s  ({total / n * 1e6:.1f} us/star; target < 60 s for 1e6 stars)")
    edsd = np.mean(d["method"] == "edsd_mode")
    ok = np.isfinite(fit["teff_k"])
    rel = np.log(fit["teff_k"][ok] / teff[ok])
    print(f"EDSD branch: {edsd:.1%} of stars; fitted: {ok.mean():.2%}; "
          f"median |ln Teff_fit/Teff_true| = {np.median(np.abs(rel)):.4f}; "
          f"median chi2 = {np.nanmedian(fit['chi2']):.2f}; flagged over-luminous: {flag['overluminous'].mean():.2%}")
    return total


if __name__ == "__main__":
    main()
