"""Thermodynamics of the ions of a white-dwarf core: the one-component plasma, liquid and solid.

All quantities are per ion, in units of k_B T (energies, free energies) or k_B (heat capacities,
entropies), as functions of the coupling parameter Gamma = (Z e)^2 / (a k_B T) and the quantum
parameter eta = T_p / T (T_p the ion plasma temperature, :mod:`~cinderclock.cooling.crystallization`).

Liquid
    Excess (Coulomb) internal energy and free energy of the classical one-component plasma from the
    analytic fit of Potekhin & Chabrier (2000, PRE 62, 8554; the fit to the Monte Carlo energies,
    their eqs. for u_ii and f_ii, numbered 16-17 in our reading -- equation numbers from memory):

        u = Gamma^(3/2) [A1 / sqrt(A2 + Gamma) + A3 / (1 + Gamma)]
            + B1 Gamma^2 / (B2 + Gamma) + B3 Gamma^2 / (B4 + Gamma^2),

    A1 = -0.9070, A2 = 0.62954, A3 = -sqrt(3)/2 - A1/sqrt(A2), B1 = 0.00456, B2 = 211.6,
    B3 = -1e-4, B4 = 0.00462. The form has the Debye-Hueckel limit u -> -(sqrt(3)/2) Gamma^(3/2).
    Heat capacity c = u - Gamma du/dGamma (classical, Gamma proportional to 1/T). The ideal-gas part
    (3/2) is added by :func:`liquid_heat_capacity`.

Solid (bcc Coulomb crystal)
    * Static lattice: Madelung energy -0.895929 Gamma (no heat capacity).
    * Harmonic phonons with their quantum thermodynamics: the analytic fit of Baiko, Potekhin &
      Yakovlev (2001, PRE 64, 057402, their eq. 13 with the bcc parameters of their table), which
      tends to Dulong-Petit (3 k_B) for eta -> 0 with the Wigner-Kirkwood correction 3 - eta^2/12,
      and to a Debye-like T^3 law for eta >> 1. The zero-point energy (1.5 u_1 eta) is left out of
      the thermal part; it does not depend on T.
    * Anharmonic terms: the classical fit of Farouki & Hamaguchi (1993, PRE 47, 4330),
      u_ah = 10.9/Gamma + 247/Gamma^2 + 1.765e5/Gamma^3, with the quantum suppression factor
      exp(-(0.12/10.9) eta^2) and the zero-point term -0.12 eta^2/Gamma of Potekhin & Chabrier
      (2010, Contrib. Plasma Phys. 50, 82).

Quantum liquid (our approximation)
    The liquid's heat capacity is multiplied by the ratio c_harm(eta)/3 of the harmonic lattice.
    This is exact in the classical limit and, to first order in eta^2, within 10 % of the
    Wigner-Kirkwood correction (-eta^2/12) of the liquid; it makes the liquid and the solid see the
    same quantum suppression at freezing (eta is 1-6 at the freezing point of 0.5-1.3 Msun cores).

Melting and latent heat
    The classical free energies of the two phases (with the ideal-gas part, ln(n lambda^3) - 1,
    written in Gamma and eta so that the quantum terms cancel) cross at Gamma_m
    (:func:`melting_gamma`, about 175 with these fits, as found by Potekhin & Chabrier 2000). The
    latent heat per ion is T Delta s = k T [u_liquid - u_solid] at Gamma_m (:func:`latent_heat_kt`),
    about 0.77 k T_m.

Mixtures
    Linear mixing (common practice): each species is an OCP at the electron density of the mixture,
    with Gamma_i = Z_i^(5/3) Gamma_e; per-ion quantities are number-fraction averages.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..relation import PublishedRelation, ValidRange

# --- liquid: Potekhin & Chabrier (2000) ---------------------------------------------------------
_A1, _A2 = -0.9070, 0.62954
_A3 = -np.sqrt(3.0) / 2.0 - _A1 / np.sqrt(_A2)
_B1, _B2, _B3, _B4 = 0.00456, 211.6, -1.0e-4, 0.00462

# --- solid ---------------------------------------------------------------------------------------
#: Madelung constant of the bcc Coulomb lattice (energy -C_M Gamma per ion).
MADELUNG_BCC = 0.895929
#: 3 <ln(omega / omega_p)> of the bcc phonon spectrum (Baiko, Potekhin & Yakovlev 2001).
_LOG_OMEGA_BCC = -2.49389
#: First phonon moment <omega/omega_p> of the bcc lattice (Baiko, Potekhin & Yakovlev 2001).
_U1_BCC = 0.5113875
#: Farouki & Hamaguchi (1993) anharmonic coefficients A_n of u_ah = sum A_n Gamma^-n.
_FH_A = (10.9, 247.0, 1.765e5)
#: Zero-temperature anharmonic coefficient of Potekhin & Chabrier (2010).
_AH_B1 = 0.12
# Baiko, Potekhin & Yakovlev (2001) fit of the harmonic bcc lattice (thermal part).
_BPY = dict(alpha=0.265764, beta=0.334547, gamma=0.932446,
            a=(1.0, 0.1839, 0.593586, 0.0054814, 5.01813e-4, 0.0, 3.9247e-7, 0.0, 5.8356e-11),
            b0=261.66, b2=7.07997, b4=0.0409484, b5=0.000397355, b6=5.11148e-5, b7=2.19749e-6,
            c9=0.004757014, c11=0.0047770935)

PC2000_LIQUID = PublishedRelation(
    key="potekhin_chabrier_2000_ocp_liquid",
    reference="Potekhin, A. Y. & Chabrier, G. 2000, PRE 62, 8554 (fit to the Monte Carlo internal energy "
              "of the classical OCP liquid; melting at Gamma = 175.0 +- 0.4)",
    ranges=(ValidRange("gamma", 0.0, 200.0),),
    note="coefficients confirmed in the authors' own published equation-of-state routines")
BPY2001_HARMONIC = PublishedRelation(
    key="baiko_potekhin_yakovlev_2001_harmonic_bcc",
    reference="Baiko, D. A., Potekhin, A. Y. & Yakovlev, D. G. 2001, PRE 64, 057402 (analytic fit to the "
              "thermodynamics of the harmonic Coulomb crystal)",
    ranges=(ValidRange("eta", 0.0, np.inf),))
FH1993_ANHARMONIC = PublishedRelation(
    key="farouki_hamaguchi_1993_anharmonic",
    reference="Farouki, R. T. & Hamaguchi, S. 1993, PRE 47, 4330 (anharmonic energy of the classical bcc "
              "OCP); quantum suppression from Potekhin, A. Y. & Chabrier, G. 2010, Contrib. Plasma Phys. 50, 82",
    ranges=(ValidRange("gamma", 150.0, np.inf),),
    note="fitted for the solid (Gamma >~ 170); used unchanged at the smaller Gamma of the lighter "
         "species of a mixture")
RELATIONS = (PC2000_LIQUID, BPY2001_HARMONIC, FH1993_ANHARMONIC)


# --- liquid ----------------------------------------------------------------------------------------

def liquid_energy(gamma):
    """Excess internal energy u = U_ex / (N k T) of the classical OCP liquid (Potekhin & Chabrier 2000)."""
    g = np.asarray(gamma, dtype=float)
    return (g**1.5 * (_A1 / np.sqrt(_A2 + g) + _A3 / (1.0 + g))
            + _B1 * g**2 / (_B2 + g) + _B3 * g**2 / (_B4 + g**2))


def liquid_free_energy(gamma):
    """Excess free energy f = F_ex / (N k T) of the classical OCP liquid (integral of u / Gamma)."""
    g = np.asarray(gamma, dtype=float)
    sg = np.sqrt(g)
    return (_A1 * (np.sqrt(g * (_A2 + g)) - _A2 * np.log(np.sqrt(g / _A2) + np.sqrt(1.0 + g / _A2)))
            + 2.0 * _A3 * (sg - np.arctan(sg))
            + _B1 * (g - _B2 * np.log1p(g / _B2)) + 0.5 * _B3 * np.log1p(g**2 / _B4))


def liquid_excess_heat_capacity(gamma):
    """Excess heat capacity per ion (k_B) of the classical OCP liquid, c = u - Gamma du/dGamma."""
    g = np.asarray(gamma, dtype=float)
    return (-0.5 * g**1.5 * (_A1 * _A2 / (_A2 + g) ** 1.5 + _A3 * (1.0 - g) / (1.0 + g) ** 2)
            - g**2 * (_B1 * _B2 / (_B2 + g) ** 2 + _B3 * (_B4 - g**2) / (_B4 + g**2) ** 2))


def liquid_heat_capacity(gamma, eta=0.0):
    """Total ion heat capacity per ion (k_B) of the liquid: (3/2 + excess) times the quantum factor.

    Parameters
    ----------
    gamma : array_like
        Coulomb coupling parameter.
    eta : array_like
        T_p / T; 0 gives the classical liquid.
    """
    return (1.5 + liquid_excess_heat_capacity(gamma)) * quantum_factor(eta)


# --- solid -----------------------------------------------------------------------------------------

def _bpy_rational(eta):
    """A(eta)/B(eta) of the Baiko et al. fit and its first two derivatives."""
    p = _BPY
    a = np.array(p["a"])
    b = np.zeros(12)
    b[0], b[2], b[4], b[5], b[6], b[7] = p["b0"], p["b2"], p["b4"], p["b5"], p["b6"], p["b7"]
    b[9], b[11] = a[6] * p["c9"], a[8] * p["c11"]
    num, den = np.polynomial.Polynomial(a), np.polynomial.Polynomial(b)
    n0, n1, n2 = num(eta), num.deriv(1)(eta), num.deriv(2)(eta)
    d0, d1, d2 = den(eta), den.deriv(1)(eta), den.deriv(2)(eta)
    r = n0 / d0
    r1 = (n1 * d0 - n0 * d1) / d0**2
    r2 = (n2 - 2.0 * r1 * d1 - r * d2) / d0
    return r, r1, r2


#: Above this eta = T_p / T the fit's polynomials would overflow; there the phonon gas is deep in its
#: T^3 regime (F, U proportional to T^4, c_v to T^3: exact for a harmonic crystal, common practice).
_ETA_T3 = 1.0e4


def harmonic_lattice(eta):
    """Thermal free energy, energy (k T per ion) and heat capacity (k_B per ion) of the bcc phonons.

    Baiko, Potekhin & Yakovlev (2001) fit, f = sum_k ln(1 - exp(-alpha_k eta)) - A(eta)/B(eta),
    u = eta df/deta, c = -eta^2 d^2f/deta^2. For eta < 1e-3 the exact classical expansion
    (f = 3 ln eta + 3 <ln omega/omega_p> - 1.5 u_1 eta + eta^2/24, c = 3 - eta^2/12) is used.

    Returns
    -------
    tuple of numpy.ndarray
        ``(f, u, c)``; the zero-point energy is excluded from f and u.
    """
    eta = np.asarray(eta, dtype=float)
    e = np.clip(eta, 1e-3, _ETA_T3)
    f = np.zeros_like(e)
    f1 = np.zeros_like(e)
    f2 = np.zeros_like(e)
    for alpha in (_BPY["alpha"], _BPY["beta"], _BPY["gamma"]):
        q = np.exp(-alpha * e)
        f += np.log1p(-q)
        f1 += alpha * q / (1.0 - q)
        f2 -= alpha**2 * q / (1.0 - q) ** 2
    r, r1, r2 = _bpy_rational(e)
    f, f1, f2 = f - r, f1 - r1, f2 - r2
    u, c = e * f1, -e**2 * f2
    deep = eta > _ETA_T3
    if np.any(deep):            # far below the Debye temperature: the exact phonon T^3 scaling
        scale = (_ETA_T3 / np.where(deep, eta, _ETA_T3)) ** 3
        f, u, c = np.where(deep, f * scale, f), np.where(deep, u * scale, u), np.where(deep, c * scale, c)
    small = eta < 1e-3
    if np.any(small):
        es = np.maximum(eta, 1e-300)
        f = np.where(small, 3.0 * np.log(es) + _LOG_OMEGA_BCC - 1.5 * _U1_BCC * es + es**2 / 24.0, f)
        u = np.where(small, 3.0 - 1.5 * _U1_BCC * es + es**2 / 12.0, u)
        c = np.where(small, 3.0 - es**2 / 12.0, c)
    return f, u, c


def quantum_factor(eta):
    """c_harm(eta) / 3: the quantum suppression of the lattice heat capacity (1 in the classical limit)."""
    eta = np.asarray(eta, dtype=float)
    if not np.any(eta > 0):
        return np.ones_like(eta)
    return harmonic_lattice(eta)[2] / 3.0


def anharmonic(gamma, eta=0.0):
    """Anharmonic free energy, energy (k T per ion) and heat capacity (k_B per ion) of the crystal.

    Farouki & Hamaguchi (1993) classical terms with the quantum suppression exp(-k eta^2),
    k = 0.12/10.9, and the zero-point term -0.12 eta^2/Gamma (Potekhin & Chabrier 2010).
    """
    g = np.asarray(gamma, dtype=float)
    eta = np.asarray(eta, dtype=float)
    kq = _AH_B1 / _FH_A[0] * eta**2
    sup = np.exp(-kq)
    f = -_AH_B1 * eta**2 / g
    u = -_AH_B1 * eta**2 / g
    c = np.zeros(np.broadcast(g, eta).shape)
    for n, a_n in enumerate(_FH_A, start=1):
        term = a_n / n * g ** (-n) * sup
        f = f - term
        u = u + term * (n + 2.0 * kq)
        c = c + term * ((n + 2.0 * kq) + (n + 2.0 * kq) ** 2 - 4.0 * kq)
    return f, u, c


def solid_heat_capacity(gamma, eta=0.0):
    """Total ion heat capacity per ion (k_B) of the crystal: harmonic phonons plus anharmonic terms."""
    return harmonic_lattice(eta)[2] + anharmonic(gamma, eta)[2]


def ion_heat_capacity(gamma, eta, solid):
    """Ion heat capacity per ion (k_B): liquid where ``solid`` is False, crystal where True."""
    return np.where(solid, solid_heat_capacity(gamma, eta), liquid_heat_capacity(gamma, eta))


# --- melting -----------------------------------------------------------------------------------------

#: ln(n lambda^3) = 3 ln eta - 1.5 ln Gamma + ln[(3 / 4 pi) (2 pi / 3)^(3/2)] (ideal-gas ions).
_LN_IDEAL_CONST = np.log(3.0 / (4.0 * np.pi) * (2.0 * np.pi / 3.0) ** 1.5)


def free_energy_difference(gamma):
    """Classical f_liquid - f_solid per ion (k T) at coupling ``gamma`` (negative: liquid stable).

    Both include the ideal/harmonic parts: f_liquid = ln(n lambda^3) - 1 + f_ex(Gamma),
    f_solid = -C_M Gamma + 3 ln eta + 3 <ln omega/omega_p> + f_ah(Gamma); the 3 ln eta terms cancel.
    """
    g = np.asarray(gamma, dtype=float)
    f_liq = -1.5 * np.log(g) + _LN_IDEAL_CONST - 1.0 + liquid_free_energy(g)
    f_sol = -MADELUNG_BCC * g + _LOG_OMEGA_BCC + anharmonic(g)[0]
    return f_liq - f_sol


@lru_cache(maxsize=1)
def melting_gamma():
    """Coupling parameter at which the classical liquid and solid free energies are equal."""
    from scipy.optimize import brentq

    return float(brentq(free_energy_difference, 120.0, 250.0, xtol=1e-10))


def latent_heat_kt(gamma_m=None):
    """Latent heat per ion in units of k T_m: u_liquid - u_solid at the melting coupling (classical).

    u_liquid = 3/2 + u_ex(Gamma_m); u_solid = -C_M Gamma_m + 3 + u_ah(Gamma_m).
    """
    g = melting_gamma() if gamma_m is None else float(gamma_m)
    u_liq = 1.5 + liquid_energy(g)
    u_sol = -MADELUNG_BCC * g + 3.0 + anharmonic(g)[1]
    return float(u_liq - u_sol)
