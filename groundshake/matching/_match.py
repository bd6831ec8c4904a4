"""Spectrum-compatible motions by the time-domain corrective-wavelet method.

The record is changed by a sum of short wavelets, one for each oscillator (period,
damping) of the band, placed at the time of that oscillator's peak response, so the
record's phasing and build-up of energy stay as they were (Lilhanand & Tseng 1988;
Abrahamson 1992). The wavelet amplitudes b solve C b = ΔR, where C_ij is the
response of oscillator i at its peak time to wavelet j, and ΔR the misfit of the
peaks; as the peak times move when the motion changes, this is repeated until the
misfit is within the tolerance. The wavelet is the improved tapered cosine of Al Atik
& Abrahamson (2010), which adds almost no velocity or displacement drift.
"""
from __future__ import annotations

import contextlib
import math
import numbers
import os
import warnings
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Callable, Sequence, Union

import numpy as np

from .._errors import GroundshakeWarning, InputError
from .._progress import Progress
from ..records._record import Record
from ._acceptance import AcceptanceCriteria, acceptance_checks
from ._measures import integrate_motion
from ._wavelets import HALF_WIDTH_GAMMAS, WaveletResponses, add_wavelets, wavelet_parameters

if TYPE_CHECKING:  # pragma: no cover
    from ..spectra import TargetSpectrum

__all__ = ["MatchResult", "match_spectrum", "match_spectrum_report", "match_record_to_target",
           "default_band", "pad_seconds"]

TargetLike = Union[str, "TargetSpectrum", np.ndarray, Sequence[Any],
                   Callable[[np.ndarray], np.ndarray]]

#: Default period band [s] when neither ``band`` nor ``periods`` is given.
DEFAULT_BAND = (0.05, 4.0)
#: Periods per decade of the default grid over the band.
PERIODS_PER_DECADE = 30
#: A step is kept if it lowers the max misfit, or lowers the mean misfit by 1 % while
#: raising the max by at most 5 % (so the solution can leave a local tie of peaks).
_MEAN_GAIN = 0.99
_MAX_SLACK = 1.05


@dataclass(frozen=True, eq=False)
class MatchResult:
    """A matched record with its convergence and acceptance report.

    Attributes
    ----------
    record : Record
        The adjusted motion (padded with ``pad_s`` seconds of zeros each side before
        matching, so the wavelets fit whole; ``metadata["pad_before_s"]`` and
        ``start_time`` include that pad, so times stay counted from the first
        sample as read).
    original : Record
        The record as given.
    periods : ndarray, shape (n_periods,)
        Periods of the band [s].
    damping : ndarray, shape (n_damping,)
        Damping ratios matched at once.
    target_psa, psa_before, psa_after : ndarray, shape (n_damping, n_periods)
        Target, original and final pseudo-spectral acceleration [m/s²].
    iterations : list of dict
        Per iteration: ``iteration`` (0 = before any change; ``"baseline"`` after the
        last baseline correction, if any), ``max_misfit``, ``mean_misfit``
        (|PSA/target - 1| over the band) and ``regularisation`` (the Levenberg-Marquardt
        factor λ of the step taken).
    converged : bool
        Whether max misfit ≤ ``tolerance``.
    status : str
        ``"converged"``, ``"not converged"`` (iteration limit) or ``"stalled"`` (no
        step improved the misfit).
    tolerance : float
        Target max misfit (ratio).
    scale_factor : float
        Linear scale applied before matching (1.0 if none).
    pad_s : float
        Zero pad added before and after the record [s].
    baseline_corrected : bool
        Whether the last baseline correction was needed and applied.
    acceptance : dict
        See :func:`groundshake.matching.acceptance_checks`.
    warnings : list of str
        The warnings issued (also raised as :class:`GroundshakeWarning`).
    target_label : str
        Description of the target.
    """

    record: Record
    original: Record
    periods: np.ndarray
    damping: np.ndarray
    target_psa: np.ndarray
    psa_before: np.ndarray
    psa_after: np.ndarray
    iterations: list
    converged: bool
    status: str
    tolerance: float
    scale_factor: float
    pad_s: float
    baseline_corrected: bool
    acceptance: dict
    warnings: list = field(default_factory=list)
    target_label: str = ""

    @property
    def max_misfit(self) -> float:
        """Final max |PSA/target - 1| over the band."""
        return float(np.max(np.abs(self.psa_after / self.target_psa - 1.0)))

    def to_dict(self) -> dict:
        """Plain dict (SI units, damping as ratios) for JSON output."""
        return {
            "name": self.record.name,
            "status": self.status,
            "converged": self.converged,
            "tolerance": self.tolerance,
            "max_misfit": self.max_misfit,
            "iterations": self.iterations,
            "target": self.target_label,
            "periods": self.periods,
            "damping": self.damping,
            "target_psa": self.target_psa,
            "psa_before": self.psa_before,
            "psa_after": self.psa_after,
            "scale_factor": self.scale_factor,
            "pad_s": self.pad_s,
            "baseline_corrected": self.baseline_corrected,
            "acceptance": self.acceptance,
            "history": list(self.record.history),
            "warnings": self.warnings,
            "method": "time-domain corrective wavelets (Lilhanand & Tseng 1988; Abrahamson "
                      "1992) with the tapered-cosine wavelet of Al Atik & Abrahamson (2010)",
        }


