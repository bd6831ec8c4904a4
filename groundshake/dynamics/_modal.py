"""Modal time history by the exact oscillator kernel, with the missing-mass correction.

Relative to the moving base, u(t) = Φ q(t) + u_res(t). Each modal coordinate obeys

    q̈ₙ + 2ξₙωₙ q̇ₙ + ωₙ² qₙ = −Σ_d Γₙd a_d(t)

and is integrated exactly for piecewise-linear ground acceleration by the kernel
that also serves the response spectra. The modes left out respond
quasi-statically (missing mass, static residual)::

    u_res(t) = Σ_d K⁻¹ (L_d − Σₙ Γₙd M φₙ) · (−a_d(t)),  L = M ι (+ M_fb ι_b, fixed base)

The full displacement history is never stored: every result is a small operator
times the modal histories (see :meth:`ModalResponse.recover`).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np
import scipy.sparse as sp

__all__ = ["ModalResponse", "modal_response", "residual_vectors", "pruned_peak"]


def residual_vectors(M: sp.spmatrix, influence: np.ndarray, shapes: np.ndarray,
                     participation: np.ndarray, solve: Callable[[np.ndarray], np.ndarray],
                     *, load: np.ndarray | None = None) -> np.ndarray:
    """Static residual shapes of the modes left out, one per ground direction.

    Parameters
    ----------
    M : sparse (n, n)
        Mass matrix [kg].
    influence : ndarray (n, 3)
        ι for ground x, y, z.
    shapes : ndarray (n, m)
        Mass-normalised mode shapes kept.
    participation : ndarray (m, 3)
        Γₙd = φₙᵀ L_d.
    solve : callable
        ``solve(B)`` returns K⁻¹ B for B (n, 3) (the model's factor, reused).
    load : ndarray (n, 3), optional
        The ground load L [kg] (``BlockModel.ground_load``; M_ff ι_f + M_fb ι_b on a fixed
        base); default M ι.

    Returns
    -------
    ndarray (n, 3)
        R with u_res(t) = R · (−a_g(t)) [m per m/s²].

    References
    ----------
    Missing-mass (residual rigid) correction, e.g. USNRC RG 1.92 Rev. 3:
    F_res = (L − Σ Γₙ M φₙ)·ZPA, L = M ι for a base that moves with the ground.
    """
    Mi = np.asarray(M @ influence) if load is None else np.asarray(load, dtype=float)
    B = Mi - np.asarray(M @ (shapes @ participation))
    return np.asarray(solve(B)).reshape(B.shape)


@dataclass
class ModalResponse:
    """Modal histories and what is needed to recover any linear result from them.

    Attributes
    ----------
    time : ndarray (n_t,)
        [s].
    dt : float
        [s].
    ground : ndarray (3, n_t)
        Ground acceleration a_g [m/s²].
    shapes : ndarray (n, m)
        Mass-normalised mode shapes.
    omega, damping : ndarray (m,)
        Circular frequencies [rad/s] and damping ratios.
    participation : ndarray (m, 3)
        Γₙd.
    q, qdot, qddot : ndarray (m, n_t)
        Modal coordinates: relative displacement, velocity, acceleration.
    residual : ndarray (n, 3) or None
        Missing-mass shapes R; u_res = R·(−a_g).
    assumptions : list of str
        For the summary.
    """

    time: np.ndarray
    dt: float
    ground: np.ndarray
    shapes: np.ndarray
    omega: np.ndarray
    damping: np.ndarray
    participation: np.ndarray
    q: np.ndarray
    qdot: np.ndarray
    qddot: np.ndarray
    residual: np.ndarray | None
    assumptions: list[str] = field(default_factory=list)

    @property
    def coordinates(self) -> np.ndarray:
        """Generalised displacement histories z (m + 3, n_t): modal q then −a_g (residual)."""
        if self.residual is None:
            return self.q
        return np.vstack([self.q, -self.ground])

    def coefficients(self, op) -> np.ndarray:
        """Coefficients (k, m [+3]) of an operator's rows on :attr:`coordinates`."""
        A = _dense(op @ self.shapes)
        if self.residual is None:
            return A
        return np.hstack([A, _dense(op @ self.residual)])

    def recover(self, op) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Relative displacement, velocity and acceleration of ``op``'s rows.

        Parameters
        ----------
        op : sparse or ndarray (k, n)

        Returns
        -------
        disp, vel, acc : ndarray (k, n_t)
            The missing-mass part contributes to displacement (static response);
            its relative velocity and acceleration are neglected, as for rigid
            modes (their absolute acceleration is the ground's).
        """
        A = _dense(op @ self.shapes)
        u = A @ self.q
        if self.residual is not None:
            u = u + _dense(op @ self.residual) @ (-self.ground)
        return u, A @ self.qdot, A @ self.qddot


def _dense(a) -> np.ndarray:
    return np.asarray(a.toarray() if sp.issparse(a) else a, dtype=float)


def modal_response(shapes: np.ndarray, omega: np.ndarray, damping: np.ndarray,
                   participation: np.ndarray, ground: np.ndarray, dt: float, *,
                   residual: np.ndarray | None = None) -> ModalResponse:
    """Integrate every mode exactly under the ground acceleration.

    Parameters
    ----------
    shapes : ndarray (n, m)
        Mass-normalised mode shapes.
    omega : ndarray (m,)
        Circular frequencies [rad/s].
    damping : ndarray (m,)
        Modal damping ratios.
    participation : ndarray (m, 3)
        Γₙd = φₙᵀ M ι_d.
    ground : ndarray (3, n_t)
        Ground acceleration [m/s²], linear between samples.
    dt : float
        Step [s].
    residual : ndarray (n, 3), optional
        Missing-mass shapes from :func:`residual_vectors`.

    Returns
    -------
    ModalResponse
    """
    from ..spectra import oscillator_history

    ag = np.atleast_2d(np.asarray(ground, dtype=float))
    gam = np.asarray(participation, dtype=float).reshape(-1, 3)
    omega = np.asarray(omega, dtype=float)
    damping = np.broadcast_to(np.asarray(damping, dtype=float), omega.shape).copy()
    m = omega.size
    n_t = ag.shape[1]
    if m:
        exc = gam @ ag                                    # (m, n_t)
        q, qd, qa_abs = oscillator_history(exc, dt, omega, damping)
        q = np.asarray(q).reshape(m, n_t)
        qd = np.asarray(qd).reshape(m, n_t)
        qdd = np.asarray(qa_abs).reshape(m, n_t) - exc
    else:
        q = qd = qdd = np.zeros((0, n_t))
    assumptions = [
        f"Modal superposition of {m} mode(s), each integrated exactly for ground acceleration "
        "linear between samples; classical (modal) damping, off-diagonal modal damping neglected.",
        ("Missing mass of the modes left out added as a static residual (its relative velocity "
         "and acceleration neglected)." if residual is not None else
         "No missing-mass correction."),
    ]
    return ModalResponse(time=np.arange(n_t) * dt, dt=float(dt), ground=ag,
                         shapes=np.asarray(shapes), omega=omega, damping=damping,
                         participation=gam, q=q, qdot=qd, qddot=qdd,
                         residual=residual, assumptions=assumptions)


def pruned_peak(A: np.ndarray, Z: np.ndarray, *, rows_per_chunk: int | None = None
                ) -> tuple[int, float, int]:
    """Exact max |A Z| over rows and columns without forming A Z whole.

    Two exact bounds prune the work: per row, Σₖ |A_ik| max_t |Z_k(t)|; per row and
    column, ‖A_i D‖·‖D⁻¹ z(t)‖ with D = diag(max_t |Z_k|) (Cauchy-Schwarz). All rows
    are first evaluated at the columns of largest ‖D⁻¹ z(t)‖; then only the rows and
    columns whose bounds can still beat the best exact peak.

    Parameters
    ----------
    A : ndarray (r, k)
    Z : ndarray (k, n_t)

    Returns
    -------
    row, value, column : int, float, int
    """
    if A.shape[0] == 0 or Z.shape[1] == 0:
        return -1, 0.0, 0
    n_t = Z.shape[1]
    if rows_per_chunk is None:                 # about 32 MB of exact values at a time
        rows_per_chunk = max(1, 4_000_000 // max(1, n_t))
    zmax = np.max(np.abs(Z), axis=1)
    bound = np.abs(A) @ zmax
    scale = np.where(zmax > 0, zmax, 1.0)
    nw = np.sqrt(np.sum((Z / scale[:, None]) ** 2, axis=0))
    order = np.argsort(-nw, kind="stable")
    nw_sorted = nw[order]
    an = np.sqrt(np.sum((A * scale[None, :]) ** 2, axis=1))          # ‖A_i D‖
    head = np.sort(order[:min(n_t, 64)])
    best, best_row, best_col = -1.0, -1, 0

    def scan(rows: np.ndarray, cols: np.ndarray) -> None:
        nonlocal best, best_row, best_col
        per = max(1, (rows_per_chunk * n_t) // max(1, cols.size))
        for s0 in range(0, rows.size, per):
            idx = rows[s0:s0 + per]
            vals = np.abs(A[idx] @ Z[:, cols])
            flat = int(np.argmax(vals))
            r, c = divmod(flat, vals.shape[1])
            if vals[r, c] > best:
                best, best_row, best_col = float(vals[r, c]), int(idx[r]), int(cols[c])

    scan(np.arange(A.shape[0]), head)
    live = np.flatnonzero(bound > best)
    if live.size:
        with np.errstate(divide="ignore", invalid="ignore"):
            thr = np.where(an[live] > 0, best / an[live], np.inf)
        k = np.searchsorted(-nw_sorted, -thr, side="left")
        keep = k > head.size
        live, k = live[keep], k[keep]
        srt = np.argsort(k, kind="stable")            # rows needing few columns first
        live, k = live[srt], k[srt]
        for s0 in range(0, live.size, 1024):
            idx = live[s0:s0 + 1024]
            with np.errstate(divide="ignore", invalid="ignore"):
                thr = np.where(an[idx] > 0, best / an[idx], np.inf)
            kk = np.searchsorted(-nw_sorted, -thr, side="left")    # with the best so far
            sel = (bound[idx] > best) & (kk > head.size)
            if not np.any(sel):
                continue
            scan(idx[sel], np.sort(order[head.size:int(np.max(kk[sel]))]))
    return best_row, max(best, 0.0), best_col
