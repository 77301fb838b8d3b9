"""Gravitational settling of 22Ne in the liquid core and the heat it releases.

22Ne has two neutrons more than the A = 2Z nuclei of the background, so in the electric field that
supports the ions against gravity it feels a net downward force F = 2 m_u g (Bildsten & Hall 2001,
ApJ 549, L219). It drifts at the terminal speed v = F D / (k T) and releases F v per ion, i.e.

    eps = X_22 / (22 m_u) * (2 m_u g)^2 D / (k T)        [erg g^-1 s^-1],

in liquid shells only (a crystallised shell holds its 22Ne). The diffusion coefficient is the one
used by Deloye & Bildsten (2002, ApJ 580, 1077),

    D = 7.3e-7 T / (rho^(1/2) Zbar Gamma^(1/3))  cm^2 s^-1   (T in K, rho in g cm^-3),

with Gamma and Zbar those of the C/O background (the formula as we recall it; it equals the
one-component-plasma self-diffusion law D = 3 omega_p a^2 Gamma^(-4/3) of Hansen, McDonald & Pollock
1975, PRA 11, 1025, to 0.1 % for carbon, which is how we checked it). That is the self-diffusion
coefficient of the background ions. The 22Ne ion (Z = 10) diffuses more slowly: molecular-dynamics
runs of C/O/Ne mixtures find D_i close to the one-component-plasma value with, at strong coupling
(Gamma above a few), D_i proportional to Z_i^(-2/3) (Hughto, Schneider, Horowitz & Berry 2010,
PRE 82, 066401, abstract). We therefore scale the background coefficient by (10 / Zbar)^(-2/3)
(0.79 for an equal C/O mixture).

The rate is that of a uniform trace below a depletion front: the 22Ne above the front has drained
inward, so shells outside it no longer heat. The front starts at the top of the C/O core and moves
inward at the local drift speed v (it stops where the shell it reaches is solid, which holds its
22Ne); inside it the concentration is taken as uniform (the central pile-up is not followed). The
total heat is also capped at the energy of bringing all the 22Ne of the star to the centre. Only the
low-density outer layers, where D is large, drain before they freeze (the front ends some 20 % of
the radius inside the core top for 0.6-1.0 Msun); it matters most for massive white dwarfs, whose
gravity is high and whose heating would otherwise go on in the outer liquid long after the
interior has frozen.
Deloye & Bildsten (2002) find delays of 0.25-1.6 Gyr by the end of crystallization, depending on the
mass and the diffusion coefficient: their diffusion calculation (not the uniform-trace rate) is the
reference, and our simplification is a caution.
"""

from __future__ import annotations

import numpy as np

from ..constants import G_SI, K_B_SI, M_SUN_KG, M_U_SI, R_SUN_M
from ..relation import PublishedRelation, ValidRange

_M_U_G = M_U_SI * 1e3
_K_B_CGS = K_B_SI * 1e7
_G_CGS = G_SI * 1e3

#: Diffusion-coefficient prefactor of Deloye & Bildsten (2002), cm^2 s^-1 (T in K, rho in g cm^-3).
DB2002_PREFACTOR = 7.3e-7

#: Charge of the settling 22Ne ion.
Z_NE22 = 10.0

#: Exponent of the charge dependence of the self-diffusion coefficient of an ion species in a
#: strongly coupled mixture, D_i ~ Z_i^(-2/3) (Hughto et al. 2010, PRE 82, 066401, abstract).
HUGHTO2010_CHARGE_EXPONENT = -2.0 / 3.0

DELOYE_BILDSTEN_2002 = PublishedRelation(
    key="deloye_bildsten_2002_ne22_settling",
    reference=("Deloye, C. J. & Bildsten, L. 2002, ApJ 580, 1077; Bildsten, L. & Hall, D. M. 2001, ApJ 549, L219; "
               "charge scaling of D: Hughto, J. et al. 2010, PRE 82, 066401"),
    ranges=(ValidRange("gamma", 1.0, 180.0),),
    note="liquid only; uniform-trace heating rate below an inward-moving depletion front, with an energy cap")


def diffusion_coefficient_cgs(rho_cgs, temperature_k, gamma, zbar):
    """22Ne diffusion coefficient (cm^2 s^-1) in the C/O liquid (Deloye & Bildsten 2002)."""
    return (DB2002_PREFACTOR * np.asarray(temperature_k, dtype=float)
            / (np.sqrt(np.asarray(rho_cgs, dtype=float)) * zbar * np.cbrt(np.asarray(gamma, dtype=float))))


