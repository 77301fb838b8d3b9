"""Thermal neutrino emissivities from the analytic fits of Itoh et al. (1996), vectorised.

Five processes are summed, each fitted by Itoh, Hayashi, Nishikawa & Kohyama (1996, ApJS 102, 411):

* pair annihilation ``e+ e- -> nu nubar`` (their section 2, eqs. 2.5-2.8),
* photo-neutrinos ``gamma e -> e nu nubar`` (section 3, eqs. 3.2-3.8 and Table 2),
* plasmon decay ``gamma_pl -> nu nubar`` (section 4, eqs. 4.1-4.11),
* bremsstrahlung on nuclei ``e (Z,A) -> e (Z,A) nu nubar`` (section 5: weakly degenerate fit,
  eqs. 5.1-5.9; liquid-metal fit with carbon parameters, eqs. 5.16-5.26),
* recombination ``e(free) -> e(bound) nu nubar`` (section 6, eqs. 6.5-6.14 and Table 12), which
  needs the inverse Fermi-Dirac integral of order 1/2 (rational fit of Antia 1993, ApJS 84, 101).

All functions take numpy arrays (broadcast together) of density in g cm^-3 and temperature in K,
with the mean mass number ``abar`` and mean charge ``zbar`` of the ions, and return energy loss
rates per unit mass in erg g^-1 s^-1.

Cautions
--------
* The fits are stated for T >= 1e7 K. Below that the emissivity is returned as zero: in white
  dwarfs the neutrino luminosity there is many orders of magnitude below the photon luminosity.
* Bremsstrahlung in the strongly degenerate regime uses the fit for a carbon liquid metal for
  every composition and does not switch to the crystal-lattice fit of Itoh et al.; both choices
  are the usual ones of compact implementations of these fits and cost well under a factor of two
  in a process that matters only for the hottest, densest cores.
* The weak mixing angle is sin^2(theta_W) = 0.2319 and three neutrino flavours are assumed, as in
  the paper.
"""

from __future__ import annotations

import numpy as np

#: sin^2 of the weak mixing angle used by Itoh et al. (1996).
SIN2_WEINBERG = 0.2319
#: Number of neutrino flavours.
N_FLAVOURS = 3.0
#: Lowest temperature (K) of the fits' stated range; emissivities are zero below it.
T_MIN_K = 1.0e7
#: m_e c^2 / k in kelvin, as written in the fits (lambda = T / 5.9302e9 K).
ELECTRON_REST_TEMPERATURE_K = 5.9302e9

_CV = 0.5 + 2.0 * SIN2_WEINBERG
_CA = 0.5
_CVP = 1.0 - _CV
_CAP = 1.0 - _CA
#: Sum and difference of the squared couplings over flavours (Itoh et al. eqs. 2.2-2.3).
Q_PLUS = _CV**2 + _CA**2 + (N_FLAVOURS - 1.0) * (_CVP**2 + _CAP**2)
Q_MINUS = _CV**2 - _CA**2 + (N_FLAVOURS - 1.0) * (_CVP**2 - _CAP**2)
#: Vector-coupling factor of the plasma process (0.93153 for sin^2 theta_W = 0.2319).
Q_PLASMA = _CV**2 + (N_FLAVOURS - 1.0) * _CVP**2
#: Coupling factor of the recombination process.
Q_RECOMBINATION = _CV**2 + 1.5 * _CA**2 + (N_FLAVOURS - 1.0) * (_CVP**2 + 1.5 * _CAP**2)

