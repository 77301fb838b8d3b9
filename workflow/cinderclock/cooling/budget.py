"""Shell sums of the energy budget: heat capacity, neutrino losses and 22Ne heating per T_c.

For one star at a time, on a (n_tc, n_shell) grid of core temperature by equal-mass shell, with the
local composition of each shell (:mod:`~cinderclock.cooling.coreprofile`) and its phase (solid below
its freezing temperature, :mod:`~cinderclock.cooling.phasesep`):

* ions: linear mixing over species, each an OCP at the shell's electron density with
  Gamma_i = Z_i^(5/3) Gamma_e and eta_i = T_p,i / T (:mod:`~cinderclock.cooling.ocp`), or the
  older ideal liquid (3/2) and Debye solid when the switches ask for them;
* electrons: degenerate Fermi gas (:mod:`~cinderclock.cooling.heat_capacity`);
* neutrinos: Itoh et al. (1996) with the shell's Abar, Zbar (:mod:`~cinderclock.cooling.neutrinos`);
* 22Ne settling heat in liquid shells (:mod:`~cinderclock.cooling.sedimentation`).

Memory is bounded by working on blocks of at most :data:`BLOCK_ELEMENTS` (T_c, shell) pairs.
"""

from __future__ import annotations

import numpy as np

from ..constants import E_CHARGE_SI, EPS0_SI, HBAR_SI, K_B_SI, M_U_SI
from . import heat_capacity as hc
from . import neutrinos as nu
from . import ocp
from . import sedimentation as sed
from .phasesep import electron_coupling_coefficient

#: Largest number of (T_c, shell) pairs evaluated at once.
BLOCK_ELEMENTS = 250_000


def _plasma_temperature_coefficient(z, a, ye):
    """T_p,i / rho^(1/2) (K per (g cm^-3)^(1/2)) of species (z, a) as an OCP at the mixture's n_e."""
    n_e_per_rho = ye / M_U_SI * 1000.0
    omega2 = n_e_per_rho * z * E_CHARGE_SI**2 / (EPS0_SI * a * M_U_SI)
    return HBAR_SI * np.sqrt(omega2) / K_B_SI


def ion_heat_capacity_per_ion(tc, rho, number_fractions, z, a, ye, solid, sw):
    """Ion heat capacity per ion (k_B) on a (n_tc, n_shell) block.

    ``number_fractions`` has shape (n_shell, n_species) (or (n_tc, n_shell, n_species)); ``solid``
    is a boolean (n_tc, n_shell) array.
    """
    t = tc[:, None]
    if not sw.crystallization:
        solid = np.zeros_like(solid)
    gamma_e = electron_coupling_coefficient(ye) * np.cbrt(rho)[None, :] / t
    c = np.zeros(solid.shape)
    for i in range(len(z)):
        xi = number_fractions[..., i]
        if np.all(xi == 0):
            continue
        gam = z[i] ** (5.0 / 3.0) * gamma_e
        eta = _plasma_temperature_coefficient(z[i], a[i], ye) * np.sqrt(rho)[None, :] / t
        if sw.coulomb_liquid:
            liq = ocp.liquid_heat_capacity(gam, eta)
        else:
            liq = np.full(solid.shape, 1.5)
        if sw.lattice == "debye":
            sol = 3.0 * hc.debye_function(sw.debye_to_plasma * eta)
        else:
            sol = ocp.harmonic_lattice(eta)[2]
            if sw.anharmonic:
                sol = sol + ocp.anharmonic(gam, eta)[2]
        c = c + xi * np.where(solid, sol, liq)
    return c


def shell_sums(tc, rho, weight, mix, t_freeze, gravity, sw, x_solid_fractions=None):
    """Mass-weighted sums for one star.

    Parameters
    ----------
    tc : (n_tc,) array
        Core temperatures (K).
    rho, weight, gravity, t_freeze : (n_shell,) arrays
        Mid-shell density (g cm^-3), mass fraction, gravity (cm s^-2) and freezing temperature (K).
    mix : ShellMixture
        Liquid composition of each shell (mass fractions (n_shell, n_species)).
    sw : PhysicsSwitches
    x_solid_fractions : (n_shell, n_species) array, optional
        Number fractions of the solid shells (after phase separation); default the liquid ones.

    Returns
    -------
    dict of (n_tc,) arrays
        ``cap_kb_per_g`` (heat capacity, k_B per gram) and ``eps_nu`` (erg g^-1 s^-1), averaged over
        the star's mass; and the (n_tc, n_shell) array ``eps_ne22_shell``, each shell's share of the
        22Ne settling heat (erg g^-1 s^-1 of the star; zero in solid shells; its sum over shells is the
        whole star's rate, which the depletion front of :mod:`~.tracks` restricts).
    """
    n_tc, n_shell = tc.size, rho.size
    nf_liq = mix.number_fractions()
    nf_sol = nf_liq if x_solid_fractions is None else x_solid_fractions
    ions_per_g = mix.ions_per_mu / (M_U_SI * 1e3)                     # (n_shell,)
    ye = mix.ye
    ye0 = float(np.mean(ye))
    electrons_per_g = ye / (M_U_SI * 1e3)
    abar, zbar = mix.abar, mix.zbar
    z53 = np.sum(nf_liq * mix.z ** (5.0 / 3.0), axis=-1)
    out = {k: np.zeros(n_tc) for k in ("cap_kb_per_g", "eps_nu")}
    out["eps_ne22_shell"] = np.zeros((n_tc, n_shell))
    step = max(1, BLOCK_ELEMENTS // max(n_shell, 1))
    for lo in range(0, n_tc, step):
        t = tc[lo:lo + step]
        solid = (t[:, None] < t_freeze[None, :]) if sw.crystallization else np.zeros((t.size, n_shell), bool)
        nf = np.where(solid[..., None], nf_sol[None], nf_liq[None])
        c_ion = ion_heat_capacity_per_ion(t, rho, nf, mix.z, mix.a, ye0, solid, sw)
        cap = np.sum(weight * ions_per_g * c_ion, axis=1)
        if sw.electrons:
            c_el = hc.electron_heat_capacity_kb(t[:, None], np.maximum(rho, 1.0)[None, :], ye0)
            cap = cap + np.sum(weight * electrons_per_g * c_el, axis=1)
        out["cap_kb_per_g"][lo:lo + step] = cap
        if sw.neutrinos:
            hot = t >= nu.T_MIN_K
            if np.any(hot):
                eps = nu.emissivity_erg_g_s(rho[None, :], t[hot, None], abar[None, :], zbar[None, :])
                out["eps_nu"][lo:lo + step][hot] = np.sum(weight * eps, axis=1)
        if sw.ne22_sedimentation and sw.ne22_mass_fraction > 0:
            gam = z53[None, :] * electron_coupling_coefficient(ye0) * np.cbrt(rho)[None, :] / t[:, None]
            heat = sed.heating_rate_erg_g_s(rho[None, :], t[:, None], gravity[None, :], gam, zbar[None, :],
                                            sw.ne22_mass_fraction)
            shell_heat = np.where(solid, 0.0, weight * heat)
            out["eps_ne22_shell"][lo:lo + step] = shell_heat
    return out
