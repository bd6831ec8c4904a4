"""Solves with a mass matrix."""
from __future__ import annotations

import numpy as np
import scipy.sparse as sp

__all__ = ["mass_solve"]


def mass_solve(M: sp.spmatrix, B: np.ndarray) -> np.ndarray:
    """M⁻¹ B (n, k) for a mass matrix M (n, n) [kg] and B (n, k).

    A diagonal M is divided out; up to 3000 DOFs a dense solve; beyond, Jacobi-
    preconditioned conjugate gradients (a consistent mass is well conditioned,
    Wathen 1987)."""
    M = sp.csr_matrix(M)
    n = M.shape[0]
    d = M.diagonal()
    if M.nnz == n:
        return B / d[:, None]
    if n <= 3000:
        import scipy.linalg as sla
        return sla.solve(M.toarray(), B, assume_a="pos")
    import scipy.sparse.linalg as spla
    pre = sp.diags(1.0 / d)
    out = np.empty_like(B, dtype=float)
    for j in range(B.shape[1]):
        x, info = spla.cg(M, B[:, j], rtol=1e-13, atol=0.0, M=pre, maxiter=2000)
        out[:, j] = x
    return out
