"""Maximum volumes of the 1/Vmax method, effective volumes of an exponential disk, <V/Vmax>.

Sources: the distance modulus m - M = 5 log10(d / 10 pc) (definition) gives every distance limit;
the 1/Vmax method and the completeness test <V/Vmax> = 0.5 +- 1/sqrt(12 N) are Schmidt 1968,
ApJ 151, 393 (reference-values.md section 9: the U(0, 1) statistic is marked D); effective volumes
are checked against scipy's general-purpose numerical quadrature.
"""

from __future__ import annotations

import numpy as np
import pytest

from cinderclock.errors import ConfigError, InputError
from cinderclock.population.simulate import place_in_sphere
from cinderclock.population.vmax import (SurveyLimits, compute_vmax, distance_limits, effective_volume,
                                         galactic_sin_b, limits_from_settings, v_over_vmax_statistic)

# One star at 100 pc with m = 18 (rows: limits, expected d_max in pc, expected binding limit code).
# Expected values follow from the distance modulus (d_max = d 10^(0.2 (m_lim - m))), from
# plx / sigma = k at 1000 / d (constant error), from S/N ~ d^-2 (error ~ distance), and from
# mu ~ 1/d at fixed tangential velocity (Schmidt 1975, ApJ 202, 22); tolerance: rounding only.
DISTANCE_CASES = [
    (SurveyLimits(faint_mag=20.0), 100 * 10**0.4, 0),
    (SurveyLimits(faint_mag=22.0, min_parallax_over_error=5.0), 400.0, 1),      # sigma 0.5 mas: 1000/(5*0.5)
    (SurveyLimits(faint_mag=22.0, min_parallax_over_error=5.0, parallax_error_model="photon_noise"), 200.0, 1),
    (SurveyLimits(faint_mag=22.0, min_proper_motion_mas_yr=40.0), 250.0, 2),      # mu = 100 mas/yr
    (SurveyLimits(faint_mag=22.0, max_distance_pc=150.0), 150.0, 3),
]


@pytest.mark.parametrize("limits, expected, code", DISTANCE_CASES)
def test_distance_limits(limits, expected, code):
    d_min, d_max, which = distance_limits([100.0], [18.0], limits, plx_over_err=[20.0], plx_err_mas=[0.5],
                                          pm_mas_yr=[100.0])
    assert d_max[0] == pytest.approx(expected, rel=1e-12)
    assert which[0] == code
    assert d_min[0] == 0.0


def test_bright_limit_sets_nearest_distance():
    # distance modulus: a star of m = 18 at 100 pc reaches m = 14 at 100 * 10^(-0.8) pc
    d_min, _, _ = distance_limits([100.0], [18.0], SurveyLimits(faint_mag=20.0, bright_mag=14.0))
    assert d_min[0] == pytest.approx(100 * 10**-0.8, rel=1e-12)


def test_missing_inputs_are_named():
    with pytest.raises(InputError, match="proper motions"):
        distance_limits([100.0], [18.0], SurveyLimits(faint_mag=20.0, min_proper_motion_mas_yr=10.0))
    with pytest.raises(InputError, match="parallax error"):
        distance_limits([100.0], [18.0], SurveyLimits(faint_mag=20.0, min_parallax_over_error=5.0))
    with pytest.raises(ConfigError, match="parallax_error_model"):
        SurveyLimits(faint_mag=20.0, parallax_error_model="gaia")


def test_geometric_volume():
    # sphere and shell volumes (geometry): Omega/3 (r2^3 - r1^3), Omega = 4 pi f
    lim = SurveyLimits(faint_mag=20.0, sky_fraction=0.25)
    assert effective_volume(0.0, 100.0, lim) == pytest.approx(np.pi / 3 * 1e6, rel=1e-12)
    assert effective_volume(50.0, 100.0, lim) == pytest.approx(np.pi / 3 * (1e6 - 1.25e5), rel=1e-12)


@pytest.mark.parametrize("sin_b, d_lo, d_hi", [(0.5, 0.0, 400.0), (1.0, 20.0, 900.0), (1e-7, 0.0, 300.0),
                                               (0.02, 10.0, 80.0)])
def test_line_of_sight_volume_against_quadrature(sin_b, d_lo, d_hi):
    # reference: scipy.integrate.quad of Omega r^2 exp(-r |sin b| / H); rel 1e-9 is quadrature accuracy
    from scipy.integrate import quad

    h = 250.0
    lim = SurveyLimits(faint_mag=20.0, scale_height_pc=h, sky_fraction=0.1)
    ref = 4 * np.pi * 0.1 * quad(lambda r: r**2 * np.exp(-r * sin_b / h), d_lo, d_hi, epsabs=0, epsrel=1e-12)[0]
    got = effective_volume(d_lo, d_hi, lim, sin_b=sin_b)
    assert got == pytest.approx(ref, rel=1e-9)


@pytest.mark.parametrize("d_hi", [0.01, 50.0, 300.0, 2000.0])
def test_all_sky_volume_against_double_quadrature(d_hi):
    # reference: scipy.integrate.dblquad over sin b in [-1, 1] and r (solid angle 2 pi d(sin b) per unit sin b)
    from scipy.integrate import dblquad

    h = 300.0
    lim = SurveyLimits(faint_mag=20.0, scale_height_pc=h, geometry="all_sky")
    ref = 2 * np.pi * dblquad(lambda r, s: r**2 * np.exp(-r * abs(s) / h), -1, 1, 0, d_hi, epsabs=0,
                              epsrel=1e-11)[0]
    assert effective_volume(0.0, d_hi, lim) == pytest.approx(ref, rel=1e-8)


