"""Record correction: mean, velocity baseline, taper, zero pads, acausal Butterworth.

Follows Boore & Bommer (2005), "Processing of strong-motion accelerograms: needs,
options and consequences", Soil Dyn. Earthq. Eng. 25, 93-115, and Boore (2005),
"On pads and filters: processing strong-motion data", BSSA 95(2), 745-750.
"""
from __future__ import annotations

import math
import warnings
from datetime import datetime, timedelta

import numpy as np
from scipy import signal

from .._errors import GroundshakeWarning, InputError
from ..records._record import Record
from ._integrate import integrate
from ._settings import DEFAULT_PROCESSING, ProcessingSettings

__all__ = ["correct_record", "butterworth_sos", "pad_samples", "cosine_taper",
           "remove_velocity_baseline"]


def butterworth_sos(dt: float, *, highpass_hz: float | None = None,
                    lowpass_hz: float | None = None, order: int = 4) -> np.ndarray | None:
    """Second-order sections of one Butterworth pass (scipy.signal.butter).

    Parameters
    ----------
    dt : float
        Time step [s].
    highpass_hz, lowpass_hz : float or None
        Corners [Hz]: a high-pass (low-cut), low-pass (high-cut) or band-pass filter.
    order : int
        Order of the pass.

    Returns
    -------
    ndarray, shape (n_sections, 6), or None when neither corner is given.
    Applied forward and backward (``scipy.signal.sosfiltfilt``) the gain is the
    square of this pass's: one half (-6 dB) at each corner.
    """
    fs = 1.0 / float(dt)
    if highpass_hz is not None and lowpass_hz is not None:
        return signal.butter(order, [highpass_hz, lowpass_hz], btype="bandpass", output="sos", fs=fs)
    if highpass_hz is not None:
        return signal.butter(order, highpass_hz, btype="highpass", output="sos", fs=fs)
    if lowpass_hz is not None:
        return signal.butter(order, lowpass_hz, btype="lowpass", output="sos", fs=fs)
    return None


def pad_samples(dt: float, highpass_hz: float, order: int) -> int:
    """Zero-pad samples at each end: half of 1.5·n/fc in total (Boore 2005), rounded up."""
    return int(math.ceil(0.75 * order / highpass_hz / dt))


def cosine_taper(n: int, percent: float) -> np.ndarray:
    """Half-cosine (Hann) taper of ``percent`` of ``n`` samples at each end, shape (n,)."""
    if percent <= 0:
        return np.ones(n)
    return signal.windows.tukey(n, alpha=min(1.0, 2.0 * percent / 100.0))


def remove_velocity_baseline(acc, dt: float, order: int) -> tuple[np.ndarray, np.ndarray]:
    """Fit a polynomial of ``order`` to velocity; remove its derivative from ``acc``.

    Parameters
    ----------
    acc : array_like, shape (n,)
        Acceleration [m/s²], one sample every ``dt``.
    dt : float
        Time step [s].
    order : int
        Order of the velocity polynomial (least squares over the whole record).

    Returns
    -------
    acc : ndarray, shape (n,)
        Corrected acceleration [m/s²].
    coef : ndarray, shape (order + 1,)
        Velocity polynomial coefficients in powers of t [s], lowest first [m/s, m/s², ...].
    """
    a = np.asarray(acc, dtype=float)
    t = np.arange(a.size) * dt
    vel, _ = integrate(a, dt)
    poly = np.polynomial.Polynomial.fit(t, vel, order)
    return a - poly.deriv()(t), poly.convert().coef


