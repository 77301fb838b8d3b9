"""Cooling models of white dwarfs: luminosity to cooling age."""
