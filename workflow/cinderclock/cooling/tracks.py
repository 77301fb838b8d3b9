"""Numerical cooling tracks: energy budget of an isothermal degenerate core, for many masses at once.

Model
-----
The core is isothermal at T_c and has the density profile of the zero-temperature structure
(:func:`cinderclock.massradius.chandrasekhar.structure_profile`, or any profile passed in), cut into
equal-mass shells, each with its own composition (an oxygen-rich centre for C/O cores,
:mod:`~cinderclock.cooling.coreprofile`). Energy conservation reads

    L_photon(T_c) + L_nu(T_c) - L_22(T_c) = -dU/dt,
    dU = C(T_c) dT_c - dE_latent(T_c) - dE_sep(T_c),

where

* L_photon(M, T_c) comes from the envelope object (anything with ``log_lum(mass, log_tc)`` and
  ``log_tc(mass, log_lum)``; the Kramers relation of :mod:`~cinderclock.cooling.envelope` or an
  integrated envelope table);
* L_nu = M int eps_nu(rho, T_c; Abar, Zbar of the shell) dm, Itoh et al. (1996);
* C sums, shell by shell, the ion heat capacity of the one-component plasma by linear mixing -- the
  Coulomb liquid (Potekhin & Chabrier 2000) or the quantum crystal (Baiko, Potekhin & Yakovlev 2001
  plus anharmonic terms), :mod:`~cinderclock.cooling.ocp` -- and the degenerate electrons;
* E_latent: each shell releases k T_f Delta s per ion when it freezes at T_f, with Delta s from the
  liquid-solid free energies (about 0.75 k per ion at Gamma_m);
* E_sep: the gravitational energy released when crystallization separates C and O
  (:mod:`~cinderclock.cooling.phasesep`: Medin & Cumming 2010 phase diagram, Isern et al. 1997
  energy);
* L_22: the heat of 22Ne settling in the liquid (Deloye & Bildsten 2002), capped at the energy of
  full settling (:mod:`~cinderclock.cooling.sedimentation`).

Every term is a function of T_c (freezing temperatures and separation energies are precomputed per
shell), so the cooling age stays a quadrature over T_c,

    t(T_c) = int_{T_c}^{inf} [C dT + dE_latent + dE_sep] / (L_photon + L_nu - L_22),

evaluated on a fine grid of log T_c for all masses (power law in T on each interval, exact for
Mestel's law); the 22Ne cap makes the sum sequential along the grid. Above the start temperature the
integrand is continued as a power law, so ages count from T_c = infinity as in Mestel's law.

With every switch off (no neutrinos, crystallization, electrons, Coulomb liquid, stratification, 22Ne)
the model is exactly Mestel's law, U = (3/2) N_ion k_B T_c and t = (2/5) U / L.

Cautions (systematics that remain)
----------------------------------
* Isothermal core on the zero-temperature density profile: no thermal structure, no contraction
  energy; hot (young) white dwarfs carry age uncertainties at the 1e6-1e7 yr level.
* The C/O profile is one documented shape for every mass (from memory of published profiles).
* Phase separation: instantaneous, complete mixing of the liquid (an upper bound on its efficiency);
  liquid phase diagram from linear mixing; no 22Ne distillation.
* 22Ne: uniform-trace settling rate below an inward-moving depletion front (no central pile-up
  profile); the diffusion coefficient is uncertain by about a factor of two in the literature.
* Quantum liquid approximated by the harmonic-lattice suppression factor; electron-ion screening
  corrections to the ion free energies are neglected.
* Neutrino emission uses the Itoh et al. fits only for T >= 1e7 K.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..constants import K_B_SI, L_SUN_W, M_SUN_KG, M_U_SI, YR_S
from . import budget
from . import crystallization as cryst
from . import ocp
from . import phasesep
from . import sedimentation as sed
from .composition import core_composition
from .coreprofile import DEFAULT_OXYGEN_PROFILE, oxygen_number_fraction, shell_mixture
from .envelope import envelope_model

_ERG = 1e7
_K_B_CGS = K_B_SI * _ERG              # erg K^-1
_M_U_G = M_U_SI * 1e3                 # g
_M_SUN_G = M_SUN_KG * 1e3
_L_SUN_ERG_S = L_SUN_W * _ERG

#: Densities (g cm^-3) below which shells are ignored in the neutrino and heat-capacity sums
#: (the envelope; a negligible mass fraction).
RHO_FLOOR_CGS = 1.0
#: Floor on the net loss rate, as a fraction of the photon + neutrino losses, when 22Ne heating
#: nearly balances them (stalls are counted in the settings as ``ne22_stall_nodes``).
NET_LOSS_FLOOR = 0.02


@dataclass(frozen=True)
class PhysicsSwitches:
    """Which pieces of physics the numerical model includes.

    Parameters
    ----------
    neutrinos : bool
        Thermal neutrino losses (Itoh et al. 1996).
    crystallization : bool
        Freezing of the ions. Off: the ions stay liquid at all temperatures.
    latent_heat : bool
        Release of the latent heat on freezing (only with ``crystallization``).
    electrons : bool
        Heat capacity of the degenerate electrons.
    coulomb_liquid : bool
        Coulomb (excess) heat capacity of the liquid, Potekhin & Chabrier (2000), with the quantum
        factor. Off: the ideal-gas 3/2 k_B per ion.
    lattice : str
        ``"bpy2001"`` (harmonic quantum crystal of Baiko, Potekhin & Yakovlev 2001) or ``"debye"``
        (3 k_B D(theta_D / T) with theta_D = ``debye_to_plasma`` T_p).
    anharmonic : bool
        Anharmonic heat capacity of the crystal (Farouki & Hamaguchi 1993; with ``"bpy2001"``).
    stratified_core : bool
        Oxygen-rich centre for C/O cores (:mod:`~cinderclock.cooling.coreprofile`). Off: the core
        composition's uniform proportions.
    phase_separation : bool
        C/O phase separation on freezing and its energy (C/O cores, with ``crystallization``).
    ne22_sedimentation : bool
        Heat of 22Ne settling in the liquid.
    ne22_mass_fraction : float
        22Ne mass fraction (about the progenitor's metallicity Z; 0.014 is about solar).
    gamma_melt : float
        Coupling parameter at melting of the one-component plasma (without phase separation).
    latent_heat_kt : float or None
        Latent heat per ion in k_B T_m; None computes it from the liquid and solid free energies
        at ``gamma_melt`` (:func:`cinderclock.cooling.ocp.latent_heat_kt`).
    debye_to_plasma : float
        theta_D / T_p for ``lattice="debye"``.
    """

    neutrinos: bool = True
    crystallization: bool = True
    latent_heat: bool = True
    electrons: bool = True
    coulomb_liquid: bool = True
    lattice: str = "bpy2001"
    anharmonic: bool = True
    stratified_core: bool = True
    phase_separation: bool = True
    ne22_sedimentation: bool = True
    ne22_mass_fraction: float = 0.014
    gamma_melt: float = cryst.GAMMA_MELT
    latent_heat_kt: float | None = None
    debye_to_plasma: float = cryst.DEBYE_TO_PLASMA

    def __post_init__(self):
        if self.lattice not in ("bpy2001", "debye"):
            raise ValueError(f"lattice must be 'bpy2001' or 'debye', not {self.lattice!r}")
        if not 0.0 <= self.ne22_mass_fraction < 0.2:
            raise ValueError("ne22_mass_fraction must lie in [0, 0.2)")

    def latent_heat_per_ion_kt(self):
        """Latent heat per ion in units of k_B T_m actually used."""
        if self.latent_heat_kt is not None:
            return float(self.latent_heat_kt)
        return ocp.latent_heat_kt(self.gamma_melt)

    def as_dict(self):
        """Plain mapping for provenance."""
        d = {k: getattr(self, k) for k in self.__dataclass_fields__}
        d["latent_heat_kt_used"] = self.latent_heat_per_ion_kt()
        return d


def _entry(ingredient, relation, where):
    """Reference entry of one ingredient from its PublishedRelation."""
    return {"ingredient": ingredient, "relation": relation.key, "reference": relation.reference,
            "where": f"cinderclock/cooling/{where}"}


#: References of the ingredients, as data (for the tracks' settings and the table's provenance).
INGREDIENT_REFERENCES = tuple(_entry(*row) for row in (
    ("liquid ion heat capacity", ocp.PC2000_LIQUID, "ocp.py liquid_energy"),
    ("crystal (harmonic, quantum)", ocp.BPY2001_HARMONIC, "ocp.py harmonic_lattice"),
    ("crystal (anharmonic)", ocp.FH1993_ANHARMONIC, "ocp.py anharmonic"),
    ("C/O phase diagram", phasesep.MEDIN_CUMMING_2010, "phasesep.py phase_diagram"),
    ("phase-separation energy", phasesep.ISERN_1997, "phasesep.py freezing_sequence"),
    ("22Ne sedimentation", sed.DELOYE_BILDSTEN_2002, "sedimentation.py"),
)) + (
    {"ingredient": "melting and latent heat", "relation": "free_energy_crossing",
     "reference": "Potekhin, A. Y. & Chabrier, G. 2000, PRE 62, 8554 (Gamma_m = 175); latent heat from the "
                  "liquid-solid entropy difference (about 0.77 kT per ion in Salaris, M. et al. 1997, ApJ 486, 413)",
     "where": "cinderclock/cooling/ocp.py melting_gamma, latent_heat_kt"},
    {"ingredient": "C/O profile", "relation": "oxygen_profile",
     "reference": "shaped after the internal C/O profiles of Salaris, M. et al. 1997, ApJ 486, 413 "
                  "(UNVERIFIED: not read off the paper's figures)",
     "where": "cinderclock/cooling/coreprofile.py OxygenProfile"},
    {"ingredient": "neutrino emission", "relation": "itoh_1996",
     "reference": "Itoh, N., Hayashi, H., Nishikawa, A. & Kohyama, Y. 1996, ApJS 102, 411",
     "where": "cinderclock/cooling/neutrinos.py"},
)

#: Honest cautions of the numerical model (see the module docstring).
CAUTIONS = (
    "isothermal core on the zero-temperature density profile (no contraction energy)",
    "one C/O profile shape for every mass (unverified against published profiles)",
    "phase separation with instantaneous complete mixing (upper bound on its efficiency); "
    "linear-mixing liquid in the phase diagram; no 22Ne distillation",
    "22Ne settling at the uniform-trace rate below a depletion front, with an energy cap (no central "
    "pile-up profile); the diffusion coefficient is uncertain by about a factor of two",
    "quantum liquid approximated by the lattice suppression factor; no electron screening corrections",
)


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
    log_lum_ne22 : array
        log10 of the 22Ne settling heat (Lsun) actually applied; -inf where zero.
    separation_energy_erg : array
        Cumulative energy released by C/O phase separation (erg).
    latent_energy_erg : array
        Cumulative latent heat released (erg).
    """

    mass_msun: np.ndarray
    radius_rsun: np.ndarray
    log_tc: np.ndarray
    log_lum: np.ndarray
    log_lum_nu: np.ndarray
    age_yr: np.ndarray
    crystallized_fraction: np.ndarray
    settings: dict = field(default_factory=dict)
    log_lum_ne22: np.ndarray | None = None
    separation_energy_erg: np.ndarray | None = None
    latent_energy_erg: np.ndarray | None = None


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


def resolve_envelope(envelope):
    """An envelope object: a preset key of :mod:`~cinderclock.cooling.envelope`, or any object with
    ``log_lum(mass_msun, log_tc)`` and ``log_tc(mass_msun, log_lum)`` passed through."""
    if hasattr(envelope, "log_lum") and hasattr(envelope, "log_tc"):
        return envelope
    return envelope_model(envelope)


def _star_setup(profile, mass_msun, comp, sw, n_shell, gamma_melt):
    """Per-shell arrays of one star and its freezing sequence."""
    q = np.asarray(profile["mass_fraction"], dtype=float)
    rho_full = np.asarray(profile["rho_cgs"], dtype=float)
    edges = np.linspace(0.0, 1.0, n_shell + 1)
    mid = 0.5 * (edges[1:] + edges[:-1])
    rho = np.interp(mid, q, rho_full)
    weight = np.where(rho > RHO_FLOOR_CGS, 1.0 / n_shell, 0.0)
    mix = shell_mixture(comp, mid, stratified=sw.stratified_core, profile=DEFAULT_OXYGEN_PROFILE)
    gravity, r_mid, (q_prof, r_prof, _) = sed.shell_gravity_cgs(profile, mid)
    # top of the C/O core: outer edge of the outermost shell that holds core matter
    core_top = float(np.interp(edges[1:][weight > 0].max(), q_prof, r_prof)) if np.any(weight > 0) else 0.0
    x_sol_nf = None
    sep_energy = np.zeros(n_shell)
    rho_c = float(rho_full[0])
    if mix.is_co:
        i_o = int(np.argmax(mix.z))
        xo = mix.mass_fractions[:, i_o]
        seq = phasesep.freezing_sequence(rho, xo, weight, separate=sw.phase_separation, gamma_melt=gamma_melt)
        t_f = seq["t_freeze_k"]
        sep_energy = seq["energy_per_mass"] * mass_msun * _M_SUN_G
        xs_n = oxygen_number_fraction(seq["x_o_solid"])
        x_sol_nf = np.empty((n_shell, 2))
        x_sol_nf[:, i_o], x_sol_nf[:, 1 - i_o] = xs_n, 1.0 - xs_n
        # freezing of the very centre: the front starts at the central density
        t_start = t_f[0] * np.cbrt(rho_c / rho[0])
    else:
        coef = cryst.coupling_coefficient_cgs(comp)
        t_f = np.minimum.accumulate(coef * np.cbrt(rho) / gamma_melt)
        t_start = coef * np.cbrt(rho_c) / gamma_melt
    ions = weight * mix.ions_per_mu / _M_U_G * mass_msun * _M_SUN_G          # ions per shell
    latent = sw.latent_heat_per_ion_kt() * _K_B_CGS * t_f * ions
    return {"rho": rho, "weight": weight, "mix": mix, "gravity": gravity, "t_freeze": t_f,
            "t_start": t_start, "x_solid_nf": x_sol_nf, "latent": latent, "separation": sep_energy,
            "n_ion": float(np.sum(ions)), "r_mid_cm": r_mid, "core_top_cm": core_top}


def _cumulative_on_grid(tc, t_start, t_freeze, per_shell):
    """Cumulative release (per shell, released at its freezing temperature) as a function of T_c.

    Piecewise linear in T through (t_start, 0) and the shell centres (T_f,k, sum_{j<k} + half of k).
    """
    cum = np.cumsum(per_shell) - 0.5 * per_shell
    t_nodes = np.concatenate([[max(t_start, t_freeze[0])], t_freeze])
    c_nodes = np.concatenate([[0.0], cum])
    total = float(np.sum(per_shell))
    # np.interp needs increasing x: T decreases along the shells
    out = np.interp(tc, t_nodes[::-1], c_nodes[::-1], left=total, right=0.0)
    return out


def cooling_tracks(masses_msun, envelope="He", core="CO", switches=None, profiles=None,
                   log_tc_start=8.5, log_lum_end=-18.0, dlog_tc=0.005, n_shell=200):
    """Integrate the cooling of white dwarfs of several masses at once.

    Parameters
    ----------
    masses_msun : array_like
        White-dwarf masses in Msun.
    envelope : str or object
        Envelope preset (``"H"`` or ``"He"``) or any object with ``log_lum(mass_msun, log_tc)`` and
        ``log_tc(mass_msun, log_lum)`` (broadcasting over arrays), e.g. an EnvelopeModel or an
        integrated envelope table; ``as_model()`` is recorded when present.
    core : str or CoreComposition
        Core composition key (``"CO"``, ``"C"``, ``"O"``, ``"ONe"``, ``"He"``).
    switches : PhysicsSwitches, optional
        Physics included (all on by default).
    profiles : list of dict, optional
        One structure profile per mass, each with arrays ``mass_fraction`` (0 to 1, increasing)
        and ``rho_cgs`` (g cm^-3), optionally ``radius_rsun``/``mass_msun`` and
        ``total_radius_rsun``. Default: the zero-temperature Chandrasekhar profiles.
    log_tc_start : float
        log10 of the hottest core temperature (K) integrated.
    log_lum_end : float
        Faintest photon luminosity (log10 Lsun) every track must reach.
    dlog_tc : float
        Step in log10 T_c.
    n_shell : int
        Number of equal-mass shells.

    Returns
    -------
    Tracks
    """
    sw = switches or PhysicsSwitches()
    env = resolve_envelope(envelope)
    comp = core_composition(core)
    masses = np.atleast_1d(np.asarray(masses_msun, dtype=float))
    if profiles is None:
        profiles = [default_profile(m, comp) for m in masses]
    if len(profiles) != masses.size:
        raise ValueError("one structure profile per mass is needed")

    # temperature grid: deep enough that the brightest mass reaches log_lum_end
    log_tc_end = float(np.min(env.log_tc(masses, np.full(masses.shape, log_lum_end)))) - 2 * dlog_tc
    n_tc = int(np.ceil((log_tc_start - log_tc_end) / dlog_tc)) + 1
    log_tc = log_tc_start - dlog_tc * np.arange(n_tc)
    tc = 10.0**log_tc                                              # (n_tc,)
    n_m = masses.size
    mass_g = masses * _M_SUN_G
    radius = np.array([_profile_radius(p, m, comp.mu_e) for p, m in zip(profiles, masses)])

    cap = np.empty((n_m, n_tc))
    eps_nu = np.empty((n_m, n_tc))
    qc = np.zeros((n_m, n_tc))
    e_lat = np.zeros((n_m, n_tc))
    e_sep = np.zeros((n_m, n_tc))
    e_cap = np.zeros(n_m)
    eps_ne_shell = np.zeros((n_m, n_tc, n_shell))
    weights = np.zeros((n_m, n_shell))
    gravities = np.zeros((n_m, n_shell))
    r_mid = np.zeros((n_m, n_shell))
    r_front = np.zeros(n_m)
    for i, (p, m) in enumerate(zip(profiles, masses)):
        st = _star_setup(p, m, comp, sw, n_shell, sw.gamma_melt)
        if sw.crystallization:
            qc[i] = _cumulative_on_grid(tc, st["t_start"], st["t_freeze"], st["weight"])
            if sw.latent_heat:
                e_lat[i] = _cumulative_on_grid(tc, st["t_start"], st["t_freeze"], st["latent"])
            e_sep[i] = _cumulative_on_grid(tc, st["t_start"], st["t_freeze"], st["separation"])
        sums = budget.shell_sums(tc, st["rho"], st["weight"], st["mix"], st["t_freeze"], st["gravity"], sw,
                                 x_solid_fractions=st["x_solid_nf"])
        cap[i], eps_nu[i] = sums["cap_kb_per_g"], sums["eps_nu"]
        if sw.ne22_sedimentation:
            e_cap[i] = sed.settling_energy_cap_erg(p, mass_g[i], sw.ne22_mass_fraction)
            eps_ne_shell[i] = sums["eps_ne22_shell"]
            weights[i], gravities[i], r_mid[i] = st["weight"], st["gravity"], st["r_mid_cm"]
            r_front[i] = st["core_top_cm"]
    r_front_start = r_front.copy()
    qc = np.clip(qc, 0.0, 1.0)
    dU_dT = cap * _K_B_CGS * mass_g[:, None]                        # erg K^-1

    # luminosities in erg s^-1
    l_photon = 10.0 ** env.log_lum(masses[:, None], log_tc[None, :]) * _L_SUN_ERG_S
    l_photon = np.broadcast_to(l_photon, (n_m, n_tc))
    l_nu = eps_nu * mass_g[:, None]
    l_out = l_photon + l_nu
    dx = dlog_tc * np.log(10.0)
    d_release = np.diff(e_lat, axis=1) + np.diff(e_sep, axis=1)    # erg released per interval (>= 0)

    # sequential in T_c because of the 22Ne reservoir; vectorised over masses. The settling heat is
    # the uniform-trace rate of the shells below the depletion front times the fraction of the
    # full-settling energy not yet released; where it would exceed the losses the core stalls at
    # constant T_c while the reservoir drains. The front moves inward at the drift speed of the
    # shell it is in.
    rows = np.arange(n_m)

    def _front_heat(k, active):
        return np.sum(np.where(active, eps_ne_shell[:, k, :], 0.0), axis=1) * mass_g

    def _front_speed(k, active):
        j = np.clip(np.sum(active, axis=1) - 1, 0, n_shell - 1)
        return sed.drift_speed_cm_s(eps_ne_shell[rows, k, j], weights[rows, j], gravities[rows, j],
                                    sw.ne22_mass_fraction)

    dt = np.empty((n_m, n_tc - 1))
    l_ne_used = np.zeros((n_m, n_tc))
    released = np.zeros(n_m)
    has_cap = e_cap > 0
    safe_cap = np.where(has_cap, e_cap, 1.0)
    limit = 1.0 - NET_LOSS_FLOOR
    stall_nodes = 0
    for k in range(n_tc - 1):
        phi = np.where(has_cap, np.clip(1.0 - released / safe_cap, 0.0, 1.0), 0.0)
        active = r_mid < r_front[:, None]                           # shells below the front
        l_front0, l_front1 = _front_heat(k, active), _front_heat(k + 1, active)
        stall = phi * l_front0 > limit * l_out[:, k]
        t_stall = np.zeros(n_m)
        if np.any(stall):
            stall_nodes += int(np.sum(stall))
            drain = np.where(stall, safe_cap * (phi - limit * l_out[:, k] / np.where(stall, l_front0, 1.0)), 0.0)
            t_stall = drain / (l_out[:, k] * (1.0 + limit)) * 2.0     # heating falls from L_out to limit*L_out
            released = released + drain
            phi = np.where(has_cap, np.clip(1.0 - released / safe_cap, 0.0, 1.0), 0.0)
        h0, h1 = phi * l_front0, phi * l_front1
        net0 = np.maximum(l_out[:, k] - h0, NET_LOSS_FLOOR * l_out[:, k])
        net1 = np.maximum(l_out[:, k + 1] - h1, NET_LOSS_FLOOR * l_out[:, k + 1])
        f0 = dU_dT[:, k] * tc[k] / net0
        f1 = dU_dT[:, k + 1] * tc[k + 1] / net1
        step = _segment_integral(f0, f1, dx) + d_release[:, k] / np.sqrt(net0 * net1)
        dt[:, k] = step + t_stall
        l_ne_used[:, k + 1] = h1
        released = np.minimum(released + 0.5 * (h0 + h1) * step, e_cap)
        if sw.ne22_sedimentation:
            r_front = np.maximum(r_front - _front_speed(k, active) * dt[:, k], 0.0)
    f = dU_dT * tc[None, :] / np.maximum(l_out - l_ne_used, NET_LOSS_FLOOR * l_out)
    # ages from T = infinity: the integrand above the start continued as a power law
    slope = np.log(f[:, 1] / f[:, 0]) / dx                          # d ln f / d ln(1/T) > 0
    t0 = np.where(slope > 0, f[:, 0] / np.where(slope > 0, slope, 1.0), 0.0)
    age_s = np.concatenate([t0[:, None], t0[:, None] + np.cumsum(dt, axis=1)], axis=1)

    with np.errstate(divide="ignore"):
        log_lum_nu = np.log10(l_nu / _L_SUN_ERG_S)
        log_lum_ne = np.log10(l_ne_used / _L_SUN_ERG_S)
    env_model = env.as_model() if hasattr(env, "as_model") else {"name": type(env).__name__}
    settings = {"envelope": env_model, "core": comp.key, "switches": sw.as_dict(),
                "oxygen_profile": DEFAULT_OXYGEN_PROFILE.as_dict() if sw.stratified_core else None,
                "melting_gamma_free_energies": ocp.melting_gamma(),
                "log_tc_start": log_tc_start, "dlog_tc": dlog_tc, "n_shell": n_shell,
                "ne22_stall_nodes": stall_nodes, "ne22_energy_released_erg": released.tolist(),
                "ne22_energy_cap_erg": e_cap.tolist(),
                "ne22_front_start_cm": r_front_start.tolist(), "ne22_front_end_cm": r_front.tolist(),
                "references": [dict(r) for r in INGREDIENT_REFERENCES], "cautions": list(CAUTIONS)}
    return Tracks(mass_msun=masses, radius_rsun=radius, log_tc=log_tc,
                  log_lum=np.log10(l_photon / _L_SUN_ERG_S), log_lum_nu=log_lum_nu,
                  age_yr=age_s / YR_S, crystallized_fraction=qc, settings=settings,
                  log_lum_ne22=log_lum_ne, separation_energy_erg=e_sep, latent_energy_erg=e_lat)
