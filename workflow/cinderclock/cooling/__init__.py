"""Cooling models of white dwarfs: luminosity to cooling age.

Modules
-------
mestel
    Mestel's law (baseline, closed form).
neutrinos, heat_capacity, crystallization, composition, envelope
    Physics of the numerical model: Itoh et al. (1996) neutrino emissivities, ion (liquid/Debye
    solid) and electron heat capacities, coupling parameter / melting / latent heat, core
    mixtures, Kramers envelope relation with H/He presets and calibration.
ocp, coreprofile, phasesep, sedimentation, budget
    One-component-plasma thermodynamics (liquid, quantum crystal, melting, latent heat), the C/O
    profile, C/O phase separation and its energy, 22Ne settling heat, and the shell sums.
tracks
    Energy-budget integration of isothermal-core cooling for many masses at once.
table, grid
    ``build_cooling_table`` (long-format pandas table, built once per configuration) and
    ``CoolingGrid`` (vectorised age / luminosity / Teff look-ups with status codes).
usertracks
    Reader and validator of user-supplied cooling tracks in cinderclock's long format.
spread
    Age spread between two cooling models (model systematics column).
"""
