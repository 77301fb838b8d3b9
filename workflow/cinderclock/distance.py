"""Distances from parallaxes: inverse parallax at high S/N, an exponentially decreasing space
density (EDSD) prior below it.

Zero-point convention
---------------------
Catalogue parallaxes carry a zero-point offset ``zero_point_mas`` (the parallax a source at
infinite distance would show). Every function here first forms the corrected parallax

    parallax_corrected = parallax - zero_point,

so a catalogue whose parallaxes are too small by 0.02 mas has ``zero_point_mas = -0.02`` and the
correction *adds* 0.02 mas. (For Gaia EDR3 the global offset found from quasars is of that sign and
order: "a few tens of microarcseconds", Lindegren et al. 2021, A&A 649, A4, abstract; "around
-0.02 mas", Gaia EDR3 documentation sect. 7.1.2. The offset depends on magnitude, colour and
position, so the configured number is the user's choice.)

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


#: The per-star Gaia EDR3/DR3 parallax zero point (coefficients in data/parallax_zero_point_l21.csv).
#: Its validity ranges are those the paper states for the fits: 6 < G < 21, 1.1 < nu_eff < 1.9
#: (five-parameter solutions) and 1.24 < pseudocolour < 1.72 (six-parameter solutions), in
#: micron^-1. Outside them the correction is evaluated at the nearest edge (the coefficients are not
#: extrapolated in G, and the colour is clipped to the fitted range: our choice, where the reference
#: implementation extrapolates the linear colour terms) and the star is flagged.
ZERO_POINT_LINDEGREN_2021 = PublishedRelation(
    key="lindegren2021",
    reference="Lindegren, L. et al. 2021, A&A 649, A4 (Gaia EDR3 parallax bias versus magnitude, colour and "
              "position), Appendix A with Tables 9 (five-parameter) and 10 (six-parameter solutions)",
    ranges=(ValidRange("phot_g_mean_mag", 6.0, 21.0, "mag"), ValidRange("nu_eff", 1.1, 1.9, "1/um"),
            ValidRange("pseudocolour", 1.24, 1.72, "1/um")),
    note="tentative recipe by its authors; calibrated on quasars, binaries and LMC stars, not on white dwarfs "
         "(which are bluer than most calibrators: nu_eff often near or above 1.7)",
)

#: astrometric_params_solved of five- and six-parameter solutions (Gaia EDR3 data model).
FIVE_PARAMETER, SIX_PARAMETER = 31, 95


def _l21_table():
    from importlib import resources

    text = (resources.files("cinderclock") / "data" / "parallax_zero_point_l21.csv").read_text()
    rows = np.array([[float(x) for x in line.split(",")] for line in text.splitlines()
                     if line.strip() and not line.startswith("#")])
    return {int(s): (rows[rows[:, 0] == s, 1], rows[rows[:, 0] == s, 2:]) for s in (5, 6)}


def lindegren2021_zero_point_mas(g_mag, nu_eff, pseudocolour, ecl_lat_deg, params_solved):
    """Per-star parallax zero point of Gaia EDR3/DR3, mas (Lindegren et al. 2021, A&A 649, A4).

    Z = sum_jk q_jk(G) c_j b_k with (Appendix A) c_0 = 1, c_1 = max(-0.24, min(0.24, x - 1.48)),
    c_2 = min(0.24, max(0, 1.48 - x))^3, c_3 = min(0, x - 1.24), c_4 = max(0, x - 1.72) of the colour
    x (nu_eff for five-parameter, pseudocolour for six-parameter solutions), b_0 = 1,
    b_1 = sin(beta), b_2 = sin^2(beta) - 1/3 of the ecliptic latitude beta, and q_jk interpolated
    linearly in G between the tabulated nodes (held constant beyond 6 and 21 mag); a colour outside
    the fitted range is clipped to it.

    Parameters
    ----------
    g_mag : array_like
        Gaia G magnitude (phot_g_mean_mag), mag.
    nu_eff, pseudocolour : array_like
        nu_eff_used_in_astrometry and pseudocolour, micron^-1 (NaN where not given).
    ecl_lat_deg : array_like
        Ecliptic latitude, degrees.
    params_solved : array_like
        astrometric_params_solved (31 or 95; anything else gives NaN).

    Returns
    -------
    zero_point_mas : ndarray
        The zero point (the corrected parallax is parallax - zero point); NaN where it cannot be
        evaluated (other solution types, missing inputs).
    outside : ndarray of bool
        True where an input lies outside the validity range of the fits (value still evaluated,
        at the edge).
    """
    g = np.atleast_1d(np.asarray(g_mag, dtype=float))
    nu = np.broadcast_to(np.asarray(nu_eff, dtype=float), g.shape)
    pc = np.broadcast_to(np.asarray(pseudocolour, dtype=float), g.shape)
    sb = np.sin(np.deg2rad(np.broadcast_to(np.asarray(ecl_lat_deg, dtype=float), g.shape)))
    sol = np.broadcast_to(np.asarray(params_solved, dtype=float), g.shape)
    zp = np.full(g.shape, np.nan)
    outside = np.zeros(g.shape, dtype=bool)
    b = np.stack([np.ones_like(sb), sb, sb**2 - 1.0 / 3.0])                      # (3, n)
    # (j, k) of the coefficient columns q00 q01 q02 q10 q11 q12 q20 q30 q40
    jk = [(0, 0), (0, 1), (0, 2), (1, 0), (1, 1), (1, 2), (2, 0), (3, 0), (4, 0)]
    for code, kind, colour, lo, hi in ((FIVE_PARAMETER, 5, nu, 1.1, 1.9), (SIX_PARAMETER, 6, pc, 1.24, 1.72)):
        sel = (sol == code) & np.isfinite(g) & np.isfinite(colour) & np.isfinite(sb)
        if not sel.any():
            continue
        nodes, q = _l21_table()[kind]
        x, gs = np.clip(colour[sel], lo, hi), g[sel]      # outside the fitted range: held at its edge
        c = np.stack([np.ones_like(x), np.clip(x - 1.48, -0.24, 0.24), np.clip(1.48 - x, 0.0, 0.24) ** 3,
                      np.minimum(0.0, x - 1.24), np.maximum(0.0, x - 1.72)])     # (5, m)
        i = np.clip(np.searchsorted(nodes, gs, side="right") - 1, 0, len(nodes) - 2)
        h = np.clip((gs - nodes[i]) / (nodes[i + 1] - nodes[i]), 0.0, 1.0)
        qg = (1.0 - h)[:, None] * q[i] + h[:, None] * q[i + 1]                    # (m, 9), micro-arcsec
        total = np.zeros(gs.shape)
        for col, (j, k) in enumerate(jk):
            total += qg[:, col] * c[j] * b[k][sel]
        zp[sel] = total * 1e-3
        outside[sel] = (gs <= 6.0) | (gs >= 21.0) | (colour[sel] <= lo) | (colour[sel] >= hi)
    return zp, outside


def ecliptic_latitude_deg(ra_deg, dec_deg):
    """Ecliptic latitude (barycentric mean ecliptic of J2000, astropy) of ICRS positions, degrees."""
    from astropy import units as u
    from astropy.coordinates import BarycentricMeanEcliptic, SkyCoord

    ra = np.asarray(ra_deg, dtype=float)
    dec = np.asarray(dec_deg, dtype=float)
    out = np.full(ra.shape, np.nan)
    ok = np.isfinite(ra) & np.isfinite(dec)
    if ok.any():
        c = SkyCoord(ra=ra[ok] * u.deg, dec=dec[ok] * u.deg, frame="icrs")
        out[ok] = c.transform_to(BarycentricMeanEcliptic()).lat.deg
    return out


def star_zero_points(table, astrometry, bands=None):
    """Parallax zero point of every star of a canonical table, as configured.

    Parameters
    ----------
    table : pandas.DataFrame
        Canonical columns (``plx_mas``, ``mag_<band>``, and the zero-point inputs read at ingest).
    astrometry : dict
        The ``astrometry`` section: ``zero_point_model`` (``constant``, ``lindegren2021`` or
        ``column``), ``parallax_zero_point_mas`` (the constant, and the value where a star's own
        zero point cannot be had) and ``zero_point_band`` (band key of Gaia G).
    bands : dict, optional
        The ``bands`` section (to check ``zero_point_band``).

    Returns
    -------
    zero_point_mas : ndarray
    outside : ndarray of bool
        lindegren2021: the star lies outside the fits' validity range (value evaluated at the edge).
    fallback : ndarray of bool
        The star's own zero point could not be had (missing inputs or column value): the constant
        was used.
    """
    from .errors import ConfigError

    n = len(table)
    const = float(astrometry.get("parallax_zero_point_mas", 0.0))
    model = astrometry.get("zero_point_model", "constant")
    none = np.zeros(n, dtype=bool)
    if model == "constant":
        return np.full(n, const), none, none
    if model == "column":
        if "plx_zp_cat_mas" not in table:
            raise ConfigError("astrometry.zero_point_model: column needs catalogue.columns.parallax_zero_point")
        zp = table["plx_zp_cat_mas"].to_numpy(dtype=float)
        outside = none
    elif model == "lindegren2021":
        band = astrometry.get("zero_point_band", "G")
        if bands is not None and band not in bands:
            raise ConfigError(f"astrometry.zero_point_band: band {band!r} is not configured; bands: {', '.join(bands)}")
        need = [c for c in ("astrometric_params_solved",) if c not in table]
        if "nu_eff_um" not in table and "pseudocolour_um" not in table:
            need.append("nu_eff")
        if "ecl_lat_deg" not in table and not ("ra_deg" in table and "dec_deg" in table):
            need.append("ecl_lat (or ra and dec)")
        if need:
            raise ConfigError(f"astrometry.zero_point_model: lindegren2021 needs catalogue.columns {', '.join(need)}")
        col = lambda name: table[name].to_numpy(dtype=float) if name in table else np.full(n, np.nan)  # noqa: E731
        beta = col("ecl_lat_deg")
        if "ra_deg" in table and "dec_deg" in table and np.isnan(beta).any():
            missing = np.isnan(beta)
            beta[missing] = ecliptic_latitude_deg(col("ra_deg")[missing], col("dec_deg")[missing])
        zp, outside = lindegren2021_zero_point_mas(col(f"mag_{band}"), col("nu_eff_um"), col("pseudocolour_um"),
                                                   beta, col("astrometric_params_solved"))
    else:
        raise ConfigError(f"astrometry.zero_point_model: unknown model {model!r}")
    fallback = ~np.isfinite(zp)
    return np.where(fallback, const, zp), outside & ~fallback, fallback
