"""Synthetic photometry and photometric luminosities.

Modules: :mod:`passbands` (speclite curves, published Vega zero points), :mod:`synthetic` (AB
magnitudes as matrix products, Planck function), :mod:`extinction` (dust_extinction laws applied
to spectra), :mod:`table` (the Teff x E(B-V) table of magnitudes for unit solid angle, built once
per configuration), :mod:`grid` (its vectorised interpolation), :mod:`usergrid` (user-supplied
synthetic-photometry tables), :mod:`sedfit` (Teff and solid angle from multi-band photometry),
:mod:`bolometric` (IAU 2015 B2 bolometric scale), :mod:`consistency` (over-luminosity flag) and
:mod:`cautions` (texts for output metadata). Distances are in :mod:`cinderclock.distance`.
"""
