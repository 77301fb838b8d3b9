"""Electron thermal conduction at arbitrary degeneracy (electron-ion plus electron-electron).

**Electron-ion part: the Lorentz gas, thermally averaged.** With an energy-dependent relaxation
time tau(eps) the linearised Boltzmann equation gives, at zero electric current (Ziman 1960,
*Electrons and Phonons*, ch. 7; the form used for arbitrary degeneracy by Lee & More 1984, Phys.
Fluids 27, 1273, and in the energy averaging of Potekhin & Yakovlev 1996, A&A 314, 341),

    K_n = (1/3) int v^2 tau(eps) (eps - mu)^n (-df/deps) g(eps) deps,
    kappa_ei = (K_2 - K_1^2 / K_0) / T,         sigma = e^2 K_0,

with f the Fermi-Dirac distribution and g(eps) = p^2 dp / (pi^2 hbar^3 deps). For Coulomb
scattering off ions of charge Z the transport cross-section gives (Rutherford, screened)

    tau(eps) = p^2 v / (4 pi Z^2 e^4 n_i Lambda(eps)).

Its limits are the published ones: strongly degenerate electrons give the Wiedemann-Franz form
kappa = pi^2 k^2 T n_e tau(eps_F) / (3 m*), with tau(eps_F) = 137^2 (3 pi / 4) hbar / (Z m* c^2
Lambda) of Potekhin et al. (1999, A&A 346, 345, eqs. 6-7; the 1/3 of kappa = pi^2 k^2 T n_e /
(3 m* nu) is the Wiedemann-Franz Lorenz number pi^2 k^2 / (3 e^2)); non-degenerate electrons give
the Lorentz-gas conductivity (128 / 3 pi) n_e k^2 T tau_e / m_e in Braginskii's (1965) units
tau_e = 3 m_e^(1/2) (kT)^(3/2) / (4 (2 pi)^(1/2) n_i Z^2 e^4 Lambda) -- the Z -> infinity
entry of Spitzer & Haerm (1953, Phys. Rev. 89, 977, Table III: delta_T = 1).

The kinetics of the averaging are non-relativistic (envelope electrons have p_F << m_e c except at
the base of massive stars); the relativistic degenerate limit is restored by the factor
(m_e / m*)^2 = 1 / (1 + x_F^2) and the Mott term -v_F^2 / (2 c^2) in Lambda (both of the
Potekhin et al. 1999 form).

**Coulomb logarithm** at each energy: Lambda(eps) = (1/2) ln(1 + b_max^2 / b_min^2) -
v_F^2 / (2 c^2) (the smooth form of Lee & More 1984, from memory; their floor of 2 is not used,
a floor of 0.1 only keeps it positive), with

* b_min = max(hbar / (2 p), Z e^2 / (2 eps)): quantum (de Broglie) or classical 90-degree impact
  parameter;
* b_max^2 = 1 / (k_i^2 + k_e^2) + a_i^2 / 6: Debye-Hueckel screening by ions (k_i^2 = 4 pi e^2
  sum n_j Z_j^2 / kT) and electrons (k_e^2 = 4 pi e^2 dn_e/dmu, the Debye length when
  non-degenerate, Thomas-Fermi when degenerate), with the ion-sphere term a_i^2 / 6 that makes
  the strongly degenerate limit ln(2 k_F b_max) equal to the Yakovlev & Urpin (1980, Sov.
  Astron. 24, 303) ion-liquid logarithm ln[(2 pi Z / 3)^(1/3) (1.5 + 3 / Gamma)^(1/2)] (for
  k_e = 0; the electrons' screening lowers it by a few per cent).

**Electron-electron collisions.** In a non-degenerate plasma they cut the Lorentz-gas value to
delta_T(Z) kappa_L, with delta_T = 0.2252, 0.3563, 0.5133, 0.7907, 1 for Z = 1, 2, 4, 16, inf
(Spitzer & Haerm 1953, Table III; interpolated linearly in 1/Z at the mean charge <Z^2>/<Z>).
In degenerate matter Pauli blocking suppresses them by (T / T_F)^2 (Urpin & Yakovlev 1980, Sov.
Astron. 24, 126; Shternin & Yakovlev 2006, PRD 74, 043004): we add them as a parallel collision
channel, 1/kappa = 1/kappa_ei + 1/kappa_ee, with kappa_ee = kappa_ei delta_T / (1 - delta_T)
[1 + (T_F / T)^2] -- exact in the non-degenerate limit, with the published (T/T_F)^2 scaling in
the degenerate one; the joining in between (and the prefactor of the degenerate term, which is
negligible wherever conduction matters in an envelope) is ours. Ion (and atom) heat conduction
is left out.
"""

from __future__ import annotations

import numpy as np

from .eos import E2
from .fermi import C_LIGHT, HBAR, K_B, M_E

#: Spitzer & Haerm (1953) Table III: delta_T against 1/Z (Z = inf, 16, 4, 2, 1).
_SH_INV_Z = np.array([0.0, 1.0 / 16.0, 0.25, 0.5, 1.0])
_SH_DELTA_T = np.array([1.0, 0.7907, 0.5133, 0.3563, 0.2252])
_N_T = 160
_S = (np.arange(_N_T) + 0.5) / _N_T                  # midpoint nodes on [0, 1]


