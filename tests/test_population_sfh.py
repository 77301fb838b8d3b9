"""Star-formation history from the luminosity function and from total ages; empty final tables; draws.

Sources: a piecewise-constant history's cumulative star formation is the sum of rate x width
(exact arithmetic); the simulated samples come from the package's own simulation (IMF, lifetimes,
IFMR, Mestel cooling forwards), so recovering an injected history checks the estimator, whatever
the numerical cooling model. The large recovery checks are in benchmarks/bench_population_intervals.py.
"""

from __future__ import annotations

import copy
import warnings

import numpy as np
import pandas as pd
import pytest

from cinderclock.cooling import mestel
from cinderclock.errors import ConfigError
from cinderclock.population.cooling_link import mestel_link
from cinderclock.population.draws import effective_thin
from cinderclock.population.sfh import PiecewiseHistory
from cinderclock.population.sfh_stage import CORRELATION_COLUMNS, SFH_COLUMNS, sfh_stage
from cinderclock.population.simulate import observe_sample, simulate_white_dwarfs
from cinderclock.population.stages import EMPTY_TABLE, luminosity_function_stage, population_age_stage

COEFF = mestel.age_coefficient_yr()
RADIUS, CUT = 160.0, 120.0


def lum(m, t):
    return mestel.luminosity_at_age(m, t, COEFF)


@pytest.fixture
def settings(config):
    s = {k: copy.deepcopy(config[k]) for k in ("population", "select", "luminosity", "progenitor")}
    s["population"]["survey"].update(faint_mag_limit=18.0, max_distance_pc=CUT, min_parallax_over_error=5.0)
    s["population"]["mbol_bins"] = {"min": 6.0, "max": 19.0, "width": 0.5}
    s["population"]["fit"]["mbol_range"] = [12.0, 19.0]
    s["population"]["fit"]["age_grid"] = {"min_gyr": 4.0, "max_gyr": 15.0, "step_gyr": 0.05}
    s["population"]["bootstrap"]["resamples"] = 40
    s["population"]["fit"]["gof_simulations"] = 50
    s["population"]["sfh_inference"]["draws"] = 1500
    s["select"]["max_distance_pc"] = None
    return s


def table_of(h, seed, settings, n_formed=500_000):
    # progenitors follow the fitted model's IFMR, lifetimes and metallicity
    from cinderclock.population.model import progenitor_choices

    rng = np.random.default_rng(seed)
    c = progenitor_choices(settings["population"], settings["progenitor"])
    wd = simulate_white_dwarfs(rng, n_formed, 10.0, lum, sfh=h, ifmr=c["ifmr"], lifetime=c["lifetime"],
                               metallicity=c["metallicity"])
    o = observe_sample(rng, wd, RADIUS, 18.0, plx_err_mas=0.3, mag_err=0.02, min_parallax_over_error=5.0,
                       distance_limit_pc=CUT)
    n = o["mbol"].size
    t = pd.DataFrame({"star_id": np.arange(n), "dist_pc": o["dist_pc"], "mag_G": o["mag"], "mbol": o["mbol"],
                      "mbol_err": o["mbol_err"], "plx_corr_mas": o["plx_mas"], "plx_err_mas": o["plx_err_mas"],
                      "total_age_gyr": o["total_age_gyr"]})
    true = np.array([1.0, 3.0, 1.0]) * n_formed / float(h.total()) / (4 / 3 * np.pi * RADIUS**3)
    return t, true


def test_piecewise_history_cumulative():
    # exact arithmetic: rates 1, 3, 1 over 0-2, 2-3, 3-10 Gyr give 2, 5, 12 stars by 2, 3, 10 Gyr
    h = PiecewiseHistory((0.0, 2.0, 3.0, 10.0), (1.0, 3.0, 1.0))
    assert h.cumulative([1.0, 2.0, 2.5, 3.0, 10.0, 50.0]).tolist() == [1.0, 2.0, 3.5, 5.0, 12.0, 12.0]
    assert h.cumulative(np.ones((2, 3)), np.ones((4, 1, 1))).shape == (4, 2, 3)
    with pytest.raises(ConfigError):
        PiecewiseHistory((0.0, 1.0), (-1.0,))