def default_band(dt: float) -> tuple[float, float]:
    """The default band [s]: 0.05-4 s, its short end raised to 10·dt if the record is
    coarser (at least ten samples per period: Phillips et al. 2012)."""
    return (max(DEFAULT_BAND[0], 10.0 * dt), DEFAULT_BAND[1])


def pad_seconds(longest_period: float, damping: float = 0.05) -> float:
    """Zero pad [s] added to each end so the longest wavelet fits whole."""
    omega = np.array([2.0 * np.pi / longest_period])
    _, shift, gamma = wavelet_parameters(omega, np.array([damping]))
    return float(HALF_WIDTH_GAMMAS * gamma[0] + shift[0])


# -- inputs -----------------------------------------------------------------------------
def _periods_and_band(periods, band, dt: float) -> tuple[np.ndarray, tuple[float, float]]:
    if band is not None:
        try:
            lo, hi = (float(b) for b in band)
        except (TypeError, ValueError):
            raise InputError(f"given {band!r}; allowed: two periods [s], shortest first",
                             param="band") from None
        if not (math.isfinite(lo) and math.isfinite(hi) and 0 < lo < hi):
            raise InputError(f"given {band!r}; allowed: two periods 0 < T1 < T2 [s]", param="band")
    if periods is None:
        lo, hi = (lo, hi) if band is not None else default_band(dt)
        count = max(int(math.ceil(PERIODS_PER_DECADE * math.log10(hi / lo))) + 1, 8)
        periods = np.geomspace(lo, hi, count)
    else:
        periods = np.unique(np.asarray(periods, dtype=float).ravel())
        if periods.size == 0 or not np.all(np.isfinite(periods)) or periods[0] <= 0:
            raise InputError(f"given {periods!r}; allowed: finite periods > 0 [s]", param="periods")
        if band is None:
            lo, hi = float(periods[0]), float(periods[-1])
        else:
            periods = periods[(periods >= lo * (1 - 1e-12)) & (periods <= hi * (1 + 1e-12))]
            if periods.size == 0:
                raise InputError(f"none fall in the band {lo:g}-{hi:g} s", param="periods")
    if periods[0] <= 2.0 * dt:
        raise InputError(f"shortest period {periods[0]:g} s is at or below the Nyquist "
                         f"period 2·dt = {2 * dt:g} s of the record; allowed: > {2 * dt:g} s",
                         param="band")
    return periods, (lo, hi)


