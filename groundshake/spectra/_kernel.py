"""The damped-oscillator kernel: exact piecewise-linear recurrence for many oscillators.

One interface, two engines: compiled numba loops (cached JIT, blocked, parallel over
oscillator blocks) and a pure-numpy time loop vectorized over oscillators. The numba
engine is used when numba imports; ``GROUNDSHAKE_NO_NUMBA=1`` forces numpy.
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from typing import Literal

import numpy as np

from .._errors import InputError
from ._coefficients import step_coefficients

__all__ = ["OscillatorPeaks", "oscillator_peaks", "oscillator_history", "kernel_engine",
           "kernel_threads"]

Engine = Literal["auto", "numba", "numpy"]

_PARALLEL_MIN_WORK = 2.0e6   # oscillator-steps below which threads do not pay
_NUMPY_CHUNK = 1024          # time steps per gathered chunk in the numpy engine


@dataclass(frozen=True)
class OscillatorPeaks:
    """Peak absolute responses of many oscillators, and when they occur.

    Attributes
    ----------
    disp, vel, abs_acc : ndarray, shape (n_osc,)
        Peak |relative displacement| [m], |relative velocity| [m/s] and
        |absolute acceleration| [m/s²].
    disp_time, vel_time, abs_acc_time : ndarray, shape (n_osc,)
        Time of each peak [s] from the first sample (the first occurrence on ties).
    """

    disp: np.ndarray
    vel: np.ndarray
    abs_acc: np.ndarray
    disp_time: np.ndarray
    vel_time: np.ndarray
    abs_acc_time: np.ndarray


_jit_module = None
_jit_failed = False


def _jit():
    """The compiled loops, or None when numba is unavailable or switched off."""
    global _jit_module, _jit_failed
    if os.environ.get("GROUNDSHAKE_NO_NUMBA", "").strip() not in ("", "0"):
        return None
    if _jit_module is None and not _jit_failed:
        try:
            import numba  # noqa: F401  (only numba's absence is a fallback)
        except ImportError:
            _jit_failed = True
            return None
        from . import _jit as module
        _jit_module = module
    return _jit_module


def kernel_threads() -> int:
    """Threads the compiled kernel may use: the CPUs this process may run on, capped by
    the environment variable ``GROUNDSHAKE_THREADS`` (set it to 1 when records are
    already spread over worker processes)."""
    try:
        n = len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        n = os.cpu_count() or 1
    cap = os.environ.get("GROUNDSHAKE_THREADS", "").strip()
    if cap:
        try:
            n = min(n, max(1, int(cap)))
        except ValueError:
            raise InputError(f"GROUNDSHAKE_THREADS={cap!r}; give a whole number >= 1") from None
    return max(1, n)


def run_blocks(fn, n_osc: int, work: float, threads: bool | None, *args) -> None:
    """Call ``fn(*before, b0, b1, *after)`` over ranges of oscillator blocks.

    ``args`` is ``(before, after)``. The ranges run on threads (the compiled loops
    release the GIL) when ``threads`` is true, or when it is None and ``work``
    (oscillator-steps) is large enough to pay for them.
    """
    from ._jit import NB

    before, after = args
    n_blocks = (n_osc + NB - 1) // NB
    n_thr = kernel_threads() if threads is None or threads else 1
    if threads is None and work < _PARALLEL_MIN_WORK:
        n_thr = 1
    n_thr = min(n_thr, n_blocks)
    if n_thr <= 1:
        fn(*before, 0, n_blocks, *after)
        return
    from concurrent.futures import ThreadPoolExecutor

    edges = np.linspace(0, n_blocks, n_thr + 1).round().astype(int)
    with ThreadPoolExecutor(max_workers=n_thr) as pool:
        futures = [pool.submit(fn, *before, int(b0), int(b1), *after)
                   for b0, b1 in zip(edges[:-1], edges[1:]) if b1 > b0]
        for f in futures:
            f.result()


def kernel_engine(engine: Engine = "auto") -> Literal["numba", "numpy"]:
    """The engine a kernel call would use: ``"numba"`` or ``"numpy"``.

    ``"auto"`` picks numba when it imports and ``GROUNDSHAKE_NO_NUMBA`` is unset
    (or ``0``); asking for ``"numba"`` when it cannot be used raises InputError.
    """
    if engine not in ("auto", "numba", "numpy"):
        raise InputError(f"engine={engine!r}; allowed: 'auto', 'numba', 'numpy'")
    if engine == "numpy":
        return "numpy"
    if _jit() is not None:
        return "numba"
    if engine == "numba":
        raise InputError("engine='numba' asked for, but numba is not available "
                         "(or GROUNDSHAKE_NO_NUMBA is set)")
    return "numpy"


def check_step(dt) -> float:
    """The time step dt [s] as a float; InputError unless a finite number > 0."""
    try:
        dt = float(dt)
    except (TypeError, ValueError):
        raise InputError(f"dt={dt!r} must be a number of seconds > 0") from None
    if not (np.isfinite(dt) and dt > 0):
        raise InputError(f"dt={dt!r} must be a finite number of seconds > 0")
    return dt


def _prepare(acc, dt, omega, damping, source):
    """Validate and normalise the kernel inputs -> (acc2d, src, coef, dt)."""
    dt = check_step(dt)
    omega = np.atleast_1d(np.asarray(omega, dtype=float))
    xi = np.atleast_1d(np.asarray(damping, dtype=float))
    if omega.ndim != 1:
        raise InputError(f"omega must be 1-D (n_osc,), got shape {omega.shape}")
    if xi.shape != omega.shape:
        if xi.size == 1:
            xi = np.full(omega.shape, float(xi.reshape(())))
        else:
            raise InputError(f"damping shape {xi.shape} does not match omega shape {omega.shape}")
    if not np.all(np.isfinite(omega) & (omega > 0)):
        bad = omega[~(np.isfinite(omega) & (omega > 0))][0]
        raise InputError(f"omega must be finite and > 0 rad/s, got {bad:g}")
    if not np.all(np.isfinite(xi) & (xi >= 0) & (xi < 1)):
        bad = xi[~(np.isfinite(xi) & (xi >= 0) & (xi < 1))][0]
        raise InputError(f"damping ratio {bad:g} is outside [0, 1)")
    a = np.asarray(acc, dtype=float)
    n_osc = omega.size
    if source is not None:
        if a.ndim != 2:
            raise InputError(f"with source=, acc must be (n_exc, n_t), got shape {a.shape}")
        src = np.asarray(source)
        if src.shape != omega.shape or not np.issubdtype(src.dtype, np.integer):
            raise InputError(f"source must be integers shaped (n_osc,)={omega.shape}, "
                             f"got {src.dtype} {src.shape}")
        if n_osc and (src.min() < 0 or src.max() >= a.shape[0]):
            raise InputError(f"source indices must lie in [0, {a.shape[0]})")
        src = src.astype(np.int64)
    elif a.ndim == 1:
        a = a[None, :]
        src = np.zeros(n_osc, np.int64)
    elif a.ndim == 2:
        if a.shape[0] != n_osc:
            raise InputError(f"acc shaped {a.shape} needs one row per oscillator "
                             f"(n_osc={n_osc}), or give a 1-D acc shared by all")
        src = np.arange(n_osc, dtype=np.int64)
    else:
        raise InputError(f"acc must be (n_t,) or (n_osc, n_t), got shape {a.shape}")
    if a.shape[-1] < 1:
        raise InputError("acc holds no samples")
    if not np.all(np.isfinite(a)):
        raise InputError("acc holds NaN or inf")
    a = np.ascontiguousarray(a)
    coef = step_coefficients(omega, xi, dt)
    return a, src, coef, dt


def oscillator_peaks(acc: np.ndarray, dt: float, omega: np.ndarray, damping: np.ndarray, *,
                     source: np.ndarray | None = None, engine: Engine = "auto",
                     threads: bool | None = None) -> OscillatorPeaks:
    """Peak responses of damped single-degree-of-freedom oscillators to a base motion.

    Solves x'' + 2ξωx' + ω²x = -acc(t) from rest, exactly for ``acc`` linear between
    samples, and keeps only the peaks: memory is O(n_osc).

    Parameters
    ----------
    acc : ndarray, shape (n_t,) or (n_osc, n_t)
        Base acceleration [m/s²] sampled every ``dt``: one excitation shared by every
        oscillator, or one row per oscillator. With ``source``, shape (n_exc, n_t).
    dt : float
        Time step [s].
    omega : ndarray, shape (n_osc,)
        Natural circular frequencies [rad/s], > 0.
    damping : ndarray, shape (n_osc,) or scalar
        Damping ratios in [0, 1).
    source : ndarray of int, shape (n_osc,), optional
        Row of ``acc`` that drives each oscillator (many oscillators per excitation).
    engine : {"auto", "numba", "numpy"}
        Compiled loops or the numpy time loop (see :func:`kernel_engine`).
    threads : bool, optional
        Run oscillator blocks on threads (:func:`kernel_threads` of them); default:
        when the work is large.

    Returns
    -------
    OscillatorPeaks
        ``disp, vel, abs_acc`` peaks and their times, each shaped (n_osc,).

    Raises
    ------
    InputError
        On dt ≤ 0, ω ≤ 0, damping outside [0, 1), non-finite samples, bad shapes.

    Notes
    -----
    The recurrence [x, v]_{i+1} = A[x, v]_i + B[a_i, a_{i+1}] is exact for
    piecewise-linear excitation (Nigam & Jennings 1969); the absolute acceleration is
    -2ξωv - ω²x. Peaks are taken at the samples.

    References
    ----------
    Nigam, N.C. & Jennings, P.C. (1969), "Calculation of response spectra from
    strong-motion earthquake records", BSSA 59(2), 909-922.

    Examples
    --------
    >>> import numpy as np
    >>> t = np.arange(2000) * 0.01
    >>> p = oscillator_peaks(np.sin(2 * np.pi * t), 0.01, np.array([2 * np.pi]), 0.05)
    >>> p.disp.shape
    (1,)
    """
    a, src, coef, dt = _prepare(acc, dt, omega, damping, source)
    n_osc = coef.shape[1]
    n_t = a.shape[1]
    pk = np.zeros((3, n_osc))
    ix = np.zeros((3, n_osc), np.int64)
    if n_osc and n_t > 1:
        if kernel_engine(engine) == "numba":
            jit = _jit()
            fn = jit.peaks_shared_range if a.shape[0] == 1 else jit.peaks_mixed_range
            run_blocks(fn, n_osc, float(n_osc) * n_t, threads, (a, src, coef), (pk, ix))
        else:
            _numpy_peaks(a, src, coef, pk, ix)
    t = ix * dt
    return OscillatorPeaks(pk[0], pk[1], pk[2], t[0], t[1], t[2])


def oscillator_history(acc: np.ndarray, dt: float, omega: np.ndarray, damping: np.ndarray, *,
                       source: np.ndarray | None = None, engine: Engine = "auto",
                       threads: bool | None = None
                       ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Whole response histories of damped oscillators to a base motion.

    Same equation, inputs and engines as :func:`oscillator_peaks`; use it for the
    few oscillators whose histories are needed (memory 3·n_osc·n_t floats).

    Returns
    -------
    disp, vel, abs_acc : ndarray, each shape (n_osc, n_t)
        Relative displacement [m], relative velocity [m/s] and absolute acceleration
        [m/s²] at every sample, starting from rest (zeros at the first sample).

    Examples
    --------
    >>> import numpy as np
    >>> d, v, a = oscillator_history(np.ones(100), 0.01, np.array([10.0]), 0.0)
    >>> d.shape
    (1, 100)
    """
    a, src, coef, dt = _prepare(acc, dt, omega, damping, source)
    n_osc = coef.shape[1]
    n_t = a.shape[1]
    hd = np.zeros((n_osc, n_t)); hv = np.zeros((n_osc, n_t)); ha = np.zeros((n_osc, n_t))
    if n_osc and n_t > 1:
        if kernel_engine(engine) == "numba":
            run_blocks(_jit().history_range, n_osc, float(n_osc) * n_t, threads,
                       (a, src, coef), (hd, hv, ha))
        else:
            _numpy_history(a, src, coef, hd, hv, ha)
    return hd, hv, ha


