"""Kramers-envelope relation L = f C M T_c^(7/2) and its calibration.

Source: /work/shared/reference-values.md section 4 (Shapiro & Teukolsky 1983, section 4.1;
re-derived constant 5.79e5 mu / (mu_e^2 Z (1 + X)), status M/D).
"""

import numpy as np
import pytest

from cinderclock.cooling import mestel
from cinderclock.cooling.envelope import ENVELOPES, calibration_for_coefficient, envelope_model


def test_helium_preset_matches_shapiro_teukolsky():
    # Section 4: L ~ 2e6 (M/Msun) T^3.5 erg/s for X = 0, Z = 0.1, mu = 1.4; the re-derived
    # constant 5.79e5 * 1.4 / (4 * 0.1) = 2.03e6. Tolerance 5 % as listed.
    c = ENVELOPES["He"].constant_cgs()
    assert c == pytest.approx(5.79e5 * 1.4 / (2.0**2 * 0.1 * 1.0), rel=0.05)
    assert c == pytest.approx(mestel.envelope_constant_cgs(), rel=1e-12)   # same physics as mestel.py


def test_envelope_relation_round_trip_and_slope():
    env = envelope_model("H")
    log_tc = np.linspace(5, 8, 7)
    ll = env.log_lum(0.6, log_tc)
    assert np.allclose(np.diff(ll) / np.diff(log_tc), 3.5)            # L proportional to T_c^(7/2)
    assert np.allclose(env.log_tc(0.6, ll), log_tc)
    # hydrogen preset: Kramers opacity ~ Z (1 + X), constant ~ mu / kappa0 (Mestel's derivation)
    ratio = env.constant_cgs() / ENVELOPES["He"].constant_cgs()
    expected = (env.mu / 1.4) / (env.Z * (1 + env.X) / 0.1)
    assert ratio == pytest.approx(expected, rel=1e-10)


def test_calibration_reproduces_a_published_coefficient():
    # Published Mestel coefficient 8.8e6 yr (Althaus et al. 2010, from memory; section 4, M):
    # the calibration factor makes mestel.age_coefficient_yr return it (exact algebra, rel 1e-10).
    f = calibration_for_coefficient(8.8e6, "He", ion_mass_number=12.0)
    c = envelope_model("He", calibration=f).constant_cgs()
    assert mestel.age_coefficient_yr(12.0, envelope_cgs=c) == pytest.approx(8.8e6, rel=1e-10)
    # Section 4 (D): C = 2e6 and A = 12 give 4.27e6 yr (rel 1e-3)
    assert mestel.age_coefficient_yr(12.0, envelope_cgs=2e6) == pytest.approx(4.27e6, rel=1e-3)
