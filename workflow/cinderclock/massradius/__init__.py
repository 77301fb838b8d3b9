"""Mass-radius relations of white dwarfs and their inversion from log g or radius.

Modules:

* :mod:`.eos` - zero-temperature equation of state (Chandrasekhar's exact degenerate-electron
  pressure, optional Salpeter 1961 lattice correction).
* :mod:`.composition` - He, C/O and O/Ne cores (mu_e, effective ion charge).
* :mod:`.chandrasekhar` - zero-temperature sequences and interior profiles (solve_ivp).
* :mod:`.envelope` - finite-temperature radius from a Mestel/Kramers envelope (simplified model).
* :mod:`.table` - the (mass, Teff) table, built once per configuration.
* :mod:`.grid` - :class:`~.grid.MassRadiusGrid`, vectorised lookups and inversions.
* :mod:`.flags` - low- and high-mass flag thresholds.
* :mod:`.nauenberg` - the Nauenberg (1972) closed form (baseline).
"""
