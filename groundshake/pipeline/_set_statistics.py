"""Statistics over the record sets of a suite: every scalar peak, and the ground and floor
spectra (log-normal)."""
from __future__ import annotations

import math
import warnings
from typing import Any, Iterable, Mapping, Sequence

import numpy as np

from .._errors import GroundshakeWarning
from ..spectra import spectrum_statistics

__all__ = ["flatten_scalars", "scalar_statistics", "peak_statistics", "spectra_statistics"]


def flatten_scalars(tree: Any, prefix: str = "") -> dict[str, float]:
    """Dotted key → float for every finite number in a nested dict/list tree.

    Lists are indexed with ``[i]`` (``equipment.pump.anchors[2].peak_tension``);
    booleans and strings are skipped.
    """
    out: dict[str, float] = {}
    if isinstance(tree, Mapping):
        for k, v in tree.items():
            out.update(flatten_scalars(v, f"{prefix}.{k}" if prefix else str(k)))
    elif isinstance(tree, (list, tuple)):
        for i, v in enumerate(tree):
            out.update(flatten_scalars(v, f"{prefix}[{i}]"))
    elif isinstance(tree, (int, float, np.integer, np.floating)) and not isinstance(tree, (bool, np.bool_)):
        f = float(tree)
        if math.isfinite(f):
            out[prefix] = f
    return out


def scalar_statistics(values: Iterable[float]) -> dict[str, float | int]:
    """Mean, standard deviation, median, 16th/84th percentiles, min, max of a sample.

    Percentiles are the sample's (linear interpolation between order statistics,
    numpy's default). Where every value is positive, the log-normal median
    (geometric mean) and 16th/84th percentiles exp(μ ∓ σ) of ln x are added
    (``lognormal_median``, ``lognormal_p16``, ``lognormal_p84``, ``beta`` = σ of
    ln x), the usual reading of a suite of ground-motion results.
    """
    x = np.asarray(list(values), dtype=float)
    n = int(x.size)
    if n == 0:
        return {"count": 0}
    out: dict[str, float | int] = {
        "count": n,
        "mean": float(np.mean(x)),
        "std": float(np.std(x, ddof=1)) if n > 1 else 0.0,
        "median": float(np.median(x)),
        "p16": float(np.percentile(x, 16)),
        "p84": float(np.percentile(x, 84)),
        "min": float(np.min(x)),
        "max": float(np.max(x)),
    }
    if np.all(x > 0):
        ln = np.log(x)
        mu = float(np.mean(ln))
        beta = float(np.std(ln, ddof=1)) if n > 1 else 0.0
        out.update(lognormal_median=math.exp(mu), lognormal_p16=math.exp(mu - beta),
                   lognormal_p84=math.exp(mu + beta), beta=beta)
    return out


def peak_statistics(peaks: list[Mapping[str, Any]]) -> dict[str, dict]:
    """Statistics of every scalar found in the ``peaks`` trees of several records.

    Keys present in only some records are summarised over those that have them
    (``count`` says how many).
    """
    flat = [flatten_scalars(p) for p in peaks]
    keys: list[str] = []
    seen = set()
    for f in flat:
        for k in f:
            if k not in seen:
                seen.add(k)
                keys.append(k)
    return {k: scalar_statistics([f[k] for f in flat if k in f]) for k in keys}


def spectra_statistics(results: Sequence[Mapping]) -> dict:
    """Log-normal statistics of ground and floor spectra over the ok records.

    Returns ``periods``, ``damping``, ``points`` and, for ``ground_psa`` (3, n_d,
    n_p), ``floor_psa`` and ``floor_psa_broadened`` (n_points, 3, n_d, n_p), a dict
    of ``median`` (geometric mean), ``p16``, ``p84`` (exp(μ ∓ σ) of ln PSA),
    ``mean``, ``min`` and ``max`` arrays, each of the quantity's shape [m/s²].
    """
    ok = [r for r in results if r.get("status") == "ok" and r.get("spectra")]
    if not ok:
        return {}
    first = ok[0]["spectra"]
    out: dict[str, Any] = {"periods": first["periods"], "damping": first["damping"],
                           "points": first["points"], "count": len(ok)}
    for key in ("ground_psa", "floor_psa", "floor_psa_broadened"):
        arrays = [np.asarray(r["spectra"][key], dtype=float) for r in ok]
        if not arrays or arrays[0].size == 0 or any(a.shape != arrays[0].shape for a in arrays):
            continue
        with warnings.catch_warnings():   # absent components are zero: no log-normal there
            warnings.simplefilter("ignore", GroundshakeWarning)
            st = spectrum_statistics(np.stack(arrays), axis=0)
        out[key] = {k: np.asarray(v) for k, v in st.items()}
    return out
