"""Response spectra of one or many records: ``response_spectrum`` and ``Spectrum``."""
from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from scipy import fft as sfft

from .._errors import GroundshakeWarning, InputError
from ._kernel import Engine, oscillator_peaks

__all__ = ["Spectrum", "response_spectrum", "default_periods", "fourier_upsample",
           "check_periods", "check_damping", "interpolation_groups", "SAMPLES_PER_PERIOD"]

#: Fewest samples per oscillator period before the record is Fourier-interpolated
#: (Phillips, Kottke, Hashash & Rathje 2012).
SAMPLES_PER_PERIOD = 10


def default_periods() -> np.ndarray:
    """The default period grid [s]: 100 log-spaced periods from 0.01 to 10 s.

    PGA, the zero-period value, is reported separately (:attr:`Spectrum.pga`).

    Returns
    -------
    ndarray, shape (100,)
    """
    return np.geomspace(0.01, 10.0, 100)


def check_periods(periods, *, name: str = "periods") -> np.ndarray:
    """Periods as a 1-D float array; InputError unless all finite and > 0."""
    try:
        p = np.atleast_1d(np.asarray(periods, dtype=float))
    except (TypeError, ValueError):
        raise InputError(f"{name}: {periods!r} is not a list of numbers of seconds") from None
    if p.ndim != 1 or p.size == 0:
        raise InputError(f"{name}: give a 1-D list of at least one period, got shape {p.shape}")
    bad = ~(np.isfinite(p) & (p > 0))
    if bad.any():
        raise InputError(f"{name}: {p[bad][0]:g} s is not allowed; periods must be finite "
                         "and > 0 s (PGA is reported separately as the zero-period value)")
    return p


def check_damping(damping, *, name: str = "damping") -> np.ndarray:
    """Damping ratios as a 1-D float array; InputError unless all in [0, 1)."""
    try:
        z = np.atleast_1d(np.asarray(damping, dtype=float))
    except (TypeError, ValueError):
        raise InputError(f"{name}: {damping!r} is not a list of damping ratios") from None
    if z.ndim != 1 or z.size == 0:
        raise InputError(f"{name}: give a 1-D list of at least one ratio, got shape {z.shape}")
    bad = ~(np.isfinite(z) & (z >= 0) & (z < 1))
    if bad.any():
        raise InputError(f"{name}: ratio {z[bad][0]:g} is outside [0, 1) "
                         "(the Python API takes ratios: 0.05 for 5 %)")
    return z


@dataclass(frozen=True, eq=False)
class Spectrum:
    """Response spectra of one record (or a stack of records).

    Attributes
    ----------
    periods : ndarray, shape (n_periods,)
        Oscillator periods [s].
    damping : ndarray, shape (n_damping,)
        Damping ratios.
    sd, sv, sa : ndarray, shape (..., n_damping, n_periods)
        Peak |relative displacement| [m], |relative velocity| [m/s] and |absolute
        acceleration| [m/s²] (``sa`` is the true absolute acceleration).
    psv, psa : ndarray, shape (..., n_damping, n_periods)
        Pseudo-velocity ω·sd [m/s] and pseudo-acceleration ω²·sd [m/s²].
    pga : ndarray or float, shape (...)
        Peak |ground acceleration| [m/s²] of the record as given (the zero period).
    sd_time, sa_time : ndarray, shape (..., n_damping, n_periods)
        Time [s] of the displacement and absolute-acceleration peaks.
    interpolated : bool
        Whether some periods used a Fourier-interpolated record.
    name : str
        Label of the record ("" when built from a bare array).
    """

    periods: np.ndarray
    damping: np.ndarray
    sd: np.ndarray
    sv: np.ndarray
    sa: np.ndarray
    psv: np.ndarray
    psa: np.ndarray
    pga: Any
    sd_time: np.ndarray = field(repr=False, default=None)
    sa_time: np.ndarray = field(repr=False, default=None)
    interpolated: bool = False
    name: str = ""

    @property
    def omega(self) -> np.ndarray:
        """Circular frequencies 2π/T [rad/s], shape (n_periods,)."""
        return 2 * np.pi / self.periods

    def to_dict(self) -> dict:
        """Plain dict of the spectrum in SI units (lists), for JSON."""
        return {"name": self.name, "periods": self.periods, "damping_percent":
                100.0 * self.damping, "pga": self.pga, "sd": self.sd, "sv": self.sv,
                "sa": self.sa, "psv": self.psv, "psa": self.psa}


