"""Fit Teff and the solid-angle factor (R/d)^2 to multi-band photometry, vectorised over a shard.

Model: m_b = M_b(Teff, E(B-V)[, log g]) + Delta, where M_b is the grid magnitude for unit solid
angle and Delta = -2.5 log10((R/d)^2). For fixed Teff the best Delta is the weighted mean offset
(weights 1/sigma_b^2), so the chi-square profile over Teff is

    chi2(Teff) = sum_b w_b (r_b - Delta*)^2,   r_b = m_b - M_b(Teff),   Delta* = sum w r / sum w.

Steps, for every star of a chunk at once:

1. chi2 on coarse Teff nodes (every few grid nodes, about ``coarse_step_dex`` apart in log Teff);
2. a parabola through the best node and its neighbours in log Teff;
3. ``n_refine`` Newton steps on chi2 evaluated at x - h, x, x + h (x = log10 Teff) with magnitudes
   interpolated from the fine grid; the final curvature gives the error of log Teff
   (sigma_x^2 = 1/a for chi2 ~ a (x - x*)^2 + c, exact for a model linear in the parameters).

Errors of log10 (R/d)^2, the radius and log L follow from the (log Teff, Delta) covariance of the
linearised model; the distance error (from 16th/84th-percentile bounds) is added in quadrature.
Errors are statistical only and are not scaled by the reduced chi-square.

Degenerate and fallback cases:

* exactly 2 bands: two data, two parameters; chi2 = 0 at the Teff whose model colour equals the
  observed colour, so the fit is the single-colour Teff estimate (method ``"colour"``);
* a spectroscopic Teff given (``teff_fixed_k`` finite): only Delta is fitted, at that Teff, from one
  band or more (method ``"fixed_teff"``); its error enters through ``teff_fixed_err_k``;
* fewer usable bands (or E(B-V)/log g off the grid): NaN results, method ``"none"``.

Caution: with blackbody model spectra Teff and L are biased for hydrogen-atmosphere white dwarfs;
see :data:`cinderclock.photometry.cautions.BLACKBODY_CAUTION`.
"""

from __future__ import annotations

import numpy as np

from ..constants import L_SUN_W, PC_M, R_SUN_M, SIGMA_SB_SI
from .bolometric import absolute_bolometric_magnitude

METHOD_SED = "sed"
METHOD_COLOUR = "colour"
METHOD_FIXED = "fixed_teff"
METHOD_NONE = "none"

_LN10 = np.log(10.0)
#: log10(4 pi sigma / L_sun) for L = 4 pi R^2 sigma T^4 with R in m.
_LOG_LUM_CONST = np.log10(4.0 * np.pi * SIGMA_SB_SI / L_SUN_W)


def _coarse_nodes(log_teff, step_dex):
    """Indices of grid nodes about ``step_dex`` apart, always including both ends."""
    span = log_teff[-1] - log_teff[0]
    n = max(int(np.ceil(span / step_dex)) + 1, 3)
    idx = np.unique(np.round(np.linspace(0, log_teff.size - 1, n)).astype(np.intp))
    return idx


def _profile(m0, w, s0, model):
    """chi2 and Delta* of the profile for models of shape (n or 1, k, nb); returns (n, k) arrays."""
    r = m0[:, None, :] - model
    wr = w[:, None, :] * r
    delta = wr.sum(axis=-1) / s0[:, None]
    chi2 = (wr * r).sum(axis=-1) - delta**2 * s0[:, None]
    return np.maximum(chi2, 0.0), delta


def _profile_shared(m0, w, s0, model, slope=None, frac=None):
    """Same as :func:`_profile` for models shared by a group of stars, as matrix products.

    The model of star i at node k is ``model[k] + frac[i] * slope[k]`` (linear interpolation
    between two E(B-V) nodes) or just ``model[k]``. Magnitudes are centred (per star, and per node
    over bands) first, which changes chi2 not at all and Delta by known shifts, and avoids
    cancellation in the expanded sums.
    """
    mref = (w * m0).sum(axis=1) / s0                     # (n,)
    mc = np.where(w > 0, m0 - mref[:, None], 0.0)
    nref = model.mean(axis=1)                            # (k,)
    mod = model - nref[:, None]
    wm = w * mc
    s1 = wm.sum(axis=1)[:, None] - w @ mod.T             # sum w r
    s2 = (wm * mc).sum(axis=1)[:, None] - 2.0 * wm @ mod.T + w @ (mod**2).T
    shift = nref[None, :]
    if slope is not None:
        sref = slope.mean(axis=1)
        d = slope - sref[:, None]
        f = frac[:, None]
        s1 -= f * (w @ d.T)
        s2 += f * (2.0 * (w @ (mod * d).T) - 2.0 * (wm @ d.T)) + f**2 * (w @ (d**2).T)
        shift = shift + f * sref[None, :]
    dc = s1 / s0[:, None]
    chi2 = s2 - dc * s1
    return np.maximum(chi2, 0.0), dc + mref[:, None] - shift


