"""Response spectra of one or many records: ``response_spectrum`` and ``Spectrum``."""
from __future__ import annotations

import warnings
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from scipy import fft as sfft

from .._errors import GroundshakeWarning, InputError
from ._kernel import Engine, check_step, oscillator_peaks

__all__ = ["Spectrum", "response_spectrum", "default_periods", "fourier_upsample",
           "check_periods", "check_damping", "interpolation_groups", "refinement_factors",
           "SAMPLES_PER_PERIOD", "MAX_REFINEMENT"]

#: Samples per oscillator period the refined record gives each period: a period T gets
#: the smallest power-of-two factor m with m·T/dt ≥ this (Phillips, Kottke, Hashash &
#: Rathje 2012 ask for at least 10, which left steps of 6 % on a real 50-Hz record; 40
#: keeps it within 0.2 % of the band-limited answer there, about 1 % on white noise up
#: to the Nyquist frequency; cost and figures in the README and benchmarks/spectra.py).
SAMPLES_PER_PERIOD = 40

#: Largest refinement factor (periods shorter than SAMPLES_PER_PERIOD·dt/16 use it).
MAX_REFINEMENT = 16

#: Most samples (records x refined length) refined at once, to bound memory.
_REFINE_BLOCK = 8_000_000


def default_periods() -> np.ndarray:
    """The default period grid [s]: 100 log-spaced periods from 0.01 to 10 s.

    PGA, the zero-period value, is reported separately (:attr:`Spectrum.pga`).

    Returns
    -------
    ndarray, shape (100,)
    """
    return np.geomspace(0.01, 10.0, 100)


def _float_list(values, name: str, what: str, one: str, *, param: str) -> np.ndarray:
    """``values`` as a non-empty 1-D float array; InputError about ``param``, located at
    ``name``, otherwise (``what``: the list's items, ``one``: one item, for the message)."""
    try:
        a = np.atleast_1d(np.asarray(values, dtype=float))
    except (TypeError, ValueError):
        raise InputError(f"given {values!r}; allowed a list of {what}", param=param,
                         value=values, where=name) from None
    if a.ndim != 1 or a.size == 0:
        raise InputError(f"give a 1-D list of at least one {one}, got shape {a.shape}",
                         param=param, where=name)
    return a


def check_periods(periods, *, name: str = "periods") -> np.ndarray:
    """Periods as a 1-D float array; InputError unless all finite and > 0."""
    p = _float_list(periods, name, "numbers of seconds", "period", param="periods")
    bad = ~(np.isfinite(p) & (p > 0))
    if bad.any():
        raise InputError(f"{p[bad][0]:g} s is not allowed; periods must be finite and > 0 s "
                         "(PGA is reported separately as the zero-period value)",
                         param="periods", value=float(p[bad][0]), where=name)
    return p


