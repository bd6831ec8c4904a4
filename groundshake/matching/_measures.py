"""Motion measures compared before and after matching (PGA, PGV, PGD, Arias, D5-95, Husid).

Velocity and displacement come from :func:`groundshake.processing.integrate` (exact
for piecewise-linear acceleration), like everywhere else in groundshake.
"""
from __future__ import annotations

import numpy as np

from ..records._record import STANDARD_GRAVITY

__all__ = ["integrate_motion", "husid", "motion_measures"]


def integrate_motion(acc: np.ndarray, dt: float) -> tuple[np.ndarray, np.ndarray]:
    """Velocity [m/s] and displacement [m] of a piecewise-linear acceleration, (n,) each.

    Zero initial conditions; exact for acceleration linear within each step.
    """
    from ..processing import integrate

    return integrate(np.asarray(acc, dtype=float), float(dt))


def husid(acc: np.ndarray, dt: float) -> np.ndarray:
    """Normalised Husid curve H(t) = ∫₀ᵗ a² dτ / ∫ a² dτ (trapezoid), shape (n,); 0 → 1."""
    acc = np.asarray(acc, dtype=float)
    a2 = acc * acc
    cum = np.concatenate([[0.0], np.cumsum(0.5 * dt * (a2[:-1] + a2[1:]))])
    total = cum[-1]
    return cum / total if total > 0 else cum


def motion_measures(acc: np.ndarray, dt: float) -> dict[str, float]:
    """PGA [m/s²], PGV [m/s], PGD [m], Arias intensity [m/s] (Arias 1970), D5-95 [s]
    (Trifunac & Brady 1975), and final velocity and displacement."""
    acc = np.asarray(acc, dtype=float)
    vel, disp = integrate_motion(acc, dt)
    h = husid(acc, dt)
    t = np.arange(acc.size) * dt
    out = {
        "pga": float(np.max(np.abs(acc))),
        "pgv": float(np.max(np.abs(vel))),
        "pgd": float(np.max(np.abs(disp))),
        "arias_intensity": float(np.pi / (2 * STANDARD_GRAVITY) * np.trapezoid(acc * acc, dx=dt)),
        "d5_95": float(np.interp(0.95, h, t) - np.interp(0.05, h, t)) if h[-1] > 0 else 0.0,
        "final_velocity": float(vel[-1]),
        "final_displacement": float(disp[-1]),
    }
    return out
