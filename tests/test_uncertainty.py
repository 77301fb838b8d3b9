"""Monte Carlo uncertainties: coverage on a simulated catalogue, analytic propagation, determinism."""

import copy

import numpy as np
import pytest

from cinderclock.api import ModelSet, run_chain
from cinderclock.montecarlo import percentiles_ignoring_nan
from cinderclock.simulate import consistent_catalogue


def _config(config, **cooling):
    cfg = copy.deepcopy(config)
    cfg["luminosity"]["error_floor_mag"] = 0.0          # the simulated errors are the whole error budget
    cfg["select"].update(wd_region=None, quality_cuts=[], max_mag_error={})
    keep = ("star_id", "parallax", "parallax_error", "teff_spec", "teff_spec_error", "logg_spec", "logg_spec_error")
    cfg["catalogue"]["columns"] = {k: v for k, v in cfg["catalogue"]["columns"].items() if k in keep}
    cfg["catalogue"]["keep_columns"] = []
    cfg["cooling"]["masses_msun"] = {"min": 0.45, "max": 1.1, "step": 0.05}
    cfg["cooling"].update(cooling)
    return cfg


@pytest.fixture(scope="module")
def setup(_default_config):
    cfg = _config(_default_config)
    return cfg, ModelSet.build(cfg)


def test_percentiles_match_numpy():
    # reference: numpy.nanpercentile (linear interpolation), on rows with NaN and an all-NaN row
    rng = np.random.default_rng(0)
    x = rng.normal(size=(50, 37))
    x[rng.uniform(size=x.shape) < 0.2] = np.nan
    x[3] = np.nan
    ours = percentiles_ignoring_nan(x, (16.0, 50.0, 84.0))
    with np.errstate(all="ignore"), pytest.warns(RuntimeWarning):
        ref = np.nanpercentile(x, [16.0, 50.0, 84.0], axis=1)
    assert np.allclose(ours, ref, equal_nan=True, rtol=0, atol=1e-12)


QUANTITIES = ["dist_pc", "teff_k", "log_lum", "mass_msun", "radius_rsun", "cool_age_gyr", "total_age_gyr"]


def test_intervals_cover_the_truth_68_percent_of_the_time(setup):
    # Simulated catalogue with known truths made from the chain's own model tables and Gaussian
    # errors of known size (an internal-consistency test of the propagation, not of the physics).
    # With n = 1500 the binomial standard error of a 68% coverage is 1.2%: the 63-73% window is
    # about 4 sigma wide on each side.
    cfg, models = setup
    cat, truth = consistent_catalogue(models, 1500, seed=5)
    res = run_chain(cat, cfg, models)
    assert len(res.table) == len(cat)
    t = truth.iloc[res.table["input_row"].to_numpy()].reset_index(drop=True)
    for q in QUANTITIES:
        ok = np.isfinite(t[q]) & np.isfinite(res.table[f"{q}_p16"])
        assert ok.sum() > 1000, q
        inside = (res.table[f"{q}_p16"] <= t[q]) & (t[q] <= res.table[f"{q}_p84"])
        assert 0.63 <= inside[ok].mean() <= 0.73, (q, inside[ok].mean())


def test_mestel_age_spread_is_five_sevenths_of_the_luminosity_spread(_default_config):
    # Mestel's law t ∝ M^(5/7) L^(-5/7): at fixed mass sigma_t/t = (5/7) sigma_L/L (analytic). Mass is
    # held fixed by giving exact spectroscopic Teff and log g (zero errors); only the parallax and the
    # photometric solid angle vary L. Percentiles of a monotonic function are the function of the
    # percentiles, so the widths in log scale must be in the ratio 5/7 up to the interpolation
    # between order statistics (tolerance 2%).
    cfg = _config(_default_config, model="mestel")
    models = ModelSet.build(cfg)
    cat, _ = consistent_catalogue(models, 300, seed=9, spec_fraction=1.0, snr=(8.0, 12.0))
    cat["teff_sp_e"] = 0.0
    cat["logg_sp_e"] = 0.0
    res = run_chain(cat, cfg, models).table
    w_l = res["log_lum_p84"] - res["log_lum_p16"]
    w_t = np.log10(res["cool_age_gyr_p84"]) - np.log10(res["cool_age_gyr_p16"])
    ok = np.isfinite(w_t) & (w_l > 0)
    assert ok.sum() > 250
    assert np.allclose(w_t[ok] / w_l[ok], 5 / 7, rtol=0.02)
    assert np.allclose(res["mass_msun_p84"] - res["mass_msun_p16"], 0.0, atol=1e-9)


