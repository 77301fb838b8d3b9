"""Mass-radius relations of white dwarfs and their inversion from log g or radius."""
