"""Element stress peaks computed block by block, so that memory stays bounded.

Stresses are the six components [σxx, σyy, σzz, τyz, τxz, τxy] (Pa) at element
centres. For every element the tracker keeps the peak von Mises stress, the
largest principal stress (tension positive) and the most negative one
(compression), each with the record step where it occurred.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

__all__ = ["StressPeaks", "principal_stresses", "von_mises", "modal_stress_peaks"]


_JIT = []


def _jit():
    """The compiled fold module, or None where numba is missing."""
    if not _JIT:
        try:
            from . import _stress_jit
            _JIT.append(_stress_jit)
        except ImportError:  # pragma: no cover - numba is a dependency
            _JIT.append(None)
    return _JIT[0]


def _invariants(s: np.ndarray):
    sxx, syy, szz, tyz, txz, txy = s
    p = (sxx + syy + szz) / 3.0
    dx, dy, dz = sxx - p, syy - p, szz - p
    j2 = 0.5 * (dx * dx + dy * dy + dz * dz) + tyz * tyz + txz * txz + txy * txy
    return p, dx, dy, dz, tyz, txz, txy, np.maximum(j2, 0.0)


def von_mises(s: np.ndarray) -> np.ndarray:
    """Von Mises stress √(3 J₂) [Pa] of stresses ``s`` shaped (6, ...)."""
    return np.sqrt(3.0 * _invariants(np.asarray(s, dtype=float))[-1])


def principal_stresses(s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Largest and smallest principal stress [Pa] of ``s`` shaped (6, ...).

    Closed form for a symmetric 3×3 tensor (trigonometric solution of the
    deviatoric cubic): s₁ = 2√(J₂/3)·cos θ, s₃ = 2√(J₂/3)·cos(θ + 2π/3),
    cos 3θ = (3√3/2)·J₃/J₂^{3/2}.
    """
    p, dx, dy, dz, tyz, txz, txy, j2 = _invariants(np.asarray(s, dtype=float))
    j3 = (dx * (dy * dz - tyz * tyz) - txy * (txy * dz - tyz * txz)
          + txz * (txy * tyz - dy * txz))
    r = np.sqrt(j2 / 3.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        c3 = np.where(j2 > 0, 1.5 * np.sqrt(3.0) * j3 / np.where(j2 > 0, j2, 1.0) ** 1.5, 1.0)
    theta = np.arccos(np.clip(c3, -1.0, 1.0)) / 3.0
    return p + 2.0 * r * np.cos(theta), p + 2.0 * r * np.cos(theta + 2.0 * np.pi / 3.0)


@dataclass
class StressPeaks:
    """Running per-element peaks.

    Attributes (all shaped (n_el,))
    ----------
    von_mises, von_mises_step : peak von Mises [Pa] and its record step.
    tension, tension_step : largest principal stress [Pa] (may be < 0 if never in tension).
    compression, compression_step : smallest principal stress [Pa].
    """

    von_mises: np.ndarray
    von_mises_step: np.ndarray
    tension: np.ndarray
    tension_step: np.ndarray
    compression: np.ndarray
    compression_step: np.ndarray

    @classmethod
    def empty(cls, n_el: int) -> "StressPeaks":
        z = lambda v: np.full(n_el, v, dtype=float)   # noqa: E731
        i = lambda: np.zeros(n_el, dtype=np.int64)    # noqa: E731
        return cls(z(0.0), i(), z(-np.inf), i(), z(np.inf), i())

    def update(self, start: int, sig: np.ndarray, steps: np.ndarray, *,
               engine: Literal["auto", "numba", "numpy"] = "auto") -> None:
        """Fold in stresses ``sig`` (c, 6, b) of elements start..start+c at record ``steps`` (b,).

        Principal stresses are evaluated exactly only where the bounds
        p + √(J₂/3) ≤ σ₁ ≤ p + 2√(J₂/3) (and the mirror for σ₃) say they can
        still beat the best so far, which saves most of the trigonometry. The
        compiled engine (numba) does it in one pass; the numpy engine is the
        reference.
        """
        steps = np.ascontiguousarray(steps, dtype=np.int64)
        c = sig.shape[0]
        if engine != "numpy" and _jit() is not None:
            _jit().fold_block(np.ascontiguousarray(sig, dtype=float), steps, int(start),
                              self.von_mises, self.von_mises_step, self.tension,
                              self.tension_step, self.compression, self.compression_step)
            return
        elements = slice(int(start), int(start) + c)
        sig = np.asarray(sig, dtype=float).transpose(1, 0, 2)          # (6, c, b)
        p, *_, j2 = _invariants(sig)
        r = np.sqrt(j2 / 3.0)
        vm = 3.0 * r                                        # √(3 J₂)
        c = np.arange(vm.shape[0])
        k = np.argmax(vm, axis=1)
        self._fold(self.von_mises, self.von_mises_step, elements, vm[c, k], steps[k], +1)
        lo = np.max(p + r, axis=1)                         # σ₁ ≥ p + r everywhere
        cand = (p + 2.0 * r) >= lo[:, None]
        hi_val = np.full(vm.shape, -np.inf)
        s1, _ = principal_stresses(sig[:, cand])
        hi_val[cand] = s1
        k = np.argmax(hi_val, axis=1)
        self._fold(self.tension, self.tension_step, elements, hi_val[c, k], steps[k], +1)
        up = np.min(p - r, axis=1)                         # σ₃ ≤ p − r everywhere
        cand = (p - 2.0 * r) <= up[:, None]
        lo_val = np.full(vm.shape, np.inf)
        _, s3 = principal_stresses(sig[:, cand])
        lo_val[cand] = s3
        k = np.argmin(lo_val, axis=1)
        self._fold(self.compression, self.compression_step, elements, lo_val[c, k], steps[k], -1)

    @staticmethod
    def _fold(best, best_step, elements, val, step, sign) -> None:
        cur = best[elements]
        better = (val > cur) if sign > 0 else (val < cur)
        cur_step = best_step[elements]
        best[elements] = np.where(better, val, cur)
        best_step[elements] = np.where(better, step, cur_step)

    def governing(self, dt: float, centres: np.ndarray | None = None) -> dict:
        """The three governing peaks with element, location [m] and time [s]."""
        out = {}
        for key, arr, steps, pick in (("von_mises", self.von_mises, self.von_mises_step, np.argmax),
                                      ("principal_tension", self.tension, self.tension_step, np.argmax),
                                      ("principal_compression", self.compression,
                                       self.compression_step, np.argmin)):
            if arr.size == 0:
                continue
            e = int(pick(arr))
            d = {"value": float(arr[e]), "element": e, "time": float(steps[e] * dt)}
            if centres is not None:
                d["at"] = [float(v) for v in centres[e]]
            out[key] = d
        return out


def modal_stress_peaks(coefficients: np.ndarray, coordinates: np.ndarray, n_el: int, *,
                       max_values: int = 600_000, progress=None,
                       engine: Literal["auto", "numba", "numpy"] = "auto") -> StressPeaks:
    """Per-element stress peaks from stress modes, in chunks of elements.

    Parameters
    ----------
    coefficients : ndarray (6·n_el, r)
        Stress of each generalised coordinate (stress modes S·φ, then S·R of
        the missing-mass shapes); row 6e + k is component k of element e.
    coordinates : ndarray (r, n_t)
        Generalised coordinate histories.
    n_el : int
    max_values : int
        Stress values held at once (memory bound, 8 bytes each; the default
        keeps a chunk in cache).
    engine : {"auto", "numba", "numpy"}
        Fold engine (see :meth:`StressPeaks.update`).
    progress : Progress, optional
        Advanced by the number of elements done.
    """
    n_t = coordinates.shape[1]
    peaks = StressPeaks.empty(n_el)
    # blocks of elements × steps small enough to stay in cache, large enough for BLAS
    chunk = int(min(n_el, 256)) if n_el else 1
    block = max(16, max_values // (6 * chunk))
    steps = np.arange(n_t)
    A = coefficients.reshape(n_el, 6, -1)
    Zc = np.ascontiguousarray(coordinates, dtype=float)
    buf = np.empty((6 * chunk, min(block, max(n_t, 1))))
    for start in range(0, n_el, chunk):
        stop = min(n_el, start + chunk)
        Ac = np.ascontiguousarray(A[start:stop].reshape(-1, A.shape[2]))
        for t0 in range(0, n_t, block):
            t1 = min(n_t, t0 + block)
            out = buf[:6 * (stop - start), :t1 - t0]
            np.matmul(Ac, Zc[:, t0:t1], out=out)
            peaks.update(start, out.reshape(stop - start, 6, t1 - t0), steps[t0:t1], engine=engine)
        if progress is not None:
            progress.advance(stop - start)
    return peaks
