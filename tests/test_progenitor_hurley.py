"""Hurley, Pols & Tout (2000) pre-white-dwarf lifetimes at several metallicities, phase by phase.

Reference: cosmic-popsynth 4.3.3 (PyPI; a general-purpose binary population-synthesis package
built on the same Hurley et al. 2000 formulae), single stars (companion 0.1 Msun at P = 1e9 d)
evolved with the package's default settings and ``zsun = 0.02`` (so zeta = log10(Z/0.02) as in the
paper). Its event table gives the times at which the star enters the Hertzsprung gap (end of the
main sequence), the giant branch (t_BGB), core helium burning (t_HeI), the early AGB (t_BAGB), the
thermally pulsing AGB (t_TP) and the white-dwarf stage (end of the AGB), and the white-dwarf mass.
Values copied from that run's output (Myr). Tolerances: the event times are printed at the end of a
time step, and the package evolves the star with Reimers mass loss, which the closed-form
lifetimes here do not follow (the core growth laws are the same; the star's mass enters the later
phases): 0.05 % for the main sequence and t_BGB (0.2 % at 5 Msun), 0.2 % to helium ignition, 0.5 % for the later
phases at M >= 2 Msun, 1.5 % at 5 Msun (mass loss of 2 % before the AGB there) and for 1-1.5 Msun
(a third of the envelope lost on the giant branch).
"""

import numpy as np
import pytest

from cinderclock.errors import ConfigError
from cinderclock.progenitor.hurley import HurleyFormulae
from cinderclock.progenitor.lifetimes import get_lifetime

# (Z, M, t_MS, t_BGB, t_HeI, t_BAGB, t_TP, t_WD, M_WD) from cosmic-popsynth 4.3.3 (see the docstring)
COSMIC = [
    (0.02, 1.0, 11003.13, 11582.77, 12326.27, 12458.68, 12463.30, 12463.52, 0.46),
    (0.02, 1.5, 2729.25, 2804.16, 2962.61, 3094.14, 3097.99, 3099.29, 0.60),
    (0.02, 2.0, 1164.16, 1173.58, 1196.48, 1489.37, 1494.07, 1495.77, 0.624),
    (0.02, 2.5, 619.37, 623.60, 628.98, 795.20, 799.44, 801.13, 0.645),
    (0.02, 3.0, 377.54, 379.79, 382.21, 473.38, 476.41, 477.56, 0.672),
    (0.02, 5.0, 104.16, 104.59, 104.84, 120.35, 121.13, 121.78, 0.879),
    (0.001, 1.0, 6177.66, 6303.84, 6617.76, 6725.62, 6730.28, 6731.43, 0.46),
    (0.001, 2.0, 789.67, 798.15, 805.56, 963.64, 966.91, 968.25, 0.624),
    (0.001, 3.0, 284.86, 287.07, 287.79, 331.16, 332.76, 333.45, 0.672),
    (0.0001, 1.0, 5918.98, 5978.81, 6180.97, 6297.88, 6302.94, 6304.54, 0.46),
    (0.0001, 1.5, 1630.58, 1647.06, 1688.38, 1790.15, 1794.16, 1796.36, 0.602),
    (0.0001, 2.0, 738.30, 745.76, 749.53, 877.74, 881.14, 882.71, 0.624),
    (0.0001, 3.0, 268.53, 271.01, 271.35, 310.08, 311.64, 312.75, 0.672),
]


@pytest.mark.parametrize("z, m, t_ms, t_bgb, t_hei, t_bagb, t_tp, t_wd, m_wd", COSMIC)
def test_phases_against_population_synthesis_package(z, m, t_ms, t_bgb, t_hei, t_bagb, t_tp, t_wd, m_wd):
    ph = HurleyFormulae(z).phases(np.array([m]), final_mass_msun=np.array([m_wd]))
    late = 0.015 if (m >= 5.0 or m <= 1.5) else 0.005
    early = 2e-3 if m >= 5.0 else 5e-4          # 5 Msun: the package's star loses 0.2 % on the main sequence
    assert ph["t_ms"][0] == pytest.approx(t_ms, rel=early)
    assert ph["t_bgb"][0] == pytest.approx(t_bgb, rel=early)
    assert ph["t_hei"][0] == pytest.approx(t_hei, rel=2e-3)
    assert ph["t_bagb"][0] == pytest.approx(t_bagb, rel=late)
    assert ph["t_tp"][0] == pytest.approx(t_tp, rel=late)
    assert ph["t_agb_end"][0] == pytest.approx(t_wd, rel=late)


def test_z002_main_sequence_matches_reference_values():
    # /work/shared/reference-values.md section 7 (D from C2 coefficients): t_BGB(1) = 11582 Myr,
    # t_MS = 11003 (1), 2729 (1.5), 1164 (2), 377.5 (3), 104.0 (5) Myr; half a unit of the last digit.
    h = HurleyFormulae(0.02)
    assert h.t_bgb(1.0) == pytest.approx(11582, abs=0.5)
    got = h.t_ms(np.array([1.0, 1.5, 2.0, 3.0, 5.0]))
    assert got == pytest.approx([11003, 2729, 1164, 377.5, 104.0], abs=0.5)


def test_metal_poor_stars_live_shorter_and_later_phases_add_up():
    # The paper's Fig. 1-style ordering (common practice): at fixed mass metal-poor stars evolve faster,
    # and the full pre-white-dwarf life exceeds the main-sequence life by 5-25 % for 1-3 Msun.
    m = np.array([1.0, 2.0, 3.0])
    rich, poor = HurleyFormulae(0.02).phases(m, [0.57, 0.65, 0.745]), HurleyFormulae(1e-4).phases(m, [0.57, 0.65, 0.745])
    assert np.all(poor["t_agb_end"] < rich["t_agb_end"])
    for ph in (rich, poor):
        extra = ph["t_agb_end"] / ph["t_ms"] - 1.0
        assert np.all((extra > 0.05) & (extra < 0.35))


def test_metallicity_range_is_data_and_enforced():
    # Hurley et al. 2000: Z = 1e-4 to 0.03.
    rel = get_lifetime({"formulae": "hurley2000", "until": "agb_end"}).relation
    z_range = [r for r in rel.ranges if r.quantity == "metallicity"][0]
    assert (z_range.low, z_range.high) == (1e-4, 0.03)
    with pytest.raises(ConfigError, match="outside the range"):
        HurleyFormulae(0.05)


def test_agb_end_lifetime_needs_the_final_mass():
    life = get_lifetime({"formulae": "hurley2000", "until": "agb_end"})
    t, ok = life.lifetime_yr([2.0], 0.02, [0.624])
    assert ok[0] and t[0] == pytest.approx(1495.77e6, rel=5e-3)      # cosmic-popsynth row above
    with pytest.raises(ConfigError, match="white dwarf's mass"):
        life.lifetime_yr([2.0], 0.02)
