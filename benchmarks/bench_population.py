"""Benchmark of the population steps on a million-star table: Vmax and luminosity function (with
bootstrap errors), forward model, and the population-age fit with its bootstrap.

Run on one core:  OMP_NUM_THREADS=1 python benchmarks/bench_population.py [n_stars]

Target (issue 7): the age fit with its bootstrap well under a minute for 1,000,000 stars.
"""

import copy
import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "workflow"))

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from cinderclock.config import load_config, stage_settings  # noqa: E402
from cinderclock.cooling import mestel  # noqa: E402
from cinderclock.population.cooling_link import mestel_link  # noqa: E402
from cinderclock.population.simulate import place_in_sphere, simulate_white_dwarfs  # noqa: E402
from cinderclock.population.stages import luminosity_function_stage, population_age_stage  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]


def make_table(n_stars, seed=1):
    """A per-star table of ``n_stars`` from a 10 Gyr population, magnitude-limited (BC = 0 in band G)."""
    coeff = mestel.age_coefficient_yr()
    rng = np.random.default_rng(seed)
    parts, have = [], 0
    while have < n_stars:
        wd = simulate_white_dwarfs(rng, 4 * (n_stars - have) + 1000, 10.0,
                                   lambda m, t: mestel.luminosity_at_age(m, t, coeff))
        d, _ = place_in_sphere(rng, wd["mbol"].size, 400.0)
        mag = wd["mbol"] + 5 * np.log10(d / 10.0)
        keep = mag < 20.0
        parts.append(pd.DataFrame({"mbol": wd["mbol"][keep], "dist_pc": d[keep], "mag_G": mag[keep]}))
        have += int(keep.sum())
    t = pd.concat(parts, ignore_index=True).iloc[:n_stars]
    t["star_id"] = np.arange(len(t))
    t["plx_corr_mas"] = 1000.0 / t["dist_pc"]
    t["plx_err_mas"] = 0.05
    return t


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000
    print(f"OMP_NUM_THREADS={os.environ.get('OMP_NUM_THREADS', 'unset')}")
    t0 = time.perf_counter()
    table = make_table(n)
    print(f"simulated table: {len(table)} stars in {time.perf_counter() - t0:.1f} s")
    cfg = load_config(ROOT / "config" / "config.yaml")
    s = copy.deepcopy(stage_settings(cfg, "population"))
    s["population"]["survey"].update(faint_mag_limit=20.0, max_distance_pc=400.0)
    s["select"]["max_distance_pc"] = None
    resamples = s["population"]["bootstrap"]["resamples"]

    t0 = time.perf_counter()
    stars, lf, summary = luminosity_function_stage(table, s)
    t_lf = time.perf_counter() - t0
    print(f"Vmax + luminosity function + {resamples} bootstrap resamples: {t_lf:.2f} s "
          f"({summary['status_counts']['used']} stars used, <V/Vmax> = {summary['v_over_vmax']['mean']:.4f})")

    link = mestel_link(mestel.age_coefficient_yr())
    t0 = time.perf_counter()
    fit, model, profile = population_age_stage(stars, link, s)
    t_fit = time.perf_counter() - t0
    print(f"forward model on {len(profile)} ages + fit + {fit['bootstrap_resamples']} bootstrap resamples: "
          f"{t_fit:.2f} s ({fit['n_stars_in_fit']} stars in the fitted range)")
    print(f"fitted age {fit['age_gyr']:.3f} Gyr (input 10), 68 %: {fit['interval68_gyr'][0]:.3f}-"
          f"{fit['interval68_gyr'][1]:.3f}, likelihood interval {fit['likelihood_interval_gyr'][0]:.3f}-"
          f"{fit['likelihood_interval_gyr'][1]:.3f}")
    print(f"total population steps: {t_lf + t_fit:.2f} s (target: well under 60 s)")


if __name__ == "__main__":
    main()
