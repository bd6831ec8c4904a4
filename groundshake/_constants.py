"""Constants shared by every stage (SI units).

One home for each, so the stages agree: import from here, never retype the number.
"""
from __future__ import annotations

__all__ = ["STANDARD_GRAVITY", "DIRECTIONS"]

#: Standard acceleration of gravity [m/s² per g] (3rd CGPM, 1901; ISO 80000-3).
STANDARD_GRAVITY = 9.80665

#: The three directions of motion, in axis order; z is vertical (up).
DIRECTIONS = ("x", "y", "z")