def spitzer_delta_t(z_mean):
    """Spitzer & Haerm (1953, Table III) thermal-conductivity factor delta_T at mean charge Z."""
    inv = 1.0 / np.maximum(np.asarray(z_mean, dtype=float), 1.0)
    return np.interp(inv, _SH_INV_Z, _SH_DELTA_T)


def _energy_integrals(eta):
    """Nodes x = eps / kT and weights of int dx over the thermal window of Fermi-Dirac electrons.

    Substitution x = t^2 (dx = 2 t dt) on t in [sqrt(max(eta - 40, 0)), sqrt(max(eta, 0) + 40)],
    midpoint rule (exponentially accurate for these smooth, rapidly decaying integrands).
    """
    eta = np.asarray(eta, dtype=float)[..., None]
    t_lo = np.sqrt(np.maximum(eta - 40.0, 0.0))
    t_hi = np.sqrt(np.maximum(eta, 0.0) + 40.0)
    t = t_lo + (t_hi - t_lo) * _S
    w = 2.0 * t * (t_hi - t_lo) / _N_T
    return t * t, w


def electron_conductivity(n_e, eta, temperature_k, ion_densities, charges, fermi_x):
    """Thermal conductivity of the electrons, erg s^-1 cm^-1 K^-1, and its parts.

    Parameters
    ----------
    n_e : array_like
        Free-electron density, cm^-3.
    eta : array_like
        Degeneracy parameter mu / kT (non-relativistic chemical potential).
    temperature_k : array_like
        Temperature, K.
    ion_densities : array_like, shape (..., n_ion)
        Number densities of the charged ions, cm^-3.
    charges : sequence of float
        Their charges Z_j.
    fermi_x : array_like
        Relativity parameter p_F / (m_e c).

    Returns
    -------
    dict
        ``kappa`` (total), ``kappa_ei`` (electron-ion Lorentz gas), ``sigma`` (electrical
        conductivity of the e-i part, s^-1), ``lambda_mean`` (Coulomb logarithm at the mean
        thermal weight) and ``delta_t`` (Spitzer-Haerm factor used).
    """
    t = np.asarray(temperature_k, dtype=float)
    n_e = np.asarray(n_e, dtype=float)
    eta = np.asarray(eta, dtype=float)
    z = np.asarray(charges, dtype=float)
    n_j = np.asarray(ion_densities, dtype=float)
    kt = K_B * t
    n_i = np.sum(n_j, axis=-1)
    z1 = np.sum(n_j * z, axis=-1)
    z2 = np.sum(n_j * z * z, axis=-1)
    with np.errstate(invalid="ignore", divide="ignore"):
        z_eff = np.where(z1 > 0, z2 / np.where(z1 > 0, z1, 1.0), 1.0)
    x, w = _energy_integrals(eta)
    with np.errstate(over="ignore"):
        f = 1.0 / (np.exp(np.clip(x - eta[..., None], -700.0, 700.0)) + 1.0)
    ff = f * (1.0 - f)
    # electron screening 4 pi e^2 dn/dmu = 4 pi e^2 n_e / kT * int x^1/2 f(1-f) / int x^1/2 f
    ratio = np.sum(w * np.sqrt(x) * ff, axis=-1) / np.sum(w * np.sqrt(x) * f, axis=-1)
    k_e2 = 4.0 * np.pi * E2 * n_e / kt * ratio
    k_i2 = 4.0 * np.pi * E2 * z2 / kt
    a_i = np.cbrt(3.0 / (4.0 * np.pi * np.maximum(n_i, 1e-300)))
    b_max2 = 1.0 / (k_i2 + k_e2) + a_i**2 / 6.0
    eps = x * kt[..., None]
    p = np.sqrt(2.0 * M_E * eps)
    b_min = np.maximum(HBAR / (2.0 * p), z_eff[..., None] * E2 / (2.0 * eps))
    xf2 = np.asarray(fermi_x, dtype=float) ** 2
    mott = 0.5 * xf2 / (1.0 + xf2)
    lam = np.maximum(0.5 * np.log1p(b_max2[..., None] / b_min**2) - mott[..., None], 0.1)
    # K_n = C (kT)^(3+n) J_n, J_n = int x^3 (x - eta)^n f(1-f) / Lambda dx, C = 2 m / (3 pi^3 Z2 e^4 hbar^3)
    g = w * x**3 * ff / lam
    d = x - eta[..., None]
    j0 = np.sum(g, axis=-1)
    j1 = np.sum(g * d, axis=-1)
    j2 = np.sum(g * d * d, axis=-1)
    c = 2.0 * M_E / (3.0 * np.pi**3 * z2 * E2**2 * HBAR**3)
    rel = 1.0 / (1.0 + xf2)
    kappa_ei = c * kt**5 / t * (j2 - j1 * j1 / j0) * rel
    sigma = E2 * c * kt**3 * j0 * rel
    delta = spitzer_delta_t(z_eff)
    t_f = (HBAR**2 * np.cbrt(3.0 * np.pi**2 * n_e) ** 2 / (2.0 * M_E)) / K_B
    kappa_ee = kappa_ei * delta / (1.0 - delta + 1e-300) * (1.0 + (t_f / t) ** 2)
    kappa = np.where(delta < 1.0, 1.0 / (1.0 / kappa_ei + 1.0 / kappa_ee), kappa_ei)
    lam_mean = np.sum(w * x**3 * ff, axis=-1) / j0
    return {"kappa": kappa, "kappa_ei": kappa_ei, "sigma": sigma, "lambda_mean": lam_mean, "delta_t": delta}
