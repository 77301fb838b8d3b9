"""Population steps on whole tables: Vmax/luminosity function stage, age stage, cooling link,
figures and the run summary.

Sources: the Sun's absolute bolometric magnitude 4.74 (IAU 2015 Resolutions B2 and B3;
reference-values.md section 1, C/D) checks the geometry of the model cooling tracks; the rest
are internal checks of bookkeeping (counts, statuses, files), labelled as such.
"""

from __future__ import annotations

import copy
import json

import numpy as np
import pandas as pd
import pytest

from cinderclock.cooling import mestel
from cinderclock.errors import ConfigError, InputError
from cinderclock.population.cooling_link import cooling_from_table, mbol_sun, mestel_link
from cinderclock.population.simulate import place_in_sphere, simulate_white_dwarfs
from cinderclock.population.stages import (LF_COLUMNS, MODEL_COLUMNS, STAR_COLUMNS, luminosity_function_stage,
                                           population_age_stage)

COEFF = mestel.age_coefficient_yr()


@pytest.fixture(scope="module")
def final_table():
    """A per-star table like the final stage's, from a simulated 9 Gyr population (BC = 0 in band G)."""
    rng = np.random.default_rng(77)
    wd = simulate_white_dwarfs(rng, 40000, 9.0, lambda m, t: mestel.luminosity_at_age(m, t, COEFF))
    d, _ = place_in_sphere(rng, wd["mbol"].size, 100.0)
    mag = wd["mbol"] + 5 * np.log10(d / 10.0)
    keep = mag < 17.5
    n = int(keep.sum())
    plx = 1000.0 / d[keep]
    table = pd.DataFrame({
        "star_id": np.arange(n) + 10**12, "ra_deg": rng.uniform(0, 360, n),
        "dec_deg": np.degrees(np.arcsin(rng.uniform(-1, 1, n))), "plx_corr_mas": plx,
        "plx_err_mas": np.full(n, 0.1), "dist_pc": d[keep], "mag_G": mag[keep], "mbol": wd["mbol"][keep],
        "absmag_G": wd["mbol"][keep], "absmag_BP": wd["mbol"][keep] + 0.1, "absmag_RP": wd["mbol"][keep] - 0.2,
        "mass_msun": wd["mass_msun"][keep], "cool_age_gyr": wd["cool_age_gyr"][keep],
        "mass_route": np.where(rng.uniform(size=n) < 0.3, "logg", "radius"),
    })
    # two faults: a star fainter than the survey limit and one without a magnitude
    table.loc[0, "mag_G"] = 18.0
    table.loc[1, "mag_G"] = np.nan
    return table


@pytest.fixture
def settings(config):
    s = {k: copy.deepcopy(config[k]) for k in ("population", "select", "luminosity")}
    s["population"]["survey"].update(faint_mag_limit=17.5, max_distance_pc=100.0)
    s["population"]["mbol_bins"] = {"min": 8.0, "max": 19.0, "width": 0.5}
    s["population"]["fit"]["mbol_range"] = [12.0, 19.0]
    s["population"]["fit"]["age_grid"] = {"min_gyr": 4.0, "max_gyr": 15.0, "step_gyr": 0.05}
    s["population"]["bootstrap"]["resamples"] = 60
    s["select"]["max_distance_pc"] = None
    return s


def test_luminosity_function_stage_bookkeeping(final_table, settings):
    # internal check: one row per star, every star has a status, the fault rows are excluded
    stars, lf, summary = luminosity_function_stage(final_table, settings)
    assert len(stars) == len(final_table)
    assert set(stars.columns) == set(STAR_COLUMNS) and set(lf.columns) == set(LF_COLUMNS)
    assert stars["lf_status"].iloc[0] == 2 and stars["lf_status"].iloc[1] == 1
    counts = summary["status_counts"]
    assert sum(counts.values()) == len(final_table)
    assert counts["used"] == len(final_table) - 2
    assert lf["n_stars"].sum() == summary["stars_in_bins"]
    # parallax S/N (constant error 0.1 mas, limit 5: 2000 pc) never binds; magnitude and distance do
    assert summary["limit_counts"]["parallax_snr"] == 0
    assert summary["limit_counts"]["magnitude"] > 0 and summary["limit_counts"]["distance"] > 0
    # a complete simulated sample: <V/Vmax> = 0.5 within 3.5 sigma (Schmidt 1968; D)
    assert abs(summary["v_over_vmax"]["z"]) < 3.5


def test_unknown_band_and_missing_positions_are_reported(final_table, settings):
    settings["population"]["survey"]["band"] = "Kp"
    with pytest.raises(ConfigError, match="mag_Kp"):
        luminosity_function_stage(final_table, settings)
    settings["population"]["survey"]["band"] = "G"
    settings["population"]["disk"]["scale_height_pc"] = 300.0
    with pytest.raises(InputError, match="ra_deg"):
        luminosity_function_stage(final_table.drop(columns=["ra_deg"]), settings)
    stars, _, _ = luminosity_function_stage(final_table, settings)         # with positions it runs
    assert (stars["lf_status"] == 0).sum() == len(final_table) - 2