def _parabola(x0, x1, x2, y0, y1, y2):
    """Vertex and curvature a (y = a (x - xv)^2 + c) of the parabola through three points."""
    d01, d12, d02 = x1 - x0, x2 - x1, x2 - x0
    a = ((y2 - y1) / d12 - (y1 - y0) / d01) / d02
    b = (y1 - y0) / d01 - a * (x0 + x1)
    with np.errstate(divide="ignore", invalid="ignore"):
        xv = -b / (2.0 * a)
    return xv, a


def fit_sed(mags, errs, grid, ebv=0.0, distance_pc=None, *, distance_lo_pc=None, distance_hi_pc=None,
            logg=None, teff_fixed_k=None, teff_fixed_err_k=None, error_floor_mag=0.0,
            coarse_step_dex=0.02, refine_step_dex=0.004, n_refine=3, chunk=16384):
    """Fit Teff and (R/d)^2 to the photometry of many stars at once.

    Parameters
    ----------
    mags : array_like, shape (n, nb)
        Observed magnitudes, in the grid's band order and systems; NaN where missing.
    errs : array_like, shape (n, nb)
        Their standard errors, mag (non-finite or non-positive marks the band missing).
    grid : PhotometryGrid
        Magnitudes for unit solid angle; its bands must match the columns of ``mags``.
    ebv : float or array_like, shape (n,)
        E(B-V), mag; must lie on the grid's E(B-V) axis range.
    distance_pc : array_like, shape (n,), optional
        Distance, pc. Without it only Teff and (R/d)^2 are returned (radius and L are NaN).
    distance_lo_pc, distance_hi_pc : array_like, optional
        16th/84th-percentile distance bounds, pc; their half log-spread is added to the errors of
        radius and luminosity.
    logg : float or array_like, optional
        log g (cgs) for gravity-dependent grids (user tables); ignored for blackbodies.
    teff_fixed_k, teff_fixed_err_k : array_like, optional
        Spectroscopic Teff (K) and its error; where finite, only (R/d)^2 is fitted at that Teff.
    error_floor_mag : float
        Added in quadrature to every magnitude error, mag (calibration and model systematics).
    coarse_step_dex, refine_step_dex : float
        Spacing in log10 Teff of the coarse search and of the refinement stencil.
    n_refine : int
        Number of Newton refinement steps.
    chunk : int
        Stars per chunk (memory ~ chunk x coarse nodes x bands x 8 bytes x a few).

    Returns
    -------
    dict of ndarray, each of shape (n,)
        ``teff_k``, ``teff_err_k``, ``log_solid_angle`` (log10 (R/d)^2) and its ``_err``,
        ``radius_rsun``, ``radius_err_rsun``, ``log_lum`` (log10 L/Lsun) and ``log_lum_err``,
        ``mbol`` and ``mbol_err`` (absolute bolometric magnitude, IAU 2015 B2), ``chi2``,
        ``teff_solid_angle_corr`` (correlation of log10 Teff and log10 (R/d)^2 in the linearised
        fit, for Monte Carlo draws), ``n_bands`` (bands used; chi2 has n_bands - 2 degrees of freedom, n_bands - 1 at fixed
        Teff), ``teff_at_grid_edge`` (fitted Teff within ``coarse_step_dex`` of an end of the
        grid: Teff may be a bound, not a fit) and ``method`` (``"sed"``, ``"colour"``, ``"fixed_teff"`` or
        ``"none"``).
    """
    m = np.atleast_2d(np.asarray(mags, dtype=float))
    e = np.atleast_2d(np.asarray(errs, dtype=float))
    n, nb = m.shape
    if nb != len(grid.band_keys) or e.shape != m.shape:
        raise ValueError(f"mags/errs must have shape (n, {len(grid.band_keys)}) in the grid's band order "
                         f"{grid.band_keys}; got {m.shape} and {e.shape}")

    def per_star(v, fill=np.nan):
        if v is None:
            return np.full(n, fill)
        return np.broadcast_to(np.asarray(v, dtype=float), (n,))

    shared = np.ndim(ebv) == 0 and (logg is None or np.ndim(logg) == 0 or not grid.gravity_dependent)
    ebv_s = float(ebv) if np.ndim(ebv) == 0 else None
    ebv_a = per_star(ebv)
    logg_s = None if logg is None else (float(logg) if np.ndim(logg) == 0 else None)
    logg_a = None if logg is None else per_star(logg)
    dist = per_star(distance_pc)
    d_lo, d_hi = per_star(distance_lo_pc), per_star(distance_hi_pc)
    t_fix, t_fix_err = per_star(teff_fixed_k), per_star(teff_fixed_err_k, 0.0)

    out = {k: np.full(n, np.nan) for k in ("teff_k", "teff_err_k", "log_solid_angle", "log_solid_angle_err",
                                           "chi2")}
    out["n_bands"] = np.zeros(n, dtype=np.int16)
    out["teff_at_grid_edge"] = np.zeros(n, dtype=bool)
    out["method"] = np.full(n, METHOD_NONE, dtype="<U12")

    nodes = _coarse_nodes(grid.log_teff, coarse_step_dex)
    xn = grid.log_teff[nodes]
    x_lo, x_hi = grid.log_teff[0], grid.log_teff[-1]
    h = float(refine_step_dex)
    shared_model = grid.on_teff_nodes(nodes, ebv_s, logg_s)[0] if shared else None

    for s in range(0, n, chunk):
        sl = slice(s, min(s + chunk, n))
        mc, ec = m[sl], e[sl]
        good = np.isfinite(mc) & np.isfinite(ec) & (ec > 0)
        w = np.where(good, 1.0 / (np.where(good, ec, 1.0) ** 2 + error_floor_mag**2), 0.0)
        m0 = np.where(good, mc, 0.0)
        nused = good.sum(axis=1)
        s0 = w.sum(axis=1)
        e_c = ebv_s if ebv_s is not None else ebv_a[sl]
        g_c = logg_s if (logg_a is None or logg_s is not None) else logg_a[sl]
        fixed = np.isfinite(t_fix[sl]) & (nused >= 1)
        free = ~fixed & (nused >= 2)
        s0_safe = np.where(s0 > 0, s0, 1.0)

        x = np.full(mc.shape[0], np.nan)
        sig_x = np.full(mc.shape[0], np.nan)
        edge = np.zeros(mc.shape[0], dtype=bool)

        # ---- 1-2: coarse search and parabola, for stars with Teff free ----
        if np.any(free):
            fi = np.flatnonzero(free)
            if shared:
                chi2c, _ = _profile_shared(m0[fi], w[fi], s0_safe[fi], shared_model)
            else:
                # the coarse search only has to land near the minimum: group stars by the nearest
                # (log g, E(B-V)) node and use that node's model, shared within the group
                e_f = e_c if np.ndim(e_c) == 0 else e_c[fi]
                g_f = g_c if (g_c is None or np.ndim(g_c) == 0) else g_c[fi]
                key, frac = _node_key(grid, e_f, g_f, fi.size)
                chi2c = np.full((fi.size, nodes.size), np.inf)
                for kk in np.unique(key[key >= 0]):
                    sel = np.flatnonzero(key == kk)
                    gi, ei = divmod(int(kk), grid.ebv.size)
                    lo_m = grid.mag[gi, ei, nodes, :]
                    if grid.ebv.size > 1:
                        d_m = grid.mag[gi, ei + 1, nodes, :] - lo_m
                        chi2c[sel], _ = _profile_shared(m0[fi[sel]], w[fi[sel]], s0_safe[fi[sel]],
                                                        lo_m, d_m, frac[sel])
                    else:
                        chi2c[sel], _ = _profile_shared(m0[fi[sel]], w[fi[sel]], s0_safe[fi[sel]], lo_m)
            chi2c = np.where(np.isfinite(chi2c), chi2c, np.inf)
            k = np.argmin(chi2c, axis=1)
            ok = np.isfinite(chi2c[np.arange(fi.size), k])
            kc = np.clip(k, 1, nodes.size - 2)
            rows = np.arange(fi.size)
            y0, y1, y2 = chi2c[rows, kc - 1], chi2c[rows, kc], chi2c[rows, kc + 1]
            x0, x1, x2 = xn[kc - 1], xn[kc], xn[kc + 1]
            with np.errstate(invalid="ignore"):
                xv, a = _parabola(x0, x1, x2, y0, y1, y2)
            xv = np.where(np.isfinite(xv) & (a > 0), np.clip(xv, x0, x2), xn[k])
            x[fi] = np.where(ok, xv, np.nan)

        # ---- 3: Newton refinement on the fine grid (free stars) ----
        fi = np.flatnonzero(free & np.isfinite(x))
        delta_at = None
        if fi.size:
            e_f = e_c if np.ndim(e_c) == 0 else e_c[fi]
            g_f = g_c if (g_c is None or np.ndim(g_c) == 0) else g_c[fi]
            xf = x[fi]
            # steps bounded by the coarse spacing, never outside the grid
            lo_b = np.maximum(xf - 3 * coarse_step_dex, x_lo + h)
            hi_b = np.minimum(xf + 3 * coarse_step_dex, x_hi - h)
            for it in range(n_refine + 1):
                xc = np.clip(xf, x_lo + h, x_hi - h)
                stencil = xc[:, None] + np.array([-h, 0.0, h])[None, :]
                model = _stencil_model(grid, stencil, e_f, g_f)
                chi2s, dels = _profile(m0[fi], w[fi], s0_safe[fi], model)
                xv, a = _parabola(xc - h, xc, xc + h, chi2s[:, 0], chi2s[:, 1], chi2s[:, 2])
                if it == n_refine:
                    break
                step_ok = np.isfinite(xv) & (a > 0)
                # where the stencil is not convex, move downhill by one stencil step
                downhill = xc + h * np.sign(chi2s[:, 0] - chi2s[:, 2])
                xf = np.clip(np.where(step_ok, xv, downhill), lo_b, hi_b)
            # final estimate: the vertex of the last stencil's parabola (kept within the stencil)
            convex = np.isfinite(xv) & (a > 0)
            xfin = np.where(convex, np.clip(xv, xc - h, xc + h), xc)
            x[fi] = xfin
            edge[fi] = (xfin <= x_lo + coarse_step_dex) | (xfin >= x_hi - coarse_step_dex)
            with np.errstate(divide="ignore", invalid="ignore"):
                sig_x[fi] = np.where(a > 0, 1.0 / np.sqrt(a), np.nan)
            out["chi2"][sl][fi] = np.maximum(
                chi2s[:, 1] - np.where(convex, a * ((xc - xv) ** 2 - (xfin - xv) ** 2), 0.0), 0.0)
            delta_at = (fi, dels, xfin - xc)

        # ---- fixed Teff ----
        xi = np.flatnonzero(fixed)
        if xi.size:
            e_f = e_c if np.ndim(e_c) == 0 else e_c[xi]
            g_f = g_c if (g_c is None or np.ndim(g_c) == 0) else g_c[xi]
            with np.errstate(divide="ignore", invalid="ignore"):
                xc = np.log10(t_fix[sl][xi])
                sx = t_fix_err[sl][xi] / (t_fix[sl][xi] * _LN10)
            inside = (xc >= x_lo + h) & (xc <= x_hi - h)
            stencil = np.clip(xc, x_lo + h, x_hi - h)[:, None] + np.array([-h, 0.0, h])[None, :]
            model = _stencil_model(grid, stencil, e_f, g_f)
            chi2s, dels = _profile(m0[xi], w[xi], s0_safe[xi], model)
            x[xi] = np.where(inside, xc, np.nan)
            sig_x[xi] = np.where(inside, np.where(np.isfinite(sx), sx, 0.0), np.nan)
            out["chi2"][sl][xi] = np.where(inside, chi2s[:, 1], np.nan)
            dx = np.zeros(xi.size)   # the stencil is centred on the fixed Teff
            if delta_at is None:
                delta_at = (xi, dels, dx)
            else:
                delta_at = tuple(np.concatenate([a_, b_]) for a_, b_ in zip(delta_at, (xi, dels, dx)))

        if delta_at is None:
            out["n_bands"][sl] = nused
            continue
        idx, dels, dx = delta_at
        # Delta at x*, its slope with x, and the (x, Delta) covariance of the linearised model
        slope = (dels[:, 2] - dels[:, 0]) / (2.0 * h)
        delta = dels[:, 1] + slope * dx
        vx = sig_x[idx] ** 2
        var_delta = 1.0 / s0_safe[idx] + slope**2 * vx
        cov = slope * vx
        valid = np.isfinite(x[idx]) & np.isfinite(delta)
        sub = np.arange(s, min(s + chunk, n))[idx]
        out["teff_k"][sub] = np.where(valid, 10.0 ** x[idx], np.nan)
        out["teff_err_k"][sub] = np.where(valid, 10.0 ** x[idx] * _LN10 * sig_x[idx], np.nan)
        out["log_solid_angle"][sub] = np.where(valid, -0.4 * delta, np.nan)
        out["log_solid_angle_err"][sub] = np.where(valid, 0.4 * np.sqrt(var_delta), np.nan)
        out["teff_at_grid_edge"][sl] = edge
        is_fixed = fixed[idx]
        nu = nused[idx]
        meth = np.where(is_fixed, METHOD_FIXED, np.where(nu == 2, METHOD_COLOUR, METHOD_SED))
        out["method"][sub] = np.where(valid, meth, METHOD_NONE)
        out["n_bands"][sl] = nused
        # covariance pieces kept for the luminosity errors
        out.setdefault("_var_delta", np.full(n, np.nan))[sub] = var_delta
        out.setdefault("_cov", np.full(n, np.nan))[sub] = cov
        out.setdefault("_var_x", np.full(n, np.nan))[sub] = vx

    _add_physical(out, dist, d_lo, d_hi, n)
    return out


