"""Stress recovery points on the block's surface.

Stresses of a brick are most accurate at its 2×2×2 Gauss points; peak stresses sit on
the surface. Each element's Gauss-point stresses (incompatible modes included) are
extrapolated to its corners (:data:`~groundshake.model._elements.GAUSS_TO_CORNERS`) and
averaged, node by node, over the elements of one part that meet there (nodal
averaging; Zienkiewicz & Zhu 1992). The recovery points are the nodes on the block's
outer surface, once per part meeting at the node: stress jumps across a material
interface, and where a pedestal meets its mat at a re-entrant edge, averaging the
pedestal's stresses with the mat's would dilute the pedestal's.

Features are marked where stress concentrates and the linear-elastic value depends on
the mesh: re-entrant corners and edges (the cells around the node do not form a box)
and the edge of a constraint — a fixed or rigid base, or a rigid equipment mount: a
constrained node that shares a surface face with a node that is not constrained.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .._grid import grid_faces
from ._elements import ElementMatrices
from ._mesh import GridMesh

__all__ = ["StressPoints", "surface_stress_points", "surface_faces"]

#: (di, dj, dk) offsets of the eight cells around a node, cell index = node index − 1 + offset
_AROUND = np.array([[di, dj, dk] for dk in (0, 1) for dj in (0, 1) for di in (0, 1)])


@dataclass(frozen=True, eq=False)
class StressPoints:
    """Where stresses are recovered and searched for peaks.

    Attributes
    ----------
    operator : scipy.sparse.csr_matrix (6·n_p, 3·n_nodes) [Pa/m]
        Stress [σxx, σyy, σzz, τyz, τxz, τxy] at each point (rows 6p + k) per unit node
        displacement (node DOFs interleaved, as in the assembly).
    node : (n_p,) int, the mesh node of each point.
    position : (n_p, 3) [m].
    part : (n_p,) int, the part whose elements are averaged at the point.
    material : (n_p,) int, that part's material index.
    element_points : (n_el, 8) int
        Point of each element corner (local node order), −1 where the corner is not on
        the surface.
    reentrant : (n_p,) bool, the point sits on a re-entrant edge or corner.
    constraint_edge : (n_p,) int8, the point sits on the edge of a constrained face:
        0 no, 1 a fixed or rigid base, 2 a rigid mount (the codes of ``constrained``).
    """

    operator: sp.csr_matrix
    node: np.ndarray
    position: np.ndarray
    part: np.ndarray
    material: np.ndarray
    element_points: np.ndarray
    reentrant: np.ndarray
    constraint_edge: np.ndarray

    @property
    def n_points(self) -> int:
        return int(self.node.size)

    def feature(self, p: int) -> str | None:
        """``"re-entrant corner"``, ``"base edge"``, ``"mount edge"`` or None for point ``p``."""
        if self.reentrant[p]:
            return "re-entrant corner"
        return {1: "base edge", 2: "mount edge"}.get(int(self.constraint_edge[p]))

    @property
    def flagged(self) -> np.ndarray:
        """(n_p,) bool, the point sits on any feature."""
        return np.asarray(self.reentrant, bool) | (np.asarray(self.constraint_edge) > 0)


def surface_faces(mesh: GridMesh) -> np.ndarray:
    """Quadrilateral faces between a filled cell and an empty one (or the grid's outside).

    Returns
    -------
    (n_f, 4) int, node numbers of each face.
    """
    filled = np.asarray(mesh.filled, bool)  # (nez, ney, nex)
    faces = []
    for axis in range(3):                   # 0: x, 1: y, 2: z (array axes 2, 1, 0)
        corners, _, _ = grid_faces(filled, 2 - axis)
        # the four nodes in the order (0, 0), (0, 1), (1, 1), (1, 0) across the face
        faces.append(mesh.node_id[tuple(np.moveaxis(corners[:, [0, 3, 2, 1]], -1, 0))])
    return np.concatenate(faces, axis=0)


def _reentrant_nodes(mesh: GridMesh) -> np.ndarray:
    """(n_nodes,) bool: the filled cells around the node do not form a box."""
    filled = np.pad(np.asarray(mesh.filled, bool), 1)   # cell (k, j, i) → (k+1, j+1, i+1)
    nz, ny, nx = mesh.node_id.shape
    # cells around node (k, j, i) are padded cells (k + dk, j + dj, i + di), d ∈ {0, 1}
    around = np.stack([filled[dk:dk + nz, dj:dj + ny, di:di + nx] for di, dj, dk in _AROUND],
                      axis=-1)                           # (nz, ny, nx, 8)
    count = around.sum(axis=-1)
    o = _AROUND
    ext = np.ones(count.shape, dtype=int)
    for a in range(3):
        lo = np.any(around[..., o[:, a] == 0], axis=-1)
        hi = np.any(around[..., o[:, a] == 1], axis=-1)
        ext *= np.where(lo & hi, 2, 1)
    bad = (count > 0) & (count != ext)
    out = np.zeros(mesh.n_nodes, dtype=bool)
    has = mesh.node_id >= 0
    out[mesh.node_id[has]] = bad[has]
    return out


def surface_stress_points(mesh: GridMesh, key_grid: np.ndarray, mats: ElementMatrices,
                          key_material: np.ndarray, *, constrained: np.ndarray | None = None,
                          batch: int = 20_000) -> StressPoints:
    """Recovery points on the surface and the operator giving their stresses.

    Parameters
    ----------
    mesh : GridMesh
    key_grid : (nez, ney, nex) int
        Element matrix of each cell (from :func:`element_keys`), −1 where empty.
    mats : ElementMatrices
        With ``corner_stress`` (k, 8, 6, 24) [Pa/m].
    key_material : (k,) int
        Material of each element matrix.
    constrained : (n_nodes,) int, optional
        0 for a free node, 1 for a node of a fixed or rigid base, 2 for a node of a rigid
        mount (booleans read as 0 and 1).
    batch : int
        Element corners handled at once while assembling (memory bound).

    Returns
    -------
    StressPoints
        ``operator`` acts on node DOFs (3·n_nodes); multiply by the node map for
        reduced DOFs.

    Notes
    -----
    σ_p = (1/n_p) Σ_{e ∋ p} Σ_g X_ag σ_g,e: each element's Gauss-point stresses
    extrapolated to the corner a at the point, averaged over the n_p elements of the
    point's part (Zienkiewicz & Zhu 1992, IJNME 33, on recovery from Gauss points).
    """
    if mats.corner_stress is None:
        raise ValueError("mats.corner_stress is None; brick_matrices gives it")
    n_nodes = mesh.n_nodes
    n_el = mesh.elements.shape[0]
    faces = surface_faces(mesh)
    on_surface = np.zeros(n_nodes, dtype=bool)
    on_surface[faces.ravel()] = True
    ei, ej, ek = np.asarray(mesh.element_cell).T
    keys = np.asarray(key_grid)[ek, ej, ei]                 # (n_el,)
    mat_el = np.asarray(key_material)[keys]                 # (n_el,)
    part_el = np.asarray(mesh.element_part, dtype=np.int64)  # (n_el,)
    n_part = int(part_el.max()) + 1 if n_el else 1
    conn = np.asarray(mesh.elements)
    pair_e, pair_a = np.nonzero(on_surface[conn])           # element corners on the surface
    pair_node = conn[pair_e, pair_a]
    code = pair_node.astype(np.int64) * n_part + part_el[pair_e]
    ucode, first, pid = np.unique(code, return_index=True, return_inverse=True)
    pid = pid.ravel()
    n_p = ucode.size
    count = np.bincount(pid, minlength=n_p).astype(float)
    node = (ucode // n_part).astype(np.int64)
    part = (ucode % n_part).astype(np.int64)
    material = mat_el[pair_e[first]].astype(np.int64)
    element_points = np.full((n_el, 8), -1, dtype=np.int64)
    element_points[pair_e, pair_a] = pid

    op = sp.csr_matrix((6 * n_p, 3 * n_nodes))
    ar6 = np.arange(6)
    ar3 = np.arange(3)
    for s in range(0, pair_e.size, batch):
        e, a, p = pair_e[s:s + batch], pair_a[s:s + batch], pid[s:s + batch]
        vals = mats.corner_stress[keys[e], a] / count[p][:, None, None]       # (b, 6, 24)
        dofs = (3 * conn[e][:, :, None] + ar3).reshape(-1, 24)               # (b, 24)
        rows = np.broadcast_to((6 * p)[:, None, None] + ar6[None, :, None], vals.shape)
        cols = np.broadcast_to(dofs[:, None, :], vals.shape)
        op = op + sp.csr_matrix((vals.ravel(), (rows.ravel(), cols.ravel())),
                                shape=(6 * n_p, 3 * n_nodes))
    op = sp.csr_matrix(op)
    op.sum_duplicates()

    reentrant = _reentrant_nodes(mesh)[node]
    edge = np.zeros(n_nodes, dtype=np.int8)
    if constrained is not None and faces.size:
        code = np.asarray(constrained).astype(np.int8)
        cf = code[faces] > 0                                 # (n_f, 4)
        mixed = cf.any(axis=1) & ~cf.all(axis=1)
        nodes_at = faces[mixed][cf[mixed]]
        edge[nodes_at] = code[nodes_at]
    return StressPoints(operator=op, node=node, position=np.asarray(mesh.nodes)[node],
                        part=part, material=material, element_points=element_points,
                        reentrant=reentrant, constraint_edge=edge[node])
