"""Progenitors of white dwarfs: initial-final mass relations, main-sequence lifetimes, total ages."""
