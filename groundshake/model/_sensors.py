"""Sensors: points of the block whose displacement is interpolated from its element's
nodes with the trilinear shape functions."""
from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from .._errors import ScenarioError
from ._elements import NODE_SIGNS, shape_values
from ._types import Point

__all__ = ["point_operator", "place_sensors"]


def _containing_cell(mesh, at: np.ndarray):
    """(i, j, k, lo, hi) of a filled cell holding point ``at`` (3,) [m], or None."""
    xs, ys, zs = mesh.lines
    idx = []
    for a, l in zip(at, (xs, ys, zs)):
        tol = 1e-9 * max(1.0, l[-1] - l[0])
        if a < l[0] - tol or a > l[-1] + tol:
            return None
        idx.append(int(np.clip(np.searchsorted(l, a, side="right") - 1, 0, len(l) - 2)))
    # a point on a cell face may belong to a neighbour cell that is filled
    for di in (0, -1):
        for dj in (0, -1):
            for dk in (0, -1):
                i, j, k = idx[0] + di, idx[1] + dj, idx[2] + dk
                if min(i, j, k) < 0 or i >= len(xs) - 1 or j >= len(ys) - 1 or k >= len(zs) - 1:
                    continue
                lo = np.array([xs[i], ys[j], zs[k]])
                hi = np.array([xs[i + 1], ys[j + 1], zs[k + 1]])
                if mesh.filled[k, j, i] and np.all(at >= lo - 1e-9) and np.all(at <= hi + 1e-9):
                    return i, j, k, lo, hi
    return None


def point_operator(mesh, P: sp.csr_matrix, at: np.ndarray) -> sp.csr_matrix | None:
    """(3, n) operator interpolating the displacement at point ``at`` (3,) [m] from the
    reduced DOFs (node map ``P`` (3·n_nodes, n)); None when the point is not in the block."""
    cell = _containing_cell(mesh, at)
    if cell is None:
        return None
    i, j, k, lo, hi = cell
    xi = np.clip(2 * (at - lo) / (hi - lo) - 1, -1, 1)
    N = shape_values(xi[None])[0]  # (8,)
    off = ((NODE_SIGNS + 1) / 2).astype(int)
    nid = mesh.node_id[k + off[:, 2], j + off[:, 1], i + off[:, 0]]
    W = sp.csr_matrix((np.repeat(N, 3), (np.tile(np.arange(3), 8),
                                         (3 * nid[:, None] + np.arange(3)).ravel())),
                      shape=(3, P.shape[0]))
    return sp.csr_matrix(W @ P)


def place_sensors(mesh, P: sp.csr_matrix, sensors) -> tuple[Point, ...]:
    """A :class:`Point` for each scenario sensor; ScenarioError for one off the block."""
    out = []
    for si, s in enumerate(sensors):
        at = np.array([float(v) for v in s.at])
        op = point_operator(mesh, P, at)
        if op is None:
            raise ScenarioError(f"sensors[{si}].at ({s.name}): {at.tolist()} is not inside or "
                                "on the block; allowed a point of the modelled parts")
        out.append(Point(name=str(s.name), position=at, operator=op))
    return tuple(out)
