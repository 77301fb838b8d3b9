"""Solve the envelope of every (mass, Teff) of a grid at once: photospheric radius by secant iteration.

For each star the photospheric radius R is adjusted until the envelope integrated inward from the
photosphere (:func:`~cinderclock.envelope.structure.integrate`), through the hydrogen and helium
layers and on through the core material (:mod:`~.mantle`), reaches the depth Dm = DM_CORE M
(:data:`~cinderclock.envelope.structure.DM_CORE`) at the radius that the zero-temperature core
(Chandrasekhar equation with the Salpeter Coulomb term,
:func:`cinderclock.massradius.chandrasekhar.structure_profile`) has at mass coordinate
(1 - DM_CORE) M. One fixed-point step and then secant steps, vectorised over the stars
not yet converged (each to |r_base - r_core| / R < 1e-7, so radii are smooth in Teff at the 1e-7
level); stars that do not converge, or whose envelope cannot be bound (hot, low-mass stars whose
radius runs away), are NaN. The cool-end jumps and multiple roots of r_base(R) that earlier
versions had (below ~3,700 K at 0.45-0.65 Msun) came from the equation of state's pressure-
ionization anomaly; see :data:`~cinderclock.envelope.structure.THERMO_FLOOR`.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..constants import L_SUN_W, M_SUN_KG, R_SUN_M
from .opacity import SIGMA_SB
from .structure import DM_CORE, G, Lookup, integrate, layer_stack

M_SUN_G = M_SUN_KG * 1e3
R_SUN_CM = R_SUN_M * 1e2
#: Masses (Msun) at which the zero-temperature core profile is integrated; in between, the
#: radius ratio r(1 - q_He) / R_0 is interpolated by a cubic spline in ln M (R_0 itself comes
#: from a dense zero-temperature sequence).
CORE_NODES_MSUN = (0.10, 0.25, 0.45, 0.7, 0.95, 1.15, 1.28, 1.36)
#: The integration runs to this factor times the zero-temperature core's pressure at Dm = DM_CORE M
#: (the end point is then interpolated inside the integrated run).
P_END_FACTOR = 3.0
#: Starting radii (in units of R_0) tried in turn for stars whose envelope cannot be integrated
#: at R_0 itself (hot stars, whose envelope at R_0 would be too massive).
START_FACTORS = (1.15, 1.3, 1.5, 1.8)
#: Secant iterations at most; each pass integrates only the stars not yet converged.
N_ITERATIONS = 16
#: Target |r_base - r_core| / R of the iteration, and the largest residual accepted in a table
#: (stars above TOLERANCE after all passes are rare: the table reports them in ``residual``).
TOLERANCE = 1e-7
ACCEPT = 3e-3


def core_radii(masses_msun, depth, core):
    """Zero-temperature total radius R_0 and radius at mass coordinate (1 - depth) M, in Rsun, and
    log10 of the pressure (dyn cm^-2) there."""
    s0, sr, sp = _core_splines(float(depth), core)
    m = np.asarray(masses_msun, dtype=float)
    ok = (m >= CORE_NODES_MSUN[0]) & (m <= CORE_NODES_MSUN[-1])
    lm = np.log(np.where(ok, m, 1.0))
    big_r0 = np.where(ok, np.exp(s0(lm)), np.nan)
    return big_r0, big_r0 * sr(lm), np.where(ok, sp(lm), np.nan)


@lru_cache(maxsize=8)
def _core_splines(depth, core):
    """Splines in ln M of ln R_0 (dense zero-temperature sequence), of r(1 - depth) / R_0 and of
    log10 P(1 - depth) (profiles)."""
    from scipy.interpolate import CubicSpline

    from ..composition import core_composition
    from ..massradius.chandrasekhar import structure_profile, zero_temperature_sequence

    comp = core_composition(core)
    seq = zero_temperature_sequence(comp.mu_e, comp.coulomb_charge, True, np.linspace(2.5, 11.5, 361))
    s0 = CubicSpline(np.log(seq["mass_msun"]), np.log(seq["radius_rsun"]))
    nodes = np.array(CORE_NODES_MSUN)
    ratio, log_p = [], []
    for m in nodes:                                   # loop over a few core models, not over stars
        p = structure_profile(float(m), comp.mu_e, comp.coulomb_charge, coulomb=True, n_points=600)
        ratio.append(np.interp(1.0 - depth, p["mass_fraction"], p["radius_rsun"]) / p["total_radius_rsun"])
        log_p.append(np.log10(np.interp(1.0 - depth, p["mass_fraction"], p["pressure_cgs"])))
    return s0, CubicSpline(np.log(nodes), np.array(ratio)), CubicSpline(np.log(nodes), np.array(log_p))


def _bisect_fallback(f, best_r, best_rel, out, width=0.05, n_steps=20):
    """Bisection for the stars the secant left above TOLERANCE (cool, convective envelopes where
    r_base(R) has small jumps): bracket best_r (1 -+ width), halve n_steps times (bracket 1e-7
    R) and take the midpoint. The residual returned for them is the relative bracket width where
    |f| / R at the midpoint stays large (the root sits on a jump of r_base), so ``residual`` keeps
    measuring how well R is determined. ``out`` (diagnostics) is updated in place."""
    sel = np.isfinite(best_rel) & (best_rel > TOLERANCE)
    if not sel.any():
        return best_r, best_rel
    lo, hi = best_r[sel] * (1.0 - width), best_r[sel] * (1.0 + width)
    f_lo, _ = f(lo, sel)
    f_hi, _ = f(hi, sel)
    ok = np.isfinite(f_lo) & np.isfinite(f_hi) & (np.sign(f_lo) != np.sign(f_hi))
    for _ in range(n_steps):                    # loop over bisection steps, not stars
        mid = 0.5 * (lo + hi)
        f_mid, _ = f(mid, sel)
        same = np.isfinite(f_mid) & (np.sign(f_mid) == np.sign(f_lo))
        lo, f_lo = np.where(same, mid, lo), np.where(same, f_mid, f_lo)
        hi = np.where(same, hi, mid)
    mid = 0.5 * (lo + hi)
    f_mid, o_mid = f(mid, sel)
    rel = np.minimum(np.abs(f_mid) / mid, (hi - lo) / mid)
    use = ok & np.isfinite(f_mid) & (rel < best_rel[sel])
    r_out, rel_out = best_r.copy(), best_rel.copy()
    idx = np.flatnonzero(sel.ravel())[use]
    r_out.ravel()[idx] = mid[use]
    rel_out.ravel()[idx] = rel[use]
    for k, v in o_mid.items():
        out[k].ravel()[idx] = v[use]
    return r_out, rel_out


def solve_grid(masses_msun, teff_k, atmosphere="H", q_h=1e-4, q_he=1e-2, core="CO", alpha=1.0):
    """Envelope solutions on the outer product of ``masses_msun`` and ``teff_k``.

    Returns
    -------
    dict of (n_mass, n_teff) arrays: ``radius_rsun``, ``log_tc``, ``log_lum``, ``logg``,
    ``radius_zero_t_rsun``, ``log_dm_conv``, ``eta_conv``, ``eta_base``, ``log_p_photosphere``,
    ``residual`` (|r_base - r_core| / R at the last iteration).
    """
    masses = np.asarray(masses_msun, dtype=float)
    teffs = np.asarray(teff_k, dtype=float)
    if atmosphere == "H" and q_h > 0:
        symbols, top = ("H", "He", f"core:{core}"), 0
    else:
        symbols, top, q_h = ("He", f"core:{core}"), 0, 0.0
    lookup = Lookup(layer_stack(symbols))
    r0, r_core, log_p_core = core_radii(masses, DM_CORE, core)
    m2, t2 = np.meshgrid(masses, teffs, indexing="ij")
    r0_2 = np.broadcast_to(r0[:, None], m2.shape) * R_SUN_CM
    rc_2 = np.broadcast_to(r_core[:, None], m2.shape) * R_SUN_CM
    mass_g = m2 * M_SUN_G

    ln_p_end = np.broadcast_to(((log_p_core + np.log10(P_END_FACTOR)) * np.log(10.0))[:, None], m2.shape)

    def f(radius, sel):
        out = integrate(lookup, mass_g[sel], radius, t2[sel], q_h, q_he, alpha, top, dm_core=DM_CORE,
                        ln_p_end=ln_p_end[sel])
        return out["r_base"] - rc_2[sel], out

    everyone = np.ones(m2.shape, dtype=bool)
    ra = r0_2.copy()
    fa, _ = f(ra[everyone], everyone)
    fa = fa.reshape(m2.shape)
    for factor in START_FACTORS:         # stars whose envelope fails at R_0 (hot): larger starts
        retry = ~np.isfinite(fa)
        if not retry.any():
            break
        fr, _ = f(r0_2[retry] * factor, retry)
        ra[retry] = np.where(np.isfinite(fr), r0_2[retry] * factor, ra[retry])
        fa[retry] = fr
    rb = ra - np.nan_to_num(fa)
    fb = np.full(m2.shape, np.nan)
    out = None
    todo = everyone.copy()
    best_r = np.full(m2.shape, np.nan)
    best_rel = np.full(m2.shape, np.inf)
    for it in range(N_ITERATIONS + 1):
        # integrate only the stars not yet converged (all of them on the first pass)
        fb_sel, out_sel = f(rb[todo], todo)
        fb[todo] = fb_sel
        if out is None:
            out = {k: np.full(m2.shape, np.nan) for k in out_sel}
        with np.errstate(invalid="ignore"):
            # fall-back: keep each star's best radius so far (a secant step that leaves the
            # tables, NaN, or worsens the residual never replaces a usable solution)
            better = todo & np.isfinite(fb) & ~(np.abs(fb) / rb >= best_rel)
        for k, v in out_sel.items():
            full = np.full(m2.shape, np.nan)
            full[todo] = v
            out[k] = np.where(better, full, out[k])
        best_r = np.where(better, rb, best_r)
        best_rel = np.where(better, np.abs(fb) / rb, best_rel)
        with np.errstate(invalid="ignore"):
            rel = np.abs(fb) / rb
            todo = np.isfinite(rel) & (rel > TOLERANCE)
            if it == N_ITERATIONS or not todo.any():
                break
            slope = (fb - fa) / (rb - ra)
            slope = np.where(np.isfinite(slope) & (slope > 0.05), slope, 1.0)
            step = np.clip(-fb / slope, -0.5 * rb, 0.5 * rb)
        ra, fa = np.where(todo, rb, ra), np.where(todo, fb, fa)
        rb = np.where(todo, rb + np.nan_to_num(step), rb)
    rb, resid = _bisect_fallback(f, best_r, best_rel, out)
    with np.errstate(invalid="ignore"):
        good = np.isfinite(resid) & (resid < ACCEPT) & (rb < 20.0 * r0_2)
    nan = np.where(good, 1.0, np.nan)
    radius_rsun = rb / R_SUN_CM * nan
    lum = 4.0 * np.pi * rb**2 * SIGMA_SB * t2**4
    return {
        "radius_rsun": radius_rsun,
        "log_tc": out["log_tc"] * nan,
        "log_lum": np.log10(lum / (L_SUN_W * 1e7)) * nan,
        "logg": np.log10(G * mass_g / rb**2) * nan,
        "radius_zero_t_rsun": r0_2 / R_SUN_CM,
        "log_dm_conv": out["log_dm_conv"] * nan,
        "eta_conv": out["eta_conv"] * nan,
        "eta_base": out["eta_base"] * nan,
        "log_t_he_base": out["log_t_he_base"] * nan,
        "dlog_t_decade": out["dlog_t_decade"] * nan,
        "log_p_photosphere": out["log_p_photosphere"] * nan,
        "residual": resid,
    }
