"""Floor (in-structure) response spectra and peak broadening."""
from __future__ import annotations

import numpy as np

__all__ = ["broaden", "floor_spectra"]


def broaden(periods: np.ndarray, values: np.ndarray, *, fraction: float = 0.15) -> np.ndarray:
    """Peak-broadened spectrum: at each period the largest value within ±``fraction``.

    B(T) = max { S(T') : (1 − fraction)·T ≤ T' ≤ (1 + fraction)·T }, with S
    piecewise linear in log-period between the given points and held at the
    ends of the period range. A peak at period T₀ then keeps its full value for
    periods from T₀/(1 + fraction) to T₀/(1 − fraction), which is the frequency
    band 0.85 f₀ … 1.15 f₀ for 15 % (ASCE 4; USNRC RG 1.122: peaks widened by
    ±15 % in frequency, the full value held across the band and joined to the
    unbroadened curve).

    Parameters
    ----------
    periods : ndarray (n_p,)
        Increasing periods [s].
    values : ndarray (..., n_p)
        Spectral values (any unit).
    fraction : float
        Half-width of the band (0.15 for ±15 %); 0 returns a copy.

    Returns
    -------
    ndarray (..., n_p)
    """
    T = np.asarray(periods, dtype=float)
    S = np.asarray(values, dtype=float)
    if fraction <= 0 or T.size < 2:
        return S.copy()
    if np.any(np.diff(T) <= 0):
        raise ValueError("periods must be strictly increasing")
    logT = np.log(T)

    def at(tq):                                          # S at periods tq (n_p,), shared weights
        x = np.clip(np.log(tq), logT[0], logT[-1])
        j = np.clip(np.searchsorted(logT, x, side="right") - 1, 0, T.size - 2)
        w = (x - logT[j]) / (logT[j + 1] - logT[j])
        return S[..., j] * (1.0 - w) + S[..., j + 1] * w

    lo, hi = (1.0 - fraction) * T, (1.0 + fraction) * T
    inside = (T[None, :] >= lo[:, None]) & (T[None, :] <= hi[:, None])   # (n_p out, n_p in)
    masked = np.where(inside, S[..., None, :], -np.inf)
    out = np.maximum(masked.max(axis=-1), np.maximum(at(lo), at(hi)))
    return out


def floor_spectra(abs_acc: np.ndarray, dt: float, periods: np.ndarray, damping: np.ndarray, *,
                  fraction: float = 0.15) -> dict:
    """Raw and broadened floor spectra of absolute acceleration histories.

    Parameters
    ----------
    abs_acc : ndarray (n_points, 3, n_t)
        Absolute acceleration [m/s²] at each point in x, y, z.
    dt : float
        [s].
    periods : ndarray (n_p,)
        [s].
    damping : ndarray (n_d,)
        Ratios.
    fraction : float
        Broadening half-width (0.15 = ±15 %).

    Returns
    -------
    dict
        ``psa``, ``sa`` (n_points, 3, n_d, n_p) raw [m/s²]; ``psa_broadened``, ``sa_broadened``
        the same broadened; ``envelope_psa`` / ``envelope_psa_broadened`` (3, n_d, n_p)
        the maximum across points.
    """
    from ..spectra import response_spectrum

    a = np.asarray(abs_acc, dtype=float)
    sp = response_spectrum(a, dt, np.asarray(periods, dtype=float),
                           np.atleast_1d(np.asarray(damping, dtype=float)))
    psa = np.asarray(sp.psa)
    sa = np.asarray(sp.sa)
    out = {"periods": np.asarray(sp.periods, dtype=float), "damping": np.atleast_1d(damping),
           "psa": psa, "sa": sa,
           "psa_broadened": broaden(sp.periods, psa, fraction=fraction),
           "sa_broadened": broaden(sp.periods, sa, fraction=fraction)}
    if a.shape[0]:
        out["envelope_psa"] = out["psa"].max(axis=0)
        out["envelope_psa_broadened"] = out["psa_broadened"].max(axis=0)
    return out
