"""C/O phase separation on crystallization: phase diagram, freezing sequence and the energy released.

Phase diagram
    Computed, once per process, by the method of Medin & Cumming (2010, PRE 81, 036107, their
    section II): per ion, relative to the linear-mixing solid,

        liquid:  g_l(x) = (1 - x) Delta f(Gamma_C) + x Delta f(Gamma_O) + s_mix(x),
        solid:   g_s(x) = Gamma_C x (1 - x) C(R) / [1 + 27 (R-1) sqrt(x)(sqrt(x)-0.3)(sqrt(x)-0.7)
                          (sqrt(x)-1) / (1 + 0.1 (R-1))] + s_mix(x),

    with x the O number fraction, R = Z_O / Z_C, Gamma_i = Z_i^(5/3) Gamma_e, Delta f = f_liquid - f_solid
    of the one-component plasma (:func:`cinderclock.cooling.ocp.free_energy_difference`, so that
    pure C melts at our Gamma_m), the solid's deviation from linear mixing of Ogata et al. (1993,
    PRE 48, 1344; fit as given by Medin & Cumming), C(R) = 0.05 (R-1)^2 / [(1 + 0.64 (R-1))(1 + 0.5 (R-1)^2)],
    and the ideal mixing entropy s_mix = (1-x) ln[(1-x)/(1-x+xR)] + x ln[xR/(1-x+xR)]. The
    coexisting liquid and solid compositions are the tie lines of the lower convex hull of
    min(g_l, g_s) at each Gamma_C. The result has the published shape (solid enriched in O, an
    azeotrope at low O fraction; Horowitz, Schneider & Berry 2010, PRL 104, 231101).

Freezing sequence (per white dwarf)
    Shells freeze from the centre outward. The solid takes the composition x_s(x_l) of the liquid at
    the front; the O-depleted (lighter) liquid left behind is mixed by Rayleigh-Taylor convection
    upward until it meets liquid of the same or lower O fraction (convective adjustment on the
    shell grid). Each shell's freezing temperature is the liquidus temperature of its liquid
    composition at that moment, made monotone (the front cannot jump ahead).

Energy released
    The method of Isern et al. (1997, ApJ 485, 308; Isern et al. 2000, ApJ 528, 397): to first order
    the energy of the star changes by dE = int (du/dX_O)_rho dX_O dm when the composition changes at
    fixed mass coordinate (the structure readjusts at no first-order cost, hydrostatic equilibrium
    being an extremum of the energy). With equal Y_e = 1/2 for C and O, u depends on X_O through the
    Coulomb energy, -C_M (e^2/a_e) sum_i X_i Z_i^(5/3) / (A_i m_u) (linear mixing), so the energy
    released by moving O inward is

        Delta E = C_M s' sum_shells (e^2 / a_e(rho)) / m_u Delta X_O dm,   s' = 8^(5/3)/16 - 6^(5/3)/12.

Cautions
    Fixed zero-temperature density profile; the mixing is instantaneous and complete (an upper bound
    on the efficiency, as noted by the authors of the published treatments); the phase diagram uses
    linear mixing in the liquid (Medin & Cumming) rather than the newer Monte Carlo diagrams; only
    C/O mixtures separate (O/Ne and 22Ne distillation are not modelled).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..constants import E_CHARGE_SI, EPS0_SI, K_B_SI, M_U_SI
from ..relation import PublishedRelation
from . import ocp
from .coreprofile import oxygen_mass_fraction_from_number, oxygen_number_fraction

Z_C, Z_O = 6.0, 8.0
A_C, A_O = 12.0, 16.0

MEDIN_CUMMING_2010 = PublishedRelation(
    key="medin_cumming_2010_phase_diagram",
    reference="Medin, Z. & Cumming, A. 2010, PRE 81, 036107 (phase diagram of two-component plasmas from "
              "liquid and solid free energies); solid deviation from linear mixing: Ogata, S. et al. 1993, "
              "PRE 48, 1344; compared with Horowitz, C. J., Schneider, A. S. & Berry, D. K. 2010, PRL 104, 231101")
ISERN_1997 = PublishedRelation(
    key="isern_1997_separation_energy",
    reference="Isern, J., Mochkovitch, R., Garcia-Berro, E. & Hernanz, M. 1997, ApJ 485, 308; Isern, J. et al. "
              "2000, ApJ 528, 397 (energy released by the redistribution of C and O on crystallization)")


def _mixing_entropy(x, rz):
    x1 = 1.0 - x
    d = x1 + x * rz
    return x1 * np.log(x1 / d) + x * np.log(x * rz / d)


def _solid_deviation(gamma_c, x, rz):
    """Ogata et al. (1993) deviation of the solid free energy from linear mixing (k T per ion)."""
    r1 = rz - 1.0
    sx = np.sqrt(x)
    c = 0.05 * r1**2 / ((1.0 + 0.64 * r1) * (1.0 + 0.5 * r1**2))
    den = 1.0 + 27.0 * r1 * sx * (sx - 0.3) * (sx - 0.7) * (sx - 1.0) / (1.0 + 0.1 * r1)
    return gamma_c * x * (1.0 - x) * c / den


@lru_cache(maxsize=4)
def phase_diagram(z1=Z_C, z2=Z_O, n_x=1501, n_gamma=260):
    """Liquidus of a two-component plasma: liquid fraction x_l, Gamma_1 at the liquidus, solid x_s.

    Returns
    -------
    tuple of numpy.ndarray
        ``(x_liquid, gamma1_liquidus, x_solid)`` sorted by ``x_liquid`` (number fraction of species 2,
        the higher charge), where Gamma_1 = Z_1^(5/3) Gamma_e.
    """
    from scipy.spatial import ConvexHull

    rz = z2 / z1
    gm = ocp.melting_gamma()
    x = np.linspace(0.0, 1.0, n_x)[1:-1]
    gammas = np.linspace(0.97 * gm / rz ** (5.0 / 3.0), 1.03 * gm, n_gamma)
    smix = _mixing_entropy(x, rz)
    rows = []
    for g1 in gammas:
        gl = (1.0 - x) * ocp.free_energy_difference(g1) + x * ocp.free_energy_difference(g1 * rz ** (5.0 / 3.0)) + smix
        gs = _solid_deviation(g1, x, rz) + smix
        pts = np.concatenate([np.column_stack([x, gl]), np.column_stack([x, gs])])
        hull = ConvexHull(pts)
        lower = hull.equations[:, 1] < 0
        for i, j in hull.simplices[lower]:
            li, lj = i < x.size, j < x.size
            if li != lj:
                il, is_ = (i, j) if li else (j, i)
                rows.append((pts[il, 0], g1, pts[is_, 0]))
    rows = np.array(sorted(rows))
    # pure-species limits: each melts at its own Gamma_m
    xl = np.concatenate([[0.0], rows[:, 0], [1.0]])
    g = np.concatenate([[gm], rows[:, 1], [gm / rz ** (5.0 / 3.0)]])
    xs = np.concatenate([[0.0], rows[:, 2], [1.0]])
    _, keep = np.unique(xl, return_index=True)
    return xl[keep], g[keep], xs[keep]


def liquidus(x_o_liquid):
    """Gamma_C at the liquidus and the coexisting solid O number fraction for liquid O fraction(s)."""
    xl, g, xs = phase_diagram()
    x = np.asarray(x_o_liquid, dtype=float)
    return np.interp(x, xl, g), np.interp(x, xl, xs)


def electron_coupling_coefficient(ye=0.5):
    """k in Gamma_e = e^2 / (a_e k_B T) = k (rho / g cm^-3)^(1/3) / (T / K)."""
    n_e_per_rho = ye / M_U_SI * 1000.0
    return E_CHARGE_SI**2 / (4.0 * np.pi * EPS0_SI * K_B_SI) * (4.0 * np.pi * n_e_per_rho / 3.0) ** (1.0 / 3.0)


def separation_energy_per_gram(rho_cgs, ye=0.5):
    """-(du/dX_O)_rho in erg g^-1 per unit O mass fraction (linear-mixing Coulomb energy)."""
    s_prime = Z_O ** (5.0 / 3.0) / A_O - Z_C ** (5.0 / 3.0) / A_C
    e2_over_ae_j = electron_coupling_coefficient(ye) * K_B_SI * np.cbrt(np.asarray(rho_cgs, dtype=float))
    return ocp.MADELUNG_BCC * s_prime * e2_over_ae_j / M_U_SI * 1e4      # J/kg -> erg/g


def freezing_sequence(rho_shell, x_o_mass, weight, separate=True, gamma_melt=None):
    """Freezing temperature, solid composition and separation energy of each shell of one star.

    Parameters
    ----------
    rho_shell : (n_shell,) array
        Mid-shell densities (g cm^-3), decreasing outward.
    x_o_mass : (n_shell,) array
        Initial O mass fraction of each shell.
    weight : (n_shell,) array
        Mass fraction of each shell (0 for ignored shells).
    separate : bool
        Apply the phase diagram and the mixing; False freezes every shell at its own composition at
        the linear-mixing coupling <Z^(5/3)> Gamma_e = Gamma_m.
    gamma_melt : float, optional
        Gamma_m of the one-component plasma for ``separate=False`` (default :func:`ocp.melting_gamma`).

    Returns
    -------
    dict
        ``t_freeze_k`` (monotone non-increasing), ``x_o_solid`` (mass fraction), ``x_o_liquid``
        (mass fraction of the liquid at the front when the shell froze), ``energy_per_mass``
        (separation energy released when each shell freezes, erg per gram of the star).
    """
    rho = np.asarray(rho_shell, dtype=float)
    w = np.asarray(weight, dtype=float)
    x = np.clip(np.asarray(x_o_mass, dtype=float).copy(), 0.0, 1.0)
    n = rho.size
    coef = electron_coupling_coefficient(0.5) * np.cbrt(rho)          # Gamma_e T
    if not separate:
        gm = ocp.melting_gamma() if gamma_melt is None else float(gamma_melt)
        xn = oxygen_number_fraction(x)
        z53 = (1.0 - xn) * Z_C ** (5.0 / 3.0) + xn * Z_O ** (5.0 / 3.0)
        t_f = np.minimum.accumulate(coef * z53 / gm)
        return {"t_freeze_k": t_f, "x_o_solid": x.copy(), "x_o_liquid": x.copy(),
                "energy_per_mass": np.zeros(n)}
    phi = separation_energy_per_gram(rho)
    t_f = np.empty(n)
    x_sol = np.empty(n)
    x_liq = np.empty(n)
    d_e = np.zeros(n)
    for k in range(n):
        x_liq[k] = x[k]
        g_c, xs_n = liquidus(oxygen_number_fraction(x[k]))
        t_f[k] = coef[k] * Z_C ** (5.0 / 3.0) / g_c
        xs = float(oxygen_mass_fraction_from_number(xs_n))
        x_sol[k] = xs
        if w[k] <= 0.0 or k + 1 >= n or w[k + 1] <= 0.0:
            x[k] = xs
            continue
        before = x[k:].copy()
        gained = (xs - x[k]) * w[k]
        x[k] = xs
        x[k + 1] = min(max(x[k + 1] - gained / w[k + 1], 0.0), 1.0)
        j, tot, wt = k + 1, x[k + 1] * w[k + 1], w[k + 1]
        while j + 1 < n and w[j + 1] > 0.0 and tot / wt < x[j + 1]:
            j += 1
            tot += x[j] * w[j]
            wt += w[j]
        x[k + 1:j + 1] = tot / wt
        d_e[k] = np.sum(phi[k:] * (x[k:] - before) * w[k:])
    return {"t_freeze_k": np.minimum.accumulate(t_f), "x_o_solid": x_sol, "x_o_liquid": x_liq,
            "energy_per_mass": d_e}
