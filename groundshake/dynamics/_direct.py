"""Direct step-by-step integration: Newmark average acceleration with optional HHT-α.

The equations are written relative to the moving base,

    M ü + C u̇ + K u = p(t) = −L a_g(t),   L = M ι (on a fixed base M_ff ι_f + M_fb ι_b),

with the whole damping matrix as given (no modal uncoupling: the discrete dashpots of
soil and equipment act as modelled). The effective stiffness is factorized once and the
factor reused at every step. Only what is asked for is kept: the histories of a
few output operators, the running peak of every DOF and, through a callback,
blocks of steps for stress peaks — never the whole displacement history.
"""
from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
import scipy.sparse as sp

from .._errors import InputError
from .._progress import Progress
from ..linalg import factorize, pardiso_available

__all__ = ["DirectResponse", "direct_response", "newmark_parameters", "substeps_for"]


def newmark_parameters(hht_alpha: float = 0.0) -> tuple[float, float, float]:
    """Return ``(alpha, beta, gamma)`` of the HHT-α family.

    ``alpha = 0`` is Newmark's average acceleration (β = 1/4, γ = 1/2).

    References
    ----------
    Hilber, Hughes & Taylor (1977), EESD 5, 283-292: γ = 1/2 − α, β = (1 − α)²/4,
    α ∈ [−1/3, 0].
    """
    a = float(hht_alpha)
    if not (-1.0 / 3.0 - 1e-12 <= a <= 0.0):
        raise InputError(f"given {hht_alpha!r}; allowed -1/3 <= alpha <= 0", param="hht_alpha",
                         value=hht_alpha)
    return a, (1.0 - a) ** 2 / 4.0, 0.5 - a


def substeps_for(dt: float, highest_hz: float | None, *, per_period: int = 10) -> int:
    """Number of sub-steps per record step so that the step is ≤ T_min / ``per_period``.

    ``highest_hz`` is the highest frequency of interest [Hz] (the cutoff);
    ``None`` means no subdivision.
    """
    if not highest_hz or highest_hz <= 0:
        return 1
    h_max = 1.0 / (highest_hz * per_period)
    return max(1, int(math.ceil(dt / h_max - 1e-9)))


class _Factor:
    """A factorized SPD sparse matrix with ``solve(b)``.

    The model's factorization (PARDISO where it loads, else scipy's SuperLU).
    """

    def __init__(self, A: sp.spmatrix, *, solver: str = "auto"):
        A = sp.csr_matrix(A)
        self._f = factorize(A, solver=solver)
        self.name = "pardiso" if (solver == "pardiso" or
                                  (solver == "auto" and pardiso_available())) else "scipy"

    def solve(self, b: np.ndarray) -> np.ndarray:
        return np.asarray(self._f.solve(b)).reshape(b.shape)


@dataclass
class DirectResponse:
    """Histories recovered during direct integration (relative to the base).

    Attributes
    ----------
    time : ndarray (n_t,)
        Record time [s].
    ground : ndarray (3, n_t)
        Ground acceleration a_g [m/s²].
    disp, vel, acc : ndarray (k, n_t)
        Relative displacement [m], velocity [m/s], acceleration [m/s²] of the
        output operator's rows.
    dof_peak : ndarray (n,) or (r,)
        Peak |u| of every DOF (or row of ``peak_operator``) [m]; ``dof_peak_step``
        the record step of it.
    substeps : int
        Sub-steps per record step.
    alpha, beta, gamma : float
        Integration parameters.
    solver : str
        Factorization used for the effective stiffness.
    """

    time: np.ndarray
    ground: np.ndarray
    disp: np.ndarray
    vel: np.ndarray
    acc: np.ndarray
    dof_peak: np.ndarray
    dof_peak_step: np.ndarray
    substeps: int
    alpha: float
    beta: float
    gamma: float
    solver: str
    assumptions: list[str] = field(default_factory=list)
    factor_time: float = 0.0


