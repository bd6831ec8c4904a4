"""Fourier (band-limited) resampling of records."""
from __future__ import annotations

import math

from scipy import signal

from .._errors import InputError
from ..records._record import Record

__all__ = ["resample", "ensure_sampling", "SAMPLES_PER_PERIOD"]

#: Samples per period of the shortest period reported (Phillips et al. 2012).
SAMPLES_PER_PERIOD = 10


def resample(record: Record, dt: float) -> Record:
    """Resample a record onto step ``dt`` by zero-padded Fourier interpolation.

    Parameters
    ----------
    record : Record
        Acceleration [m/s²], ``n`` samples at ``record.dt``.
    dt : float
        Wanted step [s]. The step used is ``n·record.dt / m`` with
        ``m = round(n·record.dt/dt)`` samples, which equals ``dt`` exactly when
        ``record.dt/dt`` is a whole number.

    Returns
    -------
    Record
        ``acc`` shape (m,); the first sample is at the same time.

    Notes
    -----
    scipy.signal.resample treats the record as one period of a periodic signal,
    so it should start and end near zero (a tapered or padded record does).
    Going coarser removes content above the new Nyquist frequency.
    """
    dt = float(dt)
    if not (math.isfinite(dt) and dt > 0):
        raise InputError(f"{record.name}: resample dt={dt!r} must be a finite number > 0")
    m = int(round(record.n * record.dt / dt))
    if m < 2:
        raise InputError(f"{record.name}: resampling to dt={dt:g} s leaves fewer than 2 samples")
    if m == record.n:
        return record
    acc = signal.resample(record.acc, m)
    new_dt = record.n * record.dt / m
    return record.replace(acc=acc, dt=new_dt,
                          step=f"Fourier resampling from dt = {record.dt:g} s to {new_dt:g} s")


def ensure_sampling(record: Record, shortest_period: float, *,
                    samples_per_period: int = SAMPLES_PER_PERIOD) -> Record:
    """Resample (finer, by a whole factor) if ``dt > shortest_period / samples_per_period``.

    Parameters
    ----------
    record : Record
        Acceleration [m/s²].
    shortest_period : float
        Shortest oscillator period [s] that will be computed.
    samples_per_period : int
        Samples wanted per shortest period (10: Phillips, Kottke, Hashash & Rathje 2012).

    Returns
    -------
    Record
        ``record`` itself when fine enough, else resampled with step ``dt/k``,
        ``k`` the smallest whole number that is fine enough.
    """
    need = float(shortest_period) / samples_per_period
    if not (need > 0 and math.isfinite(need)):
        raise InputError(f"shortest period {shortest_period!r} s must be a finite number > 0")
    if record.dt <= need * (1 + 1e-9):
        return record
    k = int(math.ceil(record.dt / need - 1e-9))
    return resample(record, record.dt / k)