def _parsed(target):
    """Target specs given as text, parsed once (other target forms unchanged)."""
    from ..spectra import parse_target
    if isinstance(target, str):
        return parse_target(target)
    if isinstance(target, (list, tuple)) and any(isinstance(t, str) for t in target):
        return [parse_target(t) if isinstance(t, str) else t for t in target]
    return target


def _defined_range(target) -> tuple[float, float, str] | None:
    """Periods [s] where every target is defined (tables), with a label; None if all are."""
    from ..spectra import TargetSpectrum
    items = target if isinstance(target, (list, tuple)) else [target]
    lo, hi, names = 0.0, math.inf, []
    for t in items:
        if isinstance(t, TargetSpectrum) and t.period_range is not None:
            lo, hi = max(lo, t.period_range[0]), min(hi, t.period_range[1])
            names.append(t.label)
    return (lo, hi, ", ".join(names)) if names else None


def _fit_band(target, periods, band, dt: float, warn: list):
    """Keep the band inside a target table: clip the default band (with a note); an
    explicit band or explicit periods outside the table are errors naming its range."""
    rng = _defined_range(target)
    if rng is None:
        return band
    tlo, thi, name = rng
    where = f"the periods of the target ({name}): {tlo:g}-{thi:g} s"
    tiny = 1e-9
    if band is not None:
        try:
            lo, hi = (float(b) for b in band)
        except (TypeError, ValueError):
            return band                      # _periods_and_band names the problem
        if lo < tlo * (1 - tiny) or hi > thi * (1 + tiny):
            raise InputError(f"band {lo:g}-{hi:g} s reaches outside {where}; allowed: a band "
                             f"within {tlo:g}-{thi:g} s, or a target that covers the band")
        return band
    if periods is not None:
        p = np.asarray(periods, dtype=float).ravel()
        if p.size and np.all(np.isfinite(p)) and (p.min() < tlo * (1 - tiny)
                                                  or p.max() > thi * (1 + tiny)):
            raise InputError(f"periods {p.min():g}-{p.max():g} s reach outside {where}; "
                             f"allowed: periods within {tlo:g}-{thi:g} s")
        return band
    lo, hi = default_band(dt)
    if lo >= tlo * (1 - tiny) and hi <= thi * (1 + tiny):
        return band
    new = (max(lo, tlo), min(hi, thi))
    if not new[0] < new[1]:
        raise InputError(f"the default band {lo:g}-{hi:g} s does not overlap {where}; "
                         "give a target that covers the band")
    warn.append(f"the default band {lo:g}-{hi:g} s is clipped to {where}: matching over "
                f"{new[0]:g}-{new[1]:g} s only")
    return new


def _damping_array(damping) -> np.ndarray:
    d = np.atleast_1d(np.asarray(damping, dtype=float)).ravel()
    if d.size == 0 or not np.all(np.isfinite(d)) or np.any(d <= 0) or np.any(d >= 1):
        raise InputError(f"given {damping!r}; allowed: ratios 0 < ξ < 1 (e.g. 0.05)",
                         param="damping")
    if np.unique(d).size != d.size:
        raise InputError(f"given {damping!r}; give each damping ratio once", param="damping")
    return d


def _one_target(t: TargetLike, periods: np.ndarray, ratio: float,
                warn: list) -> tuple[np.ndarray, str]:
    from ..spectra import TargetSpectrum, parse_target
    if isinstance(t, str):
        t = parse_target(t)
    if isinstance(t, TargetSpectrum):
        values = np.asarray(t.psa(periods), dtype=float)
        if abs(float(t.damping) - ratio) > 1e-9:
            warn.append(f"target {t.label} is for {100 * float(t.damping):g} % "
                        f"damping but is matched at {100 * ratio:g} %")
        return values, t.label
    if callable(t):     # a function, or any callable (a partial has no __name__)
        return np.asarray(t(periods), dtype=float), getattr(t, "__name__", "target")
    values = np.asarray(t, dtype=float)
    return values, "target values"


