"""Calibration of the population inference on simulated samples: interval coverage, the bias the
M_bol-error fold removes, and the recovery of star-formation histories. Prints figures; not a test.

Run:  OMP_NUM_THREADS=1 python benchmarks/bench_population_intervals.py [realisations] [progenitors]
      [progenitors of the history samples]

Samples are drawn through the package's own simulation (cinderclock.population.simulate: IMF,
history, lifetimes, IFMR, cooling forwards), placed in a sphere of 200 pc, measured with parallax
errors of 0.4 mas and magnitude errors of 0.02 mag, and cut at a measured distance of 150 pc, a
measured magnitude of 18 and parallax S/N 5 -- then fitted through the same stage functions the
workflow runs. Cooling is Mestel's law (closed form), so the figures test the estimator and its
intervals, independent of the numerical cooling model (whose ages the fit inherits, not its
calibration). For each age and each reported interval the coverage is printed with its binomial
standard error sqrt(p (1 - p) / N).
"""

import copy
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "workflow"))

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from cinderclock.config import load_config  # noqa: E402
from cinderclock.cooling import mestel  # noqa: E402
from cinderclock.population.cooling_link import mestel_link  # noqa: E402
from cinderclock.population.agefit import BOOTSTRAP_INTERVALS, REPORTED_INTERVAL  # noqa: E402
from cinderclock.population.diagnostics import count_modes  # noqa: E402
from cinderclock.population.model import progenitor_choices  # noqa: E402
from cinderclock.population.sfh import PiecewiseHistory  # noqa: E402
from cinderclock.population.sfh_stage import sfh_stage  # noqa: E402
from cinderclock.population.simulate import observe_sample, simulate_white_dwarfs  # noqa: E402
from cinderclock.population.stages import luminosity_function_stage, population_age_stage  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
COEFF = mestel.age_coefficient_yr()
RADIUS_PC, CUT_PC, MAG_LIMIT, PLX_ERR, MAG_ERR = 200.0, 150.0, 18.0, 0.4, 0.02
INTERVALS = {"likelihood 68 % (dlnL 0.5)": ("likelihood_interval_gyr", 0.68),
             "likelihood 95 % (dlnL 1.92)": ("likelihood_interval95_gyr", 0.95)}
for _m in BOOTSTRAP_INTERVALS:
    INTERVALS[f"bootstrap {_m} 68 %"] = ((_m, "interval68_gyr"), 0.68)
    INTERVALS[f"bootstrap {_m} 95 %"] = ((_m, "interval95_gyr"), 0.95)


def interval_of(fit, key):
    return fit["bootstrap_intervals"][key[0]][key[1]] if isinstance(key, tuple) else fit[key]


def lum(m, t):
    return mestel.luminosity_at_age(m, t, COEFF)


def settings():
    cfg = load_config(ROOT / "config" / "config.yaml")
    s = {k: copy.deepcopy(cfg[k]) for k in ("population", "select", "luminosity", "progenitor")}
    s["population"]["survey"].update(faint_mag_limit=MAG_LIMIT, max_distance_pc=CUT_PC, min_parallax_over_error=5.0)
    s["population"]["mbol_bins"] = {"min": 6.0, "max": 19.0, "width": 0.5}
    s["population"]["fit"]["mbol_range"] = [12.0, 19.0]
    s["population"]["fit"]["age_grid"] = {"min_gyr": 4.0, "max_gyr": 15.0, "step_gyr": 0.02}
    s["select"]["max_distance_pc"] = None
    return s


SETTINGS = settings()


def sample(seed, age_gyr, n_formed, sfh=None, s=None):
    """A measured sample; its progenitors follow the same IFMR, lifetimes and metallicity as the fitted
    model (``progenitor_choices`` of the settings ``s``)."""
    rng = np.random.default_rng(seed)
    c = progenitor_choices((s or SETTINGS)["population"], (s or SETTINGS)["progenitor"])
    wd = simulate_white_dwarfs(rng, n_formed, age_gyr, lum, sfh=sfh, ifmr=c["ifmr"], lifetime=c["lifetime"],
                               metallicity=c["metallicity"])
    o = observe_sample(rng, wd, RADIUS_PC, MAG_LIMIT, plx_err_mas=PLX_ERR, mag_err=MAG_ERR,
                       min_parallax_over_error=5.0, distance_limit_pc=CUT_PC)
    n = o["mbol"].size
    return pd.DataFrame({"star_id": np.arange(n), "dist_pc": o["dist_pc"], "mag_G": o["mag"], "mbol": o["mbol"],
                         "mbol_err": o["mbol_err"], "plx_corr_mas": o["plx_mas"], "plx_err_mas": o["plx_err_mas"]})


