"""Monte Carlo white-dwarf populations of known age and space distribution (tests, benchmarks).

Star by star (vectorised): an initial mass from the IMF, a birth time from the star-formation
history, the pre-white-dwarf lifetime and the IFMR, the cooling age and, through the cooling
callable *forwards* (luminosity at a given age), the bolometric magnitude; then a position drawn
uniformly in a sphere, optionally thinned by an exponential disk. This path shares the physical
relations with :mod:`cinderclock.population.model` but not its numerics (no tabulation, no
inversion, no quadrature), so agreement between the two checks the model's integration, and a
fit to a simulated sample checks the estimator and the likelihood. It cannot check the physics.
"""

from __future__ import annotations

import numpy as np

from .cooling_link import mbol_sun
from .imf import get_imf
from .sfh import StarFormationHistory


def simulate_white_dwarfs(rng, n_formed, age_gyr, log_lum_at_age, ifmr="cummings2018_mist", lifetime="hurley2000",
                          imf="salpeter", sfh=None, mass_range_msun=None, metallicity=0.02):
    """White dwarfs among ``n_formed`` progenitors born over a population of age ``age_gyr``.

    Parameters
    ----------
    rng : numpy.random.Generator
    n_formed : int
        Progenitors formed (initial masses within ``mass_range_msun``).
    age_gyr : float
        Population age T (Gyr).
    log_lum_at_age : callable
        ``(mass_msun, age_yr) -> log10 L/Lsun``.
    ifmr, lifetime, imf, mass_range_msun, metallicity :
        As in :class:`cinderclock.population.model.PopulationModel`.
    sfh : StarFormationHistory, optional
        Default: constant.

    Returns
    -------
    dict of ndarray
        ``initial_mass_msun``, ``mass_msun``, ``cool_age_gyr``, ``total_age_gyr`` (lookback time of
        formation), ``log_lum``, ``mbol`` of the stars that are white dwarfs today.
    """
    from ..progenitor.ifmr import get_ifmr
    from ..progenitor.lifetimes import get_lifetime

    sfh = sfh or StarFormationHistory()
    rel = get_ifmr(ifmr)
    life = get_lifetime(lifetime)
    lo, hi = mass_range_msun if mass_range_msun is not None else rel.initial_range
    mi = get_imf(imf).sample(rng, int(n_formed), lo, hi)
    tau_grid = np.linspace(0.0, float(age_gyr), 20001)
    cdf = sfh.cumulative(tau_grid, age_gyr)
    tau = np.interp(rng.uniform(size=mi.size) * cdf[-1], cdf, tau_grid)
    t_prog = life.lifetime_yr(mi, metallicity, rel.final_mass(mi)[0])[0] / 1e9
    wd = tau > t_prog
    mi, t_cool = mi[wd], (tau - t_prog)[wd]
    mf = rel.final_mass(mi)[0]
    logl = np.asarray(log_lum_at_age(mf, t_cool * 1e9), dtype=float)
    return {"initial_mass_msun": mi, "mass_msun": mf, "cool_age_gyr": t_cool, "total_age_gyr": tau[wd],
            "log_lum": logl, "mbol": mbol_sun() - 2.5 * logl}


def place_in_sphere(rng, n, radius_pc, scale_height_pc=None):
    """Distances and sin(galactic latitude) of ``n`` stars spread through a sphere.

    Uniform in volume, or, with a scale height H, with density exp(-|z|/H) (z = d sin b, the
    observer in the mid-plane) by rejection.

    Returns
    -------
    dist_pc, sin_b : ndarray
    """
    d_out, s_out = [], []
    have = 0
    while have < n:
        k = 2 * (n - have) + 100
        d = radius_pc * rng.uniform(size=k) ** (1.0 / 3.0)
        s = rng.uniform(-1.0, 1.0, size=k)
        if scale_height_pc is not None:
            keep = rng.uniform(size=k) < np.exp(-np.abs(d * s) / scale_height_pc)
            d, s = d[keep], s[keep]
        d_out.append(d)
        s_out.append(s)
        have += d.size
    return np.concatenate(d_out)[:n], np.concatenate(s_out)[:n]


def observe_sample(rng, wd, radius_pc, mag_limit, plx_err_mas=0.0, mag_err=0.0, min_parallax_over_error=None,
                   distance_limit_pc=None):
    """A measured, magnitude-limited sample of simulated white dwarfs (survey band = bolometric, BC = 0).

    Each star is placed uniformly in a sphere of ``radius_pc``; its parallax and apparent magnitude
    are measured with normal errors ``plx_err_mas`` and ``mag_err``; stars are kept by the measured
    magnitude (``< mag_limit``), the parallax S/N (``>= min_parallax_over_error``, if given) and the
    measured distance (``<= distance_limit_pc``, default ``radius_pc``). The absolute magnitude is
    the measured one, M = m - 5 log10(d / 10 pc) with d = 1000 / parallax, and its standard error
    the first-order sum of both errors, sqrt(sigma_m^2 + (5 / ln 10 * sigma_plx / plx)^2).

    Parameters
    ----------
    rng : numpy.random.Generator
    wd : dict of ndarray
        Output of :func:`simulate_white_dwarfs`.

    Returns
    -------
    dict of ndarray
        ``mbol`` (measured), ``mbol_err``, ``mbol_true``, ``mag``, ``dist_pc`` (measured), ``plx_mas``,
        ``plx_err_mas``, ``mass_msun``, ``cool_age_gyr``, ``total_age_gyr`` (cooling + progenitor
        lifetime, the true lookback time of formation), ``index`` (row in ``wd``).
    """
    n = wd["mbol"].size
    d, _ = place_in_sphere(rng, n, radius_pc)
    plx_true = 1000.0 / d
    plx = plx_true + float(plx_err_mas) * rng.standard_normal(n)
    mag = wd["mbol"] + 5.0 * np.log10(d / 10.0) + float(mag_err) * rng.standard_normal(n)
    keep = (mag < mag_limit) & (plx > 0)
    if min_parallax_over_error is not None and plx_err_mas > 0:
        keep &= plx / plx_err_mas >= min_parallax_over_error
    with np.errstate(divide="ignore", invalid="ignore"):
        d_obs = np.where(plx > 0, 1000.0 / plx, np.nan)
    keep &= d_obs <= (radius_pc if distance_limit_pc is None else distance_limit_pc)
    idx = np.flatnonzero(keep)
    d_obs = d_obs[idx]
    mbol = mag[idx] - 5.0 * np.log10(d_obs / 10.0)
    err = np.sqrt(float(mag_err) ** 2 + (5.0 / np.log(10.0) * float(plx_err_mas) / plx[idx]) ** 2)
    out = {"mbol": mbol, "mbol_err": err, "mbol_true": wd["mbol"][idx], "mag": mag[idx], "dist_pc": d_obs,
           "plx_mas": plx[idx], "plx_err_mas": np.full(idx.size, float(plx_err_mas)), "index": idx}
    for key in ("mass_msun", "cool_age_gyr", "total_age_gyr"):
        if key in wd:
            out[key] = wd[key][idx]
    return out