def _target_matrix(target: TargetLike, periods: np.ndarray, damping: np.ndarray,
                   warn: list) -> tuple[np.ndarray, str]:
    n_d, n_p = damping.size, periods.size
    if isinstance(target, np.ndarray) or (isinstance(target, (list, tuple)) and target
                                          and isinstance(target[0], (numbers.Real, list, tuple))):
        values = np.asarray(target, dtype=float)
        if values.shape == (n_p,) and n_d == 1:
            values = values[None, :]
        if values.shape != (n_d, n_p):
            raise InputError(f"array of shape {values.shape}; allowed: (n_damping, "
                             f"n_periods) = ({n_d}, {n_p}) PSA values [m/s²]", param="target")
        label = "target values"
    elif isinstance(target, (list, tuple)):
        if len(target) != n_d:
            raise InputError(f"{len(target)} targets for {n_d} damping values; "
                             "allowed: one target per damping value", param="target")
        rows = [_one_target(t, periods, float(d), warn) for t, d in zip(target, damping)]
        values = np.vstack([r[0] for r in rows])
        label = "; ".join(r[1] for r in rows)
    else:
        if n_d != 1:
            raise InputError(f"one target for {n_d} damping values; allowed: one "
                             "target per damping value (a list), or an array (n_damping, n_periods)",
                             param="target")
        v, label = _one_target(target, periods, float(damping[0]), warn)
        values = v.reshape(1, -1)
    if values.shape != (n_d, n_p) or not np.all(np.isfinite(values)) or np.any(values <= 0):
        raise InputError(f"target ({label}): PSA must be finite and > 0 at every period of "
                         f"the band {periods[0]:g}-{periods[-1]:g} s")
    return values, label


# -- the iteration ----------------------------------------------------------------------
def _peaks(acc: np.ndarray, dt: float, omega: np.ndarray, zeta: np.ndarray):
    """PSA = ω²|x|max [m/s²], sample of the peak, sign of x there; each (n_osc,)."""
    from ..spectra import oscillator_history  # the one shared oscillator kernel

    disp, _, _ = oscillator_history(acc, dt, omega, zeta)
    idx = np.argmax(np.abs(disp), axis=1)
    peak = disp[np.arange(disp.shape[0]), idx]
    return omega**2 * np.abs(peak), idx, np.where(peak >= 0, 1.0, -1.0)


def _psa(acc: np.ndarray, dt: float, omega: np.ndarray, zeta: np.ndarray) -> np.ndarray:
    """PSA = ω²|x|max [m/s²], (n_osc,), from the kernel's peaks (no histories kept)."""
    from ..spectra import oscillator_peaks  # the one shared oscillator kernel

    return omega**2 * oscillator_peaks(acc, dt, omega, zeta).disp


def _iterate(acc, R, idx, sgn, mx, mn, lam, responses, dt, omega, zeta, Q, relax, misfit):
    """One corrective step: response matrix at the current peak times, a
    Levenberg-Marquardt solve for the wavelet amplitudes, and a trial that must lower the
    misfit (λ is raised ×4 until one does, at most 6 tries)."""
    if responses is None:
        responses = WaveletResponses(dt, omega, zeta)
    C = responses.matrix(idx)
    S = C * (omega**2 / Q)[:, None] * Q[None, :]   # rows: relative misfit; columns: b_j/Q_j
    r = sgn * (1.0 - R / Q)
    # Normal equations (SᵀS + λ²σ²I) b = Sᵀr, σ ≈ largest singular value of S by power
    # iteration (LU solves stay fast where threaded SVD is not).
    StS = S.T @ S
    Str = S.T @ r
    sigma2 = _largest_eigenvalue(StS)
    eye = np.eye(StS.shape[0])
    for _ in range(6):
        b = np.linalg.solve(StS + (lam * lam * sigma2) * eye, Str)
        trial = acc + relax * add_wavelets(acc.size, dt, omega, zeta, idx, b * Q,
                                           ragged=responses.ragged)
        mxt, mnt = misfit(_psa(trial, dt, omega, zeta))  # peaks only: cheap trial
        if mxt < mx or (mnt < _MEAN_GAIN * mn and mxt <= _MAX_SLACK * mx):
            Rt, idx_t, sgn_t = _peaks(trial, dt, omega, zeta)  # peak times and signs
            mxt, mnt = misfit(Rt)
            return {"accepted": True, "acc": trial, "R": Rt, "idx": idx_t, "sgn": sgn_t,
                    "mx": mxt, "mn": mnt, "lam": lam, "responses": responses}
        lam *= 4.0
    return {"accepted": False, "lam": lam, "responses": responses}