# Table 2 of Itoh et al. (1996): Fourier coefficients of the photo-neutrino fit in three
# temperature ranges.  Rows: a0, a1, a2; columns c_i0 .. c_i6.
_PHOTO_C = np.array([
    [[1.008e11, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0],
     [8.156e10, 9.728e8, -3.806e9, -4.384e9, -5.774e9, -5.249e9, -5.153e9],
     [1.067e11, -9.782e9, -7.193e9, -6.936e9, -6.893e9, -7.041e9, -7.193e9]],
    [[9.889e10, -4.524e8, -6.088e6, 4.269e7, 5.172e7, 4.910e7, 4.388e7],
     [1.813e11, -7.556e9, -3.304e9, -1.031e9, -1.764e9, -1.851e9, -1.928e9],
     [9.750e10, 3.484e10, 5.199e9, -1.695e9, -2.865e9, -3.395e9, -3.418e9]],
    [[9.581e10, 4.107e8, 2.305e8, 2.236e8, 1.580e8, 2.165e8, 1.721e8],
     [1.459e12, 1.314e11, -1.169e11, -1.765e11, -1.867e11, -1.983e11, -1.896e11],
     [2.424e11, -3.669e9, -8.691e9, -7.967e9, -7.932e9, -7.987e9, -8.333e9]],
])
# Sine coefficients d_i1 .. d_i5 (d_i0 = 0).
_PHOTO_D = np.array([
    [[0.0, 0.0, 0.0, 0.0, 0.0],
     [-1.879e10, -9.667e9, -5.602e9, -3.370e9, -1.825e9],
     [-2.919e10, -1.185e10, -7.270e9, -4.222e9, -1.560e9]],
    [[-1.135e8, 1.256e8, 5.149e7, 3.436e7, 1.005e7],
     [1.652e9, -3.119e9, -1.839e9, -1.458e9, -8.956e8],
     [-1.548e10, -9.338e9, -5.899e9, -3.035e9, -1.598e9]],
    [[4.724e8, 2.976e8, 2.242e8, 7.937e7, 4.859e7],
     [-7.094e11, -3.697e11, -2.189e11, -1.273e11, -5.705e10],
     [-2.254e10, -1.551e10, -7.793e9, -4.489e9, -2.185e9]],
])

# Antia (1993) Table 8: rational fit of the inverse Fermi-Dirac integral of order 1/2.
_ANTIA_A1 = np.array([1.999266880833e4, 5.702479099336e3, 6.610132843877e2, 3.818838129486e1, 1.0])
_ANTIA_B1 = np.array([1.771804140488e4, -2.014785161019e3, 9.130355392717e1, -1.670718177489e0])
_ANTIA_A2 = np.array([-1.277060388085e-2, 7.187946804945e-2, -4.262314235106e-1, 4.997559426872e-1,
                      -1.285579118012e0, -3.930805454272e-1, 1.0])
_ANTIA_B2 = np.array([-9.745794806288e-3, 5.485432756838e-2, -3.299466243260e-1, 4.077841975923e-1,
                      -1.145531476975e0, -6.067091689181e-2])


def _poly(coeffs, x):
    """sum_i coeffs[i] x^i (Horner), vectorised over x."""
    out = np.full_like(x, coeffs[-1])
    for c in coeffs[-2::-1]:
        out = out * x + c
    return out


def inverse_fermi_half(f):
    """Inverse of the Fermi-Dirac integral of order 1/2 (normalised as in Antia 1993).

    Returns eta with F_{1/2}(eta) = f, using Antia's rational approximation (relative error
    below 4.2e-9).

    Parameters
    ----------
    f : array_like
        Value of the (normalised) Fermi-Dirac integral, > 0.
    """
    f = np.asarray(f, dtype=float)
    low = f < 4.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        r1 = np.log(f * _poly(_ANTIA_A1, f) / _poly(_ANTIA_B1, f))
        ff = f ** (-1.0 / 1.5)
        r2 = _poly(_ANTIA_A2, ff) / (_poly(_ANTIA_B2, ff) * ff)
    return np.where(low, r1, r2)


class _State:
    """Quantities shared by the processes at one set of (rho, T, abar, zbar)."""

    def __init__(self, rho_cgs, temperature_k, abar, zbar):
        rho, t, abar, zbar = np.broadcast_arrays(*(np.asarray(v, dtype=float)
                                                   for v in (rho_cgs, temperature_k, abar, zbar)))
        self.active = t >= T_MIN_K
        t = np.where(self.active, t, T_MIN_K)        # evaluate safely; masked out afterwards
        self.rho, self.t, self.abar, self.zbar = rho, t, abar, zbar
        self.ye = zbar / abar
        self.rm = rho * self.ye                                   # rho Y_e, g cm^-3
        self.lam = t / ELECTRON_REST_TEMPERATURE_K                 # k T / m_e c^2
        self.xi = np.cbrt(self.rm * 1e-9) / self.lam               # Itoh's xi (eq. 2.7)


