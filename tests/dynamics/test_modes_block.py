"""The block shift-invert Lanczos eigen-solver against scipy's dense eigh (issue 20, item 2).

Source: scipy.linalg.eigh on the same pencil (LAPACK), an independent dense solution.
The pencil is invented: a 3-D grid Laplacian plus a diagonal shift (SPD stiffness) and
a random positive diagonal mass, so that the eigenvalues are distinct.
"""
from __future__ import annotations

import numpy as np
import scipy.linalg as sla
import scipy.sparse as sp

from groundshake.dynamics import lowest_modes
from groundshake.linalg import factorize


def _pencil(nx=9, ny=8, nz=10, seed=4):
    def lap(m):
        return sp.diags([-np.ones(m - 1), 2 * np.ones(m), -np.ones(m - 1)], [-1, 0, 1])
    ix, iy, iz = sp.identity(nx), sp.identity(ny), sp.identity(nz)
    K = (sp.kron(sp.kron(lap(nx), iy), iz) + sp.kron(sp.kron(ix, lap(ny)), iz)
         + sp.kron(sp.kron(ix, iy), lap(nz)) + 0.01 * sp.identity(nx * ny * nz))
    rng = np.random.default_rng(seed)
    M = sp.diags(rng.uniform(0.5, 1.5, nx * ny * nz))
    return sp.csr_matrix(K), sp.csr_matrix(M)


def test_block_lanczos_equals_dense_eigh():
    K, M = _pencil()
    k = 15
    stats: dict = {}
    lam, phi = lowest_modes(K, M, n_modes=k, factor=factorize(K, solver="scipy"),
                            method="block", stats=stats)
    assert "dim" in stats                              # converged, no ARPACK fallback
    ref, vec = sla.eigh(K.toarray(), M.toarray(), subset_by_index=[0, k - 1])
    np.testing.assert_allclose(lam, ref, rtol=1e-10)    # scipy.linalg.eigh (LAPACK)
    # mass-normalised shapes equal up to sign: |φᵀ M φ_ref| = 1 (distinct eigenvalues)
    overlap = np.abs(np.einsum("im,im->m", phi, M @ vec))
    np.testing.assert_allclose(overlap, 1.0, atol=1e-6)  # scipy.linalg.eigh shapes
    np.testing.assert_allclose(phi.T @ (M @ phi), np.eye(k), atol=1e-10)  # definition


def test_auto_uses_the_block_solver_above_3000_unknowns():
    K, M = _pencil(16, 15, 14)                         # 3,360 unknowns
    lam_auto, _ = lowest_modes(K, M, n_modes=10, method="auto", solver="scipy")
    lam_arpack, _ = lowest_modes(K, M, n_modes=10, method="lanczos", solver="scipy")
    np.testing.assert_allclose(lam_auto, lam_arpack, rtol=1e-10)  # scipy eigsh (ARPACK)