def ne22_diffusion_coefficient_cgs(rho_cgs, temperature_k, gamma, zbar):
    """Diffusion coefficient (cm^2 s^-1) of the 22Ne ion in the C/O liquid.

    The background self-diffusion coefficient (:func:`diffusion_coefficient_cgs`, with the C/O
    ``gamma`` and ``zbar``) times (Z_Ne / Zbar)^(-2/3) (Hughto et al. 2010, PRE 82, 066401).
    """
    scale = (Z_NE22 / np.asarray(zbar, dtype=float)) ** HUGHTO2010_CHARGE_EXPONENT
    return diffusion_coefficient_cgs(rho_cgs, temperature_k, gamma, zbar) * scale


def heating_rate_erg_g_s(rho_cgs, temperature_k, gravity_cgs, gamma, zbar, x22):
    """Heat released per unit mass (erg g^-1 s^-1) by the settling of 22Ne of mass fraction ``x22``.

    ``gamma`` and ``zbar`` are those of the C/O background.
    """
    force = 2.0 * _M_U_G * np.asarray(gravity_cgs, dtype=float)
    d = ne22_diffusion_coefficient_cgs(rho_cgs, temperature_k, gamma, zbar)
    return x22 / (22.0 * _M_U_G) * force**2 * d / (_K_B_CGS * np.asarray(temperature_k, dtype=float))


def drift_speed_cm_s(shell_heat, weight, gravity_cgs, x22):
    """Terminal drift speed v = F D / (k T) (cm s^-1) of 22Ne recovered from a shell's heating.

    ``shell_heat`` is the shell's share of the mass-averaged heating rate (``weight`` times the
    per-gram rate of :func:`heating_rate_erg_g_s`); since that rate is X_22 / (22 m_u) F v with
    F = 2 m_u g, v = rate * 11 / (X_22 g). Zero where the shell is solid, empty or at the centre.
    """
    shell_heat = np.asarray(shell_heat, dtype=float)
    denom = np.asarray(weight, dtype=float) * x22 * np.asarray(gravity_cgs, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(denom > 0, shell_heat * 11.0 / np.where(denom > 0, denom, 1.0), 0.0)


def shell_gravity_cgs(profile, q_mid):
    """Gravity g = G m / r^2 (cm s^-2) at the enclosed mass fractions ``q_mid`` of a structure profile.

    Uses ``radius_rsun`` and ``mass_msun`` when the profile has them; otherwise the radius follows
    from the density, r^3 = (3 / 4 pi) int dm / rho.
    """
    q = np.asarray(profile["mass_fraction"], dtype=float)
    if "radius_rsun" in profile and "mass_msun" in profile:
        r_cm = np.asarray(profile["radius_rsun"], dtype=float) * R_SUN_M * 100.0
        m_g = np.asarray(profile["mass_msun"], dtype=float) * M_SUN_KG * 1e3
    else:
        m_tot = float(profile.get("total_mass_msun", 1.0)) * M_SUN_KG * 1e3
        rho = np.asarray(profile["rho_cgs"], dtype=float)
        m_g = q * m_tot
        dv = np.concatenate([[0.0], np.cumsum(np.diff(m_g) * 0.5 * (1 / rho[1:] + 1 / rho[:-1]))])
        r_cm = np.cbrt(3.0 * dv / (4.0 * np.pi))
    with np.errstate(divide="ignore", invalid="ignore"):
        g = np.where(r_cm > 0, _G_CGS * m_g / r_cm**2, 0.0)
    return np.interp(q_mid, q, g), np.interp(q_mid, q, r_cm), (q, r_cm, g)


def settling_energy_cap_erg(profile, mass_g, x22):
    """Energy (erg) released if all the 22Ne of the star sank to the centre: 2 m_u [Phi(r) - Phi(0)] per ion."""
    _, _, (q, r_cm, g) = shell_gravity_cgs(profile, np.array([0.5]))
    dphi = np.concatenate([[0.0], np.cumsum(0.5 * (g[1:] + g[:-1]) * np.diff(r_cm))])
    work_per_g = x22 / 22.0 * 2.0 * dphi                        # erg per gram of stellar matter
    dq = np.diff(q)
    return float(mass_g * np.sum(0.5 * (work_per_g[1:] + work_per_g[:-1]) * dq))
