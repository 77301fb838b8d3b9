"""Core compositions of white dwarfs as mixtures of fully ionised nuclei.

A composition is a tuple of ``(Z, A, mass_fraction)``. The derived mean quantities are those the
cooling physics needs:

* ``abar = 1 / sum(X_i / A_i)`` and ``zbar = abar * sum(X_i Z_i / A_i)`` (the variables of the
  Itoh et al. 1996 neutrino fits),
* the electron fraction ``Y_e = sum(X_i Z_i / A_i)`` (``mu_e = 1 / Y_e``),
* ions per unit mass, ``sum(X_i / A_i) / m_u``,
* the number-weighted mean ``<Z^(5/3)>`` that sets the Coulomb coupling of a mixture in the
  linear-mixing rule (common practice), and the plasma-frequency weight ``sum(x_i Z_i^2 / A_i)``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class CoreComposition:
    """A mixture of fully ionised nuclei.

    Parameters
    ----------
    key : str
        Name used in configuration files.
    species : tuple of (float, float, float)
        ``(Z, A, mass_fraction)`` of each nucleus; the mass fractions must sum to 1.
    """

    key: str
    species: tuple

    def __post_init__(self):
        total = sum(x for _, _, x in self.species)
        if not np.isclose(total, 1.0, rtol=0, atol=1e-9):
            raise ValueError(f"core composition {self.key!r}: mass fractions sum to {total}, not 1")

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
        """Mean mass number of the ions, 1 / sum(X_i / A_i)."""
        return 1.0 / self.ions_per_mu

    @property
    def ye(self):
        """Electrons per atomic mass unit, sum(X_i Z_i / A_i)."""
        z, a, x = self._arrays
        return float(np.sum(x * z / a))

    @property
    def zbar(self):
        """Mean ion charge, abar * Y_e."""
        return self.abar * self.ye

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
    def z2_over_a(self):
        """Number-weighted mean of Z^2 / A (sets the ion plasma frequency)."""
        z, a, f = self._number_fractions()
        return float(np.sum(f * z**2 / a))


#: Core compositions offered by the cooling model (mass fractions).
CORES = {
    "C": CoreComposition("C", ((6.0, 12.0, 1.0),)),
    "O": CoreComposition("O", ((8.0, 16.0, 1.0),)),
    "CO": CoreComposition("CO", ((6.0, 12.0, 0.5), (8.0, 16.0, 0.5))),
    "He": CoreComposition("He", ((2.0, 4.0, 1.0),)),
    # O:Ne:Mg 0.60:0.30:0.10 by mass, the same proportions as cinderclock.massradius.composition
    "ONe": CoreComposition("ONe", ((8.0, 16.0, 0.60), (10.0, 20.0, 0.30), (12.0, 24.0, 0.10))),
}


def core_composition(core):
    """Return the :class:`CoreComposition` for a key of :data:`CORES` or pass one through."""
    if isinstance(core, CoreComposition):
        return core
    try:
        return CORES[core]
    except KeyError:
        raise ValueError(f"unknown core composition {core!r}; choose one of {sorted(CORES)}") from None
