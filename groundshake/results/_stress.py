"""Stress peaks computed block by block, so that memory stays bounded.

Stresses are the six components [σxx, σyy, σzz, τyz, τxz, τxy] (Pa) at the stress
recovery points of the model (nodes on the block's surface, see
:mod:`groundshake.model._recovery`). For every point the tracker keeps the peak von
Mises stress, the largest principal stress (tension positive) and the most negative one
(compression), each with the record step where it occurred. :func:`element_peaks`
gives each element the largest peaks of its corner points; :func:`stress_summary` the
governing peaks, how they were recovered and a caution where a peak sits on a feature
that concentrates stress.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

__all__ = ["StressPeaks", "principal_stresses", "von_mises", "modal_stress_peaks",
           "element_peaks", "stress_summary", "RECOVERY_NOTE"]

#: How stresses are recovered (written to summary.json and the run's assumptions).
RECOVERY_NOTE = (
    "Stresses are computed at each element's 2x2x2 Gauss points (for hex8-incompatible with "
    "the internal mode amplitudes recovered from the element's node displacements), "
    "extrapolated to the element's corners and averaged at each node over the elements of "
    "one part (nodal averaging, Zienkiewicz & Zhu 1992; where parts meet, each keeps its "
    "own value); peaks are searched at every node on the block's outer surface, not inside "
    "it. At re-entrant corners and at the "
    "edge of a fixed base, rigid base or rigid mount the linear-elastic stress is "
    "concentrated and grows as the mesh is refined.")


_JIT = []


def _jit():
    """The compiled fold module, or None where numba is missing."""
    if not _JIT:
        try:
            import numba  # noqa: F401  (only numba's absence is a fallback)
        except ImportError:  # pragma: no cover - numba is a dependency
            _JIT.append(None)
        else:
            from . import _stress_jit
            _JIT.append(_stress_jit)
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

    Attributes (all shaped (n,), one entry per stress point or element)
    ----------
    von_mises, von_mises_step : peak von Mises [Pa] and its record step.
    tension, tension_step : largest principal stress [Pa] (0 if never in tension).
    compression, compression_step : smallest principal stress [Pa] (0 if never in
    compression).
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
        return cls(z(0.0), i(), z(0.0), i(), z(0.0), i())

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
        """The three governing peaks with index (``element``), location [m] and time [s].

        ``centres`` (n, 3) [m] gives ``at``; ``element`` is the index of the entry (a
        stress point for the tracker of a run).
        """
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
                       engine: Literal["auto", "numba", "numpy"] = "auto",
                       prune: bool = True) -> StressPeaks:
    """Per-element stress peaks from stress modes, in blocks of elements and steps.

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
        keeps a block in cache).
    progress : Progress, optional
        Advanced by the number of elements done.
    engine : {"auto", "numba", "numpy"}
        Fold engine (see :meth:`StressPeaks.update`).
    prune : bool
        Skip the steps that cannot raise an element's peaks (exact; see Notes).

    Notes
    -----
    With w(t) = D⁻¹ z(t), D = diag(max_t |z_k|), every stress measure of element
    e is bounded by c_e·‖w(t)‖, c_e = ‖T A_e D‖₂ (T doubles the shear terms' weight
    so that ‖T s‖ is the tensor's Frobenius norm): |σ₁|, |σ₃| ≤ ‖σ‖_F and
    σ_vm ≤ √(3/2)·‖σ‖_F. The steps with the largest ‖w‖ are evaluated first for all
    elements; then each element is evaluated only at the steps whose bound exceeds
    the peaks found so far.
    """
    Z = np.ascontiguousarray(coordinates, dtype=float)
    r, n_t = Z.shape
    peaks = StressPeaks.empty(n_el)
    if n_el == 0 or n_t == 0:
        return peaks
    A = coefficients.reshape(n_el, 6, r)
    chunk = int(min(n_el, 256))
    block = max(16, max_values // (6 * chunk))
    buf = np.empty((6 * chunk, min(block, n_t)))

    def fold(elements: np.ndarray, times: np.ndarray) -> None:
        """Evaluate ``elements`` (sorted, any) at record steps ``times``."""
        for c0 in range(0, elements.size, chunk):
            els = elements[c0:c0 + chunk]
            contiguous = els[-1] - els[0] + 1 == els.size
            Ac = np.ascontiguousarray(A[els].reshape(-1, r))
            for t0 in range(0, times.size, block):
                tt = times[t0:t0 + block]
                out = buf[:6 * els.size, :tt.size]
                np.matmul(Ac, Z[:, tt], out=out)
                sig = out.reshape(els.size, 6, tt.size)
                if contiguous:
                    peaks.update(int(els[0]), sig, tt, engine=engine)
                else:
                    sub = StressPeaks(peaks.von_mises[els], peaks.von_mises_step[els],
                                      peaks.tension[els], peaks.tension_step[els],
                                      peaks.compression[els], peaks.compression_step[els])
                    sub.update(0, sig, tt, engine=engine)
                    for name in ("von_mises", "von_mises_step", "tension", "tension_step",
                                 "compression", "compression_step"):
                        getattr(peaks, name)[els] = getattr(sub, name)
            if progress is not None:
                progress.advance(els.size)

    all_el = np.arange(n_el)
    if not prune or n_t < 512:
        fold(all_el, np.arange(n_t))
        return peaks
    scale = np.max(np.abs(Z), axis=1)
    scale[scale == 0] = 1.0
    nw = np.sqrt(np.sum((Z / scale[:, None]) ** 2, axis=0))           # (n_t,)
    order = np.argsort(-nw, kind="stable")
    nw_sorted = nw[order]
    B = A * scale[None, None, :]
    B[:, 3:, :] *= np.sqrt(2.0)
    c = np.linalg.norm(B, ord=2, axis=(1, 2))                           # (n_el,)
    first = min(n_t, 128)
    head = np.sort(order[:first])
    p0 = progress
    progress = None
    fold(all_el, head)
    tau = np.minimum(peaks.von_mises / np.sqrt(1.5),
                     np.minimum(peaks.tension, -peaks.compression))     # both clipped at 0
    with np.errstate(divide="ignore", invalid="ignore"):
        thr = np.where(c > 0, tau / c, np.inf)
    k = np.searchsorted(-nw_sorted, -thr, side="left")                # steps with nw > thr
    todo = np.flatnonzero(k > first)
    progress = p0
    if todo.size:
        todo = todo[np.argsort(k[todo], kind="stable")]
        for c0 in range(0, todo.size, chunk):
            els = np.sort(todo[c0:c0 + chunk])
            kmax = int(k[todo[min(todo.size, c0 + chunk) - 1]])
            fold(els, np.sort(order[first:kmax]))
    if progress is not None:
        progress.advance(n_el - todo.size)
    peaks.evaluated_fraction = float((first * n_el + np.sum(np.maximum(k[todo], first) - first))
                                     / (n_el * n_t)) if todo.size else first / n_t
    return peaks


def element_peaks(points: StressPeaks, element_points: np.ndarray) -> StressPeaks:
    """Each element's largest peaks over its corner points.

    Parameters
    ----------
    points : StressPeaks
        Peaks of the n_p stress points.
    element_points : (n_el, 8) int
        Point of each element corner, −1 where the corner is not a stress point.

    Returns
    -------
    StressPeaks
        Shaped (n_el,); NaN (step 0) for an element with no stress point.
    """
    ep = np.asarray(element_points, dtype=np.int64)
    has = ep >= 0
    safe = np.where(has, ep, 0)
    rows = np.arange(ep.shape[0])
    none = ~has.any(axis=1)
    out = []
    for val, step, pick, fill in ((points.von_mises, points.von_mises_step, np.argmax, -np.inf),
                                  (points.tension, points.tension_step, np.argmax, -np.inf),
                                  (points.compression, points.compression_step, np.argmin,
                                   np.inf)):
        v = np.where(has, np.asarray(val)[safe], fill) if val.size else np.full(ep.shape, fill)
        k = pick(v, axis=1)
        best = v[rows, k]
        st = np.asarray(step)[safe[rows, k]] if val.size else np.zeros(ep.shape[0], np.int64)
        out += [np.where(none, np.nan, best), np.where(none, 0, st).astype(np.int64)]
    return StressPeaks(*out)


def _join(items: list[str]) -> str:
    return items[0] if len(items) == 1 else ", ".join(items[:-1]) + " and " + items[-1]


_FEATURE_WORDS = {"re-entrant corner": "a re-entrant corner or edge",
                  "base edge": "the edge of the fixed or rigid base",
                  "mount edge": "the edge of a rigid equipment mount"}


def stress_summary(peaks: StressPeaks, points, dt: float, *,
                   part_names: list[str] | None = None) -> tuple[dict, list[str]]:
    """Governing stress peaks for the summary, and the cautions they call for.

    Parameters
    ----------
    peaks : StressPeaks
        Peaks of the model's stress points.
    points : StressPoints
        The model's stress points (``position``, ``feature(p)``).
    dt : float
        Record step [s].
    part_names : list of str, optional
        Names of the parts, to say which part a peak is in (``part``).

    Returns
    -------
    summary : dict
        ``von_mises``, ``principal_tension``, ``principal_compression`` each with
        ``value`` [Pa], ``point``, ``at`` [m], ``time`` [s], ``part`` (with
        ``part_names``) and ``feature`` (None,
        ``"re-entrant corner"``, ``"base edge"`` or ``"mount edge"``), and where the peak sits on
        a feature, ``away_from_features``: the largest peak among the other points;
        ``points``, ``n_points``, ``recovery``, ``units``.
    cautions : list of str
        One sentence for each governing peak that sits on a feature.
    """
    out = peaks.governing(dt, np.asarray(points.position))
    found: dict[str, list[str]] = {}
    for key, d in out.items():
        p = d.pop("element")
        d["point"] = p
        if part_names is not None:
            d["part"] = str(part_names[int(points.part[p])])
        feat = points.feature(p)
        d["feature"] = feat
        if feat is not None and d["value"] != 0.0:
            at = ", ".join(f"{v:.3g}" for v in d["at"])
            words = {"von_mises": "von Mises"}.get(key, key.replace("_", " "))
            found.setdefault(feat, []).append(f"{words} ({d['value'] / 1e6:.3g} MPa at ({at}) m)")
    plain = np.flatnonzero(~points.flagged)
    if plain.size:
        sub = StressPeaks(*(np.asarray(getattr(peaks, f))[plain] for f in (
            "von_mises", "von_mises_step", "tension", "tension_step", "compression",
            "compression_step")))
        for key, d in sub.governing(dt, np.asarray(points.position)[plain]).items():
            if key in out and out[key]["feature"] is not None:
                d["point"] = int(plain[d.pop("element")])
                if part_names is not None:
                    d["part"] = str(part_names[int(points.part[d["point"]])])
                out[key]["away_from_features"] = d
    notes = [f"The peak {_join(items)} sit{'s' if len(items) == 1 else ''} on "
             f"{_FEATURE_WORDS[feat]}, where the constraint or the geometry concentrates "
             "stress: the linear-elastic value there grows as the mesh is refined, so read it "
             "as a local indication, judge the stresses a short distance away and verify "
             "such details with a licensed engineer."
             for feat, items in found.items()]
    out["points"] = "nodes on the block's outer surface (Gauss-point stresses extrapolated " \
                    "to element corners, averaged per part)"
    out["n_points"] = int(points.n_points)
    out["recovery"] = RECOVERY_NOTE
    out["units"] = "Pa"
    return out, notes