def test_luminosity_spread_agrees_with_linear_propagation(setup):
    # At parallax S/N >= 30 the distance is nearly linear in the parallax, so the Monte Carlo
    # half-width of log L must equal the fit's linearised error (first-order propagation) within 10%.
    cfg, models = setup
    cat, _ = consistent_catalogue(models, 400, seed=11, snr=(30.0, 60.0))
    res = run_chain(cat, cfg, models).table
    half = 0.5 * (res["log_lum_p84"] - res["log_lum_p16"])
    assert np.median(half / res["log_lum_err"]) == pytest.approx(1.0, abs=0.1)


def test_same_seed_same_output_and_seed_matters(setup):
    cfg, models = setup
    cat, _ = consistent_catalogue(models, 200, seed=13)
    a = run_chain(cat, cfg, models).table
    b = run_chain(cat, cfg, models).table
    assert a.equals(b)
    cfg2 = copy.deepcopy(cfg)
    cfg2["uncertainty"]["seed"] += 1
    c = run_chain(cat, cfg2, models).table
    assert not np.allclose(a["mass_msun_p50"], c["mass_msun_p50"], equal_nan=True)


def test_extinction_error_widens_the_intervals(setup, _default_config):
    # An E(B-V) error must add to the Teff and luminosity intervals (reddening is degenerate with
    # temperature in broad-band photometry); internal check of the propagation path.
    cfg = _config(_default_config)
    cfg["luminosity"]["extinction"].update(mode="column", max_ebv_mag=0.3)
    cfg["catalogue"]["columns"].update(ebv="ebv", ebv_error="ebv_e")
    models = ModelSet.build(cfg)
    cat, _ = consistent_catalogue(models, 300, seed=17, spec_fraction=0.0)
    cat["ebv"] = 0.05
    cat["ebv_e"] = 0.0
    base = run_chain(cat, cfg, models).table
    cat["ebv_e"] = 0.05
    wide = run_chain(cat, cfg, models).table
    w0 = base["teff_k_p84"] - base["teff_k_p16"]
    w1 = wide["teff_k_p84"] - wide["teff_k_p16"]
    assert np.median(w1 / w0) > 1.2


@pytest.mark.parametrize("rho", [-0.8, 0.0, 0.8])
def test_teff_logg_correlation_is_honoured(setup, rho):
    # Spectroscopic Teff and log g drawn with the catalogue's correlation coefficient: the mass
    # (set by log g at nearly fixed Teff) then correlates with Teff as the input says.
    from cinderclock.montecarlo import draw_chain

    cfg, models = setup
    cat, _ = consistent_catalogue(models, 5, seed=19, spec_fraction=1.0)
    cfg2 = copy.deepcopy(cfg)
    cfg2["catalogue"]["columns"]["teff_logg_corr"] = "rho"
    cfg2["uncertainty"]["draws"] = 0
    cat["rho"] = rho
    table = run_chain(cat, cfg2, models).table
    d = draw_chain(table.iloc[:1], models.mass_radius, models.cooling, cfg["progenitor"],
                   np.random.default_rng(0), 4000)
    r = np.corrcoef(np.log(d["teff_k"][0]), d["mass_msun"][0])[0, 1]
    assert r == pytest.approx(rho, abs=0.1)
