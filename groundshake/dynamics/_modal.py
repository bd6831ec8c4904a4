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

__all__ = ["ModalResponse", "modal_response", "coupled_modal_response", "residual_vectors",
           "pruned_peak"]


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


def _modal_inputs(omega, participation, ground):
    """Float arrays ω (m,), Γ (m, 3) and a_g (3, n_t) of either modal method."""
    return (np.asarray(omega, dtype=float),
            np.asarray(participation, dtype=float).reshape(-1, 3),
            np.atleast_2d(np.asarray(ground, dtype=float)))


def _missing_mass_note(residual) -> str:
    return ("Missing mass of the modes left out added as a static residual (its relative "
            "velocity and acceleration neglected)." if residual is not None else
            "No missing-mass correction.")


def _modal_result(assumptions: list[str], shapes, omega, damping, gam, ag, dt, q, qd, qdd,
                  residual) -> ModalResponse:
    """The :class:`ModalResponse` of either modal method, time and dt filled in."""
    return ModalResponse(time=np.arange(ag.shape[1]) * dt, dt=float(dt), ground=ag,
                         shapes=np.asarray(shapes), omega=omega, damping=damping,
                         participation=gam, q=q, qdot=qd, qddot=qdd,
                         residual=residual, assumptions=assumptions)


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

    omega, gam, ag = _modal_inputs(omega, participation, ground)
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
    how = (f"Modal superposition of {m} mode(s), each integrated exactly for ground "
           "acceleration linear between samples; classical (modal) damping, off-diagonal "
           "modal damping neglected.")
    return _modal_result([how, _missing_mass_note(residual)], shapes, omega, damping, gam, ag,
                         dt, q, qd, qdd, residual)


def _linear_recursion(Ad: np.ndarray, F: np.ndarray) -> np.ndarray:
    """x_0 = 0, x_{k+1} = Ad x_k + F_k for every k: (s, n_t) from F (s, n_t − 1).

    Steps are taken b at a time: within a block x_{k+j} = Ad^j x_k + Σ_{i<j} Ad^{j−1−i} F_{k+i},
    so the forced part of every block is one product with a block-Toeplitz matrix and
    only the block starts are stepped one after another.
    """
    s, n = F.shape
    X = np.zeros((s, n + 1))
    if n == 0:
        return X
    b = int(max(1, min(16, 256 // max(s, 1), n)))   # flops b·s²·n against b-fold fewer steps
    pw = [np.eye(s)]
    for _ in range(b):
        pw.append(Ad @ pw[-1])
    T = np.zeros((b * s, b * s))
    for j in range(b):                       # block row j gives x_{k+j+1}
        for i in range(j + 1):
            T[j * s:(j + 1) * s, i * s:(i + 1) * s] = pw[j - i]
    P = np.vstack(pw[1:])                     # (b·s, s): Ad^1 … Ad^b
    n_blk = -(-n // b)
    Fp = np.zeros((s, n_blk * b))
    Fp[:, :n] = F
    Fb = Fp.reshape(s, n_blk, b).transpose(2, 0, 1).reshape(b * s, n_blk)
    Y = T @ Fb                                # forced part of every block, (b·s, n_blk)
    starts = np.zeros((s, n_blk))
    x = np.zeros(s)
    Ab = pw[b]
    for k in range(n_blk):                   # a recursion over blocks of time steps
        starts[:, k] = x
        x = Ab @ x + Y[(b - 1) * s:, k]
    Xb = P @ starts + Y                       # (b·s, n_blk)
    X[:, 1:] = Xb.reshape(b, s, n_blk).transpose(1, 2, 0).reshape(s, n_blk * b)[:, :n]
    return X


def coupled_modal_response(shapes: np.ndarray, omega: np.ndarray,
                           damping_matrix: np.ndarray, participation: np.ndarray,
                           ground: np.ndarray, dt: float, *,
                           residual: np.ndarray | None = None) -> ModalResponse:
    """Modal histories with a full (non-diagonal) modal damping matrix.

    Parameters
    ----------
    damping_matrix : ndarray (m, m)
        Modal damping Φᵀ C Φ [1/s] (symmetric, positive semi-definite).
    shapes, omega, participation, ground, dt, residual
        As for :func:`modal_response`: mode shapes (n, m), circular frequencies (m,)
        [rad/s], Γ = Φᵀ L (m, 3), ground acceleration (3, n_t) [m/s²] linear between
        samples, step [s], missing-mass shapes (n, 3) or None.

    Returns
    -------
    ModalResponse
        ``damping`` holds the diagonal ratios (Φᵀ C Φ)ₙₙ / (2ωₙ) for the record.

    Notes
    -----
    q̈ + (ΦᵀCΦ) q̇ + Ω² q = −Γ a_g(t), written as ẋ = A x + B a_g with x = [q, q̇], is
    stepped exactly for ground acceleration linear between samples (first-order-hold
    discretisation by the matrix exponential of the augmented system, e.g. Franklin,
    Powell & Workman, Digital Control of Dynamic Systems, §6.3). The modes stay coupled by
    the damping of discrete dashpots (soil radiation, equipment supports), as in the
    direct method.
    """
    import scipy.linalg as sla

    omega, gam, ag = _modal_inputs(omega, participation, ground)
    Cm = np.asarray(damping_matrix, dtype=float)
    m = omega.size
    n_t = ag.shape[1]
    if m == 0:
        z = np.zeros((0, n_t))
        return _modal_result(["No mode kept."], shapes, omega, np.zeros(0), gam, ag, dt,
                             z, z, z, residual)
    A = np.zeros((2 * m, 2 * m))
    A[:m, m:] = np.eye(m)
    A[m:, :m] = -np.diag(omega ** 2)
    A[m:, m:] = -Cm
    B = np.zeros((2 * m, 3))
    B[m:] = -gam
    big = np.zeros((2 * m + 6, 2 * m + 6))
    big[:2 * m, :2 * m] = A * dt
    big[:2 * m, 2 * m:2 * m + 3] = B * dt
    big[2 * m:2 * m + 3, 2 * m + 3:] = np.eye(3)
    E = sla.expm(big)
    Ad, G0, G1 = E[:2 * m, :2 * m], E[:2 * m, 2 * m:2 * m + 3], E[:2 * m, 2 * m + 3:]
    # x_{k+1} = Ad x_k + G0 u_k + G1 (u_{k+1} − u_k)
    F = G0 @ ag[:, :-1] + G1 @ np.diff(ag, axis=1)          # (2m, n_t − 1)
    X = _linear_recursion(Ad, F)
    q, qd = X[:m], X[m:]
    qdd = -(Cm @ qd) - (omega ** 2)[:, None] * q - gam @ ag
    with np.errstate(divide="ignore", invalid="ignore"):
        zeta = np.where(omega > 0, np.diag(Cm) / (2 * omega), 0.0)
    how = (f"Modal superposition of {m} mode(s) with the full modal damping matrix ΦᵀCΦ "
           "(modes coupled by the discrete dashpots of soil radiation and equipment supports), "
           "stepped exactly for ground acceleration linear between samples.")
    return _modal_result([how, _missing_mass_note(residual)], shapes, omega, zeta, gam, ag,
                         dt, q, qd, qdd, residual)


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