def test_population_age_stage(final_table, settings):
    # the simulated population is 9 Gyr old: inside the 95 % interval (as in test_population_agefit)
    stars, _, _ = luminosity_function_stage(final_table, settings)
    link = mestel_link(COEFF)
    summary, model, profile = population_age_stage(stars, link, settings)
    assert summary["interval95_gyr"][0] <= 9.0 <= summary["interval95_gyr"][1]
    assert set(model.columns) == set(MODEL_COLUMNS)
    assert profile["delta_lnl"].max() == 0.0
    refs = json.dumps(summary["models"])
    assert "Salpeter" in refs and "Cummings" in refs and "Hurley" in refs and "Mestel" in refs
    json.dumps(summary, default=float)                                     # serialisable
    settings["population"]["fit"]["mbol_range"] = [12.0, 12.5]
    with pytest.raises(ConfigError, match="fewer than two"):
        population_age_stage(stars, link, settings)


def test_cooling_links():
    from cinderclock.cooling.mestel import cooling_age_yr

    closed = mestel_link(COEFF)
    assert closed.name == "mestel"
    assert closed.age_yr(0.6, -4.0) == pytest.approx(cooling_age_yr(0.6, -4.0, COEFF))
    logl = np.round(np.arange(2.0, -8.0001, -0.01), 6)
    frame = pd.concat([pd.DataFrame({"mass_msun": m, "log_lum": logl, "age_yr": cooling_age_yr(m, logl, COEFF)})
                       for m in (0.5, 0.6, 0.7, 0.8, 0.9, 1.0)], ignore_index=True)
    grid_link = cooling_from_table(frame)
    assert grid_link.age_yr(np.array([0.6]), np.array([-4.0]))[0] == pytest.approx(cooling_age_yr(0.6, -4.0, COEFF),
                                                                                    rel=1e-6)
    assert grid_link.log_lum_at_age(np.array([0.6]), np.array([2e9]))[0] == pytest.approx(
        mestel.luminosity_at_age(0.6, 2e9, COEFF), abs=1e-4)
    with pytest.raises(InputError, match="not recognised"):
        cooling_from_table(pd.DataFrame({"x": [1.0]}))


def test_track_geometry_gives_the_sun_its_absolute_bolometric_magnitude():
    # A blackbody of one solar radius at 5772 K has M_bol = 4.74 (IAU 2015 B2/B3; 0.005 tolerance
    # against 4.74 as in reference-values.md); cmd_tracks applies M = m_unit - 5 log10(R / 10 pc).
    from cinderclock.constants import SIGMA_SB_SI
    from cinderclock.photometry.bolometric import bolometric_magnitude_from_flux
    from cinderclock.population.figures import cmd_tracks

    teff = np.geomspace(3000.0, 100000.0, 300)
    phot = pd.DataFrame({"teff_k": teff, "ebv_mag": 0.0,
                         "mag_bol": bolometric_magnitude_from_flux(SIGMA_SB_SI * teff**4)})
    mr = pd.DataFrame({"mass_msun": 1.0, "teff_k": [5000.0, 5772.0, 6500.0], "radius_rsun": 1.0})
    t = cmd_tracks(mr, phot, ("bol", "bol"), "bol", [1.0])[0]
    assert np.interp(5772.0, t["teff_k"][::-1], t["absmag"][::-1]) == pytest.approx(4.74, abs=0.005)
    assert mbol_sun() == pytest.approx(4.739996, abs=1e-5)
    assert np.all(t["colour"] == 0)
    assert cmd_tracks(mr, phot, ("bol", "bol"), "bol", [0.6]) == []          # no table mass near 0.6


