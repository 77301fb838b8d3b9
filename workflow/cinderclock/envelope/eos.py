"""Equation of state of the envelope gas: ions, atoms and electrons of arbitrary degeneracy.

Pure hydrogen or pure helium (the layers of a white-dwarf envelope). Ingredients:

* **Ionization** by the Saha equation written with the electron degeneracy parameter eta (valid at
  any degeneracy): n_(j+1) / n_j = (g_(j+1) w_(j+1)) / (g_j w_j) exp(-eta - chi_j / kT), with
  ground-state statistical weights (H I 2, H II 1; He I 1, He II 2, He III 1) and ionization
  energies 13.598, 24.587 and 54.418 eV (NIST). Excited states are left out of the partition
  functions (their share is below a few per cent where the atoms are neutral).
* **Pressure ionization** by hard-sphere occupation probabilities in the manner of Hummer &
  Mihalas (1988, ApJ 331, 794): ln w_j = -(4 pi / 3) n_nuc (2 r_j)^3, with every nucleus as a
  perturber (our simplification) and r_j the hydrogenic radius of the bound state,
  a_0 (13.6 eV / chi_j)^(1/2). The matching excluded-volume pressure -kT sum n_j ln w_j keeps the
  free energy consistent. w -> 0 above about 1 g cm^-3 (H) to 10 g cm^-3 (He): fully ionised.
  Known limit: with strongly degenerate electrons the Saha factor e^-eta (eta ~ rho^(2/3) / T)
  competes with ln w (~ rho); colder than ~1e5 K at 1e3 g cm^-3 the gas then stays He II /
  H I. White-dwarf envelope paths do not go there (T > 3e5 K wherever rho > 1e2 g cm^-3).
* **Electrons**: :func:`cinderclock.envelope.fermi.electron_gas` (Fermi-Dirac, relativistic at
  T = 0).
* **Coulomb** (ion-ion, rigid electron background): internal energy u = U / (N kT) interpolating
  between the Debye-Hueckel limit -(sqrt(3)/2) Gamma^(3/2) and the ion-sphere (Salpeter 1961)
  limit -0.9 Gamma, u = -(sqrt3/2) Gamma^1.5 / (1 + (sqrt3/1.8) Gamma^0.5) (both limits exact,
  interpolation ours); P_C = n_nuc kT u / 3, so at strong coupling it is the lattice term of the
  core model (:mod:`cinderclock.massradius.eos`).
* **Radiation pressure is left out**: the Eddington factor of white dwarfs is below ~1e-2, and in
  the optically thin atmosphere a T^4 / 3 is not the radiation pressure.

The specific entropy follows from the same free energy; nabla_ad = (d ln T / d ln P)_s, c_P and
delta = -(d ln rho / d ln T)_P are taken numerically on the (log T, log P) table.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..constants import C_SI, E_CHARGE_SI, EPS0_SI, H_SI, M_U_SI, SIGMA_SB_SI
from .fermi import HBAR, K_B, M_E, QUANTUM_DENSITY, electron_gas

EV = E_CHARGE_SI * 1e7                          # erg per eV
M_U = M_U_SI * 1e3                              # g
H_PLANCK = H_SI * 1e7                           # erg s
A_RAD = 4.0 * SIGMA_SB_SI * 1e3 / (C_SI * 1e2)  # erg cm^-3 K^-4
E2 = E_CHARGE_SI**2 / (4.0 * np.pi * EPS0_SI) * 1e9   # e^2 in erg cm (Gaussian)
BOHR_CM = HBAR**2 / (M_E * E2)                  # a_0 in cm
CHI_H_EV = 13.598


@dataclass(frozen=True)
class Element:
    """One chemical element of the envelope gas.

    Parameters
    ----------
    symbol : str
    charge : int
        Nuclear charge Z (the number of ionization stages is Z + 1).
    mass_number : float
        Atomic mass in u.
    weights : tuple of float
        Ground-state statistical weights of stages 0..Z.
    chi_ev : tuple of float
        Ionization energies of stages 0..Z-1 in eV (NIST Atomic Spectra Database).
    """

    symbol: str
    charge: int
    mass_number: float
    weights: tuple
    chi_ev: tuple

    @property
    def radii_cm(self):
        """Hard-sphere radii of the bound stages, a_0 (13.6 eV / chi)^(1/2) (hydrogenic)."""
        return tuple(BOHR_CM * np.sqrt(CHI_H_EV / c) for c in self.chi_ev)


HYDROGEN = Element("H", 1, 1.008, (2.0, 1.0), (13.598,))
HELIUM = Element("He", 2, 4.0026, (1.0, 2.0, 1.0), (24.587, 54.418))
ELEMENTS = {"H": HYDROGEN, "He": HELIUM}

_SQ3_2 = np.sqrt(3.0) / 2.0
_B_COUL = _SQ3_2 / 0.9


def coulomb_u_f(gamma):
    """Coulomb internal energy u = U/(N kT) and free energy f = F/(N kT) of the ion plasma."""
    t = np.sqrt(np.maximum(gamma, 0.0))
    b = _B_COUL
    u = -_SQ3_2 * t**3 / (1.0 + b * t)
    f = -2.0 * _SQ3_2 * (t * t / (2.0 * b) - t / b**2 + np.log1p(b * t) / b**3)
    return u, f


def _log_w(element, n_nuc):
    """ln w of each bound stage (shape (..., Z))."""
    r = np.array(element.radii_cm)
    return -(4.0 * np.pi / 3.0) * np.asarray(n_nuc)[..., None] * (2.0 * r) ** 3


def _fractions(element, eta, kt_ev, logw):
    """Stage fractions (..., Z+1) at degeneracy eta, kT in eV and ln w of bound stages."""
    g = np.array(element.weights)
    chi = np.array(element.chi_ev)
    lw = np.concatenate([logw, np.zeros(logw.shape[:-1] + (1,))], axis=-1)
    lg = np.log(g) + lw
    steps = lg[..., 1:] - lg[..., :-1] - eta[..., None] - chi / kt_ev[..., None]
    cum = np.concatenate([np.zeros(steps.shape[:-1] + (1,)), np.cumsum(steps, axis=-1)], axis=-1)
    cum -= cum.max(axis=-1, keepdims=True)
    f = np.exp(cum)
    return f / f.sum(axis=-1, keepdims=True)


def gas_state(rho, temperature_k, element):
    """Full thermodynamic state of a pure-element gas at density ``rho`` (g cm^-3) and T (K).

    Charge neutrality is solved by bisection in ln n_e (vectorised, 42 steps: 2e-11 in ln n_e).

    Returns
    -------
    dict of arrays
        ``pressure`` (dyn cm^-2), ``entropy`` (erg g^-1 K^-1), ``n_e``, ``n_nuc`` (cm^-3), ``eta``,
        ``fractions`` (..., Z+1), ``log_w`` (..., Z), ``gamma`` (ion coupling), ``fermi_x``.
    """
    rho, t = np.broadcast_arrays(np.asarray(rho, dtype=float), np.asarray(temperature_k, dtype=float))
    n_nuc = rho / (element.mass_number * M_U)
    kt_ev = K_B * t / EV
    logw = _log_w(element, n_nuc)
    z = np.arange(element.charge + 1, dtype=float)
    hi = np.log(element.charge * n_nuc)
    lo = hi - 80.0
    for _ in range(42):
        mid = 0.5 * (lo + hi)
        ne = np.exp(mid)
        eta = _eta(ne, t)
        zbar = _fractions(element, eta, kt_ev, logw) @ z
        up = ne > zbar * n_nuc
        hi = np.where(up, mid, hi)
        lo = np.where(up, lo, mid)
    n_e = np.exp(0.5 * (lo + hi))
    el = electron_gas(n_e, t)
    frac = _fractions(element, el["eta"], kt_ev, logw)
    n_j = frac * n_nuc[..., None]
    z2 = frac @ (z * z)
    a_ion = np.cbrt(3.0 / (4.0 * np.pi * n_nuc))
    gamma = z2 * E2 / (a_ion * K_B * t)
    u_c, f_c = coulomb_u_f(gamma)
    nkt = n_nuc * K_B * t
    p_w = -K_B * t * np.sum(n_j[..., :-1] * logw, axis=-1)
    pressure = el["pressure"] + nkt + p_w + nkt * u_c / 3.0
    # entropy density of the heavy particles (ideal, with g_j w_j as internal weights)
    lam3 = (H_PLANCK / np.sqrt(2.0 * np.pi * element.mass_number * M_U * K_B * t)) ** 3
    log_gw = np.log(np.array(element.weights)) + np.concatenate([logw, np.zeros(logw.shape[:-1] + (1,))], axis=-1)
    with np.errstate(divide="ignore", invalid="ignore"):
        terms = np.where(n_j > 0, n_j * (2.5 - np.log(np.where(n_j > 0, n_j, 1.0)) - np.log(lam3)[..., None] + log_gw),
                         0.0)
    s_vol = K_B * np.sum(terms, axis=-1) + el["entropy"] + n_nuc * K_B * (u_c - f_c)
    return {"pressure": pressure, "entropy": s_vol / rho, "n_e": n_e, "n_nuc": n_nuc, "eta": el["eta"],
            "fractions": frac, "log_w": logw, "gamma": gamma, "fermi_x": el["fermi_x"]}


def _eta(n_e, t):
    from ..cooling.neutrinos import inverse_fermi_half
    return inverse_fermi_half(n_e / (QUANTUM_DENSITY * t**1.5))


#: Grid of the tabulated equation of state (log10 T in K, log10 P in dyn cm^-2).
LOG_T_GRID = np.round(np.arange(3.20, 8.70 + 1e-9, 0.025), 6)
LOG_P_GRID = np.round(np.arange(0.0, 26.7 + 1e-9, 0.06), 6)
_LOG_RHO_NATIVE = np.arange(-15.0, 7.6, 0.04)


@dataclass
class EosTable:
    """The envelope equation of state on a regular (log T, log P) grid.

    Attributes hold 2-d arrays of shape (n_T, n_P): ``log_rho`` (g cm^-3), ``nabla_ad``,
    ``cp`` (erg g^-1 K^-1), ``delta`` (-(d ln rho / d ln T)_P), ``state`` (the full
    :func:`gas_state` dict at the grid points). NaN marks (T, P) that no density reaches.
    """

    element: Element
    log_t: np.ndarray
    log_p: np.ndarray
    log_rho: np.ndarray
    nabla_ad: np.ndarray
    cp: np.ndarray
    delta: np.ndarray
    state: dict


def _invert_rows(log_p_native, log_rho_native=None):
    """log rho on LOG_P_GRID for every row of a (n_T, n_rho) table of log P (on ``log_rho_native``,
    default the envelope layers' native density grid)."""
    log_rho_native = _LOG_RHO_NATIVE if log_rho_native is None else log_rho_native
    out = np.full((log_p_native.shape[0], LOG_P_GRID.size), np.nan)
    for i, row in enumerate(log_p_native):          # loop over temperature rows, not stars
        ok = np.isfinite(row)
        run = np.maximum.accumulate(np.where(ok, row, -np.inf))
        keep = ok & (row >= run) & np.concatenate([[True], row[1:] > run[:-1]])
        if keep.sum() < 2:
            continue
        lp, lr = row[keep], log_rho_native[keep]
        inside = (LOG_P_GRID >= lp[0]) & (LOG_P_GRID <= lp[-1])
        out[i, inside] = np.interp(LOG_P_GRID[inside], lp, lr)
    return out


@lru_cache(maxsize=4)
def eos_table(symbol):
    """Build (once per process) the :class:`EosTable` of pure ``symbol`` ("H" or "He")."""
    element = ELEMENTS[symbol]
    lt, lr = np.meshgrid(LOG_T_GRID, _LOG_RHO_NATIVE, indexing="ij")
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        p = gas_state(10.0**lr, 10.0**lt, element)["pressure"]
        log_p_native = np.where(p > 0, np.log10(np.where(p > 0, p, 1.0)), np.nan)
    log_rho = _invert_rows(log_p_native)
    ltt = np.broadcast_to(LOG_T_GRID[:, None], log_rho.shape)
    ok = np.isfinite(log_rho)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        st = gas_state(10.0 ** np.where(ok, log_rho, 0.0), 10.0**ltt, element)
    for key, val in st.items():
        st[key] = np.where(ok if val.ndim == 2 else ok[..., None], val, np.nan)
    ln10 = np.log(10.0)
    ds_dlt = np.gradient(st["entropy"], LOG_T_GRID * ln10, axis=0)
    ds_dlp = np.gradient(st["entropy"], LOG_P_GRID * ln10, axis=1)
    with np.errstate(invalid="ignore", divide="ignore"):
        nabla_ad = -ds_dlp / ds_dlt
    delta = -np.gradient(log_rho, LOG_T_GRID, axis=0)
    return EosTable(element, LOG_T_GRID, LOG_P_GRID, log_rho, nabla_ad, ds_dlt, delta, st)
