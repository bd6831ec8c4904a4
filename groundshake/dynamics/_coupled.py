"""Non-classically damped response at modal cost: the whole damping matrix on a Ritz basis.

The basis is the retained modes Φ (n, m) plus the static missing-mass shapes R (n, ≤3)
(the load-dependent Ritz vectors of the modes left out). A Rayleigh-Ritz step on
span[Φ, R] gives m + r M-orthonormal, K-orthogonal vectors Ψ: the m modes themselves
and r pseudo-modes of high frequency that carry the missing mass dynamically. The
damping matrix that direct integration uses (Rayleigh matrix of the block, equipment
dashpots, soil radiation dashpots, the low-rank bed dashpots) is projected whole,
Ψᵀ C Ψ, so the dashpots couple the reduced coordinates as they couple the full model::

    q̈ + (ΨᵀCΨ) q̇ + Ω̃² q = −Ψᵀ L a_g(t),     u = Ψ q

and the reduced first-order system is stepped exactly for ground acceleration linear
within each step (matrix exponential of the augmented system, first-order hold).
"""
from __future__ import annotations

import numpy as np
import scipy.linalg as sla

from ._modal import ModalResponse, coupled_modal_response

__all__ = ["ritz_basis", "coupled_response"]


def ritz_basis(K, M, shapes: np.ndarray, residual: np.ndarray | None, *,
               drop: float = 1e-8) -> tuple[np.ndarray, np.ndarray, int]:
    """Rayleigh-Ritz vectors of span[Φ, R].

    Parameters
    ----------
    K, M : sparse (n, n)
        Stiffness [N/m] and mass [kg].
    shapes : ndarray (n, m)
        Mass-normalised modes Φ.
    residual : ndarray (n, r) or None
        Static missing-mass shapes R (:func:`~groundshake.dynamics.residual_vectors`).
    drop : float
        Residual columns whose part M-orthogonal to Φ and to each other is smaller than
        ``drop`` times their M-norm add nothing and are dropped.

    Returns
    -------
    psi : ndarray (n, m + r')
        M-orthonormal (ψᵀMψ = I), K-orthogonal basis, ascending frequency.
    omega : ndarray (m + r',) [rad/s]
    n_extra : int
        r', the pseudo-modes kept from R.

    References
    ----------
    Wilson, Yuan & Dickens (1982), Earthquake Eng. Struct. Dyn. 10 (load-dependent Ritz
    vectors); Rayleigh-Ritz: Bathe, Finite Element Procedures (1996), §11.6.
    """
    phi = np.asarray(shapes, dtype=float)
    if residual is None or np.size(residual) == 0:
        lam = np.einsum("im,im->m", phi, K @ phi)
        return phi, np.sqrt(np.maximum(lam, 0.0)), 0
    R = np.asarray(residual, dtype=float).reshape(phi.shape[0], -1)
    keep: list[int] = []
    for _ in range(2):                        # M-orthogonalise against Φ, twice
        R = R - phi @ (phi.T @ (M @ R))
    Q = np.zeros_like(R)
    for j in range(R.shape[1]):               # ≤ 3 columns
        r = R[:, j] - Q[:, keep] @ (Q[:, keep].T @ (M @ R[:, j])) if keep else R[:, j]
        nrm0 = np.sqrt(max(float(residual[:, j] @ (M @ residual[:, j])), 0.0))
        nrm = np.sqrt(max(float(r @ (M @ r)), 0.0))
        if nrm0 > 0 and nrm > drop * nrm0:
            Q[:, j] = r / nrm
            keep.append(j)
    Q = Q[:, keep]
    if not keep:
        lam = np.einsum("im,im->m", phi, K @ phi)
        return phi, np.sqrt(np.maximum(lam, 0.0)), 0
    B = np.hstack([phi, Q])
    Kr = B.T @ (K @ B)
    Mr = B.T @ (M @ B)
    lam, X = sla.eigh(0.5 * (Kr + Kr.T), 0.5 * (Mr + Mr.T))
    psi = B @ X
    return psi, np.sqrt(np.maximum(lam, 0.0)), len(keep)


def coupled_response(K, M, C, shapes: np.ndarray, residual: np.ndarray | None,
                     load: np.ndarray, ground: np.ndarray, dt: float, *,
                     damping_update: tuple | None = None) -> ModalResponse:
    """Response with the whole damping matrix on the modes plus missing-mass vectors.

    Parameters
    ----------
    K, M : sparse (n, n)
        Stiffness [N/m] and mass [kg].
    C : sparse (n, n)
        Damping [N·s/m], the matrix direct integration uses.
    shapes : ndarray (n, m)
        Mass-normalised modes.
    residual : ndarray (n, 3) or None
        Missing-mass shapes (None: the modes alone).
    load : ndarray (n, 3)
        Ground load L [kg], p(t) = −L a_g(t).
    ground : ndarray (3, n_t)
        Ground acceleration [m/s²], linear between samples.
    dt : float
        Sample interval [s].
    damping_update : (U (n, q), d (q,)), optional
        Low-rank damping added to C: U·diag(d)·Uᵀ [N·s/m].

    Returns
    -------
    ModalResponse
        ``shapes`` is the Ritz basis Ψ (n, m + r), ``omega`` its frequencies [rad/s],
        ``damping`` the diagonal ratios (ΨᵀCΨ)ₙₙ/(2ω̃ₙ); no separate residual (the
        missing mass is in Ψ and responds dynamically).

    Notes
    -----
    Exact for the reduced system and ground acceleration linear between samples (see
    :func:`~groundshake.dynamics.coupled_modal_response`); the only approximation
    against direct integration of the full model is the reduced basis.
    """
    psi, omega, n_extra = ritz_basis(K, M, shapes, residual)
    Cr = psi.T @ (C @ psi) if C is not None else np.zeros((psi.shape[1],) * 2)
    if damping_update is not None and np.size(damping_update[1]):
        U, d = damping_update
        W = np.asarray(U.T @ psi)                 # (q, m + r); U dense or sparse
        Cr = Cr + W.T @ (np.asarray(d, dtype=float)[:, None] * W)
    Cr = 0.5 * (Cr + Cr.T)
    gam = psi.T @ np.asarray(load, dtype=float)
    r = coupled_modal_response(psi, omega, Cr, gam, ground, dt, residual=None)
    m = np.asarray(shapes).shape[1]
    r.assumptions[:] = [
        f"Reduced basis: {m} mode(s) and {n_extra} missing-mass (load-dependent Ritz) "
        "vector(s), orthogonalised by a Rayleigh-Ritz step; the missing mass responds "
        "dynamically.",
        "The whole damping matrix of direct integration (Rayleigh matrix of the block, "
        "equipment and soil dashpots) projected on that basis: the coordinates stay coupled "
        "(non-classical damping kept).",
        "Reduced equations stepped exactly (matrix exponential, first-order hold) for "
        "ground acceleration linear between samples.",
    ]
    return r
