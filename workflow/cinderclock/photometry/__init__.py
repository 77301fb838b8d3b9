"""Synthetic photometry: passbands, magnitudes of model spectra, bolometric corrections."""
