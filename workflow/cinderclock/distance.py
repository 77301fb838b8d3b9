"""Distances from parallaxes: inverse parallax at high S/N, an exponentially decreasing space
density (EDSD) prior below it.

Zero-point convention
---------------------
Catalogue parallaxes carry a zero-point offset ``zero_point_mas`` (the parallax a source at
infinite distance would show). Every function here first forms the corrected parallax

    parallax_corrected = parallax - zero_point,

so a catalogue whose parallaxes are too small by 0.02 mas has ``zero_point_mas = -0.02`` and the
correction *adds* 0.02 mas. (For Gaia EDR3 the global offset found from quasars is of that sign and
order, Lindegren et al. 2021, A&A 649, A4; value from memory; the offset depends on magnitude,
colour and position, so the configured number is the user's choice.)

Estimators
----------
* ``parallax_corrected / parallax_error >= min_snr_inverse``: d = 1 / parallax, with the 16th and
  84th percentiles 1 / (parallax + sigma) and 1 / (parallax - sigma) (exact percentiles of d when
  the parallax error is Gaussian, because d is a monotonic function of the parallax).
* below it (including zero and negative parallaxes): the posterior with the EDSD prior
  P(r) ∝ r^2 exp(-r / L) of Bailer-Jones 2015 (PASP 127, 994, section 4). Its mode solves the
  cubic r^3 / L - 2 r^2 + (parallax / sigma^2) r - 1 / sigma^2 = 0 (r in kpc, parallax in mas):
  solved here in closed form for every star at once, keeping the real positive root of highest
  posterior. The 16th and 84th percentiles come from the posterior CDF integrated on a per-star
  grid in ln r, in chunks of bounded memory.

Caution: the EDSD posterior at low S/N is dominated by the prior. Its length scale L sets where a
poorly measured star is put; white dwarfs are a local, thin-disc population, so L of a few hundred
pc suits them better than the kpc-scale values used for all-sky samples. With a large L a star of
S/N of about 3 at 100 pc is put at kpc distances, because the prior volume there outweighs the
likelihood. Report the method column with every distance.
"""

from __future__ import annotations

import numpy as np

from .relation import PublishedRelation, ValidRange

#: The EDSD prior as a published method; its only parameter is the length scale L (pc).
EDSD_BAILER_JONES_2015 = PublishedRelation(
    key="edsd",
    reference="Bailer-Jones, C. A. L. 2015, PASP 127, 994 (exponentially decreasing space density prior)",
    ranges=(ValidRange("length_scale_pc", 1.0, 1e5, "pc"),),
    note="prior-dominated at low parallax S/N; choose L for the population (white dwarfs: a few hundred pc)",
    source_location="section 3, the exponentially decreasing space density prior and the mode of its posterior",
    verified=True,
    verification="method and reference (PASP 127, 994, 2015) checked against the paper's record and abstract; the "
                 "prior has no published coefficient (its length scale is the user's choice)",
)

#: Method codes written in the ``method`` output.
METHOD_INVERSE = "inverse_parallax"
METHOD_EDSD = "edsd_mode"
METHOD_NONE = "none"

#: Default S/N above which the inverse parallax is used (fractional error 0.1). Bailer-Jones
#: (2015) shows the inverse parallax to be a fair estimator only for fractional errors of about
#: 0.1 - 0.2 and below (the paper's abstract: "not trivial once the fractional parallax error is
#: larger than about 20%"); 10 is our choice within that range.
DEFAULT_MIN_SNR_INVERSE = 10.0

#: Default EDSD length scale, pc. 1.35 kpc is the value Astraatmadja & Bailer-Jones (2016,
#: ApJ 832, 137) used for a Galaxy-wide sample (unverified); set a smaller value for local
#: white-dwarf samples (see the module caution).
DEFAULT_LENGTH_SCALE_PC = 1350.0

_GRID_POINTS = 512
_CHUNK = 8192


