"""Default cooling model against published white-dwarf evolution: ages, neutrinos, crystallization.

Every check builds the cooling and envelope tables exactly as the workflow does with the default
configuration (hydrogen atmosphere, thick hydrogen layer, C/O core with phase separation and 22Ne
sedimentation), then compares with numbers from papers. Marks follow /work/shared/reference-values.md:
"abstract" means the number was read in the paper's abstract; "from memory" values are loose checks
only (the tolerance says how loose and why).
"""

import copy

import numpy as np
import pytest

# ---------------------------------------------------------------------------------------------
# Published cooling ages of white dwarfs with dynamical masses (detailed evolutionary models of
# the papers' authors). Inputs: dynamical mass (Msun), Teff (K), atmosphere; expected cooling age.
# Tolerance 25 %: the requirement of the issue and about the spread between detailed codes
# (Prada Moroni & Straniero 2002, ApJ 581, 585, abstract: ~20 % at the faint end) plus the
# stars' own Teff and mass errors (a 1 % Teff error is ~3-4 % in age on these tracks).
STARS = [
    # Sirius B. Mass 1.018 +- 0.011 Msun (Bond et al. 2017, ApJ 840, 70, abstract); Teff 25,193 K
    # (Barstow et al. 2005, MNRAS 362, 1134, abstract); cooling age ~126 Myr (Bond et al. 2017,
    # abstract), 124 +- 10 Myr (Liebert et al. 2005, ApJ 630, L69, abstract). DA.
    ("Sirius B", 1.018, 25193.0, "H", 0.126e9, 0.25),
    # Procyon B. Mass 0.592 +- 0.006 Msun (Bond et al. 2015, ApJ 813, 106, abstract); Teff 7,740 K
    # (Provencal et al. 2002, ApJ 568, 324; quoted by secondary sources, the 2001 AAS abstract of the
    # same team gives 7,700 K); cooling age 1.19 +- 0.11 Gyr with helium-atmosphere sequences
    # (Liebert et al. 2013, ApJ 769, 7, abstract). DQZ: helium atmosphere.
    pytest.param("Procyon B", 0.592, 7740.0, "He", 1.19e9, 0.25, marks=pytest.mark.xfail(
        strict=True, reason="known limitation: helium-atmosphere envelopes are computed only above 8,000 K "
                            "(no He- free-free or collision-induced absorption in the opacity)")),
    # 40 Eridani B. Mass 0.573 +- 0.018 Msun (Mason et al. 2017, AJ 154, 200, abstract); cooling age
    # ~122 Myr, and the star fits CO-core tracks of that mass only with a thin hydrogen layer,
    # q_H ~ 1e-10 (Bond, Bergeron & Bedard 2017, ApJ 848, 16, abstract). Their Teff is not in the
    # abstract: we take 16,500 K (the older spectroscopic value, as listed on the Wikipedia page of
    # 40 Eridani -- secondary source) and 17,200 K (our memory of Bond et al.'s fit) and require the
    # age within 25 % at both, so the check does not hang on which Teff is right. DA, thin H.
    ("40 Eri B", 0.573, 16500.0, "H-thin", 0.122e9, 0.25),
    ("40 Eri B", 0.573, 17200.0, "H-thin", 0.122e9, 0.25),
]

# Cooling ages of a 0.6 Msun C/O DA with a thick hydrogen layer (reference-values.md section 7,
# "standard sequences in reviews", FROM MEMORY, quoted there as about +-20 %). Loose checks: the
# tolerance is the 25 % on top of the +-20 % memory uncertainty, i.e. a factor 1.5.
MEMORY_AGES_06 = [(-2.0, 0.15e9), (-3.0, 0.85e9), (-4.0, 4.0e9), (-4.5, 9.0e9)]


