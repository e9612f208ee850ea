"""Physical constants used by more than one step (one definition each)."""

GRAVITY = 9.80665
"""Standard acceleration of gravity [m/s^2] (CGPM 1901; ISO 80000-3)."""

J_PER_KWH = 3.6e6
"""Joules in a kilowatt-hour (exact by definition: 1000 W x 3600 s)."""
