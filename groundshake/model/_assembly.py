"""Assembly on the structured grid by stencils: no element loop, no sort.

Every node of the grid couples with at most its 27 neighbours. Each distinct element
matrix is split into its 8×8 node blocks; for each pair of local nodes (A, B) the
block of every element is added, by one strided array operation over the whole grid,
into a stencil array ``S[node, i, neighbour, j]``. The CSR matrix is then read off the
stencil in order (rows by node, columns ascending), so no COO sort is needed.
"""
from __future__ import annotations

from typing import Literal

import numpy as np
import scipy.sparse as sp

from ._elements import NODE_SIGNS, ElementMatrices
from ._mesh import GridMesh

__all__ = ["element_keys", "assemble", "assemble_stress"]

_OFF = ((NODE_SIGNS + 1) / 2).astype(int)  # (8, 3): (i, j, k) offset of each local node


def element_keys(mesh: GridMesh, material_of_part, *, decimals: int = 12):
    """Group the cells by (dx, dy, dz, material).

    Returns
    -------
    key_grid : (nez, ney, nex) int, −1 where empty.
    sizes : (k, 3) [m]; material : (k,) index into the materials.
    """
    xs, ys, zs = mesh.lines
    ids = []
    uniq = []
    for d in (np.diff(xs), np.diff(ys), np.diff(zs)):
        u, inv = np.unique(np.round(d, decimals), return_inverse=True)
        ids.append(inv)
        uniq.append(u)
    mat_cell = np.where(mesh.filled, np.asarray(material_of_part)[np.maximum(mesh.cell_part, 0)], -1)
    kz, ky, kx = np.meshgrid(ids[2], ids[1], ids[0], indexing="ij")
    code = np.stack([kx, ky, kz, mat_cell], axis=-1)[mesh.filled]
    combos, inv = np.unique(code, axis=0, return_inverse=True)
    key_grid = np.full(mesh.filled.shape, -1, dtype=np.int64)
    key_grid[mesh.filled] = inv.ravel()
    sizes = np.column_stack([uniq[0][combos[:, 0]], uniq[1][combos[:, 1]], uniq[2][combos[:, 2]]])
    return key_grid, sizes, combos[:, 3]


