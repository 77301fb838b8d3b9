"""Total ages: cooling age + progenitor lifetime from IFMR and lifetime formula, with flags.

Expected values are built from the section 7 D values of /work/shared/reference-values.md
(Cummings et al. 2018 MIST: Mf = 0.649 <- Mi = 2; Hurley et al. 2000: t_MS(2) = 1164 Myr).
"""

import numpy as np
import pytest

from cinderclock.errors import ConfigError
from cinderclock.progenitor.total_age import (AGE_OF_UNIVERSE_YR, FLAG_IFMR_RANGE, FLAG_LIFETIME_UNCERTAIN,
                                              FLAG_OLDER_THAN_UNIVERSE, models, total_age)


def test_total_age_at_published_points():
    out = total_age([0.649, 0.745], [1.0e9, 2.0e9], lifetime={"formulae": "hurley2000", "until": "main_sequence"})
    assert out["initial_mass_msun"] == pytest.approx([2.0, 3.0], abs=1e-5)
    # 1 Gyr + 1164 Myr; 2 Gyr + 377.5 Myr (rounded D values; tolerance 0.5 Myr)
    assert out["total_age_yr"] == pytest.approx([2.164e9, 2.3775e9], abs=0.5e6)
    assert list(out["flags"]) == [0, 0]


def test_flags():
    mf = np.array([0.50, 0.56, 0.60, 0.70])
    out = total_age(mf, np.full(4, 1e9), final_mass_err_msun=np.full(4, 0.02))
    f = out["flags"]
    assert f[0] & FLAG_IFMR_RANGE and np.isnan(out["total_age_yr"][0])
    # Mi = (0.56 - 0.489) / 0.080 = 0.8875 Msun < 1 Msun: lifetime too uncertain and > age of Universe
    assert out["initial_mass_msun"][1] == pytest.approx(0.8875, abs=1e-9)
    assert f[1] & FLAG_LIFETIME_UNCERTAIN and f[1] & FLAG_OLDER_THAN_UNIVERSE
    assert out["total_age_yr"][1] > AGE_OF_UNIVERSE_YR
    # Mi = 1.3875: a 0.02 Msun mass error moves Mi by 0.25 Msun, i.e. the lifetime by > 50 %
    assert f[2] & FLAG_LIFETIME_UNCERTAIN
    assert f[3] == 0 and out["progenitor_lifetime_err_yr"][3] < 0.5 * out["progenitor_lifetime_yr"][3]


def test_age_of_universe_matches_astropy_planck18():
    # Planck 2018 cosmology as shipped by astropy (Planck Collaboration 2020, A&A 641, A6).
    from astropy.cosmology import Planck18

    assert AGE_OF_UNIVERSE_YR == pytest.approx(Planck18.age(0).to_value("yr"), rel=1e-3)


def test_choices_and_provenance():
    a = total_age([0.7], [1e9], ifmr="catalan2008", lifetime="rule_of_thumb")
    mi = (0.7 - 0.318) / 0.137        # above 0.096 * 2.7 + 0.429 = 0.688: second segment
    assert a["total_age_yr"][0] == pytest.approx(1e9 + 1e10 * mi**-2.5, rel=1e-12)
    refs = [m["reference"] for m in models("catalan2008", "rule_of_thumb")]
    assert any("Catalan" in r for r in refs) and any("Hansen" in r for r in refs)
    with pytest.raises(ConfigError):
        total_age([0.7], [1e9], metallicity=0.05)         # outside Z = 1e-4 to 0.03 (Hurley et al. 2000)
