"""Envelope structure: grey atmosphere, then the structure equations in ln P, vectorised over stars.

Atmosphere (Eddington grey, T^4 = (3/4) Teff^4 (tau + 2/3)): dP/dtau = g / kappa(P, T(tau)) from
tau = 1e-4 to the photosphere tau = 2/3 in ``N_ATMOSPHERE`` RK4 steps in ln tau. The grey law is
poor below Teff ~ 5,000-6,000 K, where the atmosphere is convective and non-grey (Rohrmann et al.
2012, A&A 546, A119): cool rows carry that caution.

Interior (independent variable s = ln P, ``N_INTERIOR`` RK4 steps from the photosphere to beyond
the base of the helium layer, or on through the core material to Dm = DM_CORE M), with the mass above, Dm = M - m, as ln Dm:

    dr / ds     = -P r^2 / (G m rho)
    d ln Dm / ds = 4 pi r^4 P / (G m Dm)
    d ln T / ds  = nabla   (radiative, or mixing-length where Schwarzschild says convective)

with the luminosity L_r = L m / M (L = 4 pi R^2 sigma Teff^4) and nabla_rad = 3 kappa L_r P /
(16 pi a c G m T^4): the heat flows out of the whole core, released at a rate per unit mass taken
uniform (isothermal core of uniform heat capacity; neutrino losses, which take heat from the
centre of hot stars, are left out -- our approximation). In the envelope m / M = 1 to 1e-2.
The layer (H or He) is chosen from Dm: hydrogen while Dm < q_H M. Every step works on arrays of
all stars at once; the only Python loops are over integration steps.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..constants import G_SI
from .convection import temperature_gradient
from .eos import A_RAD, LOG_P_GRID, LOG_T_GRID, eos_table
from .fermi import C_LIGHT
from .opacity import SIGMA_SB, opacity_grid

G = G_SI * 1e3
N_ATMOSPHERE = 30
N_INTERIOR = 240
TAU_TOP = 1e-4
_FIELDS = ("log_rho", "nabla_ad", "log_cp", "delta", "log_kappa", "eta", "log_kappa_rad", "log_kappa_cond")
_LN10 = np.log(10.0)
#: Width (in ln Dm) of the smoothed H/He interface: 0.1, i.e. the interface spreads over ~0.1 dex
#: in mass -- narrower than diffusive-equilibrium profiles of real DA envelopes (our numerical
#: choice; it keeps the integrand smooth inside RK4 steps).
LAYER_WIDTH = 0.1
#: Depth Dm / M of the end point in the core material, where T is taken as T_c and the radius is
#: matched to the zero-temperature core (below the helium layer the temperature of hot stars still
#: rises: see :mod:`~.mantle`; at this depth the rise of log T over the last decade of pressure is
#: the ``dlog_t_decade`` diagnostic).
DM_CORE = 0.3
#: Floor on delta = -(d ln rho / d ln T)_P and nabla_ad in the structure equations. The hard-sphere
#: pressure ionization of :mod:`~.eos` gives small (T, P) islands with delta < 0 and nabla_ad < 0
#: (H near 1e5 K and 3 g cm^-3, He near 6e5 K and 100 g cm^-3), where mixing-length theory is
#: undefined (U imaginary): without a floor the gradient jumps to nabla_rad there, T leaps by
#: 1-2 dex in one step, and the radius solve gets several roots and NaN windows. The floor, 0.05
#: (below the values around the islands, 0.1-0.3), is a numerical guard of ours, not physics.
THERMO_FLOOR = 0.05


def _blend(a, b, w):
    """(1 - w) a + w b, taking the defined side where the other is NaN (off one layer's table)."""
    return np.where(np.isnan(a), b, np.where(np.isnan(b), a, (1.0 - w) * a + w * b))


@lru_cache(maxsize=2)
def layer_stack(symbols):
    """Stacked tables, shape (n_field, n_layer, n_T, n_P), of the layers ``symbols`` (top first):
    "H", "He", or "core:<key>" for the fully ionised core material of :mod:`~.mantle`."""
    out = []
    for sym in symbols:
        if sym.startswith("core:"):                     # the core material below the helium layer
            from .mantle import mantle_fields
            out.append(mantle_fields(sym[5:]))
            continue
        eos = eos_table(sym)
        lk, lr, lc = opacity_grid(eos)
        with np.errstate(invalid="ignore", divide="ignore"):
            fields = (eos.log_rho, eos.nabla_ad, np.log10(eos.cp), eos.delta, lk, eos.state["eta"], lr, lc)
        out.append(np.stack(fields))
    return np.stack(out, axis=1)


@dataclass
class Lookup:
    """Bilinear interpolation in the stacked (log T, log P) tables."""

    stack: np.ndarray

    def __call__(self, log_t, log_p, layer, n_fields=None):
        x = (log_t - LOG_T_GRID[0]) / (LOG_T_GRID[1] - LOG_T_GRID[0])
        y = (log_p - LOG_P_GRID[0]) / (LOG_P_GRID[1] - LOG_P_GRID[0])
        bad = ~((x >= 0) & (x <= LOG_T_GRID.size - 1) & (y >= 0) & (y <= LOG_P_GRID.size - 1))
        i = np.clip(np.floor(np.nan_to_num(x)).astype(int), 0, LOG_T_GRID.size - 2)
        j = np.clip(np.floor(np.nan_to_num(y)).astype(int), 0, LOG_P_GRID.size - 2)
        wx = np.clip(np.nan_to_num(x) - i, 0.0, 1.0)
        wy = np.clip(np.nan_to_num(y) - j, 0.0, 1.0)
        s = self.stack if n_fields is None else self.stack[:n_fields]
        v = ((1 - wx) * (1 - wy) * s[:, layer, i, j] + wx * (1 - wy) * s[:, layer, i + 1, j]
             + (1 - wx) * wy * s[:, layer, i, j + 1] + wx * wy * s[:, layer, i + 1, j + 1])
        v[:, bad] = np.nan
        return dict(zip(_FIELDS, v))


def atmosphere(lookup, teff, logg, layer):
    """ln P and ln T at the photosphere (tau = 2/3) of the grey atmosphere; arrays like ``teff``."""
    g = 10.0**logg
    lt = np.linspace(np.log(TAU_TOP), np.log(2.0 / 3.0), N_ATMOSPHERE + 1)

    def temp(ln_tau):
        return 0.25 * np.log(0.75 * teff**4 * (np.exp(ln_tau) + 2.0 / 3.0))

    def rhs(ln_tau, ln_p):
        ln_t = temp(ln_tau)
        k = lookup(ln_t / _LN10, ln_p / _LN10, layer)["log_kappa"] * _LN10
        return g * np.exp(ln_tau - k - ln_p)

    ln_p = np.log(g * TAU_TOP / 1.0)
    for _ in range(12):                      # damped fixed point P = g tau / kappa(P) at the top
        k = lookup(temp(lt[0]) / _LN10, ln_p / _LN10, layer)["log_kappa"] * _LN10
        ln_p = 0.5 * ln_p + 0.5 * (np.log(g * TAU_TOP) - np.nan_to_num(k, nan=0.0))
    for a, b in zip(lt[:-1], lt[1:]):
        h = b - a
        k1 = rhs(a, ln_p)
        k2 = rhs(a + h / 2, ln_p + h / 2 * k1)
        k3 = rhs(a + h / 2, ln_p + h / 2 * k2)
        k4 = rhs(b, ln_p + h * k3)
        ln_p = ln_p + h / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
    return ln_p, temp(lt[-1])


def integrate(lookup, mass_g, radius_cm, teff, q_h, q_he, alpha, top_layer, pressure_factor=30.0,
              dm_core=None, ln_p_end=None, return_history=False):
    """Integrate the envelopes of all stars from the photosphere to past Dm = q_He M, or, with
    ``dm_core``, on through the core material (the last layer of ``lookup``) to Dm = dm_core M.

    Parameters
    ----------
    lookup : Lookup
    mass_g, radius_cm, teff : arrays of one shape
        Mass (g), photospheric radius (cm) and Teff (K).
    q_h, q_he : float
        Hydrogen- and helium-layer mass fractions (q_h = 0: helium atmosphere).
    alpha : float
        Mixing-length parameter.
    top_layer : int
        Layer index of the top (0 for the first table of the stack).
    dm_core : float, optional
        Depth Dm / M of the end point in the core (None: end at the base of the helium layer).
    ln_p_end : array, optional
        ln P (dyn cm^-2) where the integration stops (beyond the end point); default from the
        thin-shell pressure at the helium base times ``pressure_factor``.
    return_history : bool
        Return only the integrated run, array (n_step + 1, 4, ...) of ln T, r, ln Dm, ln P.

    Returns
    -------
    dict of arrays (values at the end point, Dm = q_He M or dm_core M): ``r_base`` (cm),
    ``log_tc`` (K), ``eta_base``, ``log_t_he_base`` (K, at Dm = q_He M), ``dlog_t_decade``
    (rise of log T over the last decade of pressure above the end point), and
    diagnostics ``log_dm_conv`` (log10 Dm/M at the deepest convective point, NaN if none),
    ``eta_conv`` (degeneracy there), ``log_p_base``.
    """
    lum = 4.0 * np.pi * radius_cm**2 * SIGMA_SB * teff**4
    logg = np.log10(G * mass_g / radius_cm**2)
    ln_p0, ln_t0 = atmosphere(lookup, teff, logg, np.full(teff.shape, top_layer))
    if ln_p_end is None:
        ln_p_end = np.log(pressure_factor * G * mass_g**2 * q_he / (4.0 * np.pi * radius_cm**4))
    h = (ln_p_end - ln_p0) / N_INTERIOR
    ln_dm_h = np.log(max(q_h, 1e-300) * mass_g)
    ln_dm_he = np.log(q_he * mass_g)
    ln_dm_end = ln_dm_he if dm_core is None else np.log(dm_core * mass_g)
    he_layer = top_layer + 1 if q_h > 0 else top_layer
    core_layer = he_layer + 1

    def layer(ln_t, ln_p, k, n_fields):
        return lookup(ln_t / _LN10, ln_p / _LN10, np.full(ln_t.shape, k), n_fields)

    def rhs(ln_p, y, n_fields=5):
        ln_t, r, ln_dm = y
        # smooth H -> He (and He -> core) transitions over ~LAYER_WIDTH in ln Dm: a step inside an
        # RK4 step would make r_base jitter with the parameters (see module docstring)
        v = layer(ln_t, ln_p, he_layer, n_fields)
        if q_h > 0:
            w_he = 0.5 * (1.0 + np.tanh((ln_dm - ln_dm_h) / LAYER_WIDTH))
            v_h = layer(ln_t, ln_p, top_layer, n_fields)
            v = {k: _blend(v_h[k], v[k], w_he) for k in v_h}
        if dm_core is not None:
            w_c = 0.5 * (1.0 + np.tanh((ln_dm - ln_dm_he) / LAYER_WIDTH))
            v_c = layer(ln_t, ln_p, core_layer, n_fields)
            v = {k: _blend(v[k], v_c[k], w_c) for k in v}
        p = np.exp(ln_p)
        t = np.exp(ln_t)
        rho = 10.0 ** v["log_rho"]
        kap = 10.0 ** v["log_kappa"]
        m = mass_g - np.exp(ln_dm)
        g_loc = G * m / r**2
        nab_rad = 3.0 * kap * lum * (m / mass_g) * p / (16.0 * np.pi * A_RAD * C_LIGHT * G * m * t**4)
        hp = p / (rho * g_loc)
        ell = alpha * hp
        cp = 10.0 ** v["log_cp"]
        # guard against the equation of state's anomaly at pressure ionization (see THERMO_FLOOR)
        delta = np.maximum(v["delta"], THERMO_FLOOR)
        nabla_ad = np.maximum(v["nabla_ad"], THERMO_FLOOR)
        with np.errstate(invalid="ignore", divide="ignore"):
            u = 3.0 * A_RAD * C_LIGHT * t**3 / (cp * rho**2 * kap * ell**2) * np.sqrt(8.0 * hp / (g_loc * delta))
        nab, conv = temperature_gradient(nab_rad, nabla_ad, np.nan_to_num(u, nan=1e30))
        dr = -p * r * r / (G * m * rho)
        dlndm = 4.0 * np.pi * r**4 * p / (G * m * np.exp(ln_dm))
        return np.stack([nab, dr, dlndm]), conv, v.get("eta")

    y = np.stack([ln_t0, radius_cm.astype(float), np.log(4.0 * np.pi * radius_cm**4 * np.exp(ln_p0) / (G * mass_g))])
    ln_p = ln_p0
    hist = [np.concatenate([y, ln_p[None]])]
    conv_dm = np.full(teff.shape, np.nan)
    conv_eta = np.full(teff.shape, np.nan)
    for _ in range(N_INTERIOR):
        k1, conv, eta = rhs(ln_p, y, 6)
        with np.errstate(invalid="ignore"):
            deep_conv = conv & (y[2] < ln_dm_he)
        conv_dm = np.where(deep_conv, y[2], conv_dm)
        conv_eta = np.where(deep_conv, eta, conv_eta)
        k2 = rhs(ln_p + h / 2, y + h / 2 * k1)[0]
        k3 = rhs(ln_p + h / 2, y + h / 2 * k2)[0]
        k4 = rhs(ln_p + h, y + h * k3)[0]
        y = y + h / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
        ln_p = ln_p + h
        hist.append(np.concatenate([y, ln_p[None]]))
    hist = np.stack(hist)                                   # (n_step, 4, ...)
    if return_history:                                       # diagnostics: ln T, r, ln Dm, ln P per step
        return hist

    def at_depth(ln_dm_target):
        """State (ln T, r, ln Dm, ln P) interpolated at ln Dm = ln_dm_target, and a validity mask."""
        with np.errstate(invalid="ignore"):
            k = np.sum(hist[:, 2] < ln_dm_target, axis=0)      # steps above the target depth
        ok = (k > 0) & (k < hist.shape[0])
        kk = np.clip(k, 1, hist.shape[0] - 1)
        lo = np.take_along_axis(hist, (kk - 1)[None, None], axis=0)[0]
        hi = np.take_along_axis(hist, kk[None, None], axis=0)[0]
        w = (ln_dm_target - lo[2]) / (hi[2] - lo[2])
        return lo + w * (hi - lo), ok & np.all(np.isfinite(lo + w * (hi - lo)), axis=0)

    he_base, ok_he = at_depth(ln_dm_he)
    base, ok = at_depth(ln_dm_end)
    eta_base = lookup(he_base[0] / _LN10, he_base[3] / _LN10, np.full(teff.shape, he_layer))["eta"]
    nan = np.where(ok & ok_he, 1.0, np.nan)
    # rise of ln T over the decade of pressure above the end point (the gradient check)
    n_flat = base[0].size
    lp = hist[:, 3].reshape(hist.shape[0], n_flat)
    lt = hist[:, 0].reshape(hist.shape[0], n_flat)
    target = (base[3] - _LN10).reshape(n_flat)
    with np.errstate(invalid="ignore"):
        j = np.clip(np.sum(lp < target[None], axis=0), 1, lp.shape[0] - 1)
    cols = np.arange(n_flat)
    wj = (target - lp[j - 1, cols]) / (lp[j, cols] - lp[j - 1, cols])
    ln_t_dec = (lt[j - 1, cols] + wj * (lt[j, cols] - lt[j - 1, cols])).reshape(base[0].shape)
    return {"r_base": base[1] * nan, "log_tc": base[0] / _LN10 * nan, "eta_base": eta_base * nan,
            "log_t_he_base": he_base[0] / _LN10 * nan, "dlog_t_decade": (base[0] - ln_t_dec) / _LN10 * nan,
            "log_p_base": base[3] / _LN10 * nan, "log_dm_conv": (conv_dm - np.log(mass_g)) / _LN10,
            "eta_conv": conv_eta, "log_p_photosphere": ln_p0 / _LN10}