def coverage(n_real, n_formed, s, link):
    for age in (8.0, 11.0):
        hits = {k: 0 for k in INTERVALS}
        ages_f, ages_u, widths, finite, warn = [], [], [], 0, {}
        n_stars = []
        t0 = time.perf_counter()
        for r in range(n_real):
            table = sample(1000 * int(age) + r, age, n_formed, s=s)
            stars, _, lfs = luminosity_function_stage(table, s)
            s["population"]["measurement_errors"]["fold"] = True
            fit, _, _ = population_age_stage(stars, link, s, lfs)
            s["population"]["measurement_errors"]["fold"] = False
            unf, _, _ = population_age_stage(stars, link, s, lfs)
            for k, (key, _) in INTERVALS.items():
                lo, hi = interval_of(fit, key)
                hits[k] += lo <= age <= hi
            ages_f.append(fit["age_gyr"])
            ages_u.append(unf["age_gyr"])
            widths.append(0.5 * (fit["interval68_gyr"][1] - fit["interval68_gyr"][0]))
            finite += np.isfinite(fit["goodness_of_fit"]["deviance"])
            n_stars.append(fit["n_stars_in_fit"])
            for w in fit["warnings"]:
                warn[w["code"]] = warn.get(w["code"], 0) + 1
        dt = time.perf_counter() - t0
        print(f"\nage {age:g} Gyr: {n_real} realisations, {np.mean(n_stars):.0f} stars in the fitted range on average "
              f"({dt:.0f} s)")
        for k, (key, p) in INTERVALS.items():
            c = hits[k] / n_real
            print(f"  coverage of the {k:28s} {hits[k]:3d}/{n_real} = {c:5.1%}  (nominal {p:.0%}; binomial "
                  f"s.e. {np.sqrt(p * (1 - p) / n_real):.1%})")
        af, au = np.array(ages_f), np.array(ages_u)
        se = lambda a: a.std(ddof=1) / np.sqrt(a.size)  # noqa: E731
        print(f"  mean fitted age minus truth: folded {af.mean() - age:+.3f} +- {se(af):.3f} Gyr, not folded "
              f"{au.mean() - age:+.3f} +- {se(au):.3f} Gyr; scatter of the folded ages {af.std(ddof=1):.3f} Gyr, "
              f"mean bootstrap half-width {np.mean(widths):.3f} Gyr")
        print(f"  finite deviance in {finite}/{n_real} fits; warnings raised: {warn or 'none'} (reported bootstrap "
              f"interval: {REPORTED_INTERVAL})")
        print(f"  multimodal_bootstrap on these unimodal truths (false alarms): {warn.get('multimodal_bootstrap', 0)}"
              f"/{n_real}")


def mode_false_alarms(n_trials=1000, n=200):
    """False-alarm rate of the bimodality criterion on unimodal samples of the bootstrap's size, and
    its detection rate on two normals at Ashman's D = 3 (equal sds, 30 % minor share); values of order 10 (ages in Gyr: the 5 % separation threshold applies)."""
    rng = np.random.default_rng(4)
    cases = {
        "normal": lambda: rng.normal(10, 1, n),
        "skewed (gamma, shape 2)": lambda: 8 + rng.gamma(2.0, 1.0, n),
        "heavy tails (Student t, 3 dof)": lambda: 10 + rng.standard_t(3, n),
        "normal on a coarse grid (0.5 sd steps, like the clustered ages of a binned fit)":
            lambda: 10 + np.round(rng.normal(0, 1, n) * 2) / 2,
        "two normals, D = 3, minor share 30 % (detection)":
            lambda: np.where(rng.random(n) < 0.3, rng.normal(13.0, 1.0, n), rng.normal(10.0, 1.0, n)),
    }
    print(f"\nbimodality criterion on {n_trials} samples of {n} values each:")
    for name, draw in cases.items():
        hits = sum(count_modes(draw())[0] == 2 for _ in range(n_trials))
        print(f"  {name:80s} flagged {hits:5d}/{n_trials} = {hits / n_trials:6.2%}")


