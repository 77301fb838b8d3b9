"""The core material below the helium layer: equation of state and opacity of fully ionised C/O.

In hot white dwarfs the matter at the base of the helium layer (Dm = 1e-2 M) is only partly
degenerate (T / T_F ~ 0.1 at 5e7 K), so the temperature still rises below it. The envelope
integration therefore continues through the outer core ("mantle") down to a fixed depth
(:data:`cinderclock.envelope.structure.DM_CORE`), with this layer's tables:

* **Composition**: a core of :mod:`cinderclock.composition` (default C/O 50:50 by mass), fully
  ionised nuclei. Pressure ionization of the K shells of C and O (hard-sphere occupation
  probability of :mod:`~cinderclock.envelope.eos`, ln w = -(4 pi / 3) n_nuc (2 a_0 / Z)^3) is
  complete above ~1e3 g cm^-3 and thermal ionization above ~1e6 K, which is where the mantle lies
  in the envelope solutions; the bound states are left out (caution: K-shell bound-free opacity of
  C/O is missing at the top of the mantle of cool stars, where conduction dominates anyway).
* **Electrons**: :func:`cinderclock.envelope.fermi.electron_gas` at n_e = rho Y_e / m_u.
* **Ions**: ideal classical gas of each species plus the Coulomb energy of
  :func:`~cinderclock.envelope.eos.coulomb_u_f` per species at Gamma_j = Z_j^(5/3) e^2 / (a_e kT)
  (linear mixing, common practice; a_e the electron-sphere radius), the same limits as the helium
  layer's Coulomb term and, at strong coupling, the Salpeter lattice term of the core model.
* **Opacity**: Rosseland mean of Kramers free-free, alpha_nu = 3.69e8 n_e sum(n_j Z_j^2) T^-1/2
  nu^-3 (Rybicki & Lightman 1979, eq. 5.18b; g_ff = 1) with the Pauli-blocking factor of
  :func:`~cinderclock.envelope.opacity.free_free_degeneracy_factor` and stimulated emission, plus
  Thomson scattering; conduction from :func:`cinderclock.envelope.conduction.electron_conductivity`
  with the ion charges of the mixture (relaxation rate ~ sum n_j Z_j^2); combined harmonically.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from .conduction import electron_conductivity
from .eos import A_RAD, E2, H_PLANCK, LOG_P_GRID, LOG_T_GRID, M_U, _invert_rows, coulomb_u_f  # noqa: F401
from .fermi import K_B, QUANTUM_DENSITY, electron_gas
from .opacity import _U, _WB_DU, SIGMA_SB, SIGMA_T, free_free_degeneracy_factor

#: log10 rho grid (g cm^-3) of the mantle's native table (beyond the envelope layers' range: the
#: mantle of massive stars reaches 1e8 g cm^-3 at Dm = 0.3 M).
LOG_RHO_MANTLE = np.arange(-6.0, 9.2, 0.04)


def mantle_state(rho, temperature_k, composition):
    """Thermodynamic state of the fully ionised mixture ``composition`` (a CoreComposition).

    Returns a dict of arrays: ``pressure`` (dyn cm^-2), ``entropy`` (erg g^-1 K^-1), ``n_e``,
    ``n_j`` (..., n_species, cm^-3), ``eta``, ``fermi_x``.
    """
    rho, t = np.broadcast_arrays(np.asarray(rho, dtype=float), np.asarray(temperature_k, dtype=float))
    z, a, x = (np.array(v, dtype=float) for v in zip(*composition.species))
    n_j = rho[..., None] * x / (a * M_U)
    n_e = np.sum(n_j * z, axis=-1)
    el = electron_gas(n_e, t)
    a_e = np.cbrt(3.0 / (4.0 * np.pi * n_e))
    gamma_j = z ** (5.0 / 3.0) * (E2 / (a_e * K_B * t))[..., None]
    u_c, f_c = coulomb_u_f(gamma_j)
    kt = K_B * t
    pressure = el["pressure"] + kt * np.sum(n_j * (1.0 + u_c / 3.0), axis=-1)
    lam3 = (H_PLANCK / np.sqrt(2.0 * np.pi * a * M_U * K_B * t[..., None])) ** 3
    s_ion = K_B * np.sum(n_j * (2.5 - np.log(n_j * lam3) + u_c - f_c), axis=-1)
    return {"pressure": pressure, "entropy": (s_ion + el["entropy"]) / rho, "n_e": n_e, "n_j": n_j,
            "eta": el["eta"], "fermi_x": el["fermi_x"], "charges": z}


def mantle_opacity(state, temperature_k, rho):
    """Radiative (Rosseland free-free + Thomson), conductive and total opacity, cm^2 g^-1."""
    t = np.asarray(temperature_k, dtype=float)
    z = state["charges"]
    n_e = state["n_e"]
    nu = _U * (K_B * t[..., None]) / H_PLANCK
    stim = -np.expm1(-_U)
    theta = free_free_degeneracy_factor(state["eta"][..., None], _U, (n_e / (QUANTUM_DENSITY * t**1.5))[..., None])
    z2n = np.sum(state["n_j"] * z * z, axis=-1)
    kap = 3.69e8 * (n_e * z2n / np.sqrt(t))[..., None] / nu**3 * stim * theta + (SIGMA_T * n_e)[..., None]
    rad = 1.0 / (np.sum(_WB_DU / kap, axis=-1) / np.sum(_WB_DU) * rho)
    k_e = electron_conductivity(n_e, state["eta"], t, state["n_j"], z, state["fermi_x"])["kappa"]
    cond = 16.0 * SIGMA_SB * t**3 / (3.0 * rho * k_e)
    return 1.0 / (1.0 / rad + 1.0 / cond), rad, cond


@lru_cache(maxsize=4)
def mantle_fields(core):
    """Tables (log_rho, nabla_ad, log c_P, delta, log kappa, eta, log kappa_rad, log kappa_cond) of
    the core material ``core`` on the envelope's (LOG_T_GRID, LOG_P_GRID), stacked (8, n_T, n_P)."""
    from ..composition import core_composition

    comp = core_composition(core)
    lt, lr = np.meshgrid(LOG_T_GRID, LOG_RHO_MANTLE, indexing="ij")
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        p = mantle_state(10.0**lr, 10.0**lt, comp)["pressure"]
        log_p_native = np.where(p > 0, np.log10(np.where(p > 0, p, 1.0)), np.nan)
    log_rho = _invert_rows(log_p_native, LOG_RHO_MANTLE)
    ok = np.isfinite(log_rho)
    ltt = np.broadcast_to(LOG_T_GRID[:, None], log_rho.shape)
    rho = 10.0 ** np.where(ok, log_rho, 0.0)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore", under="ignore"):
        st = mantle_state(rho, 10.0**ltt, comp)
        entropy = np.where(ok, st["entropy"], np.nan)
        ln10 = np.log(10.0)
        ds_dlt = np.gradient(entropy, LOG_T_GRID * ln10, axis=0)
        ds_dlp = np.gradient(entropy, LOG_P_GRID * ln10, axis=1)
        nabla_ad = -ds_dlp / ds_dlt
        delta = -np.gradient(log_rho, LOG_T_GRID, axis=0)
        tot = np.full(ok.shape, np.nan)
        rad, cond = tot.copy(), tot.copy()
        idx = np.flatnonzero(ok.ravel())
        for k0 in range(0, idx.size, 4096):               # chunks of grid points (memory), not stars
            sel = idx[k0:k0 + 4096]
            sub = {k: (v if k == "charges" else v.reshape(-1, *v.shape[2:])[sel]) for k, v in st.items()}
            res = mantle_opacity(sub, 10.0 ** ltt.ravel()[sel], rho.ravel()[sel])
            for arr, val in zip((tot, rad, cond), res):
                arr.ravel()[sel] = val
        fields = (log_rho, nabla_ad, np.log10(ds_dlt), delta, np.log10(tot), np.where(ok, st["eta"], np.nan),
                  np.log10(rad), np.log10(cond))
    return np.stack(fields)