def correct_record(record: Record, settings: ProcessingSettings | None = None) -> Record:
    """Correct an acceleration record (Boore & Bommer 2005; Boore 2005).

    Steps, each appended to ``history``: remove the mean (whole record or
    pre-event part); fit a polynomial to velocity and remove its derivative;
    half-cosine taper at both ends; zero pads of 1.5·n/fc in total before a
    low-cut filter; acausal (forward-backward) Butterworth filter in second-order
    sections. The padded record is returned (Boore 2005: velocity, displacement and
    spectra must be computed from it); ``metadata["pad_before_s"]`` says how much
    was added in front.

    Parameters
    ----------
    record : Record
        Acceleration as read [m/s²].
    settings : ProcessingSettings, optional
        Defaults: :data:`DEFAULT_PROCESSING` (published practice).

    Returns
    -------
    Record
        A new record; ``acc`` shape (n + pads,) [m/s²].

    Raises
    ------
    InputError
        A corner at or above the Nyquist frequency, or a pre-event part too short.

    Warns
    -----
    GroundshakeWarning
        A low-cut period (1/highpass_hz) longer than the record.

    Examples
    --------
    >>> rec = read_record("records/demo-h1.csv")[0]                            # doctest: +SKIP
    >>> out = correct_record(rec, ProcessingSettings(highpass_hz=0.15))        # doctest: +SKIP
    >>> out.n > rec.n, out.history[-1]                                         # doctest: +SKIP
    (True, 'acausal Butterworth high-pass 0.15 Hz, order 4 each way (scipy sosfiltfilt)')
    """
    s = DEFAULT_PROCESSING if settings is None else settings
    if not s.enabled:
        return record.replace(step="processing off: used exactly as read")
    dt = record.dt
    nyquist = 0.5 / dt
    for key in ("highpass_hz", "lowpass_hz"):
        value = getattr(s, key)
        if value is not None and value >= 0.95 * nyquist:
            what = "high-pass" if key == "highpass_hz" else "low-pass"
            raise InputError(f"{what} corner {value:g} Hz must be below 0.95 x the Nyquist "
                             f"frequency {nyquist:g} Hz of {record.source or record.name} "
                             f"(dt = {dt:g} s)", param=key, value=value)
    rec = record
    acc = np.array(record.acc, dtype=float)

    # 1. mean
    if s.mean_removal == "pre-event":
        m = int(math.floor(s.pre_event_s / dt)) + 1
        if m < 2 or m > acc.size:
            raise InputError(f"a pre-event length of {s.pre_event_s:g} s gives {m} samples of "
                             f"{record.source or record.name}; need 2 to {acc.size}",
                             param="pre_event_s", value=s.pre_event_s)
        mean = float(np.mean(acc[:m]))
        acc = acc - mean
        rec = rec.replace(acc=acc, step=f"removed the pre-event mean ({s.pre_event_s:g} s): "
                                        f"{mean:.6g} m/s2")
    else:
        mean = float(np.mean(acc))
        acc = acc - mean
        rec = rec.replace(acc=acc, step=f"removed the mean of the whole record: {mean:.6g} m/s2")

    # 2. velocity baseline
    if s.baseline_order:
        acc, coef = remove_velocity_baseline(acc, dt, s.baseline_order)
        rec = rec.replace(acc=acc, step=f"removed the derivative of an order-{s.baseline_order} "
                                        f"polynomial fitted to velocity (coefficients "
                                        f"{', '.join(f'{c:.4g}' for c in coef)})")

    # 3. taper
    if s.taper_percent > 0:
        acc = acc * cosine_taper(acc.size, s.taper_percent)
        rec = rec.replace(acc=acc, step=f"cosine taper over {s.taper_percent:g} % at each end")

    # 4. pads and 5. filter
    sos = butterworth_sos(dt, highpass_hz=s.highpass_hz, lowpass_hz=s.lowpass_hz,
                          order=s.filter_order)
    if sos is not None:
        changes = {}
        if s.highpass_hz is not None:
            if 1.0 / s.highpass_hz > record.duration:
                warnings.warn(f"{record.source or record.name}: high-pass corner {s.highpass_hz:g} Hz is below "
                              f"1/duration = {1 / max(record.duration, dt):.3g} Hz; the filter "
                              f"has little record to act on", GroundshakeWarning, stacklevel=2)
            if s.pad:
                npad = pad_samples(dt, s.highpass_hz, s.filter_order)
                acc = np.concatenate([np.zeros(npad), acc, np.zeros(npad)])
                md = dict(rec.metadata)
                before = float(md.get("pad_before_s", 0.0)) + npad * dt
                md["pad_before_s"] = before
                md["pad_after_s"] = float(md.get("pad_after_s", 0.0)) + npad * dt
                changes = {"metadata": md, "start_time": _shift_iso(rec.start_time, -npad * dt)}
                rec = rec.replace(acc=acc, step=f"zero pads of {npad * dt:g} s at each end "
                                                f"(1.5·n/fc = {2 * npad * dt:g} s in total), kept",
                                  **changes)
        acc = signal.sosfiltfilt(sos, acc, padtype=None)
        band = " to ".join(f"{v:g} Hz" for v in (s.highpass_hz, s.lowpass_hz) if v is not None)
        kind = ("band-pass" if s.highpass_hz is not None and s.lowpass_hz is not None
                else "high-pass" if s.highpass_hz is not None else "low-pass")
        rec = rec.replace(acc=acc, step=f"acausal Butterworth {kind} {band}, order "
                                        f"{s.filter_order} each way (scipy sosfiltfilt)")
    return rec


def _shift_iso(text: str, seconds: float) -> str:
    if not text:
        return ""
    try:
        t = datetime.fromisoformat(text.replace("Z", "+00:00"))
    except ValueError:
        return text
    return (t + timedelta(seconds=seconds)).isoformat()