def _node_key(grid, ebv, logg, n):
    """Group key g * n_ebv + e for the coarse search, and the E(B-V) interpolation fraction.

    e is the lower bracketing E(B-V) node (the model is interpolated exactly in E(B-V)); g is the
    nearest log g node (the refinement interpolates log g exactly). Key -1 marks stars off the grid.
    """
    e = np.broadcast_to(np.asarray(ebv, dtype=float), (n,))
    if grid.ebv.size == 1:
        ie, fe, oke = np.zeros(n, dtype=np.intp), np.zeros(n), e == grid.ebv[0]
    else:
        ie = np.clip(np.searchsorted(grid.ebv, e, side="right") - 1, 0, grid.ebv.size - 2)
        fe = (e - grid.ebv[ie]) / (grid.ebv[ie + 1] - grid.ebv[ie])
        oke = (e >= grid.ebv[0]) & (e <= grid.ebv[-1])
    if grid.gravity_dependent and grid.logg.size > 1:
        g = np.broadcast_to(np.asarray(logg, dtype=float), (n,))
        i = np.clip(np.searchsorted(grid.logg, g), 1, grid.logg.size - 1)
        ig = np.where(np.abs(g - grid.logg[i - 1]) <= np.abs(grid.logg[i] - g), i - 1, i)
        okg = (g >= grid.logg[0]) & (g <= grid.logg[-1])
    else:
        ig, okg = np.zeros(n, dtype=np.intp), np.ones(n, bool)
    return np.where(oke & okg, ig * grid.ebv.size + ie, -1), np.where(oke, fe, 0.0)


