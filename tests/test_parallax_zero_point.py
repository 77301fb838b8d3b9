"""Per-star parallax zero point (Lindegren et al. 2021, A&A 649, A4) and its use by select/luminosity."""

import numpy as np
import pandas as pd
import pytest

from cinderclock.distance import (FIVE_PARAMETER, SIX_PARAMETER, ZERO_POINT_LINDEGREN_2021,
                                  ecliptic_latitude_deg, lindegren2021_zero_point_mas, star_zero_points)
from cinderclock.reasons import bit


def _reference():
    zpt = pytest.importorskip("zero_point.zpt")
    zpt.load_tables()
    return zpt


def test_matches_the_gaia_teams_reference_implementation():
    # Reference: gaiadr3-zeropoint (the Gaia team's implementation of Lindegren et al. 2021, Tables 9
    # and 10 with the basis functions of Appendix A). It rounds to 1e-6 mas, hence the tolerance.
    import warnings

    zpt = _reference()
    rng = np.random.default_rng(3)
    n = 5000
    g, nu, pc = rng.uniform(6.05, 20.95, n), rng.uniform(1.12, 1.88, n), rng.uniform(1.25, 1.71, n)
    beta, sol = rng.uniform(-89, 89, n), rng.choice([FIVE_PARAMETER, SIX_PARAMETER], n)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = zpt.get_zpt(g, nu, pc, beta, sol)
    mine, outside = lindegren2021_zero_point_mas(g, nu, pc, beta, sol)
    assert np.max(np.abs(mine - ref)) < 1.5e-6 and not outside.any()


def test_faint_quasar_like_sources_are_offset_by_a_few_tens_of_microarcsec():
    # Lindegren et al. 2021, abstract: quasar parallaxes are offset "by a few tens of microarcsec";
    # Groenewegen 2021 (A&A 654, A20) finds a mean of -0.021 mas from quasars. A loose check at G = 19-20,
    # nu_eff = 1.6 (quasar-like colour), averaged over the ecliptic latitude.
    beta = np.linspace(-89, 89, 179)
    g = np.full_like(beta, 19.5)
    zp, _ = lindegren2021_zero_point_mas(g, np.full_like(beta, 1.6), np.nan, beta, np.full_like(beta, 31))
    assert -0.05 < np.average(zp, weights=np.cos(np.deg2rad(beta))) < -0.005


def test_outside_the_validity_range_is_flagged_and_held_at_the_edge():
    assert ZERO_POINT_LINDEGREN_2021.ranges[0].low == 6.0 and ZERO_POINT_LINDEGREN_2021.ranges[0].high == 21.0
    zp, outside = lindegren2021_zero_point_mas([21.5, 21.0 - 1e-9, 15.0, 15.0], [1.5, 1.5, 2.05, 1.9 - 1e-9],
                                               np.nan, 10.0, 31)
    assert outside.tolist() == [True, False, True, False]
    # held at the edges, not extrapolated (internal check: equal to the value at the edge)
    assert np.isclose(zp[0], zp[1], atol=1e-9) and np.isclose(zp[2], zp[3], atol=2e-6)


def test_two_parameter_and_missing_inputs_fall_back_to_the_constant():
    table = pd.DataFrame({"plx_mas": [1.0, 1.0, 1.0], "mag_G": [17.0, 17.0, np.nan], "nu_eff_um": [1.6, 1.6, 1.6],
                          "ecl_lat_deg": [0.0, 0.0, 0.0], "astrometric_params_solved": [31, 3, 31]})
    zp, outside, fallback = star_zero_points(table, {"zero_point_model": "lindegren2021",
                                                     "parallax_zero_point_mas": -0.017, "zero_point_band": "G"})
    assert fallback.tolist() == [False, True, True] and np.allclose(zp[1:], -0.017)
    ref, _ = lindegren2021_zero_point_mas(17.0, 1.6, np.nan, 0.0, 31)
    assert np.isclose(zp[0], ref[0])


def test_ecliptic_latitude_from_ra_dec():
    # The north ecliptic pole is at RA 18h00m, Dec +66.56 deg (IAU; obliquity 23.44 deg, common practice);
    # the vernal equinox (RA 0, Dec 0) lies on the ecliptic.
    lat = ecliptic_latitude_deg(np.array([270.0, 0.0]), np.array([90.0 - 23.4393, 0.0]))
    assert abs(lat[0] - 90.0) < 0.01 and abs(lat[1]) < 0.01


def test_select_applies_each_stars_zero_point_and_sets_the_flags(config):
    from cinderclock.config import stage_settings
    from cinderclock.stages.select import select

    s = stage_settings(config, "select")
    s["astrometry"].update(zero_point_model="column", parallax_zero_point_mas=0.0)
    s["select"].update(wd_region=None, quality_cuts=[], max_mag_error={}, max_distance_pc=None,
                       min_parallax_over_error=5.0)
    table = pd.DataFrame({"star_id": [1, 2], "input_row": [0, 1], "plx_mas": [0.52, 0.52], "plx_err_mas": [0.1, 0.1],
                          "plx_zp_cat_mas": [0.05, np.nan], "quality_bits": [0, 0]})
    kept, rejects = select(table, s)
    # star 1: (0.52 - 0.05)/0.1 = 4.7 < 5, rejected; star 2: no zero point, the constant 0 -> 5.2, kept
    assert kept["star_id"].tolist() == [2] and rejects["star_id"].tolist() == [1]
    assert kept["plx_zp_mas"].tolist() == [0.0] and kept["quality_bits"].iloc[0] & bit("zero_point_fallback")
