"""Physical constants used by more than one step (one definition each)."""

GRAVITY = 9.80665
"""Standard acceleration of gravity [m/s^2] (CGPM 1901; ISO 80000-3)."""