@pytest.fixture(scope="module")
def default_models(_default_config):
    """Envelope, mass-radius and cooling tables of the default configuration (as the workflow builds
    them), on a reduced mass range to keep the test quick; a helium-atmosphere set for Procyon B and a
    thin-hydrogen-layer DA set for 40 Eri B."""
    from cinderclock.config import stage_settings
    from cinderclock.stages import models as M

    out = {}
    # (key, atmosphere, hydrogen layer, masses): the thin-layer DA set only spans 40 Eri B's mass
    sets = [("H", "H", "thick", (0.5, 1.1)), ("He", "He", "thick", (0.5, 1.1)), ("H-thin", "H", "thin", (0.5, 0.7))]
    for key, atm, layer, (m_lo, m_hi) in sets:
        cfg = copy.deepcopy(_default_config)
        cfg["envelope"]["atmosphere"] = atm
        cfg["envelope"]["hydrogen_layer"] = layer
        cfg["envelope"]["masses_msun"] = {"min": m_lo, "max": m_hi, "step": 0.05}
        cfg["cooling"]["masses_msun"] = {"min": m_lo, "max": m_hi, "step": 0.05}
        e_tab, _, _ = M.build_envelope_table(stage_settings(cfg, "envelope_model"))
        env = M.load_envelope(e_tab)
        c_tab, _, _ = M.build_cooling_table(stage_settings(cfg, "cooling_model"), envelope=env)
        out[key] = {"envelope": env, "cooling": M.load_cooling(c_tab), "table": c_tab}
    return out


def _age_at_teff(models, mass, teff):
    """Cooling age (yr) of a star of ``mass`` at ``teff`` on the tables' finite-temperature radii."""
    grid = models["cooling"]
    # log L where the track of this mass has this Teff (Teff falls monotonically along a track)
    lum_nodes = grid.log_lum
    teff_track = grid.interpolate("teff_k", np.full(lum_nodes.shape, mass), lum_nodes)
    ok = np.isfinite(teff_track) & models["envelope"].inside(mass, lum_nodes)
    assert teff_track[ok].min() < teff < teff_track[ok].max(), "star outside the computed envelopes"
    log_lum = np.interp(np.log10(teff), np.log10(teff_track[ok]), lum_nodes[ok])
    age, status = grid.age_yr(mass, log_lum)
    assert status == 0, (mass, teff, log_lum, status)
    return float(age), float(log_lum)


@pytest.mark.parametrize("name,mass,teff,atm,expected,tol", STARS, ids=["Sirius B", "Procyon B", "40 Eri B 16.5 kK", "40 Eri B 17.2 kK"])
def test_cooling_age_of_stars_with_dynamical_masses(default_models, name, mass, teff, atm, expected, tol):
    age, _ = _age_at_teff(default_models[atm], mass, teff)
    assert age == pytest.approx(expected, rel=tol), f"{name}: {age / 1e9:.3f} Gyr"


@pytest.mark.parametrize("log_lum,expected", MEMORY_AGES_06)
def test_0p6_ages_against_review_values_from_memory(default_models, log_lum, expected):
    """Loose check (values from memory, see the module docstring): within a factor 1.5."""
    age, status = default_models["H"]["cooling"].age_yr(0.6, log_lum)
    assert status == 0
    assert expected / 1.5 < age < expected * 1.5


def test_disk_luminosity_function_cutoff(default_models):
    """The disk luminosity function turns down near log L = -4.4 (Liebert, Dahn & Monet 1988,
    ApJ 332, 891, abstract); disk ages from it: >= 9.5 (+1.1, -0.8) Gyr (Oswalt et al. 1996,
    Nature 382, 692, as quoted in their 1997 AAS abstract) and 6.8-8.2 Gyr for the thin disk
    (Kilic et al. 2017, ApJ 837, 162, abstract). A typical (0.6 Msun) white dwarf at the cut-off
    therefore has a cooling age between the youngest disk age less ~1 Gyr of progenitor life and
    the oldest one: 5.8-10.6 Gyr."""
    age, status = default_models["H"]["cooling"].age_yr(0.6, -4.4)
    assert 5.8e9 < age < 10.6e9