def test_scale_height_tends_to_geometric_volume():
    # H -> infinity: the exponential weight is 1 (exact limit)
    far = SurveyLimits(faint_mag=20.0, scale_height_pc=1e12)
    flat = SurveyLimits(faint_mag=20.0)
    for geometry in ("line_of_sight", "all_sky"):
        lim = SurveyLimits(faint_mag=20.0, scale_height_pc=1e12, geometry=geometry)
        assert effective_volume(0.0, 300.0, lim, sin_b=0.7) == pytest.approx(effective_volume(0.0, 300.0, flat),
                                                                             rel=1e-8)
    with pytest.raises(InputError, match="sky positions"):
        effective_volume(0.0, 300.0, far)


def test_galactic_latitude_of_pole_and_centre():
    # North galactic pole near RA 192.859, Dec +27.128 and the centre near RA 266.405, Dec -28.936
    # (J2000, from memory): loose checks only.
    s = galactic_sin_b([192.859, 266.405], [27.128, -28.936])
    assert s[0] > 0.99999
    assert abs(s[1]) < 2e-3


def _uniform_sample(rng, n, limits, scale_height=None, radius=400.0):
    """Stars with M uniform in [10, 16], spread through a sphere (or disk), kept by the survey limits."""
    d, sin_b = place_in_sphere(rng, n, radius, scale_height)
    absmag = rng.uniform(10.0, 16.0, n)
    m = absmag + 5 * np.log10(d / 10.0)
    plx_err = rng.uniform(0.2, 1.0, n)
    plx = 1000.0 / d
    keep = (m < limits.faint_mag) & (plx / plx_err >= limits.min_parallax_over_error)
    return d[keep], m[keep], plx_err[keep], sin_b[keep]


def test_uniform_sample_has_v_over_vmax_one_half():
    # Schmidt (1968): for a complete sample spread uniformly in space V/Vmax ~ U(0, 1), so
    # <V/Vmax> = 0.5 +- 1/sqrt(12 N) (D). A 3.5-sigma band fails by chance once in ~2000 seeds;
    # the Kolmogorov-Smirnov test (scipy.stats) checks the whole distribution.
    from scipy.stats import kstest

    rng = np.random.default_rng(314)
    lim = SurveyLimits(faint_mag=19.0, min_parallax_over_error=5.0, max_distance_pc=400.0)
    d, m, err, _ = _uniform_sample(rng, 60000, lim)
    v = compute_vmax(d, m, lim, plx_err_mas=err)
    assert v["usable"].all()
    stat = v_over_vmax_statistic(v["v_over_vmax"])
    assert stat["n"] > 5000
    assert stat["sigma"] == pytest.approx(1 / np.sqrt(12 * stat["n"]))
    assert abs(stat["mean"] - 0.5) < 3.5 * stat["sigma"]
    assert kstest(v["v_over_vmax"], "uniform").pvalue > 1e-3
    # every limit code occurs: magnitude, parallax S/N and distance all bind for some stars
    assert set(np.unique(v["vmax_limit"])) == {0, 1, 3}


@pytest.mark.parametrize("geometry", ["line_of_sight", "all_sky"])
def test_disk_sample_needs_the_scale_height_correction(geometry):
    # An exponential disk (H = 120 pc) seen to 600 pc: with the effective volume <V/Vmax> is 0.5 within
    # 3.5 sigma (D, as above); with geometric volumes the far stars are too few and <V/Vmax> falls
    # far below 0.5 (more than 10 sigma here), so the check can fail.
    rng = np.random.default_rng(2718)
    h = 120.0
    lim = SurveyLimits(faint_mag=20.0, min_parallax_over_error=3.0, max_distance_pc=600.0, scale_height_pc=h,
                       geometry=geometry)
    d, m, err, sin_b = _uniform_sample(rng, 40000, lim, scale_height=h, radius=600.0)
    with_h = v_over_vmax_statistic(compute_vmax(d, m, lim, plx_err_mas=err, sin_b=sin_b)["v_over_vmax"])
    flat = SurveyLimits(faint_mag=20.0, min_parallax_over_error=3.0, max_distance_pc=600.0)
    without = v_over_vmax_statistic(compute_vmax(d, m, flat, plx_err_mas=err)["v_over_vmax"])
    assert abs(with_h["z"]) < 3.5
    assert without["z"] < -10


def test_stars_outside_the_limits_are_not_usable():
    lim = SurveyLimits(faint_mag=18.0, max_distance_pc=100.0)
    v = compute_vmax([50.0, 150.0, 50.0], [17.0, 17.0, 18.5], lim)
    assert v["usable"].tolist() == [True, False, False]
    assert v["v_over_vmax"][0] == pytest.approx((50.0 / min(100.0, 50 * 10**0.2)) ** 3)


def test_limits_from_settings_defaults_to_the_selection():
    settings = {"population": {"survey": {"band": "G", "faint_mag_limit": 20.0, "min_parallax_over_error": None,
                                          "max_distance_pc": 300.0}, "disk": {}},
                "select": {"min_parallax_over_error": 4.0, "max_distance_pc": 500.0}}
    lim = limits_from_settings(settings)
    assert lim.min_parallax_over_error == 4.0
    assert lim.max_distance_pc == 300.0
    settings["population"]["survey"]["max_distance_pc"] = None
    assert limits_from_settings(settings).max_distance_pc == 500.0
