"""Velocity and displacement from acceleration that is linear within each step."""
from __future__ import annotations

import numpy as np

__all__ = ["integrate"]


def integrate(acc, dt: float) -> tuple[np.ndarray, np.ndarray]:
    """Integrate acceleration twice, exactly for piecewise-linear acceleration.

    Parameters
    ----------
    acc : array_like, shape (..., n)
        Acceleration [m/s²], time on the last axis.
    dt : float
        Time step [s].

    Returns
    -------
    vel, disp : ndarray, shape (..., n)
        Velocity [m/s] and displacement [m], both zero at the first sample.

    Notes
    -----
    With a linear between samples, v[i+1] = v[i] + dt·(a[i] + a[i+1])/2 and
    u[i+1] = u[i] + dt·v[i] + dt²·(2a[i] + a[i+1])/6.
    """
    a = np.asarray(acc, dtype=float)
    dt = float(dt)
    a0, a1 = a[..., :-1], a[..., 1:]
    dv = 0.5 * dt * (a0 + a1)
    vel = np.concatenate([np.zeros(a.shape[:-1] + (1,)), np.cumsum(dv, axis=-1)], axis=-1)
    du = dt * vel[..., :-1] + dt * dt * (2.0 * a0 + a1) / 6.0
    disp = np.concatenate([np.zeros(a.shape[:-1] + (1,)), np.cumsum(du, axis=-1)], axis=-1)
    return vel, disp
