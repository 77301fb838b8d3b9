"""Core compositions of white dwarfs and the mean quantities the structure equations need.

Three core families, by mass fraction of fully ionised nuclei (our defaults; change them by
building your own :class:`CoreComposition`):

* ``He``  - pure helium-4 (product of binary evolution below about 0.45 Msun).
* ``CO``  - carbon-12 and oxygen-16, 50:50 by mass. Real cores are oxygen-rich in the centre
  (roughly 60-80 % O, from memory) and vary with progenitor mass and the 12C(alpha,gamma) rate;
  50:50 is a conventional round choice (common practice).
* ``ONe`` - oxygen-16 : neon-20 : magnesium-24 = 0.60 : 0.30 : 0.10 by mass (a typical
  carbon-burning product; proportions from memory, adequate for mu_e and the Coulomb term).

mu_e uses integer mass numbers, so every N = Z nucleus gives exactly mu_e = 2 (with true atomic
masses it would differ by < 0.1 %, e.g. 2.0013 for helium-4, 1.9994 for oxygen-16).

The Coulomb (lattice) energy per electron of ion species i scales as Z_i^(2/3); with the
linear-mixing rule a mixture behaves as one species with Z_eff^(2/3) = <Z^(5/3)> / <Z> (number
averages over ions). For C/O 50:50 this gives Z_eff = 6.98.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class CoreComposition:
    """A core made of fully ionised nuclei.

    Parameters
    ----------
    name : str
        Short label (``He``, ``CO``, ``ONe``).
    nuclei : tuple of (charge Z, mass number A, mass fraction) tuples
        The mass fractions must sum to 1.
    note : str
        Where the proportions come from.
    """

    name: str
    nuclei: tuple
    note: str = ""

    def __post_init__(self):
        total = sum(x for _, _, x in self.nuclei)
        if abs(total - 1.0) > 1e-9:
            raise ValueError(f"mass fractions of core '{self.name}' sum to {total}, not 1")

    def _numbers(self):
        # number of ions per unit mass (in units of 1/m_u): X_i / A_i
        return [(z, a, x / a) for z, a, x in self.nuclei]

    @property
    def mu_e(self):
        """Mean molecular weight per electron, 1 / sum(X_i Z_i / A_i)."""
        return 1.0 / sum(x * z / a for z, a, x in self.nuclei)

    @property
    def mean_mass_number(self):
        """Number-averaged mass number <A> of the ions (sets the ion heat capacity per gram)."""
        n = self._numbers()
        return sum(y * a for _, a, y in n) / sum(y for _, _, y in n)

    @property
    def mean_charge(self):
        """Number-averaged ion charge <Z>."""
        n = self._numbers()
        return sum(y * z for z, _, y in n) / sum(y for _, _, y in n)

    @property
    def coulomb_charge(self):
        """Effective Z for the lattice term, (<Z^(5/3)> / <Z>)^(3/2) (linear mixing)."""
        n = self._numbers()
        z53 = sum(y * z ** (5.0 / 3.0) for z, _, y in n)
        z1 = sum(y * z for z, _, y in n)
        return (z53 / z1) ** 1.5

    def as_dict(self):
        """Plain description for provenance."""
        return {"name": self.name, "nuclei_Z_A_massfraction": [list(t) for t in self.nuclei],
                "mu_e": self.mu_e, "coulomb_charge": self.coulomb_charge,
                "mean_mass_number": self.mean_mass_number, "note": self.note}


CORE_COMPOSITIONS = {
    "He": CoreComposition("He", ((2, 4, 1.0),), "pure helium-4"),
    "CO": CoreComposition("CO", ((6, 12, 0.5), (8, 16, 0.5)),
                          "C:O = 50:50 by mass (conventional round choice, common practice)"),
    "ONe": CoreComposition("ONe", ((8, 16, 0.6), (10, 20, 0.3), (12, 24, 0.1)),
                           "O:Ne:Mg = 0.60:0.30:0.10 by mass (typical carbon-burning ash, from memory)"),
}


def core_composition(core):
    """Look up a :class:`CoreComposition` by name (``He``, ``CO``, ``ONe``) or pass one through."""
    if isinstance(core, CoreComposition):
        return core
    try:
        return CORE_COMPOSITIONS[core]
    except KeyError:
        from ..errors import ConfigError
        raise ConfigError(f"unknown core composition '{core}'; choose one of {sorted(CORE_COMPOSITIONS)}") from None
