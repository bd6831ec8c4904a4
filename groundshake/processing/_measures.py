"""Intensity measures of an acceleration record, and its Fourier amplitude spectrum.

Every integral treats acceleration as linear between samples (the same
assumption as :func:`integrate` and the oscillator kernel).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..records._record import STANDARD_GRAVITY, Record
from ._integrate import integrate

__all__ = ["intensity_measures", "arias_intensity", "husid", "cumulative_absolute_velocity",
           "standardized_cav", "significant_duration", "bracketed_duration", "mean_period",
           "fourier_amplitude", "FourierSpectrum", "SCALAR_MEASURES"]

#: Scalar keys of :func:`intensity_measures`, in display order, with their SI units.
SCALAR_MEASURES = {
    "pga": "m/s2", "pga_time": "s", "pgv": "m/s", "pgv_time": "s", "pgd": "m", "pgd_time": "s",
    "arias_intensity": "m/s", "d5_75": "s", "d5_95": "s", "bracketed_duration": "s",
    "cav": "m/s", "cav_std": "m/s", "mean_period": "s",
}


def _segment_square_integrals(a: np.ndarray, dt: float) -> np.ndarray:
    """∫a² dt over each step for linear a, shape (..., n-1)."""
    a0, a1 = a[..., :-1], a[..., 1:]
    return dt * (a0 * a0 + a0 * a1 + a1 * a1) / 3.0


def _segment_abs_integrals(a: np.ndarray, dt: float) -> np.ndarray:
    """∫|a| dt over each step for linear a (exact across a sign change), shape (..., n-1)."""
    a0, a1 = a[..., :-1], a[..., 1:]
    same = a0 * a1 >= 0
    s = np.abs(a0) + np.abs(a1)
    with np.errstate(invalid="ignore", divide="ignore"):
        cross = np.where(s > 0, 0.5 * dt * (a0 * a0 + a1 * a1) / s, 0.0)
    return np.where(same, 0.5 * dt * s, cross)


def arias_intensity(acc, dt: float) -> np.ndarray:
    """Arias intensity Ia = π/(2g)·∫a² dt [m/s] (Arias 1970); ``acc`` (..., n) m/s² → (...)."""
    a = np.asarray(acc, dtype=float)
    return np.pi / (2 * STANDARD_GRAVITY) * _segment_square_integrals(a, dt).sum(axis=-1)


def husid(acc, dt: float) -> np.ndarray:
    """Husid curve: cumulative Arias intensity over its total, shape (..., n), from 0 to 1."""
    a = np.asarray(acc, dtype=float)
    c = np.cumsum(_segment_square_integrals(a, dt), axis=-1)
    c = np.concatenate([np.zeros(a.shape[:-1] + (1,)), c], axis=-1)
    total = c[..., -1:]
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(total > 0, c / total, 0.0)


def _crossing_time(curve: np.ndarray, level: float, dt: float) -> float:
    """First time a non-decreasing ``curve`` (n,) reaches ``level``, linear between samples."""
    i = int(np.searchsorted(curve, level, side="left"))
    if i <= 0:
        return 0.0
    if i >= curve.size:
        return (curve.size - 1) * dt
    c0, c1 = curve[i - 1], curve[i]
    frac = (level - c0) / (c1 - c0) if c1 > c0 else 0.0
    return (i - 1 + frac) * dt


def significant_duration(acc, dt: float, start: float = 0.05, end: float = 0.95) -> float:
    """Time [s] between ``start`` and ``end`` fractions of the Arias intensity
    (Trifunac & Brady 1975); ``acc`` shape (n,)."""
    h = husid(acc, dt)
    if h[-1] <= 0:
        return 0.0
    return _crossing_time(h, end, dt) - _crossing_time(h, start, dt)


def bracketed_duration(acc, dt: float, threshold_g: float = 0.05) -> float:
    """Time [s] from the first to the last sample with |a| ≥ threshold (in g); 0 if none."""
    a = np.abs(np.asarray(acc, dtype=float))
    idx = np.flatnonzero(a >= threshold_g * STANDARD_GRAVITY)
    return float((idx[-1] - idx[0]) * dt) if idx.size else 0.0


def cumulative_absolute_velocity(acc, dt: float) -> np.ndarray:
    """CAV = ∫|a| dt [m/s] (EPRI 1988); ``acc`` (..., n) m/s² → (...)."""
    return _segment_abs_integrals(np.asarray(acc, dtype=float), dt).sum(axis=-1)


def standardized_cav(acc, dt: float, *, window_s: float = 1.0, threshold_g: float = 0.025) -> float:
    """Standardized CAV [m/s] (EPRI 1991): ∫|a| dt summed over the 1-s windows
    (from the first sample) whose peak |a| exceeds 0.025 g; ``acc`` shape (n,)."""
    a = np.asarray(acc, dtype=float)
    seg = _segment_abs_integrals(a, dt)
    win_of_seg = np.floor(np.arange(seg.size) * dt / window_s + 1e-9).astype(int)
    n_win = int(win_of_seg[-1]) + 1 if seg.size else 0
    per_window = np.bincount(win_of_seg, weights=seg, minlength=n_win)
    win_of_sample = np.floor(np.arange(a.size) * dt / window_s + 1e-9).astype(int)
    win_of_sample = np.minimum(win_of_sample, n_win - 1)
    peak = np.zeros(n_win)
    np.maximum.at(peak, win_of_sample, np.abs(a))
    return float(per_window[peak > threshold_g * STANDARD_GRAVITY].sum())


def mean_period(acc, dt: float, *, fmin: float = 0.25, fmax: float = 20.0) -> float:
    """Mean period Tm = Σ C²/f / Σ C² [s] over fmin ≤ f ≤ fmax (Rathje et al. 1998).

    C are the Fourier amplitudes of the record zero-padded so that df ≤ 0.05 Hz;
    fmax is cut to the Nyquist frequency when that is lower.
    """
    a = np.asarray(acc, dtype=float)
    nfft = 1 << int(np.ceil(np.log2(max(a.size, 1.0 / (0.05 * dt)))))
    amp = np.abs(np.fft.rfft(a, nfft))
    f = np.fft.rfftfreq(nfft, dt)
    sel = (f >= fmin) & (f <= min(fmax, 0.5 / dt))
    c2 = amp[sel] ** 2
    total = c2.sum()
    return float((c2 / f[sel]).sum() / total) if total > 0 else float("nan")


def intensity_measures(record: Record) -> dict:
    """Intensity measures of a record, SI units.

    Parameters
    ----------
    record : Record
        Acceleration [m/s²] (corrected, usually).

    Returns
    -------
    dict
        ``pga`` [m/s²], ``pgv`` [m/s], ``pgd`` [m] with ``pga_time``, ``pgv_time``,
        ``pgd_time`` [s] (first time the peak |.| occurs; all times are counted from
        the first sample of the record as read, i.e. less ``metadata["pad_before_s"]``); ``arias_intensity`` [m/s];
        ``d5_75``, ``d5_95`` [s] (significant durations) and ``t5``, ``t75``, ``t95``
        [s]; ``bracketed_duration`` [s] (0.05 g); ``cav``, ``cav_std`` [m/s];
        ``mean_period`` [s]; ``husid`` ndarray (n,) (fraction of Arias intensity).

    References
    ----------
    Arias (1970); Trifunac & Brady (1975), BSSA 65(3); EPRI (1988) NP-5930; EPRI (1991)
    TR-100082; Rathje, Abrahamson & Bray (1998), J. Geotech. Geoenviron. Eng. 124(2).
    """
    a = record.acc
    dt = record.dt
    vel, disp = integrate(a, dt)
    h = husid(a, dt)
    t0 = float(record.metadata.get("pad_before_s", 0.0) or 0.0)
    peaks = {}
    for key, x in (("pga", a), ("pgv", vel), ("pgd", disp)):
        i = int(np.argmax(np.abs(x)))
        peaks[key] = float(abs(x[i]))
        peaks[f"{key}_time"] = round(i * dt - t0, 9)
    t5, t75, t95 = (round(float(_crossing_time(h, q, dt)) - t0, 9) for q in (0.05, 0.75, 0.95))
    return {
        **peaks,
        "arias_intensity": float(arias_intensity(a, dt)),
        "d5_75": t75 - t5,
        "d5_95": t95 - t5,
        "bracketed_duration": bracketed_duration(a, dt),
        "cav": float(cumulative_absolute_velocity(a, dt)),
        "cav_std": standardized_cav(a, dt),
        "mean_period": mean_period(a, dt),
        "t5": t5, "t75": t75, "t95": t95,
        "husid": h,
    }


@dataclass(frozen=True)
class FourierSpectrum:
    """Fourier amplitude spectrum of acceleration.

    Attributes
    ----------
    frequency : ndarray, shape (m,)
        Frequencies [Hz] (FFT bins above zero).
    amplitude : ndarray, shape (m,)
        |dt·FFT(acc)| [m/s].
    smooth_frequency : ndarray, shape (k,)
        Centre frequencies [Hz] of the smoothed spectrum (log spaced).
    smoothed : ndarray, shape (k,)
        Konno-Ohmachi smoothed amplitude [m/s] at ``smooth_frequency``.
    bandwidth : float
        Konno-Ohmachi b.
    """

    frequency: np.ndarray
    amplitude: np.ndarray
    smooth_frequency: np.ndarray
    smoothed: np.ndarray
    bandwidth: float


def fourier_amplitude(acc, dt: float, *, bandwidth: float = 40.0, n_smooth: int = 200,
                      fmin: float | None = None, fmax: float | None = None,
                      centres=None) -> FourierSpectrum:
    """Fourier amplitude spectrum with Konno-Ohmachi smoothing (Konno & Ohmachi 1998).

    Parameters
    ----------
    acc : array_like, shape (n,)
        Acceleration [m/s²].
    dt : float
        Time step [s].
    bandwidth : float
        Konno-Ohmachi b (40 is usual).
    n_smooth : int
        Number of log-spaced centre frequencies of the smoothed spectrum.
    fmin, fmax : float, optional
        Range of centre frequencies [Hz]; defaults: the first FFT bin and Nyquist.
    centres : array_like, shape (k,), optional
        Centre frequencies [Hz] to use instead (overrides the three above).

    Returns
    -------
    FourierSpectrum

    Notes
    -----
    Each smoothed value is the average of the amplitudes weighted by the window
    W(f; fc) = [sin(b·log10(f/fc)) / (b·log10(f/fc))]^4 (W = 1 at f = fc), normalised
    to unit sum over the FFT bins — the window of Konno & Ohmachi (1998), BSSA 88(1).
    """
    a = np.asarray(acc, dtype=float)
    amp = np.abs(np.fft.rfft(a)) * dt
    f = np.fft.rfftfreq(a.size, dt)
    f, amp = f[1:], amp[1:]
    lo = f[0] if fmin is None else float(fmin)
    hi = f[-1] if fmax is None else float(fmax)
    centres = np.geomspace(lo, hi, int(n_smooth)) if centres is None else \
        np.asarray(centres, dtype=float).ravel()
    smoothed = np.empty(centres.size)
    logf = np.log10(f)
    block = max(1, int(2_000_000 // max(f.size, 1)))  # bound the window matrix to ~16 MB
    for start in range(0, centres.size, block):
        fc = centres[start:start + block, None]
        x = bandwidth * (logf[None, :] - np.log10(fc))
        with np.errstate(invalid="ignore", divide="ignore"):
            w = np.where(x == 0, 1.0, (np.sin(x) / x)) ** 4
        smoothed[start:start + block] = (w @ amp) / w.sum(axis=1)
    return FourierSpectrum(frequency=f, amplitude=amp, smooth_frequency=centres,
                           smoothed=smoothed, bandwidth=float(bandwidth))