def _stencil_model(grid, stencil_x, ebv, logg):
    """Grid magnitudes at per-star log Teff stencils (n, k) -> (n, k, nb)."""
    t = 10.0 ** stencil_x
    e = ebv if np.ndim(ebv) == 0 else np.asarray(ebv)[:, None]
    g = logg if (logg is None or np.ndim(logg) == 0) else np.asarray(logg)[:, None]
    return grid.magnitudes(t, e, g)


def _add_physical(out, dist, d_lo, d_hi, n):
    """Radius, luminosity and M_bol with errors from the fit covariance and the distance bounds."""
    var_delta = out.pop("_var_delta", np.full(n, np.nan))
    cov = out.pop("_cov", np.full(n, np.nan))
    var_x = out.pop("_var_x", np.full(n, np.nan))
    with np.errstate(divide="ignore", invalid="ignore"):
        log_d = np.log10(dist * PC_M)
        sig_logd = np.where(np.isfinite(d_lo) & np.isfinite(d_hi) & (d_lo > 0),
                            0.5 * (np.log10(d_hi) - np.log10(d_lo)), 0.0)
        log_theta = out["log_solid_angle"]
        x = np.log10(out["teff_k"])
        log_r = 0.5 * log_theta + log_d - np.log10(R_SUN_M)
        out["radius_rsun"] = 10.0**log_r
        var_log_r = 0.25 * 0.16 * var_delta + sig_logd**2
        out["radius_err_rsun"] = out["radius_rsun"] * _LN10 * np.sqrt(var_log_r)
        out["log_lum"] = _LOG_LUM_CONST + log_theta + 2.0 * log_d + 4.0 * x
        # log L = const - 0.4 Delta + 4 x + 2 log d
        var_log_l = 0.16 * var_delta + 16.0 * var_x + 2.0 * (-0.4) * 4.0 * cov + 4.0 * sig_logd**2
        out["log_lum_err"] = np.sqrt(np.maximum(var_log_l, 0.0))
        out["mbol"] = absolute_bolometric_magnitude(out["log_lum"])
        out["mbol_err"] = 2.5 * out["log_lum_err"]
        # correlation of log10 Teff and log10 (R/d)^2 in the linearised fit (0 where Teff is exact)
        rho = -cov / np.sqrt(var_x * var_delta)
        out["teff_solid_angle_corr"] = np.where(np.isfinite(rho), np.clip(rho, -1.0, 1.0), 0.0)