def _pair(s):
    """Pair annihilation, erg cm^-3 s^-1 (Itoh et al. 1996 eqs. 2.5-2.8)."""
    lam, xi = s.lam, s.xi
    hot = s.t >= 1e10
    g = 1.0 - 13.04 * lam**2 + 133.5 * lam**4 + 1534.0 * lam**6 + 918.6 * lam**8
    num = (6.002e19 + 2.084e20 * xi + 1.872e21 * xi**2) * np.exp(np.where(hot, -4.9924, -5.5924) * xi)
    den = xi**3 + np.where(hot, 1.2383 / lam - 0.8141 / lam**2,
                           0.9383 / lam - 0.4141 / lam**2 + 0.05829 / lam**3)
    f_pair = num / den
    q_pair = 1.0 / (10.748 * lam**2 + 0.3967 * np.sqrt(lam) + 1.005) \
        * (1.0 + s.rm / (7.692e7 * lam**3 + 9.715e6 * np.sqrt(lam))) ** -0.3
    return 0.5 * Q_PLUS * (1.0 + Q_MINUS / Q_PLUS * q_pair) * g * np.exp(-2.0 / lam) * f_pair


def _plasma(s):
    """Plasmon decay, erg cm^-3 s^-1 (Itoh et al. 1996 eqs. 4.1-4.11)."""
    gamma2 = 1.1095e11 * s.rm / (s.t**2 * np.sqrt(1.0 + (1.019e-6 * s.rm) ** (2.0 / 3.0)))
    gam = np.sqrt(gamma2)
    f_t = 2.4 + 0.6 * gam**0.5 + 0.51 * gam + 1.25 * gam**1.5
    f_l = (8.6 * gamma2 + 1.35 * gam**3.5) / (225.0 - 17.0 * gam + gamma2)
    lg2rm = np.log10(2.0 * s.rm)
    lgt = np.log10(s.t)
    x = (17.5 + lg2rm - 3.0 * lgt) / 6.0
    y = (-24.5 + lg2rm + 3.0 * lgt) / 6.0
    shape = 0.39 - 1.25 * x - 0.35 * np.sin(4.5 * x) - 0.3 * np.exp(-(4.5 * x + 0.9) ** 2)
    damp = np.exp(-(np.minimum(0.0, y - 1.6 + 1.25 * x) / (0.57 - 0.25 * x)) ** 2)
    f_xy = np.where((np.abs(x) > 0.7) | (y < 0.0), 1.0, 1.05 + shape * damp)
    return Q_PLASMA * 3.0e21 * s.lam**9 * gamma2**3 * np.exp(-gam) * (f_t + f_l) * f_xy


def _photo(s):
    """Photo-neutrino process, erg cm^-3 s^-1 (Itoh et al. 1996 eqs. 3.2-3.8, Table 2)."""
    t = s.t
    band = np.where(t < 1e8, 0, np.where(t < 1e9, 1, 2))
    tau = np.log10(t) - np.array([7.0, 8.0, 9.0])[band]
    cc = np.where(band == 0, 0.5654 + tau, 1.5654)
    k = np.arange(1, 6)
    arg = (5.0 * np.pi / 3.0) * tau[..., None] * k                 # shape (..., 5)
    cos_k, sin_k = np.cos(arg), np.sin(arg)
    last = np.cos(10.0 * np.pi * tau)
    coef = []
    for i in range(3):
        c = _PHOTO_C[band, i]                                      # (..., 7)
        d = _PHOTO_D[band, i]                                      # (..., 5)
        coef.append(0.5 * c[..., 0] + np.sum(c[..., 1:6] * cos_k + d * sin_k, axis=-1)
                    + 0.5 * c[..., 6] * last)
    a0, a1, a2 = coef
    lam, xi = s.lam, s.xi
    f_photo = (a0 + a1 * xi + a2 * xi**2) * np.exp(-cc * xi) \
        / (xi**3 + 6.290e-3 / lam + 7.483e-3 / lam**2 + 3.061e-4 / lam**3)
    q_photo = 0.666 * (1.0 + 2.045 * lam) ** -2.066 \
        / (1.0 + s.rm / (1.875e8 * lam + 1.653e8 * lam**2 + 8.499e8 * lam**3 - 1.604e8 * lam**4))
    q = 0.5 * Q_PLUS * (1.0 - Q_MINUS / Q_PLUS * q_photo) * s.rm * lam**5 * f_photo
    return np.maximum(q, 0.0)