def test_neutrino_photon_crossover(default_models):
    """Plasmon neutrinos dominate the energy loss of model white dwarfs down to Teff ~ 25,000 K
    depending on mass (Winget et al. 2004, ApJ 602, L109, abstract); for 0.6 Msun the crossover
    must fall between 20,000 and 30,000 K (the issue's bracket: +-20 % on the abstract's number)."""
    t = default_models["H"]["table"]
    tr = t[np.isclose(t["mass_msun"], 0.6)].sort_values("log_lum", ascending=False)
    diff = tr["log_lum_nu"].to_numpy() - tr["log_lum"].to_numpy()
    k = np.nonzero((diff[:-1] > 0) & (diff[1:] <= 0))[0]
    assert k.size >= 1
    teff = tr["teff_k"].to_numpy()[k[0]]
    assert 20000.0 < teff < 30000.0, teff


def test_crystallization_onset(default_models):
    """0.9-1.1 Msun white dwarfs crystallize near log L = -3: the crystallization pile-up of the
    Gaia 100 pc sample peaks below L = 1e-3 Lsun (Tremblay et al. 2019, Nature 565, 202, as described
    by secondary sources of its figure 3). 0.6 Msun begins near log L = -3.8 (reference-values.md
    section 7, from memory: loose, +-0.4 dex)."""
    grid = default_models["H"]["cooling"]
    lum = grid.log_lum

    def onset(mass):
        """Brightest log L at which more than 1 % of the mass is crystalline."""
        q = grid.interpolate("crystallized_fraction", np.full(lum.shape, mass), lum)
        solid = np.isfinite(q) & (q > 0.01)
        return lum[solid].max()

    assert -3.5 < onset(1.0) < -2.4
    assert -4.2 < onset(0.6) < -3.4


def _grid_with(models, **physics):
    """The default H-atmosphere cooling grid rebuilt with some physics switched off."""
    from cinderclock.cooling.table import build_cooling_table
    from cinderclock.cooling.grid import CoolingGrid

    return CoolingGrid.from_frame(build_cooling_table("numerical", masses=[0.55, 0.6, 0.65, 0.95, 1.0, 1.05],
                                                      envelope=models["H"]["envelope"], physics=physics))


def test_debye_cooling_makes_heavier_white_dwarfs_fainter_when_old(default_models):
    """At an old age (9 Gyr) a 1.0 Msun white dwarf is fainter than a 0.6 Msun one because its
    crystallized core is in the Debye (quantum) regime of the lattice heat capacity (common practice;
    Tremblay et al. 2019 discuss the same ordering). Isolated here from the sedimentation physics,
    which the next test keeps."""
    grid = _grid_with(default_models, phase_separation=False, ne22_sedimentation=False)
    l06, _ = grid.log_lum_at_age(0.6, 9e9)
    l10, _ = grid.log_lum_at_age(1.0, 9e9)
    assert l10 < l06


def test_heavier_white_dwarfs_are_fainter_when_old_with_all_physics(default_models):
    """Same ordering with every default ingredient on (22Ne settling and phase separation included):
    the issue's requirement and the Debye-cooling argument of the previous test (common practice)."""
    grid = default_models["H"]["cooling"]
    l06, _ = grid.log_lum_at_age(0.6, 9e9)
    l10, _ = grid.log_lum_at_age(1.0, 9e9)
    assert l10 < l06