def test_burst_is_recovered_within_its_uncertainty(settings):
    # A rate 3x higher 2-3 Gyr ago on a constant background (10 Gyr): the 2-3 Gyr bin's posterior
    # holds the input within 3 sd, and lies more than 3 sd above the constant rate of its neighbours
    h = PiecewiseHistory((0.0, 2.0, 3.0, 10.0), (1.0, 3.0, 1.0))
    table, true = table_of(h, 5, settings)
    stars, _, lfs = luminosity_function_stage(table, settings)
    fit, _, _ = population_age_stage(stars, mestel_link(COEFF), settings, lfs)
    sfh, cor, summ = sfh_stage(stars, mestel_link(COEFF), settings, fit)
    lf = sfh[sfh["method"] == "luminosity_function"].set_index("bin")
    burst = lf.loc[3]
    assert burst["lookback_lo_gyr"] == 2.0 and burst["lookback_hi_gyr"] == 3.0
    assert abs(burst["rate_mean"] - true[1]) < 3 * burst["rate_sd"]
    assert burst["rate_mean"] - 3 * burst["rate_sd"] > true[0]
    assert np.all(sfh["rate_p16"] >= 0) and np.all(sfh["rate_p16"] <= sfh["rate_p84"])
    # correlations: a symmetric matrix with unit diagonal, neighbours anti-correlated (internal)
    c = cor.pivot(index="bin_i", columns="bin_j", values="correlation").to_numpy()
    assert np.allclose(c, c.T) and np.allclose(np.diag(c), 1.0)
    assert c[2, 3] < 0 and c[3, 4] < 0
    assert summ["constant_rate"]["rate"] > 0 and set(sfh.columns) == set(SFH_COLUMNS)
    # the Markov chains pass their diagnostics (split R-hat < 1.01, bulk and tail ESS >= 400 in every
    # bin; Vehtari et al. 2021) and so raise no sfh_poor_sampling warning
    mc = summ["luminosity_function"]["sampling"]
    assert mc["passed"] and mc["rhat_max"] < 1.01 and mc["ess_bulk_min"] >= 400
    assert "sfh_poor_sampling" not in [w["code"] for w in summ["warnings"]]


def test_total_age_estimate_sees_the_burst(settings):
    # exact total ages: the 1/Vmax density of stars born 2-3 Gyr ago over the model's white dwarfs per
    # unit rate. The burst bin is about 3x its neighbours (a 35 % tolerance covers the Poisson noise
    # of ~100-300 stars per bin and the left-out stars)
    settings["population"]["sfh_inference"]["from_total_ages"] = True
    h = PiecewiseHistory((0.0, 2.0, 3.0, 10.0), (1.0, 3.0, 1.0))
    table, true = table_of(h, 6, settings, n_formed=200_000)
    stars, _, _ = luminosity_function_stage(table, settings)
    sfh, _, summ = sfh_stage(stars, mestel_link(COEFF), settings, None, table)
    tot = sfh[sfh["method"] == "total_ages"].set_index("bin")["rate_mean"]
    assert tot[3] / (0.5 * (tot[2] + tot[4])) == pytest.approx(3.0, rel=0.35)
    assert tot[8] == 0.0                                        # nothing formed 11-13 Gyr ago
    assert "total_ages" in summ["methods"]


def test_empty_final_table_gives_valid_empty_outputs(settings, tmp_path):
    # internal check: the final stage's empty table (key columns only) goes through every population step
    from cinderclock.population.summary import render
    from cinderclock.tableio import read_table, write_table

    empty = pd.DataFrame({"star_id": pd.Series([], dtype="int64"), "input_row": pd.Series([], dtype="int64")})
    stars, lf, lfs = luminosity_function_stage(empty, settings)
    assert len(stars) == 0 and lf["n_stars"].sum() == 0 and lfs["empty"] == EMPTY_TABLE
    fit, model, profile = population_age_stage(stars, mestel_link(COEFF), settings, lfs)
    assert fit["age_gyr"] is None and "no stars" in fit["not_fitted"]
    sfh, cor, summ = sfh_stage(stars, mestel_link(COEFF), settings, fit)
    assert not summ["fitted"] and len(sfh) == 0
    write_table(sfh, tmp_path / "sfh.parquet", SFH_COLUMNS, {})
    write_table(cor, tmp_path / "cor.parquet", CORRELATION_COLUMNS, {})
    assert len(read_table(tmp_path / "sfh.parquet")[0]) == 0
    page = render({}, {}, {}, lfs, fit, summ)
    assert "no stars" in page


def test_draws_are_size_bounded():
    # internal: 1000 stars x 100 draws thinned by 10 is 10,000 rows; a bound of 4,000 raises the
    # thinning to 25 (4 kept draws each); more stars than rows is refused naming the key
    assert effective_thin(1000, 100, 10, 20_000) == 10
    assert effective_thin(1000, 100, 10, 4_000) == 25
    with pytest.raises(ConfigError, match="max_rows"):
        effective_thin(5000, 100, 10, 4_000)


