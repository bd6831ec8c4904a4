"""Motion measures compared before and after matching (PGA, PGV, PGD, Arias, D5-95, Husid).

Thin wrappers over :mod:`groundshake.processing` (``integrate``, ``husid``,
``arias_intensity``, ``significant_duration``) so the numbers agree with
``groundshake info``.
"""
from __future__ import annotations

import numpy as np

__all__ = ["integrate_motion", "husid", "motion_measures"]


def integrate_motion(acc: np.ndarray, dt: float) -> tuple[np.ndarray, np.ndarray]:
    """Velocity [m/s] and displacement [m] of a piecewise-linear acceleration ``acc``
    [m/s²] shaped (..., n): each (..., n), from rest (:func:`groundshake.processing.integrate`)."""
    from ..processing import integrate

    return integrate(np.asarray(acc, dtype=float), float(dt))


def husid(acc: np.ndarray, dt: float) -> np.ndarray:
    """Normalised Husid curve H(t) = ∫₀ᵗ a²dτ / ∫a²dτ of ``acc`` [m/s²] (n,): (n,), 0 → 1."""
    from ..processing import husid as _husid

    return _husid(np.asarray(acc, dtype=float), float(dt))


def motion_measures(acc: np.ndarray, dt: float) -> dict[str, float]:
    """PGA [m/s²], PGV [m/s], PGD [m], Arias intensity [m/s] (Arias 1970), D5-95 [s]
    (Trifunac & Brady 1975), final velocity [m/s] and displacement [m] of ``acc`` (n,)."""
    from ..processing import arias_intensity, significant_duration

    acc = np.asarray(acc, dtype=float)
    vel, disp = integrate_motion(acc, dt)
    return {
        "pga": float(np.max(np.abs(acc))),
        "pgv": float(np.max(np.abs(vel))),
        "pgd": float(np.max(np.abs(disp))),
        "arias_intensity": float(arias_intensity(acc, dt)),
        "d5_95": float(significant_duration(acc, dt, 0.05, 0.95)),
        "final_velocity": float(vel[-1]),
        "final_displacement": float(disp[-1]),
    }
