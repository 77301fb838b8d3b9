"""Opacity of the envelope gas: Rosseland mean of published monochromatic forms, plus conduction.

Radiative part, at each (T, rho) of the equation-of-state table, the Rosseland mean
1/kappa_R = int (1/kappa_nu) dB/dT dnu / int dB/dT dnu over 100 frequencies (0.02 < h nu/kT < 40)
of the sum of

* **bound-free** absorption of hydrogenic species from levels n = 1..8 (H I; He II with Z = 2):
  Kramers' cross-section sigma = 1.0449e-26 g_bf lambda^3 Z^4 / n^5 cm^2 (lambda in Angstrom)
  with the Gaunt factor g_bf = 1 - 0.3456 (lambda R Z^2)^(-1/3) (lambda R Z^2 / n^2 - 1/2)
  (Gray 2005, *The Observation and Analysis of Stellar Photospheres*, eqs. 8.4-8.5; R the
  Rydberg constant), level populations by Boltzmann factors times the occupation probabilities
  of :mod:`~cinderclock.envelope.eos` (w_n with radius n^2 a_0 / Z). He I from its ground state
  only, sigma = 7.4e-18 (nu_0 / nu)^3 cm^2 (threshold value from memory; hydrogenic slope);
* **free-free** (Kramers, g_ff = 1): alpha_nu = 3.69e8 Z^2 n_e n_i T^(-1/2) nu^-3 cm^-1
  (Rybicki & Lightman 1979, eq. 5.18b);
* **H-minus** for hydrogen, with H- in Saha equilibrium with the hydrogen's own electrons
  (n_H- / n_HI = (1/2) exp(eta + 0.754 eV / kT), degeneracy form as in the ionization): bound-free
  cross-section of Wishart (1979) as fitted in Gray (2005) eq. 8.11 and free-free of Bell &
  Berrington (1987) as fitted in Gray eq. 8.13 (coefficients from memory of that text; the
  bound-free peak, 4.0e-17 cm^2 near 8500 A, is checked in the tests);
* all with the stimulated-emission factor (1 - e^(-h nu / kT)), and Thomson **electron
  scattering** sigma_T n_e (no Compton or degeneracy correction: it matters only where conduction
  dominates).

Conductive part: kappa_cond = 16 sigma T^3 / (3 rho K_e), K_e = pi^2 k^2 T n_e tau / m*, with the
relaxation time tau = 137^2 (3 pi / 4) hbar / (Z E_F Lambda), E_F = m* c^2 = m_e c^2 (1 + x^2)^(1/2)
(Potekhin et al. 1999, A&A 346, 345, their eqs. 6-7, as quoted on the authors' conductivity
page), and the Yakovlev & Urpin (1980, Sov. Astron. 24, 303) ion-liquid Coulomb logarithm
Lambda = ln[(2 pi Z / 3)^(1/3) (1.5 + 3 / Gamma)^(1/2)] - v^2 / 2 (v = x / (1 + x^2)^(1/2); form
from memory), floored at 1. Written for degenerate electrons; where the gas is non-degenerate it
gives a huge kappa_cond that radiation short-circuits, as it should. Combined harmonically:
1/kappa = 1/kappa_rad + 1/kappa_cond.

Cautions: no molecules (H2, H2+), no collision-induced absorption and no He- free-free, so cool
atmospheres (DA below ~5,000 K, DB below ~12,000 K) are too transparent; no metal opacity.
"""

from __future__ import annotations

import numpy as np

from ..constants import SIGMA_SB_SI
from .conduction import electron_conductivity
from .eos import BOHR_CM, CHI_H_EV, EV, H_PLANCK
from .fermi import C_LIGHT, K_B, QUANTUM_DENSITY

SIGMA_SB = SIGMA_SB_SI * 1e3
SIGMA_T = 6.6524587e-25                 # Thomson cross-section, cm^2 (CODATA)
RYDBERG_PER_A = 1.0 / 911.27            # R in Angstrom^-1 (infinite-mass Rydberg, 1/911.27 A)
CHI_HMINUS_EV = 0.754
_N_LEVELS = 8
_U = np.geomspace(0.02, 40.0, 100)     # h nu / kT
_WB = _U**4 * np.exp(_U) / np.expm1(_U) ** 2
_WB_DU = _WB * np.gradient(_U)

# Gray (2005) eq. 8.11 (Wishart 1979): H- bound-free, 1e-18 * sum a_i lambda^i cm^2, lambda in A
_HM_BF = (1.99654, -1.18267e-5, 2.64243e-6, -4.40524e-10, 3.23992e-14, -1.39568e-18, 2.78701e-23)


