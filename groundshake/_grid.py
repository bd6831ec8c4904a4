"""The outer faces of a set of cells on one structured grid (the package's one face finder).

The mesh is a set of filled cells of a rectilinear grid; a face lies between a filled cell
and an empty one (or the outside of the grid). Found with whole-array operations: pad the
grid with empty cells along an axis, and compare each cell with its neighbour.
"""
from __future__ import annotations

import numpy as np

__all__ = ["grid_faces"]


def grid_faces(filled: np.ndarray, axis: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The faces normal to array axis ``axis`` between a filled cell and an empty one.

    Parameters
    ----------
    filled : ndarray of bool, shape (n0, n1, n2)
        Cells that hold an element; grid points are (n0+1, n1+1, n2+1).
    axis : {0, 1, 2}
        The array axis the faces are normal to.

    Returns
    -------
    corners : ndarray of int, shape (n_f, 4, 3)
        Grid-point indices of each face's corners, going round it: (0, 0), (1, 0), (1, 1),
        (0, 1) steps along the other two axes in increasing order. Faces are in C order of
        their first corner.
    cell : ndarray of int, shape (n_f, 3)
        The filled cell the face belongs to.
    plus : ndarray of bool, shape (n_f,)
        The face's outward normal points along +``axis`` (the filled cell is below it).
    """
    pad = [(0, 0)] * 3
    pad[axis] = (1, 1)
    f = np.pad(np.asarray(filled, bool), pad)
    lo = np.take(f, np.arange(f.shape[axis] - 1), axis=axis)
    hi = np.take(f, np.arange(1, f.shape[axis]), axis=axis)
    idx = np.argwhere(lo != hi)               # grid-line index along `axis`, cell across
    plus = lo[tuple(idx.T)]
    cell = idx.copy()
    cell[:, axis] -= plus.astype(int)         # the filled side
    a1, a2 = [d for d in range(3) if d != axis]
    step = np.zeros((4, 3), int)
    step[:, a1] = (0, 1, 1, 0)
    step[:, a2] = (0, 0, 1, 1)
    return idx[:, None, :] + step[None], cell, plus
