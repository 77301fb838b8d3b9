"""Composition of the core shell by shell: the oxygen-rich centre of C/O white dwarfs.

Helium burning in the progenitor leaves an oxygen-rich centre (the convective core of central
helium burning, where 12C(alpha,gamma)16O runs longest) inside a carbon-richer mantle (built by the
helium-burning shell). We use a documented profile of the oxygen mass fraction against the
enclosed mass fraction q = m/M:

    X_O(q) = X_c                                  for q <= q_1,
             X_c + (X_out - X_c) (1 - cos(pi s))/2,  s = (q - q_1)/(q_2 - q_1), for q_1 < q < q_2,
             X_out                                for q >= q_2,

and X_C = 1 - X_O. Defaults X_c = 0.70, q_1 = 0.45, q_2 = 0.80, X_out = 0.30 (mass-averaged
X_O = 0.55), shaped after the published chemical profiles of 0.5-1.0 Msun C/O white dwarfs of
Salaris et al. (1997, ApJ 486, 413, their figure of the internal C/O profiles; the numbers are our
reading from memory, not a fit).

What is approximated
    * one profile for every mass (the published central X_O falls slowly with mass and depends on
      the 12C(alpha,gamma) rate and on convective overshooting by +-0.1);
    * the outer helium and hydrogen layers (< 1e-2 of the mass) are treated as C/O;
    * 22Ne (mass fraction ~ Z) is a trace: it enters only the sedimentation heating
      (:mod:`~cinderclock.cooling.sedimentation`), not the heat capacity or the coupling.

Other cores (``C``, ``O``, ``He``, ``ONe``) and ``stratified=False`` give a uniform composition.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np

from .composition import core_composition

_C, _O = (6.0, 12.0), (8.0, 16.0)


@dataclass(frozen=True)
class OxygenProfile:
    """Oxygen mass fraction of a C/O core against the enclosed mass fraction (see module docstring).

    Parameters
    ----------
    x_o_centre, x_o_outer : float
        Oxygen mass fraction inside ``q_inner`` and outside ``q_outer``.
    q_inner, q_outer : float
        Enclosed mass fractions where the decline from the centre value starts and ends.
    """

    x_o_centre: float = 0.70
    q_inner: float = 0.45
    q_outer: float = 0.80
    x_o_outer: float = 0.30

    def __post_init__(self):
        if not (0.0 <= self.q_inner < self.q_outer <= 1.0):
            raise ValueError("oxygen profile: need 0 <= q_inner < q_outer <= 1")
        if not (0.0 <= self.x_o_centre <= 1.0 and 0.0 <= self.x_o_outer <= 1.0):
            raise ValueError("oxygen profile: mass fractions must lie in [0, 1]")

    def oxygen_mass_fraction(self, q):
        """X_O at enclosed mass fraction(s) ``q`` (0 at the centre, 1 at the surface)."""
        q = np.asarray(q, dtype=float)
        s = np.clip((q - self.q_inner) / (self.q_outer - self.q_inner), 0.0, 1.0)
        return self.x_o_centre + (self.x_o_outer - self.x_o_centre) * 0.5 * (1.0 - np.cos(np.pi * s))

    def mean_oxygen_mass_fraction(self):
        """Mass-averaged X_O of the profile."""
        q = (np.arange(20000) + 0.5) / 20000
        return float(np.mean(self.oxygen_mass_fraction(q)))

    def as_dict(self):
        """Provenance entry."""
        return {**asdict(self), "reference": "shaped after Salaris, M. et al. 1997, ApJ 486, 413 "
                "(internal C/O profiles; UNVERIFIED: not read off the paper's figures, not a fit)"}


#: Default C/O stratification.
DEFAULT_OXYGEN_PROFILE = OxygenProfile()


@dataclass(frozen=True)
class ShellMixture:
    """Species and their mass fractions in each shell.

    Attributes
    ----------
    z, a : (n_species,) arrays
        Charge and mass numbers.
    mass_fractions : (..., n_shell, n_species) array
    is_co : bool
        True for a two-species C/O mixture (phase separation applies).
    """

    z: np.ndarray
    a: np.ndarray
    mass_fractions: np.ndarray
    is_co: bool

    @property
    def ions_per_mu(self):
        """sum X_i / A_i per shell: ions per atomic mass unit."""
        return np.sum(self.mass_fractions / self.a, axis=-1)

    @property
    def ye(self):
        """Electrons per atomic mass unit per shell."""
        return np.sum(self.mass_fractions * self.z / self.a, axis=-1)

    def number_fractions(self):
        """Ion number fractions, shape of ``mass_fractions``."""
        n = self.mass_fractions / self.a
        return n / np.sum(n, axis=-1, keepdims=True)

    @property
    def abar(self):
        return 1.0 / self.ions_per_mu

    @property
    def zbar(self):
        return self.abar * self.ye


def oxygen_number_fraction(x_o_mass):
    """O number fraction of a C/O mixture from its O mass fraction."""
    x = np.asarray(x_o_mass, dtype=float)
    n_o, n_c = x / _O[1], (1.0 - x) / _C[1]
    return n_o / (n_o + n_c)


def oxygen_mass_fraction_from_number(x_o_number):
    """O mass fraction of a C/O mixture from its O number fraction."""
    x = np.asarray(x_o_number, dtype=float)
    m_o, m_c = x * _O[1], (1.0 - x) * _C[1]
    return m_o / (m_o + m_c)


def shell_mixture(core, q_shell, stratified=True, profile=DEFAULT_OXYGEN_PROFILE):
    """Composition of shells at enclosed mass fractions ``q_shell`` (any shape).

    Parameters
    ----------
    core : str or CoreComposition
        Core key; only ``"CO"`` (or any two-species C/O composition) is stratified.
    q_shell : array_like
        Mid-shell enclosed mass fractions.
    stratified : bool
        Use ``profile`` for C/O; False keeps the core's uniform proportions.
    profile : OxygenProfile
    """
    comp = core_composition(core)
    z, a, x = (np.array(v, dtype=float) for v in zip(*comp.species))
    q = np.asarray(q_shell, dtype=float)
    is_co = len(z) == 2 and set(zip(z, a)) == {_C, _O}
    if is_co and stratified:
        xo = profile.oxygen_mass_fraction(q)
        i_o = int(np.argmax(z))
        frac = np.empty(q.shape + (2,))
        frac[..., i_o], frac[..., 1 - i_o] = xo, 1.0 - xo
    else:
        frac = np.broadcast_to(x, q.shape + (len(z),)).copy()
    return ShellMixture(z=z, a=a, mass_fractions=frac, is_co=is_co)
