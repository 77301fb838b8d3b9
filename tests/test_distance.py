"""Distances: inverse parallax and the EDSD posterior of Bailer-Jones (2015, PASP 127, 994)."""

import numpy as np
import pytest
from scipy import integrate, optimize

from cinderclock.distance import (METHOD_EDSD, METHOD_INVERSE, METHOD_NONE, distances, edsd_log_posterior,
                                  edsd_mode_kpc, edsd_percentiles_kpc)

L_KPC = 1.35


def _reference_mode_and_percentiles(plx, sig, lk):
    """Independent reference with scipy: mode by bounded scalar minimisation started from a dense
    log grid, percentiles by adaptive quadrature of the same unnormalised posterior and brentq."""
    rs = np.geomspace(1e-4, 60 * lk, 400001)
    lp = edsd_log_posterior(rs, plx, sig, lk)
    i = int(np.argmax(lp))
    res = optimize.minimize_scalar(lambda r: -edsd_log_posterior(r, plx, sig, lk),
                                   bounds=(rs[max(i - 1, 0)], rs[i + 1]), method="bounded",
                                   options={"xatol": 1e-12})
    mode = res.x
    top = 60 * lk
    peak = lp.max()
    pts = [mode * 0.5, mode, mode * 1.5, 2 * lk]

    def dens(r):
        return np.exp(edsd_log_posterior(r, plx, sig, lk) - peak)

    z = integrate.quad(dens, 0, top, limit=1000, points=pts)[0]

    def cdf(r):
        return integrate.quad(dens, 0, r, limit=1000, points=[p for p in pts if p < r])[0] / z

    qs = [optimize.brentq(lambda r, q=q: cdf(r) - q, 1e-5, top, xtol=1e-10) for q in (0.16, 0.84)]
    return mode, qs


# (parallax mas, error mas): high to low S/N, zero and negative parallaxes, a bimodal case.
EDSD_CASES = [(10.0, 1.0), (10.0, 3.0), (1.0, 0.5), (0.3, 0.5), (-1.0, 0.5), (5.0, 2.5), (20.0, 2.1),
              (3.0, 1.0), (10.0, 5.0)]


@pytest.mark.parametrize("plx,sig", EDSD_CASES)
def test_edsd_mode_and_percentiles_match_scipy(plx, sig):
    # Reference: numerical maximisation and quadrature of the Bailer-Jones (2015) posterior
    # P(r|plx) ∝ r^2 exp(-r/L) exp(-(plx - 1/r)^2 / (2 sigma^2)) with scipy. Tolerances: the mode
    # is a closed-form cubic root (rel 1e-5 covers the reference optimiser's tolerance); the
    # percentiles come from a 512-point grid CDF with linear interpolation (rel 1e-3).
    mode_ref, (q16, q84) = _reference_mode_and_percentiles(plx, sig, L_KPC)
    mode = edsd_mode_kpc(np.array([plx]), np.array([sig]), L_KPC)[0]
    q = edsd_percentiles_kpc(np.array([plx]), np.array([sig]), L_KPC, (0.16, 0.84))[0]
    assert mode == pytest.approx(mode_ref, rel=1e-5)
    assert q[0] == pytest.approx(q16, rel=1e-3)
    assert q[1] == pytest.approx(q84, rel=1e-3)


def test_edsd_mode_solves_bailer_jones_cubic():
    # Bailer-Jones 2015, the mode equation r^3/L - 2 r^2 + (plx/sigma^2) r - 1/sigma^2 = 0.
    rng = np.random.default_rng(3)
    plx = rng.uniform(-2, 20, 2000)
    sig = rng.uniform(0.05, 3, 2000)
    r = edsd_mode_kpc(plx, sig, L_KPC)
    resid = r**3 / L_KPC - 2 * r**2 + plx / sig**2 * r - 1 / sig**2
    scale = r**3 / L_KPC + 2 * r**2 + np.abs(plx) / sig**2 * r + 1 / sig**2
    assert np.all(r > 0)
    assert np.max(np.abs(resid) / scale) < 1e-10


def test_edsd_prior_dominated_limit():
    # With an uninformative parallax the posterior is the prior r^2 exp(-r/L): mode 2L exactly
    # (derivative of the prior), median of the Gamma(3, L) distribution from scipy.
    from scipy.stats import gamma

    plx, sig = np.array([0.0]), np.array([1e4])
    assert edsd_mode_kpc(plx, sig, L_KPC)[0] == pytest.approx(2 * L_KPC, rel=1e-6)
    q = edsd_percentiles_kpc(plx, sig, L_KPC, (0.16, 0.84))[0]
    assert q == pytest.approx(gamma(3, scale=L_KPC).ppf([0.16, 0.84]), rel=1e-3)


INVERSE_CASES = [
    # (parallax, error, zero point, expected d, lo, hi) in mas / pc: d = 1/(plx - zp),
    # lo/hi = 1/(plx - zp ± sigma) (percentiles of a monotonic function of a Gaussian; exact).
    (10.0, 0.5, 0.0, 100.0, 1000 / 10.5, 1000 / 9.5),
    (10.0, 0.5, -0.02, 1000 / 10.02, 1000 / 10.52, 1000 / 9.52),   # negative zero point adds
    (2.0, 0.1, 0.05, 1000 / 1.95, 1000 / 2.05, 1000 / 1.85),
]


@pytest.mark.parametrize("plx,sig,zp,d,lo,hi", INVERSE_CASES)
def test_inverse_parallax_with_zero_point(plx, sig, zp, d, lo, hi):
    out = distances([plx], [sig], zero_point_mas=zp, min_snr_inverse=10.0)
    assert out["method"][0] == METHOD_INVERSE
    assert out["distance_pc"][0] == pytest.approx(d, rel=1e-12)
    assert out["distance_lo_pc"][0] == pytest.approx(lo, rel=1e-12)
    assert out["distance_hi_pc"][0] == pytest.approx(hi, rel=1e-12)


def test_threshold_and_invalid_inputs():
    out = distances([10.0, 10.0, np.nan, 5.0, 5.0], [0.5, 2.0, 1.0, 0.0, -1.0],
                    min_snr_inverse=10.0, length_scale_pc=400.0)
    assert list(out["method"]) == [METHOD_INVERSE, METHOD_EDSD, METHOD_NONE, METHOD_NONE, METHOD_NONE]
    assert np.isnan(out["distance_pc"][2:]).all()
    # the EDSD star uses L = 0.4 kpc: its mode solves the cubic with that L
    r = out["distance_pc"][1] / 1000
    assert r**3 / 0.4 - 2 * r**2 + 10.0 / 4.0 * r - 1 / 4.0 == pytest.approx(0.0, abs=1e-9)
    assert out["distance_lo_pc"][1] < out["distance_pc"][1] < out["distance_hi_pc"][1]


def test_edsd_high_snr_approaches_inverse_parallax():
    # As sigma/plx -> 0 the likelihood dominates and the mode tends to 1/plx (Bailer-Jones 2015).
    r = edsd_mode_kpc(np.array([10.0]), np.array([0.01]), L_KPC)[0]
    assert r == pytest.approx(0.1, rel=1e-5)


def test_length_scale_outside_range_is_a_config_error():
    from cinderclock.errors import ConfigError

    with pytest.raises(ConfigError, match="length scale"):
        distances([1.0], [0.5], length_scale_pc=0.0)