def fourier_upsample(acc: np.ndarray, factor: int) -> np.ndarray:
    """Band-limited (Fourier) interpolation of records to ``factor`` times the rate.

    The straight line joining the first and last samples is taken out first and put
    back after, so the periodic extension the FFT implies has no jump at the ends.

    Parameters
    ----------
    acc : ndarray, shape (..., n)
        Samples at step dt.
    factor : int
        Integer rate factor m ≥ 1.

    Returns
    -------
    ndarray, shape (..., (n - 1)·m + 1)
        Samples at step dt/m; every m-th sample equals the original one (to round-off).
    """
    a = np.asarray(acc, dtype=float)
    m = int(factor)
    n = a.shape[-1]
    if m <= 1 or n < 2:
        return a.copy()
    s = np.arange(n) / (n - 1)
    trend0 = a[..., :1]
    slope = a[..., -1:] - a[..., :1]
    r = a - trend0 - slope * s
    spec = sfft.rfft(r, axis=-1)
    big = n * m
    out = np.zeros(a.shape[:-1] + (big // 2 + 1,), dtype=complex)
    out[..., : spec.shape[-1]] = spec
    if n % 2 == 0:
        out[..., n // 2] *= 0.5          # split the Nyquist bin between ± frequencies
    y = sfft.irfft(out, n=big, axis=-1)[..., : (n - 1) * m + 1] * m
    sf = np.arange((n - 1) * m + 1) / ((n - 1) * m)
    return y + trend0 + slope * sf


def interpolation_groups(flat: np.ndarray, dt: float, periods: np.ndarray,
                         interpolate: bool):
    """Split periods into those the record resolves and those needing interpolation.

    Yields ``(selection (n_periods,) bool, records (n_rec, n), step)``: the periods
    at or above 10·dt with the records as given, and, if any are shorter (and
    ``interpolate``), those with the records Fourier-interpolated by the integer
    factor that gives them ten samples per period (Phillips et al. 2012).
    """
    short = periods < SAMPLES_PER_PERIOD * dt if interpolate else np.zeros(periods.size, bool)
    if (~short).any():
        yield ~short, flat, dt
    if short.any():
        m = int(math.ceil(SAMPLES_PER_PERIOD * dt / periods[short].min() - 1e-9))
        yield short, fourier_upsample(flat, m), dt / m


def response_spectrum(acc: np.ndarray, dt: float, periods=None, damping=0.05, *,
                      interpolate: bool = True, engine: Engine = "auto",
                      name: str = "") -> Spectrum:
    """Response spectra of base accelerations, exact for piecewise-linear records.

    Parameters
    ----------
    acc : ndarray, shape (n_t,) or (..., n_t)
        Ground acceleration [m/s²], time on the last axis; leading axes are records
        (or components, sensors) computed in one batch.
    dt : float
        Time step [s].
    periods : array_like, shape (n_periods,), optional
        Oscillator periods [s], all > 0; default :func:`default_periods`.
    damping : float or array_like, shape (n_damping,)
        Damping ratios in [0, 1) (0.05 for 5 %).
    interpolate : bool
        Fourier-interpolate the record for periods shorter than 10·dt (Phillips et
        al. 2012); turn off to use the samples as they are.
    engine : {"auto", "numba", "numpy"}
        Kernel engine (see :func:`groundshake.spectra.kernel_engine`).
    name : str
        Label carried by the result.

    Returns
    -------
    Spectrum
        ``sd, sv, sa, psv, psa`` shaped (..., n_damping, n_periods); ``pga`` (...).

    Raises
    ------
    InputError
        Periods ≤ 0 or not finite, damping outside [0, 1), dt ≤ 0, NaN samples.

    Notes
    -----
    Each oscillator solves u'' + 2ξωu' + ω²u = -a_g(t) from rest (Nigam & Jennings
    1969); PSV = ω·SD and PSA = ω²·SD. SA tends to PGA as the period goes to zero.

    References
    ----------
    Nigam & Jennings (1969), BSSA 59(2); Phillips, Kottke, Hashash & Rathje (2012),
    Soil Dyn. Earthq. Eng.

    Examples
    --------
    >>> import numpy as np
    >>> t = np.arange(0, 10, 0.01)
    >>> s = response_spectrum(np.sin(2 * np.pi * t), 0.01, [0.5, 1.0], [0.02, 0.05])
    >>> s.psa.shape
    (2, 2)
    """
    p = default_periods() if periods is None else check_periods(periods)
    z = check_damping(damping)
    try:
        dt = float(dt)
    except (TypeError, ValueError):
        raise InputError(f"dt={dt!r} must be a number of seconds > 0") from None
    if not (math.isfinite(dt) and dt > 0):
        raise InputError(f"dt={dt!r} must be a finite number of seconds > 0")
    a = np.asarray(acc, dtype=float)
    if a.ndim == 0 or a.shape[-1] < 1:
        raise InputError(f"acc must have at least one sample on its last axis, got shape {a.shape}")
    if not np.all(np.isfinite(a)):
        raise InputError("acc holds NaN or inf")
    lead = a.shape[:-1]
    flat = a.reshape(-1, a.shape[-1])
    n_rec, n_t = flat.shape
    duration = (n_t - 1) * dt
    if n_t > 1 and p.max() > duration:
        warnings.warn(f"periods up to {p.max():g} s exceed the record length "
                      f"({duration:g} s); values there mostly reflect the free vibration "
                      "after the record ends", GroundshakeWarning, stacklevel=2)
    n_d, n_p = z.size, p.size
    out = {k: np.zeros((n_rec, n_d, n_p)) for k in ("sd", "sv", "sa", "sd_time", "sa_time")}
    short = None
    for sel, rec, step in interpolation_groups(flat, dt, p, interpolate):
        short = sel if step < dt else short
        ps = p[sel]
        # oscillators ordered record-major so that each kernel block shares one record
        omega = np.broadcast_to(2 * np.pi / ps, (n_rec, n_d, ps.size)).ravel()
        xi = np.broadcast_to(z[:, None], (n_rec, n_d, ps.size)).ravel()
        src = np.repeat(np.arange(n_rec), n_d * ps.size)
        pk = oscillator_peaks(rec, step, omega, xi, source=src, engine=engine)
        shape = (n_rec, n_d, ps.size)
        out["sd"][..., sel] = pk.disp.reshape(shape)
        out["sv"][..., sel] = pk.vel.reshape(shape)
        out["sa"][..., sel] = pk.abs_acc.reshape(shape)
        out["sd_time"][..., sel] = pk.disp_time.reshape(shape)
        out["sa_time"][..., sel] = pk.abs_acc_time.reshape(shape)
    omega = 2 * np.pi / p
    res = {k: v.reshape(lead + (n_d, n_p)) for k, v in out.items()}
    pga = np.abs(flat).max(axis=-1).reshape(lead)
    if not lead:
        pga = float(pga)
    for v in res.values():
        v.setflags(write=False)
    return Spectrum(periods=p, damping=z, sd=res["sd"], sv=res["sv"], sa=res["sa"],
                    psv=res["sd"] * omega, psa=res["sd"] * omega ** 2, pga=pga,
                    sd_time=res["sd_time"], sa_time=res["sa_time"],
                    interpolated=short is not None, name=name)
