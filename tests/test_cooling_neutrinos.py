"""Thermal neutrino emissivities (Itoh et al. 1996 fits) against an independent implementation.

Reference: pynucastro 3.1.0 (PyPI), ``pynucastro.neutrino_cooling.sneut5``, which implements the
same fits of Itoh, Hayashi, Nishikawa & Kohyama (1996, ApJS 102, 411). The tabulated check values
are marked D in /work/shared/reference-values.md, section 6.
"""

import numpy as np
import pytest

from cinderclock.cooling import neutrinos as nu

# (rho g cm^-3, T K, abar, zbar, total erg g^-1 s^-1, plasma part or None)
# Source: reference-values.md section 6 (pynucastro 3.1.0 sneut5 outputs, status D).
# Tolerance 1 %: the values are quoted to 4 significant figures and the fits are the same.
SECTION6_POINTS = [
    (1e6, 1e7, 12.0, 6.0, 3.665e-7, 7.42e-9),       # bremsstrahlung dominates
    (1e6, 2e7, 12.0, 6.0, 5.685e-4, 5.441e-4),
    (1e6, 3e7, 12.0, 6.0, 2.792e-2, 2.763e-2),
    (3e6, 3e7, 12.0, 6.0, 6.035e-3, None),
    (1e7, 5e7, 12.0, 6.0, 0.1896, None),
    (1e6, 1e8, 12.0, 6.0, 29.71, 29.23),
    (1e6, 3e7, 13.714, 6.857, 2.796e-2, None),      # C/O 50:50 by mass
    (1e6, 1e8, 13.714, 6.857, 29.76, None),
]


@pytest.mark.parametrize("rho, t, abar, zbar, total, plasma", SECTION6_POINTS)
def test_section6_check_values(rho, t, abar, zbar, total, plasma):
    comps = nu.emissivity_components(rho, t, abar, zbar)
    assert sum(comps.values()) == pytest.approx(total, rel=0.01)
    if plasma is not None:
        assert comps["plasma"] == pytest.approx(plasma, rel=0.01)


def test_against_pynucastro_over_a_grid():
    """Every process against pynucastro's sneut5 over the white-dwarf range of rho and T.

    Same fits, so agreement is expected to rounding: the only difference is that we compute the
    plasma coupling factor (0.931531) from sin^2 theta_W where sneut5 writes 0.93153, a 1.4e-6
    relative change. Tolerance 1e-5 relative (per process, plus an absolute floor of 1e-12 of the
    total for processes that vanish).
    """
    sneut5 = pytest.importorskip("pynucastro.neutrino_cooling").sneut5
    names = {"pair": "spair", "photo": "sphot", "plasma": "splas", "bremsstrahlung": "sbrem",
             "recombination": "sreco"}
    rho = 10.0 ** np.array([2.0, 4.0, 5.5, 6.0, 6.5, 7.0, 8.0, 9.0])
    temp = 10.0 ** np.array([7.0, 7.3, 7.6, 8.0, 8.4, 8.8, 9.2, 9.7])
    for abar, zbar in [(12.0, 6.0), (13.714, 6.857), (16.0, 8.0), (4.0, 2.0)]:
        r2, t2 = np.meshgrid(rho, temp)
        ours = nu.emissivity_components(r2, t2, abar, zbar)
        for (i, j), r in np.ndenumerate(r2):
            total, ref = sneut5(r, t2[i, j], abar=abar, zbar=zbar, full_output=True)
            for ours_name, ref_name in names.items():
                expected = getattr(ref, ref_name)
                got = ours[ours_name][i, j]
                assert abs(got - expected) <= 1e-5 * abs(expected) + 1e-12 * total, \
                    (ours_name, r, t2[i, j], abar, got, expected)


def test_zero_below_fit_range_and_vectorised_shape():
    # The fits start at 1e7 K (Itoh et al. 1996); below it the emissivity is defined as zero.
    rho = np.full((3, 4), 1e6)
    t = np.array([5e6, 9.99e6, 1e7, 2e7])[None, :] * np.ones((3, 1))
    out = nu.emissivity_erg_g_s(rho, t, 12.0, 6.0)
    assert out.shape == (3, 4)
    assert np.all(out[:, :2] == 0.0)
    assert np.all(out[:, 2:] > 0.0)


def test_plasma_coupling_constant():
    # Itoh et al. (1996) write C_V^2 + (n - 1) C_V'^2 = 0.93153 for sin^2 theta_W = 0.2319, n = 3.
    assert nu.Q_PLASMA == pytest.approx(0.93153, abs=5e-6)


def test_inverse_fermi_half_round_trip():
    """Antia (1993) inverse against a direct quadrature of the Fermi-Dirac integral.

    Antia's normalisation: F_1/2(eta) = int_0^inf sqrt(x) / (1 + exp(x - eta)) dx. Tolerance 1e-6
    in eta (Antia quotes a relative error below 4.2e-9 for the approximation).
    """
    from scipy.integrate import quad

    for eta in (-10.0, -2.0, 0.0, 1.5, 5.0, 20.0):
        f = quad(lambda x: np.sqrt(x) / (1.0 + np.exp(min(x - eta, 700.0))), 0, np.inf, limit=200)[0]
        assert nu.inverse_fermi_half(f) == pytest.approx(eta, abs=1e-6)
