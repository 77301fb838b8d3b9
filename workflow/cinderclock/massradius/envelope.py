"""Finite-temperature radius: a non-degenerate Kramers envelope on a zero-temperature core.

CAUTION: this is a simplified model. Its radii differ from those of detailed evolutionary
models by some per cent (more for hot, low-mass stars), and it does not describe convective
envelopes (cool DA stars), partial ionisation, the thermal pressure of the core's ions, or
residual nuclear burning. Use it for the size of the temperature effect and its trend, not as a
substitute for a detailed model grid.

Envelope model (Mestel 1952, MNRAS 112, 583; Shapiro & Teukolsky 1983, *Black Holes, White
Dwarfs and Neutron Stars*, section 4.1) - the same physics as :mod:`cinderclock.cooling.mestel`:

* Radiative envelope, ideal gas, Kramers opacity kappa = kappa0 rho T^-3.5, constant L and a
  thin envelope (m_r = M). Radiative diffusion and hydrostatic equilibrium give
  P dP = A T^7.5 dT, A = 16 pi a c G M k / (3 kappa0 mu m_u L), so from a radiative zero
  P = sqrt(2A/8.5) T^4.25 and rho = sqrt(2A/8.5) (mu m_u / k) T^3.25.
* The envelope ends at the degeneracy boundary rho*(T) where the electron ideal-gas and
  non-relativistic degenerate pressures are equal; there T equals the isothermal core
  temperature T_c, and matching gives L = C (M/Msun) T_c^3.5 with
  C = :func:`cinderclock.cooling.mestel.envelope_constant_cgs`.
* Thickness. In the envelope d ln P = 4.25 d ln T, so with P = rho k T / (mu m_u)
  hydrostatic equilibrium dP = -rho G M dr / r^2 becomes
  4.25 k dT / (mu m_u) = -G M dr / r^2,   i.e.   G M (1/R_b - 1/R) = 4.25 k (T_c - T_eff) / (mu m_u).
  For a thin envelope this is Delta R = 4.25 k (T_c - T_eff) / (mu m_u g). The photosphere is
  taken at T = T_eff.
* The zero-temperature core of radius R_0 already extends beyond the degeneracy boundary: its
  outer layer (rho < rho*) has G M (1/R_b - 1/R_0) = h(x*) - h(x_s), with the T = 0 enthalpy
  per gram h(x) = (m_e c^2 / (mu_e m_u)) (y - kappa_C x / 2), y = sqrt(1 + x^2) (it is
  2.5 k T_c / (mu_e m_u) in the non-relativistic limit). The hot star replaces that layer by the
  envelope, so
  G M (1/R_0 - 1/R) = 4.25 k/m_u [ (T_H - T_eff)/mu_H + (T_c - T_H)/mu_deep ] - [h(x*) - h(x_s)].
* L = 4 pi R^2 sigma T_eff^4 couples R, T_c and g; the equation above is solved for R at every
  (M, T_eff) by a vectorised bracket-and-bisection (no per-star loops). The smallest root is the
  physical one; where no root exists the envelope cannot be bound in this model (hot, low-mass
  stars) and the radius is NaN.

Hydrogen layer (what "thick" and "thin" change): the envelope gas below the hydrogen is the
cooling module's default envelope (X = 0, Z = 0.1, mu = 1.4: helium with a metal-like opacity
calibration, as in Shapiro & Teukolsky's worked example). A pure-hydrogen layer (mu_H = 0.5,
fully ionised) of fractional mass q_H sits on top; its base is at pressure P_H = G M^2 q_H /
(4 pi R^4) and hence, on the envelope's P-T law, at temperature T_H (clipped to [T_eff, T_c]).
Only the mean molecular weight changes between the layers: the P-T law (opacity) and the
luminosity-core-temperature link are those of the deep envelope, so the core temperature at a
given (M, T_eff, R) is the same for both choices. q_H = 1e-4 ("thick", the canonical value from
single-star evolution) and q_H = 1e-10 ("thin"); both are common practice.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..constants import C_SI, G_SI, K_B_SI, L_SUN_W, M_E_SI, M_SUN_KG, M_U_SI, R_SUN_M, SIGMA_SB_SI
from ..relation import PublishedRelation, ValidRange
from .eos import DENSITY_SCALE_CGS, coulomb_kappa, zero_pressure_x

MESTEL_KRAMERS_ENVELOPE = PublishedRelation(
    key="mestel_kramers_envelope",
    reference="Mestel, L. 1952, MNRAS 112, 583; Shapiro, S. L. & Teukolsky, S. A. 1983, Black Holes, "
              "White Dwarfs and Neutron Stars (Wiley), section 4.1 (radiative Kramers envelope on an "
              "isothermal degenerate core); thickness from hydrostatic equilibrium on that envelope",
    ranges=(ValidRange("teff", 3000.0, 150000.0, "K"), ValidRange("mass", 0.1, 1.38, "solMass")),
    note="simplified: radii differ from detailed evolutionary models by some per cent; no convection "
         "(cool DA envelopes), no core ion pressure, no residual burning; hot low-mass envelopes can be "
         "unbound (NaN). Range of our choosing.",
)


@dataclass(frozen=True)
class EnvelopeGas:
    """Fully ionised envelope gas: hydrogen and metal mass fractions and mean molecular weight."""

    X: float
    Z: float
    mu: float


@dataclass(frozen=True)
class HydrogenLayer:
    """Hydrogen layer on top of the envelope.

    Parameters
    ----------
    name : str
        ``thick`` or ``thin`` (or your own).
    mass_fraction : float
        q_H = M_H / M (0 for no hydrogen).
    mu : float
        Mean molecular weight of the layer gas (0.5 for fully ionised hydrogen).
    note : str
        Where the value comes from.
    """

    name: str
    mass_fraction: float
    mu: float = 0.5
    note: str = ""


#: Envelope gas below the hydrogen layer: the default of cinderclock.cooling.mestel.envelope_constant_cgs.
DEEP_ENVELOPE = EnvelopeGas(X=0.0, Z=0.1, mu=1.4)

HYDROGEN_LAYERS = {
    # q_H = 1e-4: canonical thick layer left by single-star evolution (common practice)
    "thick": HydrogenLayer("thick", 1e-4, 0.5, "q_H = 1e-4, canonical thick layer (common practice)"),
    # q_H = 1e-10: the usual 'thin' choice (common practice); its effect on R is nearly nil
    "thin": HydrogenLayer("thin", 1e-10, 0.5, "q_H = 1e-10, thin layer (common practice)"),
}

_CGS = {"G": G_SI * 1e3, "k": K_B_SI * 1e7, "m_u": M_U_SI * 1e3, "c": C_SI * 1e2,
        "sigma": SIGMA_SB_SI * 1e3, "M_sun": M_SUN_KG * 1e3, "R_sun": R_SUN_M * 1e2,
        "L_sun": L_SUN_W * 1e7, "m_e": M_E_SI * 1e3}
_A_RAD = 4.0 * _CGS["sigma"] / _CGS["c"]          # erg cm^-3 K^-4


def hydrogen_layer(choice):
    """Look up a :class:`HydrogenLayer` by name or pass one through."""
    if isinstance(choice, HydrogenLayer):
        return choice
    try:
        return HYDROGEN_LAYERS[choice]
    except KeyError:
        from ..errors import ConfigError
        raise ConfigError(f"unknown hydrogen layer '{choice}'; choose one of {sorted(HYDROGEN_LAYERS)}") from None


def _envelope_state(radius_cm, mass_g, teff_k, layer, gas, mu_e, kappa_c, x_s, c_env):
    """Everything that follows from a trial radius: returns (residual terms, diagnostics)."""
    from ..cooling.mestel import KRAMERS_BF_CGS, degeneracy_density_cgs

    k, m_u, G = _CGS["k"], _CGS["m_u"], _CGS["G"]
    lum = 4.0 * np.pi * radius_cm**2 * _CGS["sigma"] * teff_k**4             # erg s^-1
    t_c = (lum / (c_env * mass_g / _CGS["M_sun"])) ** (2.0 / 7.0)            # K
    # envelope P-T law P = sqrt(2A/8.5) T^4.25 (deep gas opacity and mu)
    kappa0 = KRAMERS_BF_CGS * gas.Z * (1.0 + gas.X)
    a_env = 16.0 * np.pi * _A_RAD * _CGS["c"] * G * mass_g * k / (3.0 * kappa0 * gas.mu * m_u * lum)
    p_coef = np.sqrt(2.0 * a_env / 8.5)
    # base of the hydrogen layer
    if layer.mass_fraction > 0:
        p_h = G * mass_g**2 * layer.mass_fraction / (4.0 * np.pi * radius_cm**4)
        t_h = (p_h / p_coef) ** (1.0 / 4.25)
        t_h = np.clip(t_h, teff_k, np.maximum(t_c, teff_k))
    else:
        t_h = np.asarray(teff_k, dtype=float) * np.ones_like(t_c)
    t_top = np.minimum(teff_k, t_c)
    h_env = 4.25 * k / m_u * ((t_h - t_top) / layer.mu + (np.maximum(t_c, t_h) - t_h) / gas.mu)
    # zero-temperature enthalpy of the layer above the degeneracy boundary
    rho_star = degeneracy_density_cgs(t_c, mu_e)
    x_star = np.maximum(np.cbrt(rho_star / (DENSITY_SCALE_CGS * mu_e)), x_s)
    y_star, y_s = np.sqrt(1.0 + x_star**2), np.sqrt(1.0 + x_s**2)
    dy = x_star**2 / (y_star + 1.0) - x_s**2 / (y_s + 1.0)                  # y* - y_s without cancellation
    h_deg = _CGS["m_e"] * _CGS["c"] ** 2 / (mu_e * m_u) * (dy - 0.5 * kappa_c * (x_star - x_s))
    p_b = p_coef * t_c**4.25
    diag = {"core_temp_k": t_c, "log_lum": np.log10(lum / _CGS["L_sun"]), "hydrogen_base_temp_k": t_h,
            "envelope_mass_fraction": 4.0 * np.pi * radius_cm**4 * p_b / (G * mass_g**2),
            "degeneracy_density_cgs": rho_star}
    return h_env - h_deg, diag


def finite_temperature_radius(mass_msun, teff_k, radius_zero_t_rsun, hydrogen="thick", mu_e=2.0,
                              ion_charge=None, envelope_gas=DEEP_ENVELOPE, max_inflation=30.0):
    """Radius (Rsun) of a white dwarf of mass M and effective temperature Teff with a Kramers envelope.

    Parameters
    ----------
    mass_msun : array_like
        Mass in Msun.
    teff_k : array_like
        Effective temperature in K (broadcast against ``mass_msun``).
    radius_zero_t_rsun : array_like
        Zero-temperature radius R_0(M) in Rsun from the same core model
        (:func:`cinderclock.massradius.chandrasekhar.zero_temperature_sequence`).
    hydrogen : str or HydrogenLayer
        ``thick`` (q_H = 1e-4) or ``thin`` (q_H = 1e-10).
    mu_e : float
        Mean molecular weight per electron of the core.
    ion_charge : float or None
        Effective core ion charge if the core model includes the Salpeter lattice term (it moves
        the T = 0 surface), else ``None``.
    envelope_gas : EnvelopeGas
        Gas below the hydrogen layer; sets the opacity, the P-T law and (through
        :func:`cinderclock.cooling.mestel.envelope_constant_cgs`) the core temperature.
    max_inflation : float
        Largest R / R_0 searched for a root.

    Returns
    -------
    dict of numpy arrays
        ``radius_rsun`` (NaN where the envelope cannot be bound), ``core_temp_k`` (K),
        ``log_lum`` (log10 L/Lsun), ``hydrogen_base_temp_k`` (K), ``envelope_mass_fraction``
        (mass above the degeneracy boundary over M; the thin-envelope assumption needs it small),
        ``degeneracy_density_cgs`` (g cm^-3).

    Notes
    -----
    Simplified model - radii differ from detailed evolutionary models by some per cent; see the
    module docstring for what is left out.
    """
    from ..cooling.mestel import envelope_constant_cgs

    layer = hydrogen_layer(hydrogen)
    m, t, r0 = np.broadcast_arrays(np.asarray(mass_msun, dtype=float), np.asarray(teff_k, dtype=float),
                                   np.asarray(radius_zero_t_rsun, dtype=float))
    shape = m.shape
    m, t, r0 = m.ravel(), t.ravel(), r0.ravel()
    mass_g = m * _CGS["M_sun"]
    r0_cm = r0 * _CGS["R_sun"]
    kappa_c = coulomb_kappa(ion_charge)
    x_s = zero_pressure_x(ion_charge)
    c_env = envelope_constant_cgs(X=envelope_gas.X, Z=envelope_gas.Z, mu=envelope_gas.mu, mu_e=mu_e)
    gm = _CGS["G"] * mass_g

    def residual(r_cm):
        dh, diag = _envelope_state(r_cm, mass_g, t, layer, envelope_gas, mu_e, kappa_c, x_s, c_env)
        return gm * (1.0 / r0_cm - 1.0 / r_cm) - dh, diag

    # bracket the smallest root on a geometric scan of R/R0 - 1, then bisect
    scan = np.concatenate([[0.0], np.geomspace(1e-6, max_inflation - 1.0, 160)])
    lo = np.full(m.size, np.nan)
    hi = np.full(m.size, np.nan)
    prev = r0_cm.copy()
    prev_res, _ = residual(prev)
    found = np.zeros(m.size, dtype=bool)
    for s in scan[1:]:
        cur = r0_cm * (1.0 + s)
        res, _ = residual(cur)
        new = ~found & (prev_res < 0) & (res >= 0)
        lo[new], hi[new] = prev[new], cur[new]
        found |= new
        prev, prev_res = cur, res
        if found.all():
            break
    lo_, hi_ = np.where(found, lo, r0_cm), np.where(found, hi, r0_cm)
    for _ in range(60):
        mid = 0.5 * (lo_ + hi_)
        res, _ = residual(mid)
        up = res >= 0
        hi_ = np.where(up, mid, hi_)
        lo_ = np.where(up, lo_, mid)
    r = 0.5 * (lo_ + hi_)
    _, diag = residual(r)
    good = found & np.isfinite(r0_cm) & np.isfinite(t) & (t > 0)
    out = {"radius_rsun": np.where(good, r / _CGS["R_sun"], np.nan)}
    for key, val in diag.items():
        out[key] = np.where(good, val, np.nan)
    return {key: val.reshape(shape) for key, val in out.items()}