def _bremsstrahlung(s):
    """Electron-nucleus bremsstrahlung, erg cm^-3 s^-1 (Itoh et al. 1996 section 5)."""
    rho, t, ye, zbar, abar, rm = s.rho, s.t, s.ye, s.zbar, s.abar, s.rm
    t8 = t * 1e-8
    rho6 = rho * 1e-6
    t_fermi = ELECTRON_REST_TEMPERATURE_K * (np.sqrt(1.0 + 1.018 * (rho6 * ye) ** (2.0 / 3.0)) - 1.0)
    prefactor = 0.5738 * zbar * ye * t8**6 * rho
    # weakly degenerate electrons (eqs. 5.1-5.9)
    eta = rm / (7.05e6 * t8**1.5 + 5.12e4 * t8**3)
    f_w = 1.0 / (23.5 + 6.83e4 / t8**2 + 7.81e8 / t8**5) \
        + 1.26 * (1.0 + 1.0 / eta) / (1.0 + 1.47 / eta + 3.29e-2 / eta**2)
    g_w = 1.0 / ((230.0 + 6.7e5 / t8**2 + 7.66e9 / t8**5) * (1.0 + rm * 1e-9)) \
        + 1.0 / ((7.75e5 * t8**1.5 + 247.0 * t8**3.85) / rm + 4.07 + 0.0240 * t8**1.4
                 + 4.59e-5 * t8**-0.110 * rho**0.656)
    weak = prefactor * (0.5 * Q_PLUS * f_w - 0.5 * Q_MINUS * g_w)
    # strongly degenerate liquid metal, carbon parameters (eqs. 5.16-5.26)
    u = (np.pi / 5.0) * (np.log10(rho) - 3.0)
    k = np.arange(1, 6)
    cos_k = np.cos(u[..., None] * k)
    sin_k = np.sin(u[..., None] * k)

    def fourier(c0, c_u, c_cos, c_sin):
        return c0 + c_u * u + np.sum(np.asarray(c_cos) * cos_k, axis=-1) \
            + np.sum(np.asarray(c_sin + [0.0]) * sin_k, axis=-1)

    fb = fourier(0.5 * 0.17946 + 0.34529, 0.00945,
                 [-0.05821, -0.01089, -0.01147, -0.00656, -0.00519],
                 [-0.04969, -0.01584, -0.00504, -0.00281])
    ft = fourier(0.5 * 0.06781 + 0.24819, -0.02342,
                 [-0.00944, -0.01289, -0.00589, -0.00404, -0.00330],
                 [-0.02213, -0.01136, -0.00467, -0.00131])
    gb = fourier(0.5 * 0.00766 + 0.07917, -0.01259,
                 [-0.00710, -0.00028, 0.00232, 0.00044, 0.00158],
                 [0.02300, -0.01078, 0.00118, -0.00089])
    gt = fourier(-0.5 * 0.00769 + 0.05211, -0.00829,
                 [0.00356, -0.00184, 0.00146, 0.00031, 0.00069],
                 [0.01052, -0.00354, -0.00014, -0.00018])
    inv_gamma = 1.0 / (0.2275 * zbar**2 / t8 * np.cbrt(rho6 / abar))   # 1 / ion coupling parameter
    g13 = np.cbrt(inv_gamma)
    v = -0.05483 - 0.01946 * g13 + 1.86310 * g13**2 - 0.78873 * inv_gamma
    w = -0.06711 + 0.06859 * g13 + 1.74360 * g13**2 - 0.74498 * inv_gamma
    f_liq = v * fb + (1.0 - v) * ft
    g_liq = w * gb + (1.0 - w) * gt
    strong = prefactor * (0.5 * Q_PLUS * f_liq - 0.5 * Q_MINUS * g_liq)
    return np.where(t > 0.3 * t_fermi, weak, strong)