def _largest_eigenvalue(A: np.ndarray, iterations: int = 30) -> float:
    """Largest eigenvalue of a symmetric positive semi-definite matrix (power iteration)."""
    v = np.ones(A.shape[0]) / np.sqrt(A.shape[0])
    lam = 0.0
    for _ in range(iterations):
        w = A @ v
        lam = float(np.linalg.norm(w))
        if lam == 0.0:
            return 1.0
        v = w / lam
    return lam


def _baseline_fix(acc: np.ndarray, dt: float) -> np.ndarray:
    """Acceleration correction that brings final velocity and displacement to zero.

    Two smooth shapes (a Hann window w(t) and w(t)·(t - t_mid)), zero at both ends, are
    combined so that their integrals cancel the final velocity and displacement
    exactly (integrated as piecewise-linear, like the record).
    """
    n = acc.size
    t = np.arange(n) * dt
    w = np.hanning(n)
    basis = np.vstack([w, w * (t - t[n // 2]) / max(t[-1], dt)])
    vb, db = integrate_motion(basis, dt)
    v, d = integrate_motion(acc, dt)
    A = np.array([[vb[0, -1], vb[1, -1]], [db[0, -1], db[1, -1]]])
    c = np.linalg.solve(A, -np.array([v[-1], d[-1]]))
    return c @ basis


def match_spectrum_report(record: Record, target: TargetLike,
                          damping: float | Sequence[float] = 0.05,
                          periods: np.ndarray | Sequence[float] | None = None, *,
                          band: tuple[float, float] | None = None, tolerance: float = 0.05,
                          max_iterations: int = 40, relaxation: float = 1.0,
                          prescale: bool = True, pad: bool = True, rcond: float = 1e-2,
                          criteria: AcceptanceCriteria | None = None,
                          progress: bool = False) -> MatchResult:
    """Adjust ``record`` until its spectrum matches ``target``; return the full report.

    Parameters
    ----------
    record : Record
        A corrected acceleration record [m/s²].
    target : str, TargetSpectrum, array or sequence
        A target spec string (``"asce7:sds=1.0,sd1=0.6"``, see
        :func:`groundshake.spectra.parse_target`), an object with ``.psa(periods)`` in
        m/s², a callable of the periods, an array of PSA [m/s²] shaped (n_periods,) or
        (n_damping, n_periods), or a list of any of these, one per damping value.
    damping : float or sequence of float
        Damping ratio(s) matched at once (0.05 = 5 %).
    periods : array_like, optional
        Periods [s] at which the spectrum is matched; default: 30 per decade over
        ``band``.
    band : (float, float), optional
        Shortest and longest period [s]; default the span of ``periods``, or
        0.05-4 s (short end at least 10·dt).
    tolerance : float
        Converged when max |PSA/target - 1| ≤ tolerance over the band (0.05 = 5 %).
    max_iterations : int
        Most iterations (each: one response matrix, one solve, one update).
    relaxation : float
        Fraction (0, 1] of the computed wavelet amplitudes applied at each step.
    prescale : bool
        Scale the record first so the mean log ratio to the target is zero (common
        practice before matching).
    pad : bool
        Add zeros before and after so the longest wavelet fits whole.
    rcond : float
        First Levenberg-Marquardt factor λ (relative to the largest singular value of the
        scaled response matrix): each step solves (SᵀS + λ²σ²I) b = Sᵀr. λ is multiplied
        by 4 while a step fails to reduce the misfit and divided by 4 after a good one
        (floor 1e-4); this keeps nearly dependent oscillators (close periods, several
        damping values at one period) from producing large opposing wavelets.
    criteria : AcceptanceCriteria, optional
        Limits of the acceptance checks (defaults documented there).
    progress : bool
        Show a progress bar of the iterations on stderr (when it is a terminal).

    Returns
    -------
    MatchResult

    Warns
    -----
    GroundshakeWarning
        When the match does not converge, when the final baseline correction was
        needed, and when an acceptance check fails.

    Examples
    --------
    >>> from groundshake import read_record, correct_record  # doctest: +SKIP
    >>> rec = correct_record(read_record("records/demo-h1.mseed", units="m/s2")[0])  # doctest: +SKIP
    >>> res = match_spectrum_report(rec, "asce7:sds=1.0,sd1=0.6,tl=8", 0.05, None,
    ...                             band=(0.05, 4.0))  # doctest: +SKIP
    >>> res.status, res.iterations[-1]["max_misfit"] <= 0.05  # doctest: +SKIP
    ('converged', True)

    References
    ----------
    Lilhanand, K. & Tseng, W.S. (1988), Proc. 9th WCEE, vol. II, 819-824.
    Abrahamson, N.A. (1992), "Non-stationary spectral matching", Seismol. Res. Lett. 63(1).
    Al Atik, L. & Abrahamson, N. (2010), "An improved method for nonstationary spectral
    matching", Earthquake Spectra 26(3), 601-617.
    """
    if not isinstance(record, Record):
        raise InputError(f"{type(record).__name__}; allowed: a groundshake Record", param="record")
    if not (math.isfinite(tolerance) and tolerance > 0):
        raise InputError(f"given {tolerance!r}; allowed: a ratio > 0 (0.05 = 5 %)",
                         param="tolerance")
    if int(max_iterations) < 0:
        raise InputError(f"given {max_iterations!r}; allowed: an integer >= 0",
                         param="max_iterations")
    if not (0 < relaxation <= 1):
        raise InputError(f"given {relaxation!r}; allowed: 0 < relaxation <= 1", param="relaxation")
    if np.max(np.abs(record.acc), initial=0.0) == 0:
        raise InputError(f"{record.name}: the record is all zeros; nothing to match")
    dt = record.dt
    warn: list[str] = []
    damping_arr = _damping_array(damping)
    target = _parsed(target)
    band = _fit_band(target, periods, band, dt, warn)
    periods_arr, (lo, hi) = _periods_and_band(periods, band, dt)
    if periods_arr[0] < 10.0 * dt:
        warn.append(f"shortest period {periods_arr[0]:g} s has fewer than 10 samples per "
                    f"period (dt = {dt:g} s); short-period match is coarse (Phillips et al. 2012)")
    target_psa, label = _target_matrix(target, periods_arr, damping_arr, warn)
    n_d, n_p = target_psa.shape
    omega = np.tile(2.0 * np.pi / periods_arr, n_d)
    zeta = np.repeat(damping_arr, n_p)
    Q = target_psa.ravel()

    steps = []
    pad_s = 0.0
    acc0 = record.acc
    if pad:
        pad_s = pad_seconds(float(periods_arr[-1]), float(damping_arr.min()))
        n_pad = int(math.ceil(pad_s / dt))
        pad_s = n_pad * dt
        acc0 = np.concatenate([np.zeros(n_pad), acc0, np.zeros(n_pad)])
        steps.append(f"padded with {pad_s:.3f} s of zeros at each end for matching")
    acc_before = acc0.copy()
    v_in, d_in = integrate_motion(acc0, dt)
    if (abs(v_in[-1]) > 0.05 * np.max(np.abs(v_in))
            or abs(d_in[-1]) > 0.2 * np.max(np.abs(d_in))):
        warn.append(f"{record.name}: the input ends with velocity {v_in[-1]:.3g} m/s and "
                    f"displacement {d_in[-1]:.3g} m; correct the record (baseline, low-cut "
                    "filter) before matching")
    R0, idx, sgn = _peaks(acc0, dt, omega, zeta)
    psa_before = R0.reshape(n_d, n_p)
    scale = 1.0
    if prescale:
        scale = float(np.exp(np.mean(np.log(Q / R0))))
        steps.append(f"scaled by {scale:.6g} (mean log ratio to the target over the band = 0)")
    acc = acc0 * scale
    R = R0 * scale

    def misfit(Rv):
        m = np.abs(Rv / Q - 1.0)
        return float(m.max()), float(m.mean())

    mx, mn = misfit(R)
    iterations = [{"iteration": 0, "max_misfit": mx, "mean_misfit": mn,
                   "regularisation": None}]
    relax = float(relaxation)
    lam = float(rcond)
    responses = None
    status = "converged" if mx <= tolerance else "not converged"
    bar = Progress("matching", total=int(max_iterations)) if progress else contextlib.nullcontext()
    with bar:
        for it in range(1, int(max_iterations) + 1):
            if mx <= tolerance:
                break
            state = _iterate(acc, R, idx, sgn, mx, mn, lam, responses, dt, omega, zeta, Q,
                             relax, misfit)
            if responses is None:
                responses = state["responses"]
            lam = state["lam"]
            if not state["accepted"]:
                status = "stalled"
                iterations.append({"iteration": it, "max_misfit": mx, "mean_misfit": mn,
                                   "regularisation": lam})
                break
            acc, R, idx, sgn, mx, mn = (state[k] for k in ("acc", "R", "idx", "sgn", "mx", "mn"))
            iterations.append({"iteration": it, "max_misfit": mx, "mean_misfit": mn,
                               "regularisation": lam})
            lam = max(lam / 4.0, 1e-4)
            if progress:
                bar.advance()
    converged = mx <= tolerance
    if converged:
        status = "converged"
    elif status != "stalled":
        status = "not converged"
    n_iter = iterations[-1]["iteration"]
    steps.append(f"matched to {label} at {', '.join(f'{100 * d:g}' for d in damping_arr)} % "
                 f"damping over {periods_arr[0]:g}-{periods_arr[-1]:g} s by corrective wavelets "
                 f"(Al Atik & Abrahamson 2010): {status} after {n_iter} iterations, "
                 f"max misfit {100 * mx:.2f} %")

    crit = criteria or AcceptanceCriteria()
    vel, disp = integrate_motion(acc, dt)
    pgv = float(np.max(np.abs(vel)))
    pgd = float(np.max(np.abs(disp)))
    baseline = (abs(vel[-1]) > crit.max_final_velocity_ratio * pgv
                or abs(disp[-1]) > crit.max_final_displacement_ratio * pgd)
    if baseline:
        acc = acc + _baseline_fix(acc, dt)
        R, _, _ = _peaks(acc, dt, omega, zeta)
        mx, mn = misfit(R)
        iterations.append({"iteration": "baseline", "max_misfit": mx, "mean_misfit": mn,
                           "regularisation": None})
        steps.append(f"final velocity {vel[-1]:.3g} m/s and displacement {disp[-1]:.3g} m "
                     f"brought to zero by a smooth baseline correction; max misfit now "
                     f"{100 * mx:.2f} %")
        warn.append(f"{record.name}: matched motion needed a last baseline correction "
                    f"(final velocity {vel[-1]:.3g} m/s, displacement {disp[-1]:.3g} m)")
        converged = mx <= tolerance
        if not converged and status == "converged":
            status = "not converged"

    psa_after = R.reshape(n_d, n_p)
    acceptance = acceptance_checks(psa=psa_after, target_psa=target_psa,
                                   acc_before=acc_before, acc_after=acc, dt=dt, criteria=crit)
    if not converged:
        warn.append(f"{record.name}: spectral match {status}: max misfit {100 * mx:.1f} % > "
                    f"tolerance {100 * tolerance:g} % after {n_iter} iterations; the target "
                    "may be unreachable from this record (check the target and the band)")
    failed = [k for k, ok in acceptance["checks"].items() if not ok]
    if failed:
        warn.append(f"{record.name}: acceptance check(s) not met: {', '.join(failed)}")
    for w in warn:
        warnings.warn(w, GroundshakeWarning, stacklevel=2)

    out = record
    for s in steps:
        out = out.replace(step=s)
    changes = {}
    if pad_s:        # the pads keep the record's own time axis: as read from t = 0
        md = dict(record.metadata)
        md["pad_before_s"] = float(md.get("pad_before_s", 0.0) or 0.0) + pad_s
        md["pad_after_s"] = float(md.get("pad_after_s", 0.0) or 0.0) + pad_s
        changes = {"metadata": md, "start_time": _shift_iso(record.start_time, -pad_s)}
    out = out.replace(acc=acc, **changes)
    return MatchResult(record=out, original=record, periods=periods_arr, damping=damping_arr,
                       target_psa=target_psa, psa_before=psa_before, psa_after=psa_after,
                       iterations=iterations, converged=converged, status=status,
                       tolerance=float(tolerance), scale_factor=scale, pad_s=pad_s,
                       baseline_corrected=bool(baseline), acceptance=acceptance,
                       warnings=warn, target_label=label)


def match_spectrum(record: Record, target: TargetLike,
                   damping: float | Sequence[float] = 0.05,
                   periods: np.ndarray | Sequence[float] | None = None, **options) -> Record:
    """Adjust ``record`` until its spectrum matches ``target``; return the new Record.

    Same parameters as :func:`match_spectrum_report` (``band``, ``tolerance``,
    ``max_iterations``, ``relaxation``, ``prescale``, ``pad``, ``rcond``, ``criteria``
    keyword-only); the convergence and acceptance report is dropped, except that a
    failed match still warns (:class:`GroundshakeWarning`) and is written in the
    record's ``history``.
    """
    return match_spectrum_report(record, target, damping, periods, **options).record


def match_record_to_target(record: Record, spec: str, *, damping: float | None = None,
                           periods: np.ndarray | Sequence[float] | None = None,
                           band: tuple[float, float] | None = None,
                           base_dir: str | os.PathLike | None = None,
                           **options) -> tuple[Record, dict]:
    """Scenario hook: match one component to the target named in ``[motion] target``.

    Parameters
    ----------
    record : Record
        The corrected component [m/s²].
    spec : str
        Target spec string (see :func:`groundshake.spectra.parse_target`); a CSV or
        Volume 3 path is resolved against ``base_dir`` (the scenario's folder).
    damping : float, optional
        Damping ratio of the match; default: the damping the target is for
        (``TargetSpectrum.damping``), else 0.05.
    periods, band, **options
        As :func:`match_spectrum_report`.

    Returns
    -------
    (Record, dict)
        The matched record and the report (``MatchResult.to_dict()`` plus ``cautions``).
    """
    from .._cautions import CAUTIONS
    from ..spectra import parse_target

    target = parse_target(spec, base_dir=base_dir)
    if damping is None:
        damping = float(target.damping or 0.05)     # matching needs ξ > 0: 0 % → 5 %
    result = match_spectrum_report(record, target, damping, periods, band=band, **options)
    report = result.to_dict()
    report["cautions"] = list(CAUTIONS)
    return result.record, report


def _shift_iso(text: str, seconds: float) -> str:
    """An ISO 8601 time moved by ``seconds`` ("" stays "", unreadable text unchanged)."""
    from datetime import datetime, timedelta

    if not text or not seconds:
        return text
    try:
        t = datetime.fromisoformat(text.replace("Z", "+00:00"))
    except ValueError:
        return text
    return (t + timedelta(seconds=seconds)).isoformat()