# -- numpy engine -------------------------------------------------------------
def _forcing_chunks(a, src):
    """Yield (i0, block) with block (n_steps, n_osc) of excitation samples, or 1-D."""
    n_t = a.shape[1]
    shared = a.shape[0] == 1 or bool(np.all(src == src[0]))
    if shared:
        yield 0, a[src[0]]
        return
    for t0 in range(0, n_t, _NUMPY_CHUNK):
        t1 = min(n_t, t0 + _NUMPY_CHUNK + 1)
        yield t0, np.ascontiguousarray(a[src, t0:t1].T)


def _numpy_steps(a, src, coef):
    """Yield (i, x, v) after each step i = 1..n_t-1 (arrays reused in place)."""
    a11, a12, a21, a22, b11, b12, b21, b22 = coef[:8]
    n_t = a.shape[1]
    x = np.zeros(coef.shape[1]); v = np.zeros(coef.shape[1])
    xn = np.empty_like(x); tmp = np.empty_like(x)
    for t0, block in _forcing_chunks(a, src):
        stop = n_t - 1 if block.ndim == 1 else min(n_t - 1, t0 + block.shape[0] - 1)
        for i in range(t0, stop):
            f0 = block[i - t0]; f1 = block[i - t0 + 1]
            np.multiply(a11, x, out=xn); xn += np.multiply(a12, v, out=tmp)
            xn += np.multiply(b11, f0, out=tmp); xn += np.multiply(b12, f1, out=tmp)
            np.multiply(a22, v, out=v); v += np.multiply(a21, x, out=tmp)
            v += np.multiply(b21, f0, out=tmp); v += np.multiply(b22, f1, out=tmp)
            x, xn = xn, x
            yield i + 1, x, v


def _numpy_peaks(a, src, coef, pk, ix):
    cv, cx = coef[8], coef[9]
    absa = np.empty(coef.shape[1]); tmp = np.empty_like(absa)
    for i, x, v in _numpy_steps(a, src, coef):
        np.multiply(cv, v, out=absa); absa += np.multiply(cx, x, out=tmp)
        for r, q in ((0, x), (1, v), (2, absa)):
            np.abs(q, out=tmp)
            m = tmp > pk[r]
            if m.any():
                pk[r][m] = tmp[m]
                ix[r][m] = i


def _numpy_history(a, src, coef, hd, hv, ha):
    cv, cx = coef[8], coef[9]
    for i, x, v in _numpy_steps(a, src, coef):
        hd[:, i] = x
        hv[:, i] = v
    np.multiply(cv[:, None], hv, out=ha)
    ha += cx[:, None] * hd