def hminus_bf_cross_section(lambda_a):
    """H- photodetachment cross-section in cm^2 (Gray 2005 eq. 8.11 fit to Wishart 1979); 0 beyond 16,419 A."""
    lam = np.asarray(lambda_a, dtype=float)
    poly = np.zeros_like(lam)
    for c in _HM_BF[::-1]:
        poly = poly * lam + c
    ok = (lam > 1250.0) & (lam < 16419.0)
    return np.where(ok, np.maximum(poly, 0.0) * 1e-18, 0.0)


def hminus_ff_per_atom(lambda_a, temperature_k):
    """H- free-free absorption per H atom per unit electron pressure, cm^4 dyn^-1 (Gray eq. 8.13;
    Bell & Berrington 1987), stimulated emission included."""
    lg = np.log10(np.asarray(lambda_a, dtype=float))
    th = np.log10(5040.0 / np.asarray(temperature_k, dtype=float))
    f0 = -2.2763 - 1.6850 * lg + 0.76661 * lg**2 - 0.053346 * lg**3
    f1 = 15.2827 - 9.2846 * lg + 1.99381 * lg**2 - 0.142631 * lg**3
    f2 = -197.789 + 190.266 * lg - 67.9775 * lg**2 + 10.6913 * lg**3 - 0.625151 * lg**4
    return 1e-26 * 10.0 ** (f0 + f1 * th + f2 * th**2)


def free_free_degeneracy_factor(eta, u, f_half):
    """Pauli-blocking factor of free-free absorption (net of stimulated emission), 0 < theta <= 1.

    With a Kramers cross-section per electron ~ 1/v and g(eps) deps ~ v deps, the net absorption
    by electrons of any degeneracy is ~ int_0^inf [f(x) - f(x + u)] dx = ln(1 + e^eta) -
    ln(1 + e^(eta - u)) (x = eps / kT, u = h nu / kT; Pauli-blocked absorption f (1 - f') less
    stimulated emission f' (1 - f)); the non-degenerate value, which the Kramers formula written
    with n_e assumes, is (2 / sqrt(pi)) F_1/2(eta) (1 - e^-u). theta is their ratio: 1 for
    eta << 0, ~ u / [(1 - e^-u) (4 / (3 sqrt(pi))) eta^(3/2)] for eta >> u (the degeneracy
    correction of free-free opacity as in Cox & Giuli 1968, *Principles of Stellar Structure*,
    sec. 16.2, from memory; derived here).

    Parameters
    ----------
    eta : array_like
        Degeneracy parameter mu / kT.
    u : array_like
        h nu / kT.
    f_half : array_like
        F_1/2(eta) = int_0^inf x^(1/2) / (e^(x - eta) + 1) dx, i.e. n_e / (QUANTUM_DENSITY T^1.5).
    """
    eta = np.asarray(eta, dtype=float)
    u = np.asarray(u, dtype=float)
    num = np.logaddexp(0.0, eta) - np.logaddexp(0.0, eta - u)
    den = 2.0 / np.sqrt(np.pi) * np.asarray(f_half, dtype=float) * (-np.expm1(-u))
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.clip(num / den, 0.0, 1.0)


def _hydrogenic_bf(lam, kt_ev, n_ion_stage, z, chi_ev, n_nuc):
    """Sum over levels of hydrogenic bound-free opacity (cm^-1), shape (..., n_freq)."""
    out = np.zeros(lam.shape)
    n_nuc = n_nuc[..., 0]
    lw1 = -(4 * np.pi / 3) * n_nuc * (2 * BOHR_CM / z) ** 3
    for n in range(1, _N_LEVELS + 1):
        x = lam * RYDBERG_PER_A * z * z
        edge = x <= n * n
        g = np.clip(1.0 - 0.3456 * x ** (-1.0 / 3.0) * (x / (n * n) - 0.5), 0.0, None)
        lwn = -(4 * np.pi / 3) * n_nuc * (2 * n * n * BOHR_CM / z) ** 3
        pop = n_ion_stage * n * n * np.exp(lwn - lw1 - chi_ev * (1.0 - 1.0 / n**2) / kt_ev)
        out = out + np.where(edge, pop[..., None] * 1.0449e-26 * g * lam**3 * z**4 / n**5, 0.0)
    return out