def test_figures_are_written(final_table, settings, tmp_path, monkeypatch):
    # internal check: every figure function writes a non-blank PNG and a PDF, with and without total ages
    import matplotlib.image as mpimg

    from cinderclock.population import figures

    stars, lf, _ = luminosity_function_stage(final_table, settings)
    link = mestel_link(COEFF)
    fit, model, profile = population_age_stage(stars, link, settings)
    teff = np.geomspace(3000.0, 100000.0, 50)
    phot = pd.DataFrame({"teff_k": teff, "ebv_mag": 0.0, **{f"mag_{b}": -10 * np.log10(teff) + k
                                                            for b, k in (("G", 0.0), ("BP", 0.1), ("RP", -0.2))}})
    mr = pd.DataFrame({"mass_msun": np.repeat([0.6, 0.8], 50), "teff_k": np.tile(teff, 2),
                       "radius_rsun": np.repeat([0.0125, 0.0100], 50)})
    tracks = figures.cmd_tracks(mr, phot, ("BP", "RP"), "G", [0.6, 0.8], age_yr=link.age_yr)
    written = []
    written += figures.colour_magnitude(final_table, tracks, ("BP", "RP"), "G", tmp_path / "cmd")
    written += figures.mass_distribution(final_table, tmp_path / "mass")
    written += figures.age_distributions(final_table, tmp_path / "ages", population_age=(9.0, 8.5, 9.5))
    with_total = final_table.assign(total_age_gyr=final_table["cool_age_gyr"] + 1.0)
    written += figures.age_distributions(with_total, tmp_path / "ages_total", population_age=(9.0, 8.5, 9.5))
    written += figures.luminosity_function(lf, tmp_path / "lf", model=model, fit=fit, note="note")
    written += figures.age_fit(fit, profile, tmp_path / "fit")
    monkeypatch.setattr(figures, "DENSITY_ABOVE", 100)                     # large-sample drawing path
    written += figures.colour_magnitude(final_table, tracks, ("BP", "RP"), "G", tmp_path / "cmd_cells")
    assert len(written) == 14
    for p in written:
        assert p.exists() and p.stat().st_size > 5000
        if p.suffix == ".png":
            img = mpimg.imread(p)
            assert img.shape[0] > 300 and img.shape[1] > 500
            assert img[..., :3].std() > 0.05                                  # not a blank canvas
        else:
            assert p.read_bytes()[:5] == b"%PDF-"


def test_run_summary_lists_counts_models_and_configuration(config):
    from cinderclock.population.summary import render

    counts = {"rows_read": 10, "rows_in_results": 7, "rows_rejected": 3, "shards": 1,
              "kept_after_stage": {"ingest": 9, "select": 7}, "rejected_by_stage": {"ingest": 1, "select": 2},
              "rejected_by_reason": {"ingest/malformed_row": 1, "select/parallax_snr": 2}}
    prov = {"package_version": "0.1.0", "config_hash": "ab" * 32, "catalogue_sha256": "cd" * 32,
            "reasons": {"parallax_snr": "Parallax <S/N> below the limit"},
            "stages": {"cooling_model": {"models": [{"name": "mestel",
                                                     "reference": "Mestel, L. 1952, MNRAS 112, 583"}]}}}
    lf = {"status_counts": {"used": 7}, "v_over_vmax": {"n": 7, "mean": 0.5, "sigma": 0.1, "z": 0.0}, "limits": {}}
    fit = {"age_gyr": 9.1, "interval68_gyr": [8.8, 9.4], "interval95_gyr": [None, None],
           "likelihood_interval_gyr": [8.9, 9.3], "models": [{"name": "salpeter", "reference": "Salpeter 1955"}],
           "cautions": ["indicative"], "fit_edges_mbol": [12.0, 12.5, 13.0]}
    page = render(counts, prov, config, lf, fit)
    assert "malformed_row" in page and "parallax_snr" in page
    assert "Parallax &lt;S/N&gt; below the limit" in page                   # escaped
    assert "Mestel, L. 1952" in page and "Salpeter 1955" in page
    assert "8.800 - 9.400" in page and "n/a - n/a" in page
    assert "faint_mag_limit" in page                                        # the configuration listing


def test_too_few_stars_give_no_fit_and_the_figures_say_so(final_table, settings, tmp_path):
    # internal check: a sample with no stars in the fitted range goes through without a fit
    from cinderclock.population import figures
    from cinderclock.population.stages import MIN_STARS_FOR_FIT

    bright = final_table[final_table["mbol"] < 11.0].reset_index(drop=True)
    settings["population"]["fit"]["mbol_range"] = [14.0, 19.0]
    stars, lf, _ = luminosity_function_stage(bright, settings)
    link = mestel_link(COEFF)
    fit, model, profile = population_age_stage(stars, link, settings)
    assert fit["age_gyr"] is None and fit["n_stars_in_fit"] < MIN_STARS_FOR_FIT
    assert "no population age" in fit["cautions"][0]
    written = figures.luminosity_function(lf, tmp_path / "lf", model=model, fit=fit)
    written += figures.age_fit(fit, profile, tmp_path / "fit")
    assert all(p.exists() for p in written)


def test_progenitor_choices_fall_back_to_the_progenitor_section():
    # internal check of the configuration rule: population.* first, then progenitor.*, then defaults
    from cinderclock.population.model import progenitor_choices

    pop = {"ifmr": None, "lifetime": "rule_of_thumb", "metallicity": None}
    assert progenitor_choices(pop, {"ifmr": "catalan2008", "lifetime": "hurley2000"}) == \
        {"ifmr": "catalan2008", "lifetime": "rule_of_thumb", "metallicity": 0.02}
    assert progenitor_choices(pop, None)["ifmr"] == {"relation": "cummings2018", "isochrones": "mist"}