def _recombination(s):
    """Recombination neutrinos, erg cm^-3 s^-1 (Itoh et al. 1996 eqs. 6.5-6.14, Table 12)."""
    nu = inverse_fermi_half(1.10520e8 * s.rm / s.t**1.5)      # electron chemical potential / kT
    neg = nu < 0.0
    a1 = np.where(neg, 1.51e-2, 1.23e-2)
    a2 = np.where(neg, 2.42e-1, 2.66e-1)
    a3 = np.where(neg, 1.21, 1.30)
    b = np.where(neg, 3.71e-2, 1.17e-1)
    c = np.where(neg, 9.06e-1, 8.97e-1)
    d = np.where(neg, 9.28e-1, 1.77e-1)
    f1 = np.where(neg, 0.0, -1.20e-2)
    f2 = np.where(neg, 0.0, 2.29e-2)
    f3 = np.where(neg, 0.0, -1.04e-3)
    zeta = 1.579e5 * s.zbar**2 / s.t
    with np.errstate(over="ignore", invalid="ignore"):
        x = zeta / (1.0 + f1 * nu + f2 * nu**2 + f3 * nu**3)
        big_j = (a1 / x + a2 * x**-2.25 + a3 * x**-4.55) * np.exp(nu) / (1.0 + b * np.exp(c * nu) * (1.0 + d * x))
        q = Q_RECOMBINATION * 2.649e-18 * s.ye * s.zbar**13 * s.rho * big_j / (1.0 + np.exp(zeta + nu))
    inside = (nu >= -20.0) & (nu <= 10.0)
    return np.where(inside & np.isfinite(q), q, 0.0)


_PROCESSES = {
    "pair": _pair,
    "photo": _photo,
    "plasma": _plasma,
    "bremsstrahlung": _bremsstrahlung,
    "recombination": _recombination,
}

#: Names of the processes, as keys of :func:`emissivity_components`.
PROCESSES = tuple(_PROCESSES)


def emissivity_components(rho_cgs, temperature_k, abar, zbar):
    """Neutrino energy-loss rate of each process, erg g^-1 s^-1.

    Parameters
    ----------
    rho_cgs : array_like
        Mass density in g cm^-3.
    temperature_k : array_like
        Temperature in K (rates are zero below :data:`T_MIN_K`).
    abar : array_like
        Mean mass number of the ions, 1 / sum(X_i / A_i).
    zbar : array_like
        Mean ion charge, abar * sum(X_i Z_i / A_i).

    Returns
    -------
    dict of str to numpy.ndarray
        Keys ``pair``, ``photo``, ``plasma``, ``bremsstrahlung``, ``recombination``.
    """
    s = _State(rho_cgs, temperature_k, abar, zbar)
    out = {}
    with np.errstate(over="ignore", under="ignore", divide="ignore", invalid="ignore"):
        for name, fn in _PROCESSES.items():
            q = fn(s) / s.rho
            out[name] = np.where(s.active & np.isfinite(q), q, 0.0)
    return out


def emissivity_erg_g_s(rho_cgs, temperature_k, abar, zbar):
    """Total thermal neutrino energy-loss rate, erg g^-1 s^-1 (sum of :func:`emissivity_components`).

    Parameters are those of :func:`emissivity_components`.
    """
    comps = emissivity_components(rho_cgs, temperature_k, abar, zbar)
    return sum(comps.values())
