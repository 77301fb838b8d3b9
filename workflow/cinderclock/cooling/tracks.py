"""Numerical cooling tracks: energy budget of an isothermal degenerate core, for many masses at once.

Model
-----
The core is isothermal at T_c and has the density profile of the zero-temperature structure
(:func:`cinderclock.massradius.chandrasekhar.structure_profile`, or any profile passed in). Energy
conservation reads

    L_photon(T_c) + L_neutrino(T_c) = -dU/dt,
    dU = [ C_ion(T_c) + C_el(T_c) ] dT_c + l k_B T_c N_ion dq(T_c),

where

* L_photon = f C M T_c^(7/2) is the Kramers envelope relation (:mod:`~cinderclock.cooling.envelope`),
* L_neutrino = M int eps_nu(rho(m), T_c) dm with the Itoh et al. (1996) emissivities
  (:mod:`~cinderclock.cooling.neutrinos`),
* C_ion sums 3/2 k_B per liquid ion and the Debye heat capacity of crystallised shells,
* C_el is the heat capacity of the degenerate electrons (:mod:`~cinderclock.cooling.heat_capacity`),
* q(T_c) is the crystallised mass fraction (shells where the coupling parameter exceeds
  Gamma_m = 175; crystallization proceeds outward because density falls outward), and
  l = 0.77 the latent heat per ion in units of k_B T_m.

Every quantity is a function of T_c alone, so the cooling age is a quadrature over T_c:

    t(T_c) = int_{T_c}^{inf} [ (C_ion + C_el) + l k_B T N_ion dq/dT ] / (L_photon + L_neutrino) dT.

It is evaluated on a fine grid of log T_c for all masses at once; on each interval the integrand
is taken as a power law in T (exact for Mestel's law). Above the start temperature the integrand
is continued as the power law of the first interval, so ages count from T_c = infinity as in
Mestel's law (this adds well under 1e5 yr).

With neutrinos, crystallization and electrons switched off the model is exactly Mestel's law:
U = (3/2) N_ion k_B T_c and t = (2/5) U / L.

Cautions (systematics that remain)
----------------------------------
* Isothermal core, zero-temperature density profile: no thermal structure, no contraction
  energy; hot (young) white dwarfs are larger and their ages uncertain at the 1e6-1e7 yr level.
* Simplified envelope: single Kramers opacity law, no convective coupling (which speeds late
  cooling), no H/He layering; the envelope calibration changes ages by tens of per cent.
* Ion liquid at the ideal-gas heat capacity (no Coulomb liquid term); Debye solid with
  theta_D = 0.45 T_p.
* No C/O phase separation, no 22Ne sedimentation (both delay cooling in real white dwarfs by up
  to ~1-2 Gyr at the faint end, from memory), no residual nuclear burning.
* Neutrino emission uses the Itoh et al. fits only for T >= 1e7 K.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..constants import K_B_SI, L_SUN_W, M_SUN_KG, M_U_SI, YR_S
from . import crystallization as cryst
from . import heat_capacity as hc
from . import neutrinos as nu
from .composition import core_composition
from .envelope import envelope_model

_ERG = 1e7
_K_B_CGS = K_B_SI * _ERG              # erg K^-1
_M_U_G = M_U_SI * 1e3                 # g
_M_SUN_G = M_SUN_KG * 1e3
_L_SUN_ERG_S = L_SUN_W * _ERG

#: Densities (g cm^-3) below which shells are ignored in the neutrino and heat-capacity sums
#: (the envelope; a negligible mass fraction).
RHO_FLOOR_CGS = 1.0


@dataclass(frozen=True)
class PhysicsSwitches:
    """Which pieces of physics the numerical model includes.

    Parameters
    ----------
    neutrinos : bool
        Thermal neutrino losses (Itoh et al. 1996).
    crystallization : bool
        Freezing of the ions at Gamma_m and the Debye heat capacity of the solid. Off: the ions
        stay an ideal liquid (3/2 k_B per ion) at all temperatures.
    latent_heat : bool
        Release of the latent heat on freezing (only with ``crystallization``).
    electrons : bool
        Heat capacity of the degenerate electrons.
    gamma_melt : float
        Coupling parameter at melting.
    latent_heat_kt : float
        Latent heat per ion in units of k_B T_m.
    debye_to_plasma : float
        theta_D / T_p.
    """

    neutrinos: bool = True
    crystallization: bool = True
    latent_heat: bool = True
    electrons: bool = True
    gamma_melt: float = cryst.GAMMA_MELT
    latent_heat_kt: float = cryst.LATENT_HEAT_KT
    debye_to_plasma: float = cryst.DEBYE_TO_PLASMA

    def as_dict(self):
        """Plain mapping for provenance."""
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def default_profile(mass_msun, core="CO", n_points=200):
    """Zero-temperature structure profile from :mod:`cinderclock.massradius.chandrasekhar`."""
    from ..massradius.chandrasekhar import structure_profile

    comp = core_composition(core)
    return structure_profile(float(mass_msun), mu_e=comp.mu_e, n_points=n_points)


@dataclass
class Tracks:
    """Cooling tracks on a common grid of core temperature.

    Arrays have shape (n_mass, n_tc) unless noted.

    Attributes
    ----------
    mass_msun : (n_mass,) array
    radius_rsun : (n_mass,) array
        Zero-temperature radius of each mass.
    log_tc : (n_tc,) array
        log10 core temperature (K), decreasing.
    log_lum : array
        log10 photon luminosity (Lsun).
    log_lum_nu : array
        log10 neutrino luminosity (Lsun); -inf where zero.
    age_yr : array
        Cooling age in years, increasing along each track.
    crystallized_fraction : array
        Crystallised mass fraction.
    settings : dict
        The choices the tracks were built with (for provenance).
    """

    mass_msun: np.ndarray
    radius_rsun: np.ndarray
    log_tc: np.ndarray
    log_lum: np.ndarray
    log_lum_nu: np.ndarray
    age_yr: np.ndarray
    crystallized_fraction: np.ndarray
    settings: dict = field(default_factory=dict)


def _resample_profile(profile, n_shell):
    """Mid-shell densities of ``n_shell`` equal-mass shells, and the full-resolution arrays."""
    q = np.asarray(profile["mass_fraction"], dtype=float)
    rho = np.asarray(profile["rho_cgs"], dtype=float)
    edges = np.linspace(0.0, 1.0, n_shell + 1)
    mid = 0.5 * (edges[1:] + edges[:-1])
    return np.interp(mid, q, rho), q, rho


def _profile_radius(profile, mass_msun, mu_e):
    if "total_radius_rsun" in profile:
        return float(profile["total_radius_rsun"])
    if "radius_rsun" in profile:
        return float(np.max(profile["radius_rsun"]))
    from ..massradius.nauenberg import radius_rsun
    return float(radius_rsun(mass_msun, mu_e))


def _segment_integral(f0, f1, dx):
    """int over an interval of length dx of a positive function, as a power law between f0, f1."""
    with np.errstate(divide="ignore", invalid="ignore"):
        r = f1 / f0
        lr = np.log(r)
        powerlaw = f0 * dx * (r - 1.0) / lr
    trap = 0.5 * (f0 + f1) * dx
    ok = (f0 > 0) & (f1 > 0) & (np.abs(lr) > 1e-8) & np.isfinite(powerlaw)
    return np.where(ok, powerlaw, trap)


def cooling_tracks(masses_msun, envelope="He", core="CO", switches=None, profiles=None,
                   log_tc_start=8.5, log_lum_end=-18.0, dlog_tc=0.005, n_shell=200):
    """Integrate the cooling of white dwarfs of several masses at once.

    Parameters
    ----------
    masses_msun : array_like
        White-dwarf masses in Msun.
    envelope : str or EnvelopeModel
        Envelope preset (``"H"`` or ``"He"``) or model.
    core : str or CoreComposition
        Core composition key (``"CO"``, ``"C"``, ``"O"``, ``"ONe"``, ``"He"``).
    switches : PhysicsSwitches, optional
        Physics included (all on by default).
    profiles : list of dict, optional
        One structure profile per mass, each with arrays ``mass_fraction`` (0 to 1, increasing)
        and ``rho_cgs`` (g cm^-3), and optionally ``total_radius_rsun``. Default: the
        zero-temperature Chandrasekhar profiles (:func:`default_profile`).
    log_tc_start : float
        log10 of the hottest core temperature (K) integrated.
    log_lum_end : float
        Faintest photon luminosity (log10 Lsun) every track must reach.
    dlog_tc : float
        Step in log10 T_c.
    n_shell : int
        Number of equal-mass shells for the neutrino and heat-capacity sums.

    Returns
    -------
    Tracks
    """
    sw = switches or PhysicsSwitches()
    env = envelope_model(envelope)
    comp = core_composition(core)
    masses = np.atleast_1d(np.asarray(masses_msun, dtype=float))
    if profiles is None:
        profiles = [default_profile(m, comp) for m in masses]
    if len(profiles) != masses.size:
        raise ValueError("one structure profile per mass is needed")

    # temperature grid: deep enough that the brightest mass reaches log_lum_end
    log_tc_end = float(np.min(env.log_tc(masses, log_lum_end))) - 2 * dlog_tc
    n_tc = int(np.ceil((log_tc_start - log_tc_end) / dlog_tc)) + 1
    log_tc = log_tc_start - dlog_tc * np.arange(n_tc)
    tc = 10.0**log_tc                                              # (n_tc,)

    shells = [_resample_profile(p, n_shell) for p in profiles]
    rho_shell = np.stack([s[0] for s in shells])                  # (n_mass, n_shell)
    live = rho_shell > RHO_FLOOR_CGS
    weight = np.where(live, 1.0 / n_shell, 0.0)                   # mass fraction of each shell
    radius = np.array([_profile_radius(p, m, comp.mu_e) for p, m in zip(profiles, masses)])

    mass_g = masses * _M_SUN_G                                     # (n_mass,)
    ions_per_g = comp.ions_per_mu / _M_U_G
    electrons_per_g = comp.ye / _M_U_G
    n_ion = mass_g * ions_per_g                                    # (n_mass,)

    # crystallised fraction from the full-resolution profiles
    if sw.crystallization:
        qc = np.stack([cryst.crystallized_mass_fraction(tc, s[1], s[2], comp, sw.gamma_melt) for s in shells])
    else:
        qc = np.zeros((masses.size, n_tc))

    # heat capacity dU/dT in erg K^-1 (n_mass, n_tc), built shell by shell over all T at once
    t3 = tc[None, :, None]                                         # (1, n_tc, 1)
    rho3 = rho_shell[:, None, :]                                   # (n_mass, 1, n_shell)
    w3 = weight[:, None, :]
    if sw.crystallization:
        solid = t3 < cryst.melting_temperature_k(rho3, comp, sw.gamma_melt)
        theta = cryst.debye_temperature_k(rho3, comp, sw.debye_to_plasma)
        c_ion = hc.ion_heat_capacity_kb(t3, theta, solid)
    else:
        c_ion = np.full((1, 1, 1), 1.5)
    cap = np.sum(w3 * c_ion, axis=2) * ions_per_g                   # k_B per g, per unit mass fraction
    if sw.electrons:
        c_el = hc.electron_heat_capacity_kb(t3, np.maximum(rho3, RHO_FLOOR_CGS), comp.ye)
        cap = cap + np.sum(w3 * c_el, axis=2) * electrons_per_g
    cap = np.broadcast_to(cap, (masses.size, n_tc))
    dU_dT = cap * _K_B_CGS * mass_g[:, None]                        # erg K^-1

    # luminosities in erg s^-1
    l_photon = env.constant_cgs() * masses[:, None] * tc[None, :] ** 3.5
    l_nu = np.zeros_like(l_photon)
    if sw.neutrinos:
        hot = tc >= nu.T_MIN_K
        if np.any(hot):
            eps = nu.emissivity_erg_g_s(rho3 * np.ones((1, int(hot.sum()), 1)), t3[:, hot, :],
                                        comp.abar, comp.zbar)
            l_nu[:, hot] = np.sum(w3 * eps, axis=2) * mass_g[:, None]
    l_total = l_photon + l_nu

    # time per unit ln T: integrand (erg K^-1 * K / erg s^-1) = s
    f = dU_dT * tc[None, :] / l_total                              # (n_mass, n_tc)
    dx = dlog_tc * np.log(10.0)
    dt_heat = _segment_integral(f[:, :-1], f[:, 1:], dx)
    dt = dt_heat
    if sw.crystallization and sw.latent_heat:
        t_mid = np.sqrt(tc[:-1] * tc[1:])
        l_mid = np.sqrt(l_total[:, :-1] * l_total[:, 1:])
        d_lat = sw.latent_heat_kt * _K_B_CGS * t_mid[None, :] * n_ion[:, None] * (qc[:, 1:] - qc[:, :-1])
        dt = dt + d_lat / l_mid
    # ages from T = infinity: the integrand above the start continued as a power law
    slope = np.log(f[:, 1] / f[:, 0]) / dx                          # d ln f / d ln(1/T) > 0
    t0 = np.where(slope > 0, f[:, 0] / np.where(slope > 0, slope, 1.0), 0.0)
    age_s = np.concatenate([t0[:, None], t0[:, None] + np.cumsum(dt, axis=1)], axis=1)

    with np.errstate(divide="ignore"):
        log_lum_nu = np.log10(l_nu / _L_SUN_ERG_S)
    settings = {"envelope": env.as_model(), "core": comp.key, "switches": sw.as_dict(),
                "log_tc_start": log_tc_start, "dlog_tc": dlog_tc, "n_shell": n_shell}
    return Tracks(mass_msun=masses, radius_rsun=radius, log_tc=log_tc,
                  log_lum=np.log10(l_photon / _L_SUN_ERG_S), log_lum_nu=log_lum_nu,
                  age_yr=age_s / YR_S, crystallized_fraction=qc, settings=settings)