def direct_response(K: sp.spmatrix, M: sp.spmatrix, C: sp.spmatrix | None,
                    influence: np.ndarray, ground: np.ndarray, dt: float, *,
                    output: sp.spmatrix | np.ndarray | None = None,
                    hht_alpha: float = 0.0, substeps: int = 1,
                    on_block: Callable[[np.ndarray, np.ndarray], None] | None = None,
                    block_steps: int = 64, solver: str = "auto",
                    peak_operator: sp.spmatrix | None = None,
                    progress: bool = False, load: np.ndarray | None = None,
                    damping_update: tuple | None = None) -> DirectResponse:
    """Integrate M ü + C u̇ + K u = −L a_g(t) step by step (L = M ι unless ``load``).

    Parameters
    ----------
    K, M : sparse (n, n)
        Stiffness [N/m] and mass [kg] on the free DOFs.
    C : sparse (n, n) or None
        Full damping matrix [N·s/m]; None for no damping.
    influence : ndarray (n, 3)
        Rigid-body influence vectors ι for ground x, y, z.
    ground : ndarray (3, n_t)
        Ground acceleration [m/s²] at the record steps.
    dt : float
        Record step [s].
    output : sparse or ndarray (k, n), optional
        Rows whose relative displacement, velocity and acceleration are kept.
    hht_alpha : float
        HHT-α in [−1/3, 0]; 0 gives Newmark average acceleration.
    substeps : int
        Sub-steps per record step; the ground acceleration is linear within a
        record step.
    on_block : callable(u_block (n, b), steps (b,)), optional
        Called with blocks of displacement columns at record steps (for stress
        peaks), so that memory stays bounded.
    block_steps : int
        Columns per block handed to ``on_block``.
    solver : {"auto", "scipy", "pardiso"}
        Factorization of the effective stiffness.
    peak_operator : sparse (r, n), optional
        Rows whose running peak |·| is tracked (default: the DOFs themselves).
    progress : bool
        Show a progress bar.
    load : ndarray (n, 3), optional
        Ground load L [kg] with p(t) = −L a_g(t) (``BlockModel.ground_load``); default M ι.
    damping_update : (U, d), optional
        A low-rank part of the damping, C_total = C + U diag(d) Uᵀ with U (n, r) and
        d (r,) [N·s/m] (dashpots on a few averaged motions); solved by the
        Sherman-Morrison-Woodbury identity, so the factor stays sparse.

    Returns
    -------
    DirectResponse

    Notes
    -----
    HHT-α (Hilber, Hughes & Taylor 1977)::

        M a₁ + (1+α)(C v₁ + K u₁) − α(C v₀ + K u₀) = (1+α) p₁ − α p₀

    with Newmark's updates (Newmark 1959). The initial acceleration is
    a₀ = −ι a_g(0) (the structure starts at rest), which needs no mass solve.
    """
    K = sp.csr_matrix(K)
    M = sp.csr_matrix(M)
    n = K.shape[0]
    C = sp.csr_matrix((n, n)) if C is None else sp.csr_matrix(C)
    iota = np.asarray(influence, dtype=float)
    ag = np.atleast_2d(np.asarray(ground, dtype=float))
    if iota.shape != (n, 3) or ag.shape[0] != 3:
        raise ValueError(f"influence must be (n, 3) and ground (3, n_t); got {iota.shape}, {ag.shape}")
    n_t = ag.shape[1]
    substeps = max(1, int(substeps))
    alpha, beta, gamma = newmark_parameters(hht_alpha)
    h = dt / substeps
    c0 = 1.0 / (beta * h * h)
    c1 = gamma / (beta * h)
    c2 = 1.0 / (beta * h)
    c3 = 1.0 / (2.0 * beta) - 1.0
    c4 = 1.0 - gamma / beta
    c5 = h * (1.0 - gamma / (2.0 * beta))
    Keff = (c0 * M + (1.0 + alpha) * c1 * C + (1.0 + alpha) * K).tocsr()
    t_fac = time.perf_counter()
    factor = _Factor(Keff, solver=solver)
    t_fac = time.perf_counter() - t_fac
    Miota = np.asarray(M @ iota) if load is None else np.asarray(load, dtype=float)  # (n, 3)
    U = dU = None
    if damping_update is not None and np.size(damping_update[1]):
        U = np.asarray(damping_update[0].toarray() if sp.issparse(damping_update[0])
                       else damping_update[0], dtype=float)
        dU = np.asarray(damping_update[1], dtype=float)
        U, dU = U[:, dU > 0], dU[dU > 0]
    if U is not None and dU.size:
        # Woodbury: (A + U D Uᵀ)⁻¹ = A⁻¹ − A⁻¹U (D⁻¹ + UᵀA⁻¹U)⁻¹ UᵀA⁻¹, D = (1+α)c1·diag(d)
        AiU = factor.solve(U)
        Dd = (1.0 + alpha) * c1 * dU
        small = np.diag(1.0 / Dd) + U.T @ AiU
        small_inv = np.linalg.inv(small)
        base_solve = factor.solve

        class _W:
            @staticmethod
            def solve(b):
                x = base_solve(b)
                return x - AiU @ (small_inv @ (U.T @ x))
        factor_w = _W()
    else:
        U = None
        factor_w = factor

    if output is None:
        output = sp.csr_matrix((0, n))
    out = output
    k = out.shape[0]
    yd = np.zeros((k, n_t))
    yv = np.zeros((k, n_t))
    ya = np.zeros((k, n_t))
    u = np.zeros(n)
    v = np.zeros(n)
    a = -iota @ ag[:, 0]
    n_pk = n if peak_operator is None else peak_operator.shape[0]
    peak = np.zeros(n_pk)
    peak_step = np.zeros(n_pk, dtype=np.int64)
    yd[:, 0] = 0.0
    yv[:, 0] = 0.0
    ya[:, 0] = out @ a
    block = np.empty((n, block_steps)) if on_block is not None else None
    bsteps: list[int] = []
    if block is not None:
        block[:, 0] = u
        bsteps.append(0)
    has_c = C.nnz > 0
    g_prev = ag[:, 0]
    p_prev = -Miota @ g_prev
    with Progress("time steps", total=n_t - 1, enabled=progress) as bar:
        for i in range(1, n_t):
            g0, g1 = ag[:, i - 1], ag[:, i]
            for s in range(1, substeps + 1):
                g = g0 + (g1 - g0) * (s / substeps)
                p = -Miota @ g
                rhs = (1.0 + alpha) * p - alpha * p_prev + M @ (c2 * v + c3 * a) - K @ u
                if has_c or U is not None:
                    w_ = (1.0 + alpha) * (c4 * v + c5 * a) - alpha * v
                    if has_c:
                        rhs -= C @ w_
                    if U is not None:
                        rhs -= U @ (dU * (U.T @ w_))
                du = factor_w.solve(rhs)
                a_new = c0 * du - c2 * v - c3 * a
                v = c1 * du + c4 * v + c5 * a
                u = u + du
                a = a_new
                p_prev = p
            yd[:, i] = out @ u
            yv[:, i] = out @ v
            ya[:, i] = out @ a
            au = np.abs(u if peak_operator is None else peak_operator @ u)
            better = au > peak
            peak[better] = au[better]
            peak_step[better] = i
            if block is not None:
                j = len(bsteps)
                block[:, j] = u
                bsteps.append(i)
                if j + 1 == block_steps:
                    on_block(block, np.asarray(bsteps))
                    bsteps = []
            if progress and i % 100 == 0:
                bar.advance(100)
    if block is not None and bsteps:
        on_block(block[:, :len(bsteps)], np.asarray(bsteps))
    name = "Newmark average acceleration" if alpha == 0 else f"HHT-α (α = {alpha:g})"
    assumptions = [
        f"{name}, β = {beta:.4g}, γ = {gamma:.4g}; step {h:.4g} s "
        f"({substeps} sub-step(s) per record step of {dt:.4g} s); ground acceleration linear within a record step.",
        "The damping matrix as given is used whole (no modal uncoupling).",
        "Effective stiffness factorized once and reused at every step; structure starts at rest.",
    ]
    return DirectResponse(time=np.arange(n_t) * dt, ground=ag, disp=yd, vel=yv, acc=ya,
                          dof_peak=peak, dof_peak_step=peak_step, substeps=substeps,
                          alpha=alpha, beta=beta, gamma=gamma, solver=factor.name,
                          assumptions=assumptions, factor_time=t_fac)