def test_sirius_b_spectroscopic_mass(default_models):
    """Sirius B: Teff 25,193 K and log g 8.556 from its Balmer lines (Barstow et al. 2005, MNRAS 362,
    1134, abstract), which with their mass-radius relation gave 0.98 Msun ("98% that of our own Sun",
    ESA/Hubble release heic0516 on that paper). Our finite-temperature relation at the same Teff and
    log g must give the same mass within 0.03 Msun (the spread between the paper's own mass
    determinations, 0.98 from log g and 1.02 from the redshift and the dynamical mass of Bond et al. 2017)."""
    from cinderclock.constants import G_SI, M_SUN_KG, R_SUN_M

    env = default_models["H"]["envelope"]
    masses = np.linspace(0.9, 1.1, 41)
    r = np.asarray(env.radius_at_teff(masses, np.full(masses.shape, 25193.0)), dtype=float)
    logg = np.log10(G_SI * masses * M_SUN_KG / (r * R_SUN_M) ** 2 * 100.0)
    mass = np.interp(8.556, logg, masses)
    assert mass == pytest.approx(0.98, abs=0.03)


def test_phase_separation_delay(default_models):
    """C/O phase separation on crystallization delays the cooling by ~1.5 Gyr for 0.6-0.8 Msun at the
    faint end (maximum delay; Chabrier et al. 2000, ApJ 543, 216, abstract: ~1.0 Gyr for 0.5 and 1.2
    Msun, ~1.5 Gyr for 0.6-0.8 Msun). Measured once the core is mostly solid (log L = -4.6 for 0.6 Msun,
    ~90 % crystallized); tolerance +-50 %: our redistribution mixes instantly and completely (an upper
    bound on its efficiency) while their profiles are stratified, so only the order of magnitude is fair."""
    off = _grid_with(default_models, phase_separation=False)
    on = default_models["H"]["cooling"]
    delay = float(on.age_yr(0.6, -4.6)[0] - off.age_yr(0.6, -4.6)[0])
    assert 0.75e9 < delay < 2.25e9, delay / 1e9


def test_ne22_settling_delay_by_complete_crystallization(default_models):
    """22Ne settling slows the cooling by 0.25-1.6 Gyr by the time the star has completely
    crystallized, depending on mass and the sedimentation rate (Deloye & Bildsten 2002, ApJ 580,
    1077, abstract); the delay is minor for 0.6 Msun and considerably larger for ~1.0 Msun
    (Garcia-Berro et al. 2008, ApJ 677, 473, abstract). Measured at log L = -5.3, where both tracks
    are over 90 % solid: the published range itself, and the mass ordering."""
    off = _grid_with(default_models, ne22_sedimentation=False)
    on = default_models["H"]["cooling"]
    delays = []
    for mass in (0.6, 1.0):
        q = on.interpolate("crystallized_fraction", np.array([mass]), np.array([-5.3]))
        assert float(q[0]) > 0.9
        delays.append(float(on.age_yr(mass, -5.3)[0] - off.age_yr(mass, -5.3)[0]))
    assert all(0.25e9 < d < 1.6e9 for d in delays), delays
    assert delays[0] < delays[1], delays


def test_grey_boundary_flag_follows_the_published_limits(default_models):
    """Detailed (non-grey) outer boundary conditions become relevant below Teff = 5,800 K for 0.60 Msun
    and 6,100 K for 0.90 Msun (Rohrmann et al. 2012, A&A 546, A119, abstract). The table's flag must
    switch on at those temperatures: rows between 5,800 and 6,100 K are flagged at 0.9 Msun and not at
    0.6 Msun."""
    from cinderclock.cooling.table import grey_boundary_teff_k

    assert grey_boundary_teff_k(0.6) == pytest.approx(5800.0)
    assert grey_boundary_teff_k(0.9) == pytest.approx(6100.0)
    t = default_models["H"]["table"]
    band = (t["teff_k"] > 5850.0) & (t["teff_k"] < 6050.0)
    at06, at09 = band & np.isclose(t["mass_msun"], 0.6), band & np.isclose(t["mass_msun"], 0.9)
    assert at06.sum() > 0 and at09.sum() > 0
    assert (t.loc[at06, "grey_boundary"] == 0).all()
    assert (t.loc[at09, "grey_boundary"] == 1).all()
    assert (t.loc[np.isclose(t["mass_msun"], 0.6) & (t["teff_k"] < 5750.0), "grey_boundary"] == 1).all()
