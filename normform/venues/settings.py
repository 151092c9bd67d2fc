"""Defaults shared by the matcher and its command (a light module: no heavy imports)."""

# Score at or above which a line is taken to be its library record; set on the
# development fixture (lowest true match 0.797, highest wrong candidate 0.707).
DEFAULT_THRESHOLD = 0.78