def distances(parallax_mas, parallax_error_mas, zero_point_mas=0.0,
              min_snr_inverse=DEFAULT_MIN_SNR_INVERSE, length_scale_pc=DEFAULT_LENGTH_SCALE_PC):
    """Distance estimates with 16th/84th-percentile bounds for arrays of parallaxes.

    Parameters
    ----------
    parallax_mas, parallax_error_mas : array_like
        Catalogue parallax and its standard error, mas.
    zero_point_mas : float or array_like
        Parallax zero point, mas; the corrected parallax is ``parallax - zero_point``.
    min_snr_inverse : float
        Corrected-parallax S/N at or above which the inverse parallax is used.
    length_scale_pc : float
        Length scale L of the EDSD prior, pc.

    Returns
    -------
    dict
        ``distance_pc`` (inverse parallax, or the EDSD posterior mode), ``distance_lo_pc`` and
        ``distance_hi_pc`` (16th and 84th percentiles), ``parallax_snr`` (corrected parallax over
        its error) and ``method`` (array of ``"inverse_parallax"``, ``"edsd_mode"`` or ``"none"``
        where the input is not finite or the error is not positive).
    """
    plx = np.asarray(parallax_mas, dtype=float) - np.asarray(zero_point_mas, dtype=float)
    err = np.asarray(parallax_error_mas, dtype=float)
    plx, err = np.broadcast_arrays(plx, err)
    plx = np.atleast_1d(plx).astype(float)
    err = np.atleast_1d(err).astype(float)
    if not EDSD_BAILER_JONES_2015.inside(length_scale_pc=length_scale_pc):
        from .errors import ConfigError

        raise ConfigError(f"EDSD length scale must lie in [1, 1e5] pc, got {length_scale_pc}")

    n = plx.size
    d = np.full(n, np.nan)
    lo = np.full(n, np.nan)
    hi = np.full(n, np.nan)
    method = np.full(n, METHOD_NONE, dtype="<U16")
    ok = np.isfinite(plx) & np.isfinite(err) & (err > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        snr = np.where(ok, plx / err, np.nan)

    inv = ok & (snr >= min_snr_inverse)
    d[inv] = 1000.0 / plx[inv]
    lo[inv] = 1000.0 / (plx[inv] + err[inv])
    with np.errstate(divide="ignore"):
        # for S/N <= 1 the 84th percentile is unbounded
        hi[inv] = np.where(plx[inv] > err[inv], 1000.0 / (plx[inv] - err[inv]), np.inf)
    method[inv] = METHOD_INVERSE

    low = ok & ~inv
    if np.any(low):
        l_kpc = length_scale_pc / 1000.0
        mode = edsd_mode_kpc(plx[low], err[low], l_kpc)
        q = edsd_percentiles_kpc(plx[low], err[low], l_kpc, (0.16, 0.84), mode_kpc=mode)
        d[low] = 1000.0 * mode
        lo[low] = 1000.0 * q[:, 0]
        hi[low] = 1000.0 * q[:, 1]
        method[low] = METHOD_EDSD
    return {"distance_pc": d, "distance_lo_pc": lo, "distance_hi_pc": hi,
            "parallax_snr": snr, "method": method}


def edsd_log_posterior(r_kpc, parallax_mas, parallax_error_mas, length_scale_kpc):
    """Unnormalised ln P(r | parallax) for the EDSD prior (Bailer-Jones 2015, eq. for P*_3)."""
    r = np.asarray(r_kpc, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return (2.0 * np.log(r) - r / length_scale_kpc
                - 0.5 * ((parallax_mas - 1.0 / r) / parallax_error_mas) ** 2)


def _real_cubic_roots(b, c, d):
    """Real roots of r^3 + b r^2 + c r + d = 0, as an (n, 3) array with NaN for complex roots.

    Trigonometric/hyperbolic closed forms (no cancellation between two cube roots).
    """
    shift = -b / 3.0
    p = c - b * b / 3.0
    q = 2.0 * b**3 / 27.0 - b * c / 3.0 + d
    disc = (q / 2.0) ** 2 + (p / 3.0) ** 3
    roots = np.full(b.shape + (3,), np.nan)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # three real roots (p < 0, disc <= 0)
        three = (disc <= 0) & (p < 0)
        m = 2.0 * np.sqrt(-p / 3.0)
        arg = np.clip(3.0 * q / (p * m), -1.0, 1.0)
        theta = np.arccos(arg) / 3.0
        for k in range(3):
            roots[..., k] = np.where(three, m * np.cos(theta - 2.0 * np.pi * k / 3.0), np.nan)
        # one real root, p > 0: t = -2 sqrt(p/3) sinh(asinh(3q/(2p) sqrt(3/p)) / 3)
        pos = ~three & (p > 0)
        s = np.sqrt(np.abs(p) / 3.0)
        t_pos = -2.0 * s * np.sinh(np.arcsinh(1.5 * q / (np.abs(p) * s)) / 3.0)
        # one real root, p < 0: t = -2 sign(q) sqrt(-p/3) cosh(acosh(-3|q|/(2p) sqrt(-3/p)) / 3)
        neg = ~three & (p < 0)
        t_neg = -2.0 * np.sign(q) * s * np.cosh(
            np.arccosh(np.maximum(1.5 * np.abs(q) / (np.abs(p) * s), 1.0)) / 3.0)
        # p == 0: t = cbrt(-q)
        zero = ~three & (p == 0)
        t_one = np.where(pos, t_pos, np.where(neg, t_neg, np.where(zero, np.cbrt(-q), np.nan)))
        roots[..., 0] = np.where(three, roots[..., 0], t_one)
    return roots + shift[..., None]


def edsd_mode_kpc(parallax_mas, parallax_error_mas, length_scale_kpc):
    """Mode of the EDSD distance posterior, kpc (Bailer-Jones 2015, PASP 127, 994).

    Solves r^3/L - 2 r^2 + (parallax/sigma^2) r - 1/sigma^2 = 0 in closed form for every star,
    keeps the real positive root with the highest posterior and polishes it with two Newton steps.
    The cubic has at least one positive root (it is negative at r = 0 and grows without bound).
    """
    plx = np.asarray(parallax_mas, dtype=float)
    sig = np.asarray(parallax_error_mas, dtype=float)
    lk = float(length_scale_kpc)
    # divide through by 1/L: r^3 + b r^2 + c r + d = 0
    b = np.full_like(plx, -2.0 * lk)
    c = lk * plx / sig**2
    d = -lk / sig**2
    roots = _real_cubic_roots(b, c, d)
    roots = np.where(roots > 0, roots, np.nan)
    lp = edsd_log_posterior(roots, plx[:, None], sig[:, None], lk)
    lp = np.where(np.isfinite(lp), lp, -np.inf)
    best = np.argmax(lp, axis=1)
    r = np.take_along_axis(roots, best[:, None], axis=1)[:, 0]
    for _ in range(2):  # Newton polish on the cubic
        f = ((r + b) * r + c) * r + d
        fp = (3.0 * r + 2.0 * b) * r + c
        with np.errstate(divide="ignore", invalid="ignore"):
            step = np.where(fp != 0, f / fp, 0.0)
        r_new = r - step
        r = np.where(np.isfinite(r_new) & (r_new > 0), r_new, r)
    return r


def edsd_percentiles_kpc(parallax_mas, parallax_error_mas, length_scale_kpc, quantiles,
                         mode_kpc=None, n_grid=_GRID_POINTS, chunk=_CHUNK):
    """Percentiles of the EDSD distance posterior, kpc, shape (n, len(quantiles)).

    The posterior density in x = ln r (P(r) r) is evaluated on a per-star uniform grid from
    8 local widths below the mode up to max(mode + 12 widths, ln(20 L)), so the far tail that the
    prior feeds at low S/N is always covered; the CDF is the cumulative trapezoid sum and each
    percentile is interpolated linearly in it. Stars are processed ``chunk`` at a time.
    """
    plx = np.asarray(parallax_mas, dtype=float)
    sig = np.asarray(parallax_error_mas, dtype=float)
    lk = float(length_scale_kpc)
    qs = np.asarray(quantiles, dtype=float)
    if mode_kpc is None:
        mode_kpc = edsd_mode_kpc(plx, sig, lk)
    out = np.empty((plx.size, qs.size))
    u = np.linspace(0.0, 1.0, n_grid)
    for s in range(0, plx.size, chunk):
        sl = slice(s, s + chunk)
        p, e, m = plx[sl, None], sig[sl, None], mode_kpc[sl, None]
        # local width in x = ln r from the curvature of ln[P(r) r] at the mode:
        # d2/dx2 = -r/L - (2/r^2 - parallax/r)/sigma^2
        curv = m / lk + (2.0 / m**2 - p / m) / e**2
        with np.errstate(divide="ignore", invalid="ignore"):
            w = np.clip(1.0 / np.sqrt(np.where(curv > 0, curv, np.nan)), 0.01, 2.0)
        w = np.where(np.isfinite(w), w, 2.0)
        x0 = np.log(m) - 8.0 * w
        x1 = np.maximum(np.log(m) + 12.0 * w, np.log(20.0 * lk))
        x = x0 + (x1 - x0) * u[None, :]
        r = np.exp(x)
        lp = 3.0 * x - r / lk - 0.5 * ((p - 1.0 / r) / e) ** 2
        dens = np.exp(lp - lp.max(axis=1, keepdims=True))
        cdf = np.concatenate([np.zeros((dens.shape[0], 1)),
                              np.cumsum(0.5 * (dens[:, 1:] + dens[:, :-1]), axis=1)], axis=1)
        cdf /= cdf[:, -1:]
        for k, q in enumerate(qs):
            j = np.clip((cdf < q).sum(axis=1), 1, n_grid - 1)
            c0 = np.take_along_axis(cdf, (j - 1)[:, None], axis=1)[:, 0]
            c1 = np.take_along_axis(cdf, j[:, None], axis=1)[:, 0]
            xa = np.take_along_axis(x, (j - 1)[:, None], axis=1)[:, 0]
            xb = np.take_along_axis(x, j[:, None], axis=1)[:, 0]
            f = np.where(c1 > c0, (q - c0) / np.where(c1 > c0, c1 - c0, 1.0), 0.0)
            out[sl, k] = np.exp(xa + f * (xb - xa))
    return out