def check_damping(damping, *, name: str = "damping") -> np.ndarray:
    """Damping ratios as a 1-D float array; InputError unless all in [0, 1)."""
    z = _float_list(damping, name, "damping ratios", "ratio", param="damping")
    bad = ~(np.isfinite(z) & (z >= 0) & (z < 1))
    if bad.any():
        raise InputError(f"ratio {z[bad][0]:g} is outside [0, 1) (the Python API takes "
                         "ratios: 0.05 for 5 %)", param="damping", value=float(z[bad][0]),
                         where=name)
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
        Peak |ground acceleration| [m/s²] over the samples as given ("sample PGA").
    pga_band_limited : ndarray or float, shape (...)
        Peak |ground acceleration| [m/s²] of the band-limited (Fourier-interpolated)
        record, on its :data:`MAX_REFINEMENT`-fold refinement; ≥ ``pga``. This is the
        value SA tends to at short periods when the record is refined (``interpolate``
        true, the default: the zero-period value of this spectrum); without
        refinement it equals ``pga``.
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
    # the band-limited PGA, or (records (n_rec, n_t), leading shape) to compute it from
    _pga_bl: Any = field(default=None, repr=False)

    @property
    def pga_band_limited(self):
        """Peak |acceleration| [m/s²] of the band-limited record, shape (...).

        Taken on the :data:`MAX_REFINEMENT`-fold Fourier interpolation (the record the
        shortest periods use), computed when first asked for; the sample :attr:`pga`
        when the spectrum was computed without refinement.
        """
        if self._pga_bl is None:
            return self.pga
        if isinstance(self._pga_bl, tuple):
            flat, lead = self._pga_bl
            peaks = np.array([np.abs(fourier_upsample(flat[i:i + 1], MAX_REFINEMENT)).max()
                              for i in range(flat.shape[0])]).reshape(lead)
            object.__setattr__(self, "_pga_bl", float(peaks) if not lead else peaks)
        return self._pga_bl

    @property
    def zero_period(self):
        """The zero-period value [m/s²]: the PGA that SA tends to as T → 0 here.

        :attr:`pga_band_limited` (equal to the sample :attr:`pga` when the record was
        used as given), shape (...).
        """
        return self.pga_band_limited

    @property
    def omega(self) -> np.ndarray:
        """Circular frequencies 2π/T [rad/s], shape (n_periods,)."""
        return 2 * np.pi / self.periods

    def to_dict(self) -> dict:
        """Plain dict of the spectrum in SI units (lists), for JSON."""
        return {"name": self.name, "periods": self.periods, "damping_percent":
                100.0 * self.damping, "pga": self.pga, "sd": self.sd, "sv": self.sv,
                "sa": self.sa, "psv": self.psv, "psa": self.psa,
                "pga_band_limited": self.zero_period}


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
    spec *= m                            # the gain of the longer inverse transform
    if n % 2 == 0:
        spec[..., n // 2] *= 0.5         # split the Nyquist bin between ± frequencies
    big = n * m
    # irfft zero-pads the spectrum to big // 2 + 1 bins itself
    y = sfft.irfft(spec, n=big, axis=-1)[..., : (n - 1) * m + 1]
    # the line back, in place: trend0 + slope·(k / ((n - 1)·m))
    y += trend0
    y += slope * (np.arange((n - 1) * m + 1) / ((n - 1) * m))
    return y


def refinement_factors(periods, dt: float) -> np.ndarray:
    """The Fourier-refinement factor of each period: depends on T and dt only.

    m(T) = the smallest power of two with m·T/dt ≥ :data:`SAMPLES_PER_PERIOD`,
    between 1 and :data:`MAX_REFINEMENT`.

    Parameters
    ----------
    periods : array_like, shape (n_periods,)
        Oscillator periods [s], > 0.
    dt : float
        Time step of the record [s].

    Returns
    -------
    ndarray of int, shape (n_periods,)
        Factors 1, 2, 4, 8 or 16.

    Notes
    -----
    The factor of a period never depends on the other periods asked for, so each
    period's value is the same whatever the period set. Powers of two let one
    Fourier interpolation at the largest factor serve every smaller one (every
    (M/m)-th sample of the M-fold record is the m-fold record).
    """
    p = np.asarray(periods, dtype=float)
    need = SAMPLES_PER_PERIOD * float(dt) / p
    k = np.ceil(np.log2(np.maximum(need, 1.0)) - 1e-9)
    return np.minimum(2 ** k.astype(int), MAX_REFINEMENT).astype(int)


def interpolation_groups(flat: np.ndarray, dt: float, periods: np.ndarray,
                         interpolate: bool, *, fine: np.ndarray | None = None):
    """Group periods by refinement factor and give each group its refined records.

    Yields ``(selection (n_periods,) bool, records (n_rec, (n - 1)·m + 1), step)``,
    one group per factor m of :func:`refinement_factors` (largest first), the records
    Fourier-interpolated by m (m = 1: as given) and ``step = dt/m``. With
    ``interpolate`` false, one group: all periods, the records as given. ``fine``,
    if given, is ``flat`` already refined by a power of two at least the largest factor
    needed (saves a transform).
    """
    if not interpolate:
        yield np.ones(periods.size, bool), flat, dt
        return
    factors = refinement_factors(periods, dt)
    top = int(factors.max())
    if fine is not None and top > 1:
        top = (fine.shape[-1] - 1) // max(1, flat.shape[-1] - 1)
    else:
        fine = fourier_upsample(flat, top) if top > 1 else flat
    for m in sorted(set(factors.tolist()), reverse=True):
        rec = flat if m == 1 else np.ascontiguousarray(fine[..., ::top // m])
        yield factors == m, rec, dt / m


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
        Read the record as band-limited: each period T uses the record
        Fourier-interpolated by :func:`refinement_factors` (the smallest power of two
        giving ``SAMPLES_PER_PERIOD`` = 40 samples per period, at most 16; 1 from
        T ≥ 40·dt). Turn off to use the samples as they are (piecewise linear).
    engine : {"auto", "numba", "numpy"}
        Kernel engine (see :func:`groundshake.spectra.kernel_engine`).
    name : str
        Label carried by the result.

    Returns
    -------
    Spectrum
        ``sd, sv, sa, psv, psa`` shaped (..., n_damping, n_periods); ``pga`` (sample)
        and ``pga_band_limited`` (...).

    Raises
    ------
    InputError
        Periods ≤ 0 or not finite, damping outside [0, 1), dt ≤ 0, NaN samples.

    Notes
    -----
    Each oscillator solves u'' + 2ξωu' + ω²u = -a_g(t) from rest (Nigam & Jennings
    1969); PSV = ω·SD and PSA = ω²·SD. SA tends to the zero-period value
    (:attr:`Spectrum.zero_period`: the band-limited PGA when refined, else the sample
    PGA) as the period goes to zero. A period's factor depends only on T and dt, so
    its value never depends on the other periods asked for, and the spectrum has no
    step at a fixed number of samples per period (the factors change where the
    difference they make is already small).

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
    dt = check_step(dt)
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
    factors = refinement_factors(p, dt) if interpolate else np.ones(n_p, int)
    top = int(factors.max())                  # one refined record serves every group
    pga_bl = np.zeros(n_rec)
    # records in blocks, so that the refined copies stay within _REFINE_BLOCK samples
    block = max(1, _REFINE_BLOCK // max(1, n_t * top))
    for r0 in range(0, n_rec, block):
        part = flat[r0:r0 + block]
        k = part.shape[0]
        fine = fourier_upsample(part, top) if top > 1 else part
        pga_bl[r0:r0 + k] = np.abs(fine).max(axis=-1)
        for sel, rec, step in interpolation_groups(part, dt, p, interpolate,
                                                   fine=fine if top > 1 else None):
            ps = p[sel]
            # oscillators ordered record-major so that each kernel block shares one record
            omega = np.broadcast_to(2 * np.pi / ps, (k, n_d, ps.size)).ravel()
            xi = np.broadcast_to(z[:, None], (k, n_d, ps.size)).ravel()
            src = np.repeat(np.arange(k), n_d * ps.size)
            pk = oscillator_peaks(rec, step, omega, xi, source=src, engine=engine)
            shape = (k, n_d, ps.size)
            for key, val in (("sd", pk.disp), ("sv", pk.vel), ("sa", pk.abs_acc),
                             ("sd_time", pk.disp_time), ("sa_time", pk.abs_acc_time)):
                out[key][r0:r0 + k, :, sel] = val.reshape(shape)
    omega = 2 * np.pi / p
    res = {k: v.reshape(lead + (n_d, n_p)) for k, v in out.items()}
    pga = np.abs(flat).max(axis=-1).reshape(lead)
    pga_bl = pga_bl.reshape(lead)
    if not lead:
        pga, pga_bl = float(pga), float(pga_bl)
    if not interpolate or n_t < 2:
        pga_bl = None                              # as given: the sample PGA
    elif top < MAX_REFINEMENT:
        pga_bl = (flat.copy(), lead)               # not refined that far here: when asked
    for v in res.values():
        v.setflags(write=False)
    return Spectrum(periods=p, damping=z, sd=res["sd"], sv=res["sv"], sa=res["sa"],
                    psv=res["sd"] * omega, psa=res["sd"] * omega ** 2, pga=pga,
                    sd_time=res["sd_time"], sa_time=res["sa_time"],
                    interpolated=bool(np.any(factors > 1)), name=name,
                    _pga_bl=pga_bl)