def radiative_opacity(state, temperature_k, rho, element):
    """Rosseland-mean radiative opacity (cm^2 g^-1) from a :func:`~cinderclock.envelope.eos.gas_state` dict."""
    t = np.asarray(temperature_k, dtype=float)
    kt_ev = K_B * t / EV
    nu = _U * (K_B * t[..., None]) / H_PLANCK
    lam = C_LIGHT / nu * 1e8                               # Angstrom
    stim = -np.expm1(-_U)
    n_e = state["n_e"][..., None]
    frac = state["fractions"]
    n_nuc = state["n_nuc"]
    kap = np.zeros(nu.shape)
    if element.symbol == "H":
        n_h1 = frac[..., 0] * n_nuc
        kap += _hydrogenic_bf(lam, kt_ev, n_h1, 1.0, CHI_H_EV, n_nuc[..., None]) * stim
        ions = [(1.0, frac[..., 1] * n_nuc)]
        # H- in Saha equilibrium with the hydrogen's own electrons (degenerate form)
        with np.errstate(over="ignore"):
            n_hm = n_h1 * 0.5 * np.exp(np.minimum(state["eta"] + CHI_HMINUS_EV / kt_ev, 700.0))
        kap += n_hm[..., None] * hminus_bf_cross_section(lam) * stim
        p_e = state["n_e"] * K_B * t
        kap += (n_h1 * p_e)[..., None] * hminus_ff_per_atom(lam, t[..., None])
    else:
        n_he1 = frac[..., 0] * n_nuc
        n_he2 = frac[..., 1] * n_nuc
        nu0 = element.chi_ev[0] * EV / H_PLANCK
        kap += np.where(nu >= nu0, n_he1[..., None] * 7.4e-18 * (nu0 / nu) ** 3, 0.0) * stim
        kap += _hydrogenic_bf(lam, kt_ev, n_he2, 2.0, element.chi_ev[1], n_nuc[..., None]) * stim
        ions = [(1.0, n_he2), (2.0, frac[..., 2] * n_nuc)]
    theta = free_free_degeneracy_factor(state["eta"][..., None], _U, (state["n_e"] / (QUANTUM_DENSITY * t**1.5))[..., None])
    for z, n_i in ions:
        kap += 3.69e8 * z * z * (n_e * n_i[..., None]) / np.sqrt(t[..., None]) / nu**3 * stim * theta
    kap += SIGMA_T * n_e
    with np.errstate(divide="ignore"):
        inv = np.sum(_WB_DU / kap, axis=-1) / np.sum(_WB_DU)
    return 1.0 / (inv * rho)


def conductive_opacity(state, temperature_k, rho, element):
    """Electron-conduction opacity 16 sigma T^3 / (3 rho K_e) in cm^2 g^-1, K_e from
    :func:`cinderclock.envelope.conduction.electron_conductivity` (any degeneracy, e-i and e-e)."""
    t = np.asarray(temperature_k, dtype=float)
    frac = state["fractions"]
    n_ion = frac[..., 1:] * state["n_nuc"][..., None]
    charges = np.arange(1, element.charge + 1, dtype=float)
    k_e = electron_conductivity(state["n_e"], state["eta"], t, n_ion, charges, state["fermi_x"])["kappa"]
    return 16.0 * SIGMA_SB * t**3 / (3.0 * rho * k_e)


def total_opacity(state, temperature_k, rho, element, chunk=64):
    """Harmonic sum of radiative and conductive opacity (cm^2 g^-1), rows processed in chunks."""
    t = np.asarray(temperature_k, dtype=float)
    rad = np.empty(t.shape)
    for k in range(0, t.shape[0], chunk):
        sub = {key: val[k:k + chunk] for key, val in state.items()}
        rad[k:k + chunk] = radiative_opacity(sub, t[k:k + chunk], rho[k:k + chunk], element)
    cond = np.empty(t.shape)
    for k in range(0, t.shape[0], chunk * 4):
        sub = {key: val[k:k + chunk * 4] for key, val in state.items()}
        cond[k:k + chunk * 4] = conductive_opacity(sub, t[k:k + chunk * 4], rho[k:k + chunk * 4], element)
    rad = np.where(np.isnan(rad), np.inf, rad)
    return 1.0 / (1.0 / rad + 1.0 / cond), rad, cond


def opacity_grid(table):
    """log10 of the total, radiative and conductive opacity on an EosTable's grid (NaN where undefined)."""
    ok = np.isfinite(table.log_rho)
    t = np.broadcast_to(10.0 ** table.log_t[:, None], ok.shape)[ok]
    rho = 10.0 ** table.log_rho[ok]
    st = {key: val[ok] for key, val in table.state.items()}
    with np.errstate(invalid="ignore", divide="ignore", over="ignore", under="ignore"):
        tot, rad, cond = total_opacity(st, t, rho, table.element, chunk=4096)
    out = []
    for val in (tot, rad, cond):
        grid = np.full(ok.shape, np.nan)
        grid[ok] = np.log10(val)
        out.append(grid)
    return tuple(out)