def _lin_offsets(shape_zyx):
    nz, ny, nx = shape_zyx
    o = np.arange(27)
    ox, oy, oz = o % 3 - 1, (o // 3) % 3 - 1, o // 9 - 1
    return ox + nx * (oy + ny * oz)


def assemble(mesh: GridMesh, key_grid: np.ndarray, mats: ElementMatrices, *,
             mass: Literal["consistent", "lumped"] = "consistent"):
    """Global stiffness and mass of the grid's node DOFs (3·n_nodes, interleaved).

    Parameters
    ----------
    mesh : the grid. key_grid : (nez, ney, nex) index into ``mats`` (−1 empty).
    mats : element matrices of the distinct keys.
    mass : consistent δij·∫ρ N_A N_B dV, or lumped (row sums on the diagonal).

    Returns
    -------
    K, M : scipy.sparse.csr_matrix (3·n_nodes, 3·n_nodes) [N/m], [kg].
    """
    nz, ny, nx = mesh.node_id.shape
    nez, ney, nex = key_grid.shape
    nk = mats.stiffness.shape[0]
    filled = mesh.filled
    uniform = nk == 1 and bool(filled.all())
    kg = np.where(key_grid >= 0, key_grid, nk)
    # node blocks with the key last: Kt[A, i, B, j, key], mt[A, B, key]
    Kt = np.concatenate([mats.stiffness, np.zeros((1, 24, 24))]).reshape(nk + 1, 8, 3, 8, 3)
    Kt = np.ascontiguousarray(np.moveaxis(Kt, 0, -1))
    mt = np.ascontiguousarray(np.moveaxis(np.concatenate([mats.mass, np.zeros((1, 8, 8))]), 0, -1))
    # stencils with the grid axes last, so that each block add runs along contiguous x
    S = np.zeros((27, 3, 3, nz, ny, nx))
    Sm = np.zeros((27, nz, ny, nx))
    C = np.zeros((27, nz, ny, nx), dtype=bool)
    for A in range(8):
        ai, aj, ak = _OFF[A]
        sl = (slice(ak, ak + nez), slice(aj, aj + ney), slice(ai, ai + nex))
        for B in range(8):
            d = _OFF[B] - _OFF[A] + 1
            o = d[0] + 3 * d[1] + 9 * d[2]
            if uniform:  # one element matrix everywhere: add a constant block
                S[(o, slice(None), slice(None)) + sl] += Kt[A, :, B, :, 0][:, :, None, None, None]
                Sm[(o,) + sl] += mt[A, B, 0]
            else:
                S[(o, slice(None), slice(None)) + sl] += Kt[A, :, B, :][:, :, kg]
                Sm[(o,) + sl] += mt[A, B][kg]
            C[(o,) + sl] |= filled
    S = S.transpose(3, 4, 5, 1, 0, 2)  # (nz, ny, nx, i, o, j), a view
    Sm = np.moveaxis(Sm, 0, -1)
    C = np.moveaxis(C, 0, -1)
    g = np.flatnonzero(mesh.node_id.ravel() >= 0)
    nid = mesh.node_id.ravel()
    n = g.size
    mask = C.reshape(-1, 27)[g]  # (n, 27)
    nb_lin = np.clip(g[:, None] + _lin_offsets((nz, ny, nx))[None], 0, nid.size - 1)
    nbr = nid[nb_lin]  # valid where mask
    del C
    rowlen = mask.sum(axis=1)  # neighbours per node
    ar3 = np.arange(3)
    # stiffness
    m4 = np.broadcast_to(mask[:, None, :, None], (n, 3, 27, 3))
    data = S.reshape(-1, 3, 27, 3)[g][m4]  # reshape copies into node order
    del S
    cols = (3 * nbr[:, None, :, None] + ar3[None, None, None, :]).astype(np.int32)
    indices = np.broadcast_to(cols, (n, 3, 27, 3))[m4]
    indptr = np.zeros(3 * n + 1, dtype=np.int64)
    np.cumsum(np.repeat(3 * rowlen, 3), out=indptr[1:])
    K = sp.csr_matrix((data, indices, indptr), shape=(3 * n, 3 * n))
    K.has_sorted_indices = True
    # mass
    Smg = Sm.reshape(-1, 27)[g]
    if mass == "lumped":
        M = sp.diags(np.repeat(Smg.sum(axis=1), 3)).tocsr()
    elif mass == "consistent":
        m3 = np.broadcast_to(mask[:, None, :], (n, 3, 27))
        mdata = np.broadcast_to(Smg[:, None, :], (n, 3, 27))[m3]
        mcols = (3 * nbr[:, None, :] + ar3[None, :, None]).astype(np.int32)
        mind = np.broadcast_to(mcols, (n, 3, 27))[m3]
        mptr = np.zeros(3 * n + 1, dtype=np.int64)
        np.cumsum(np.repeat(rowlen, 3), out=mptr[1:])
        M = sp.csr_matrix((mdata, mind, mptr), shape=(3 * n, 3 * n))
        M.has_sorted_indices = True
    else:
        raise ValueError(f"mass={mass!r}; allowed 'consistent', 'lumped'")
    return K, M


def assemble_stress(mesh: GridMesh, key_grid: np.ndarray, mats: ElementMatrices):
    """Element-centre stress operator (6·n_el, 3·n_nodes) [Pa/m], rows 6e + k."""
    ei, ej, ek = mesh.element_cell.T
    keys = key_grid[ek, ej, ei]
    vals = mats.centre_stress[keys]  # (n_el, 6, 24)
    n_el = keys.size
    dofs = (3 * mesh.elements[:, :, None] + np.arange(3)[None, None]).reshape(n_el, 24)
    rows = np.broadcast_to((6 * np.arange(n_el))[:, None, None] + np.arange(6)[None, :, None],
                           (n_el, 6, 24))
    cols = np.broadcast_to(dofs[:, None, :], (n_el, 6, 24))
    return sp.csr_matrix((vals.ravel(), (rows.ravel(), cols.ravel())),
                         shape=(6 * n_el, 3 * mesh.n_nodes))
