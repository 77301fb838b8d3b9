"""Core compositions of white dwarfs: mixtures of fully ionised nuclei and their mean quantities.

A composition is a tuple of ``(Z, A, mass_fraction)``. Derived quantities, shared by the structure
(mass-radius) and cooling models:

* electrons per atomic mass unit ``Y_e = sum(X_i Z_i / A_i)`` and ``mu_e = 1 / Y_e``;
* ``abar = 1 / sum(X_i / A_i)`` (number-averaged mass number) and ``zbar = abar Y_e`` (number-
  averaged charge), the variables of the Itoh et al. (1996) neutrino fits;
* the number-weighted ``<Z^(5/3)>`` of the linear-mixing rule for the Coulomb energy (common
  practice), the effective lattice charge ``Z_eff = (<Z^(5/3)> / <Z>)^(3/2)`` (6.98 for C/O 50:50),
  and ``<Z^2 / A>`` for the ion plasma frequency.

Integer mass numbers are used, so every N = Z nucleus gives exactly mu_e = 2 (true atomic masses
would change it by < 0.1 %). The offered cores (mass fractions, our defaults):

* ``C``, ``O`` - pure carbon-12, pure oxygen-16;
* ``CO`` - 50:50 by mass. Real cores are oxygen-rich in the centre (roughly 60-80 % O;
  unverified, see the README's constants table) and vary with progenitor mass and the 12C(alpha,gamma) rate; 50:50 is a conventional
  round choice (common practice);
* ``He`` - pure helium-4 (binary-evolution products below about 0.45 Msun);
* ``ONe`` - O:Ne:Mg = 0.60:0.30:0.10 by mass (a typical carbon-burning ash; proportions unverified, see the
  README's constants table).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import ConfigError


@dataclass(frozen=True)
class CoreComposition:
    """A mixture of fully ionised nuclei.

    Parameters
    ----------
    key : str
        Name used in configuration files.
    species : tuple of (float, float, float)
        ``(Z, A, mass_fraction)`` of each nucleus; the mass fractions must sum to 1.
    note : str
        Where the proportions come from.
    """

    key: str
    species: tuple
    note: str = ""

    def __post_init__(self):
        total = sum(x for _, _, x in self.species)
        if not np.isclose(total, 1.0, rtol=0, atol=1e-9):
            raise ValueError(f"core composition {self.key!r}: mass fractions sum to {total}, not 1")

    @property
    def name(self):
        """Same as :attr:`key`."""
        return self.key

    @property
    def _arrays(self):
        z, a, x = (np.array(v, dtype=float) for v in zip(*self.species))
        return z, a, x

    @property
    def ions_per_mu(self):
        """sum(X_i / A_i): ions per atomic mass unit of matter."""
        z, a, x = self._arrays
        return float(np.sum(x / a))

    @property
    def abar(self):
        """Number-averaged mass number of the ions, 1 / sum(X_i / A_i)."""
        return 1.0 / self.ions_per_mu

    mean_mass_number = abar

    @property
    def ye(self):
        """Electrons per atomic mass unit, sum(X_i Z_i / A_i)."""
        z, a, x = self._arrays
        return float(np.sum(x * z / a))

    @property
    def zbar(self):
        """Number-averaged ion charge, abar * Y_e."""
        return self.abar * self.ye

    mean_charge = zbar

    @property
    def mu_e(self):
        """Mean molecular weight per electron, 1 / Y_e."""
        return 1.0 / self.ye

    def _number_fractions(self):
        z, a, x = self._arrays
        n = x / a
        return z, a, n / n.sum()

    @property
    def z53(self):
        """Number-weighted mean of Z^(5/3) (linear-mixing Coulomb coupling)."""
        z, a, f = self._number_fractions()
        return float(np.sum(f * z ** (5.0 / 3.0)))

    @property
    def coulomb_charge(self):
        """Effective Z of the lattice term, (<Z^(5/3)> / <Z>)^(3/2) (linear mixing)."""
        return (self.z53 / self.zbar) ** 1.5

    @property
    def z2_over_a(self):
        """Number-weighted mean of Z^2 / A (sets the ion plasma frequency)."""
        z, a, f = self._number_fractions()
        return float(np.sum(f * z**2 / a))

    def as_dict(self):
        """Plain description for provenance."""
        return {"name": self.key, "nuclei_Z_A_massfraction": [list(t) for t in self.species], "mu_e": self.mu_e,
                "coulomb_charge": self.coulomb_charge, "mean_mass_number": self.abar, "note": self.note}


#: Core compositions by configuration key (mass fractions).
CORES = {
    "C": CoreComposition("C", ((6.0, 12.0, 1.0),), "pure carbon-12"),
    "O": CoreComposition("O", ((8.0, 16.0, 1.0),), "pure oxygen-16"),
    "CO": CoreComposition("CO", ((6.0, 12.0, 0.5), (8.0, 16.0, 0.5)),
                          "C:O = 50:50 by mass (conventional round choice, common practice)"),
    "He": CoreComposition("He", ((2.0, 4.0, 1.0),), "pure helium-4"),
    "ONe": CoreComposition("ONe", ((8.0, 16.0, 0.60), (10.0, 20.0, 0.30), (12.0, 24.0, 0.10)),
                           "O:Ne:Mg = 0.60:0.30:0.10 by mass (typical carbon-burning ash; proportions unverified)"),
}


def core_composition(core):
    """Return the :class:`CoreComposition` for a key of :data:`CORES`, or pass one through."""
    if isinstance(core, CoreComposition):
        return core
    try:
        return CORES[core]
    except KeyError:
        raise ConfigError(f"unknown core composition {core!r}; choose one of {', '.join(sorted(CORES))}") from None
