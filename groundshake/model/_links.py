"""Constraints of the block model: fixed DOFs and rigid links to master DOFs.

The grid's node DOFs (3 per node, interleaved x, y, z) are free, fixed (a fixed base) or
slaved to a master with six DOFs [u, θ] by a rigid link, u = u_m + θ_m × (x − x_m) (the
base face on lumped soil springs, each equipment footprint); an equipment item on a
flexible support adds three master DOFs of its own. The reduced DOFs are
[free node DOFs, master DOFs], and the node map P gives the node DOFs from them.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sp

__all__ = ["rigid_link", "resultant_rows", "Links", "Reduction"]


def rigid_link(offsets: np.ndarray) -> np.ndarray:
    """Rows (3p, 6) mapping master [u, θ] to the translations of points at ``offsets``
    (p, 3) from the master: u = u_m + θ × r."""
    r = np.atleast_2d(offsets)
    p = r.shape[0]
    T = np.zeros((p, 3, 6))
    T[:, 0, 0] = T[:, 1, 1] = T[:, 2, 2] = 1.0
    T[:, 0, 4], T[:, 0, 5] = r[:, 2], -r[:, 1]
    T[:, 1, 3], T[:, 1, 5] = -r[:, 2], r[:, 0]
    T[:, 2, 3], T[:, 2, 4] = r[:, 1], -r[:, 0]
    return T.reshape(3 * p, 6)


def resultant_rows(offsets: np.ndarray) -> np.ndarray:
    """(6, 3p): forces at points ``offsets`` (p, 3) → [Fx, Fy, Fz, Mx, My, Mz] about 0."""
    return rigid_link(offsets).T


@dataclass
class Links:
    """The constraints as they are laid down, node DOFs (3·n_nodes) first: ``status``
    0 free, 1 fixed, 2 slaved; each rigid link's node DOFs and (master offset, rows
    (3p, 6)); ``n_extra`` master DOFs so far. :meth:`reduce` closes them."""

    n_node_dof: int
    status: np.ndarray = field(init=False)
    slave_rows: list = field(default_factory=list)
    slave_maps: list = field(default_factory=list)
    n_extra: int = 0

    def __post_init__(self):
        self.status = np.zeros(self.n_node_dof, dtype=np.int8)

    def fix(self, dofs: np.ndarray) -> None:
        """Fix node DOFs ``dofs`` (a fixed base)."""
        self.status[dofs] = 1

    def masters(self, count: int) -> int:
        """Add ``count`` master DOFs; returns the offset of the first among the masters."""
        first = self.n_extra
        self.n_extra += count
        return first

    def link(self, dofs: np.ndarray, offsets: np.ndarray) -> int:
        """Slave node DOFs ``dofs`` (the 3 DOFs of each of p nodes) to a new rigid master
        at ``offsets`` (p, 3) [m] from the nodes' positions; returns the master's offset."""
        master = self.masters(6)
        self.status[dofs] = 2
        self.slave_rows.append(dofs)
        self.slave_maps.append((master, rigid_link(offsets)))
        return master

    def reduce(self) -> "Reduction":
        """The node map P (3·n_nodes, n) and the reduced DOF numbering."""
        free_dofs = np.flatnonzero(self.status == 0)
        nf = free_dofs.size
        n = nf + self.n_extra
        red_of = np.full(self.n_node_dof, -1, dtype=np.int64)
        red_of[free_dofs] = np.arange(nf)
        rows = [free_dofs]
        cols = [np.arange(nf)]
        vals = [np.ones(nf)]
        for dofs, (mo, T) in zip(self.slave_rows, self.slave_maps):
            nz = T != 0
            r, c = np.nonzero(nz)
            rows.append(dofs[r])
            cols.append(nf + mo + c)
            vals.append(T[nz])
        P = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows),
                                                  np.concatenate(cols))),
                          shape=(self.n_node_dof, n))
        return Reduction(status=self.status, free_dofs=free_dofs, red_of=red_of, P=P,
                         n_extra=self.n_extra)


@dataclass(frozen=True, eq=False)
class Reduction:
    """Reduced DOFs: ``free_dofs`` (nf,) node DOFs kept, ``red_of`` (3·n_nodes,) the
    reduced number of each node DOF (−1 when not free), ``P`` (3·n_nodes, n) the node
    map, ``n_extra`` master DOFs after the nf free ones."""

    status: np.ndarray
    free_dofs: np.ndarray
    red_of: np.ndarray
    P: sp.csr_matrix
    n_extra: int

    @property
    def nf(self) -> int:
        return int(self.free_dofs.size)

    @property
    def n(self) -> int:
        return self.nf + self.n_extra

    def reduce(self, A: sp.spmatrix) -> sp.csr_matrix:
        """Pᵀ A P (n, n) of a node matrix A (3·n_nodes, 3·n_nodes), in blocks."""
        free, s_dofs = self.free_dofs, np.flatnonzero(self.status == 2)
        Af = A[free]
        Aff = Af[:, free]
        if self.n_extra == 0:
            return sp.csr_matrix(Aff)
        Ts = self.P[s_dofs][:, self.nf:]  # (|s|, n_extra)
        Afs = Af[:, s_dofs] @ Ts
        Ass = Ts.T @ (A[s_dofs][:, s_dofs] @ Ts)
        return sp.bmat([[Aff, Afs], [Afs.T, Ass]], format="csr")

    def extra(self, D: np.ndarray) -> sp.csr_matrix:
        """A matrix D (n_extra, n_extra) of the master DOFs placed in the reduced (n, n)."""
        if self.n_extra == 0:
            return sp.csr_matrix((self.n, self.n))
        return sp.bmat([[sp.csr_matrix((self.nf, self.nf)), None],
                        [None, sp.csr_matrix(D)]], format="csr")
