"""Orientation-independent spectra of two horizontal components: RotDnn and GMRotD50."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .._errors import InputError
from ._coefficients import step_coefficients
from ._kernel import (Engine, _jit, check_step, kernel_engine, oscillator_history,
                      run_blocks)
from ._spectrum import (MAX_REFINEMENT, check_damping, check_periods, default_periods,
                        fourier_upsample, interpolation_groups)

__all__ = ["RotD", "rotd", "rotated_peak"]

#: Rotation angles [degrees]: 0, 1, ..., 179 (180° and beyond repeat them).
ANGLES = np.arange(180.0)
_RAD = np.deg2rad(ANGLES)
_COS = np.cos(_RAD)
_SIN = np.sin(_RAD)


@dataclass(frozen=True, eq=False)
class RotD:
    """Orientation-independent spectra of a pair of horizontal components.

    Attributes
    ----------
    periods : ndarray, shape (n_periods,)
        Periods [s].
    damping : ndarray, shape (n_damping,)
        Damping ratios.
    percentiles : ndarray, shape (n_pct,)
        The nn of each RotDnn (0-100).
    sd, psv, psa : ndarray, shape (n_pct, n_damping, n_periods)
        RotDnn of relative displacement [m], and ω·, ω²· that [m/s, m/s²].
    gmrotd50 : ndarray, shape (n_damping, n_periods)
        GMRotD50 of PSA [m/s²]: median over 0-89° of the geometric mean of the two
        rotated components (Boore, Watson-Lamprey & Abrahamson 2006).
    angle_of_max : ndarray, shape (n_damping, n_periods)
        Rotation angle [degrees, 0-179] at which the RotD100 displacement occurs.
    pga : ndarray, shape (n_pct,)
        RotDnn of the peak ground acceleration [m/s²].
    by_angle : ndarray, shape (n_damping, n_periods, 180)
        Peak |displacement| [m] at each rotation angle θ of a1·cosθ + a2·sinθ.
    pga_band_limited : ndarray, shape (n_pct,)
        RotDnn of the peak ground acceleration [m/s²] of the band-limited pair (both
        components Fourier-interpolated 16-fold, as the shortest periods use them);
        ``pga`` (over the samples) when computed without refinement.
    """

    periods: np.ndarray
    damping: np.ndarray
    percentiles: np.ndarray
    sd: np.ndarray
    psv: np.ndarray
    psa: np.ndarray
    gmrotd50: np.ndarray
    angle_of_max: np.ndarray
    pga: np.ndarray
    by_angle: np.ndarray
    pga_band_limited: np.ndarray | None = None

    @property
    def zero_period(self) -> np.ndarray:
        """The zero-period RotDnn [m/s²] that RotDnn of SA tends to as T → 0 here:
        :attr:`pga_band_limited`, or :attr:`pga` without refinement; shape (n_pct,)."""
        return self.pga if self.pga_band_limited is None else self.pga_band_limited

    def psa_for(self, nn: float) -> np.ndarray:
        """PSA RotDnn [m/s²] for one of the percentiles computed, (n_damping, n_periods)."""
        hit = np.flatnonzero(np.isclose(self.percentiles, nn))
        if not hit.size:
            raise InputError(f"RotD{nn:g} was not computed; have {list(self.percentiles)}")
        return self.psa[hit[0]]


def rotated_peak(u1: np.ndarray, u2: np.ndarray) -> np.ndarray:
    """Peak over time of |u1·cosθ + u2·sinθ| for θ = 0, 1, ..., 179°.

    Parameters
    ----------
    u1, u2 : ndarray, shape (..., n_t)
        Two orthogonal components of any linear response (same units).

    Returns
    -------
    ndarray, shape (..., 180)
    """
    u1 = np.asarray(u1, dtype=float)
    u2 = np.asarray(u2, dtype=float)
    lead = u1.shape[:-1]
    a = np.ascontiguousarray(u1.reshape(-1, u1.shape[-1]))
    b = np.ascontiguousarray(u2.reshape(-1, u2.shape[-1]))
    out = np.zeros((a.shape[0], ANGLES.size))
    jit = _jit()
    if jit is not None:
        for r in range(a.shape[0]):
            jit.rotated_peaks(a[r], b[r], _COS, _SIN, out[r])
    else:
        _numpy_rotated(a, b, out)
    return out.reshape(lead + (ANGLES.size,))


def _numpy_rotated(a, b, out, chunk_bytes=32 << 20):
    """Brute-force rotated peaks, chunked over time to bound memory (numpy engine)."""
    n_osc, n_t = a.shape
    step = max(1, int(chunk_bytes // (8 * ANGLES.size * max(n_osc, 1))))
    for t0 in range(0, n_t, step):
        proj = (a[:, None, t0:t0 + step] * _COS[None, :, None]
                + b[:, None, t0:t0 + step] * _SIN[None, :, None])
        np.maximum(out, np.abs(proj).max(axis=-1), out=out)


def _check_percentiles(percentiles) -> np.ndarray:
    try:
        q = np.atleast_1d(np.asarray(percentiles, dtype=float))
    except (TypeError, ValueError):
        raise InputError(f"given {percentiles!r}; allowed a list of numbers",
                         param="percentiles") from None
    if q.ndim != 1 or q.size == 0 or not np.all(np.isfinite(q) & (q >= 0) & (q <= 100)):
        raise InputError(f"given {percentiles!r}; allowed: numbers from 0 to 100 "
                         "(50 for RotD50, 100 for RotD100)", param="percentiles")
    return q


def rotd(acc1: np.ndarray, acc2: np.ndarray, dt: float, periods=None, damping=0.05,
         percentiles=(50, 100), *, interpolate: bool = True,
         engine: Engine = "auto") -> RotD:
    """RotDnn spectra (Boore 2010) and GMRotD50 of two horizontal components.

    Parameters
    ----------
    acc1, acc2 : ndarray, shape (n_t,)
        Orthogonal horizontal ground accelerations [m/s²], same sampling.
    dt : float
        Time step [s].
    periods : array_like, shape (n_periods,), optional
        Periods [s] > 0; default :func:`default_periods`.
    damping : float or array_like, shape (n_damping,)
        Damping ratios in [0, 1).
    percentiles : sequence of float
        The nn of each RotDnn (50 = median over angles, 100 = maximum).
    interpolate : bool
        Refine the pair per period as :func:`response_spectrum` does (band-limited
        reading; :func:`~groundshake.spectra.refinement_factors`).
    engine : {"auto", "numba", "numpy"}
        Kernel engine.

    Returns
    -------
    RotD

    Notes
    -----
    The oscillator is linear, so its response to a1·cosθ + a2·sinθ is u1·cosθ + u2·sinθ:
    two displacement histories per oscillator serve all 180 angles (1° steps). The
    percentile over angles is the linear-interpolation percentile of the 180 values.
    PSA = ω²·SD, as in Boore (2010).

    References
    ----------
    Boore, D.M. (2010), BSSA 100(4), 1830-1835. Boore, Watson-Lamprey & Abrahamson
    (2006), BSSA 96(4A), 1502-1511.
    """
    p = default_periods() if periods is None else check_periods(periods)
    z = check_damping(damping)
    q = _check_percentiles(percentiles)
    a1 = np.asarray(acc1, dtype=float)
    a2 = np.asarray(acc2, dtype=float)
    if a1.ndim != 1 or a1.shape != a2.shape:
        raise InputError(f"the two components must be 1-D and equally long; got shapes "
                         f"{a1.shape} and {a2.shape} (resample or trim them first)")
    if a1.size < 1 or not (np.all(np.isfinite(a1)) and np.all(np.isfinite(a2))):
        raise InputError("the components must hold finite samples")
    dt = check_step(dt)
    n_d, n_p = z.size, p.size
    by_angle = np.zeros((n_d, n_p, ANGLES.size))
    use_numba = kernel_engine(engine) == "numba"
    for sel, rec, step in interpolation_groups(np.stack([a1, a2]), dt, p, interpolate):
        ps = p[sel]
        omega = np.broadcast_to(2 * np.pi / ps, (n_d, ps.size)).ravel()
        xi = np.broadcast_to(z[:, None], (n_d, ps.size)).ravel()
        out = np.zeros((omega.size, ANGLES.size))
        if use_numba:
            jit = _jit()
            coef = step_coefficients(omega, xi, step)
            r1 = np.ascontiguousarray(rec[0]); r2 = np.ascontiguousarray(rec[1])
            run_blocks(jit.rotd_range, omega.size, 4.0 * omega.size * r1.size, None,
                       (r1, r2, coef, _COS, _SIN), (out,))
        else:
            block = max(1, int(4e6 // max(rec.shape[1], 1)))
            for k0 in range(0, omega.size, block):
                sl = slice(k0, k0 + block)
                d1 = oscillator_history(rec[0], step, omega[sl], xi[sl], engine="numpy")[0]
                d2 = oscillator_history(rec[1], step, omega[sl], xi[sl], engine="numpy")[0]
                _numpy_rotated(d1, d2, out[sl])
        by_angle[:, sel, :] = out.reshape(n_d, ps.size, ANGLES.size)
    w2 = (2 * np.pi / p) ** 2
    sd = np.moveaxis(np.percentile(by_angle, q, axis=-1), 0, 0)  # (n_pct, n_d, n_p)
    gm = np.sqrt(by_angle[..., :90] * by_angle[..., 90:])
    gmrotd50 = np.median(gm, axis=-1) * w2
    angle = ANGLES[np.argmax(by_angle, axis=-1)]
    pga_by_angle = rotated_peak(a1, a2)
    pga = np.percentile(pga_by_angle, q)
    pga_bl = None
    if interpolate and a1.size > 1:
        fine = fourier_upsample(np.stack([a1, a2]), MAX_REFINEMENT)
        pga_bl = np.percentile(rotated_peak(fine[0], fine[1]), q)
    return RotD(periods=p, damping=z, percentiles=q, sd=sd, psv=sd * np.sqrt(w2),
                psa=sd * w2, gmrotd50=gmrotd50, angle_of_max=angle, pga=pga,
                by_angle=by_angle, pga_band_limited=pga_bl)