def test_posterior_draws_are_the_uncertainty_stage_draws(_default_config):
    # The draws table regenerates the uncertainty stage's own draws: with no thinning, their
    # percentiles (numpy.nanpercentile, linear, as reference) equal the final table's _p16/_p50/_p84
    # columns to rounding, and thinning keeps draws 0, thin, 2 thin, ...
    from cinderclock.api import ModelSet, run_chain
    from cinderclock.config import stage_settings
    from cinderclock.population.draws import DRAW_COLUMNS, QUANTITY_KEYS, shard_draws
    from cinderclock.simulate import consistent_catalogue

    from helpers import spectroscopic_config

    cfg = spectroscopic_config(_default_config)
    cfg["uncertainty"].update(draws=40, chunk_stars=25)
    models = ModelSet.build(cfg)
    cat, _ = consistent_catalogue(models, 60, seed=3)
    final = run_chain(cat, cfg, models).table
    s = stage_settings(cfg, "uncertainty")
    frames = list(shard_draws(final, models.mass_radius, models.cooling, s, thin=1))
    d = pd.concat(frames, ignore_index=True)
    assert set(d.columns) == set(DRAW_COLUMNS) and len(d) == 40 * len(final)
    for q in QUANTITY_KEYS:
        x = d[q].to_numpy().reshape(len(final), 40)
        with np.errstate(all="ignore"), warnings.catch_warnings():
            warnings.simplefilter("ignore", RuntimeWarning)              # all-NaN rows (off the tables)
            ref = np.nanpercentile(x, [16, 50, 84], axis=1)
        for i, p in enumerate((16, 50, 84)):
            assert np.allclose(ref[i], final[f"{q}_p{p}"], equal_nan=True, rtol=1e-12, atol=1e-12), q
    thin = pd.concat(list(shard_draws(final, models.mass_radius, models.cooling, s, thin=8)), ignore_index=True)
    assert sorted(set(thin["draw"])) == [0, 8, 16, 24, 32]
    full = d.set_index(["star_id", "draw"])
    assert np.allclose(thin.set_index(["star_id", "draw"])["log_lum"], full.loc[thin.set_index(
        ["star_id", "draw"]).index, "log_lum"], equal_nan=True)



@pytest.mark.slow
def test_workflow_writes_history_and_draws_when_asked(tmp_path):
    # internal check of the rules: with posterior_draws enabled the workflow writes the draws table
    # (one row per star and kept draw, described), its data dictionary, the history and the summary
    import os
    import subprocess
    import sys
    from pathlib import Path

    import yaml

    from cinderclock.simulate import make_catalogue, write_csv
    from cinderclock.tableio import read_table

    root = Path(__file__).resolve().parents[1]
    cat, _ = make_catalogue(300, seed=5)
    write_csv(cat, tmp_path / "catalogue.csv")
    cfg = yaml.safe_load((root / "config" / "config.yaml").read_text())
    cfg["catalogue"]["path"] = "catalogue.csv"
    cfg["population"]["bootstrap"]["resamples"] = 30
    cfg["population"]["posterior_draws"].update(enabled=True, thin=20)
    (tmp_path / "config").mkdir()
    (tmp_path / "config" / "config.yaml").write_text(yaml.safe_dump(cfg))
    env = dict(os.environ, OMP_NUM_THREADS="1",
               PYTHONPATH=os.pathsep.join(p for p in (str(root / "workflow"), os.environ.get("PYTHONPATH", "")) if p))
    run = subprocess.run([sys.executable, "-m", "snakemake", "-s", str(root / "Snakefile"), "-d", str(tmp_path),
                          "--cores", "2"], capture_output=True, text=True, timeout=900, env=env)
    assert run.returncode == 0, run.stderr[-3000:]
    final, _, _ = read_table(tmp_path / "results/final/white_dwarfs.parquet")
    draws, specs, meta = read_table(tmp_path / "results/population/posterior_draws.parquet")
    k = cfg["uncertainty"]["draws"]
    assert len(draws) == len(final) * len(range(0, k, 20))
    assert specs["cool_age_gyr"].unit == "Gyr" and meta["provenance"]
    assert "`total_age_gyr`" in (tmp_path / "results/population/posterior_draws.md").read_text()
    sfh, _, _ = read_table(tmp_path / "results/population/sfh.parquet")
    assert (tmp_path / "results/figures/star_formation_history.png").stat().st_size > 5000
    page = (tmp_path / "results/report/run_summary.html").read_text()
    assert "Star-formation history" in page and "Posterior draws" in page and "Interval coverage" in page
