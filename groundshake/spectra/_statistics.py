"""Statistics of spectra over several records or components."""
from __future__ import annotations

import warnings

import numpy as np

from .._errors import GroundshakeWarning, InputError

__all__ = ["spectrum_statistics"]


def spectrum_statistics(values, axis: int = 0) -> dict[str, np.ndarray]:
    """Suite statistics of spectral values, log-normal where that is the convention.

    Parameters
    ----------
    values : array_like, shape (n_records, ...) (records along ``axis``)
        Spectral ordinates (any unit), one row per record or component.
    axis : int
        The axis that runs over records.

    Returns
    -------
    dict of ndarray, each shaped like ``values`` without ``axis``
        ``count`` (int), ``mean`` (arithmetic), ``median`` (geometric mean, the
        log-normal median), ``std_ln`` (standard deviation of ln values, ddof = 1 when
        more than one record), ``p16`` = median·exp(-std_ln), ``p84`` =
        median·exp(+std_ln) (log-normal 15.87th and 84.13th percentiles), ``min``,
        ``max`` (the envelope).

    Notes
    -----
    Where any value along ``axis`` is ≤ 0 the log-normal entries are NaN (with a
    GroundshakeWarning).
    """
    v = np.asarray(values, dtype=float)
    if v.ndim == 0 or v.size == 0:
        raise InputError("spectrum statistics need at least one record")
    try:
        v = np.moveaxis(v, axis, 0)
    except np.exceptions.AxisError:
        raise InputError(f"axis={axis} is out of range for values of shape {v.shape}") from None
    if not np.all(np.isfinite(v)):
        raise InputError("spectrum statistics: values hold NaN or inf")
    n = v.shape[0]
    positive = np.all(v > 0, axis=0)
    if not np.all(positive):
        warnings.warn("some spectral values are <= 0; log-normal statistics there are NaN",
                      GroundshakeWarning, stacklevel=2)
    with np.errstate(divide="ignore", invalid="ignore"):
        ln = np.log(np.where(v > 0, v, np.nan))
    mu = ln.mean(axis=0)
    sd = ln.std(axis=0, ddof=1) if n > 1 else np.zeros_like(mu)
    med = np.exp(mu)
    return {"count": np.full(mu.shape, n), "mean": v.mean(axis=0), "median": med,
            "std_ln": sd, "p16": med * np.exp(-sd), "p84": med * np.exp(sd),
            "min": v.min(axis=0), "max": v.max(axis=0)}