def sfh_recovery(n_formed, s, link):
    cases = {
        "3x burst 2-3 Gyr ago on a constant rate, 10 Gyr": PiecewiseHistory((0.0, 2.0, 3.0, 10.0), (1.0, 3.0, 1.0)),
        "declining: rate rising linearly with lookback, 0.3 -> 1.7 over 10 Gyr": PiecewiseHistory(
            tuple(np.arange(0.0, 10.01, 0.5)), tuple(0.3 + 0.14 * np.arange(0.25, 10.0, 0.5))),
    }
    vol = 4.0 / 3.0 * np.pi * RADIUS_PC**3
    for name, h in cases.items():
        table = sample(77, 10.0, n_formed, sfh=h, s=s)
        stars, _, lfs = luminosity_function_stage(table, s)
        fit, _, _ = population_age_stage(stars, link, s, lfs)
        t0 = time.perf_counter()
        sfh, _, summ = sfh_stage(stars, link, s, fit)
        dt = time.perf_counter() - t0
        e = np.asarray(summ["lookback_edges_gyr"])
        true = np.array([(h.cumulative(e[i + 1]) - h.cumulative(e[i])) / (e[i + 1] - e[i]) for i in range(e.size - 1)])
        true *= n_formed / float(h.total()) / vol
        lf = summ["luminosity_function"]
        mc = lf["sampling"]
        print(f"\n{name}: {summ['stars_in_fit']} stars; history step {dt:.1f} s; {lf['draws']} draws; "
              f"bulk ESS min {lf['effective_samples']:.0f}, tail ESS min {mc.get('ess_tail_min', float('nan')):.0f}, "
              f"max R-hat {mc.get('rhat_max', float('nan')):.4f}; warnings "
              f"{[w['code'] for w in summ['warnings']] or 'none'}")
        print("  lookback (Gyr)   true rate   posterior mean +- sd       pull   inside 16-84 %")
        inside = 0
        for i in range(e.size - 1):
            m, sd, lo, hi = lf["rate_mean"][i], lf["rate_sd"][i], lf["rate_p16"][i], lf["rate_p84"][i]
            ok = lo <= true[i] <= hi
            inside += ok
            print(f"  {e[i]:5.1f}-{e[i + 1]:5.1f}     {true[i]:.3e}   {m:.3e} +- {sd:.2e}   {(m - true[i]) / sd:+5.2f}   "
                  f"{'yes' if ok else 'no'}")
        print(f"  {inside}/{e.size - 1} bins hold the true rate in their 16-84 % range")
        if "burst" in name:
            r = np.array(lf["rate_mean"])
            ratio = r[3] / (0.5 * (r[2] + r[4]))
            print(f"  burst contrast: rate(2-3 Gyr) / mean of the neighbouring bins = {ratio:.2f} (input 3)")


def main():
    n_real = int(sys.argv[1]) if len(sys.argv) > 1 else 30
    n_formed = int(sys.argv[2]) if len(sys.argv) > 2 else 1_500_000
    n_formed_sfh = int(sys.argv[3]) if len(sys.argv) > 3 else n_formed
    s = settings()
    link = mestel_link(COEFF)
    mode_false_alarms()
    print(f"{n_real} realisations per age, {n_formed} progenitors formed per sample; parallax errors {PLX_ERR} mas, "
          f"magnitude errors {MAG_ERR} mag; {s['population']['bootstrap']['resamples']} bootstrap resamples")
    coverage(n_real, n_formed, s, link)
    s["population"]["measurement_errors"]["fold"] = True
    sfh_recovery(n_formed_sfh, s, link)


if __name__ == "__main__":
    main()
