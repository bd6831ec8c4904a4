"""The structured grid: grid lines on every part face, mount and sensor, elements where a part is."""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .._errors import ScenarioError

__all__ = ["Box", "GridMesh", "grid_lines", "mesh_boxes", "count_grid"]


@dataclass(frozen=True)
class Box:
    """A rectangular part: ``origin`` (3,) the least corner [m], ``size`` (3,) [m]."""

    name: str
    origin: tuple[float, float, float]
    size: tuple[float, float, float]
    material: int = 0

    @property
    def lo(self) -> np.ndarray:
        return np.asarray(self.origin, float)

    @property
    def hi(self) -> np.ndarray:
        return np.asarray(self.origin, float) + np.asarray(self.size, float)


@dataclass(frozen=True, eq=False)
class GridMesh:
    """A structured box grid with some cells filled.

    Arrays follow (z, y, x) order so that the grid's linear index
    ``i + nx·(j + ny·k)`` is the C-order flat index.

    Attributes
    ----------
    lines : (xs, ys, zs) grid coordinates [m].
    filled : (nez, ney, nex) bool, cell holds an element.
    cell_part : (nez, ney, nex) int, part index (−1 where empty).
    node_id : (nz, ny, nx) int, node number (−1 where no element touches).
    nodes : (n_nodes, 3) [m]. elements : (n_el, 8) connectivity (local order of _elements).
    element_cell : (n_el, 3) cell indices (i, j, k). element_part : (n_el,).
    """

    lines: tuple[np.ndarray, np.ndarray, np.ndarray]
    filled: np.ndarray
    cell_part: np.ndarray
    node_id: np.ndarray
    nodes: np.ndarray
    elements: np.ndarray
    element_cell: np.ndarray
    element_part: np.ndarray
    extras: dict = field(default_factory=dict)

    @property
    def shape(self) -> tuple[int, int, int]:
        """Number of grid lines (nx, ny, nz)."""
        return tuple(len(a) for a in self.lines)

    @property
    def n_nodes(self) -> int:
        return self.nodes.shape[0]

    @property
    def element_centres(self) -> np.ndarray:
        xs, ys, zs = self.lines
        i, j, k = self.element_cell.T
        return np.column_stack([(xs[i] + xs[i + 1]) / 2, (ys[j] + ys[j + 1]) / 2,
                                (zs[k] + zs[k + 1]) / 2])

    @property
    def element_sizes(self) -> np.ndarray:
        xs, ys, zs = self.lines
        i, j, k = self.element_cell.T
        return np.column_stack([np.diff(xs)[i], np.diff(ys)[j], np.diff(zs)[k]])


def grid_lines(breaks, element_size: float, *, soft=(), soft_gap: float = 0.2):
    """Grid coordinates along one axis [m].

    ``breaks`` (part faces) are always grid lines; ``soft`` points (equipment edges,
    mounts, sensors) become lines unless they fall within ``soft_gap``·element_size of
    another line (sensors are interpolated anyway, so a sliver element is not worth it).
    Each gap is then cut into ``ceil(gap / element_size)`` equal pieces.
    """
    b = np.unique(np.asarray(breaks, dtype=float))
    extent = b[-1] - b[0]
    tol = 1e-9 * max(extent, 1.0)
    keep = [b[0]]
    for v in b[1:]:
        if v - keep[-1] > tol:
            keep.append(v)
    b = np.array(keep)
    for s in sorted(float(v) for v in soft):
        if s <= b[0] + tol or s >= b[-1] - tol:
            continue
        if np.min(np.abs(b - s)) > soft_gap * element_size:
            b = np.sort(np.append(b, s))
    out = [b[:1]]
    for a, c in zip(b[:-1], b[1:]):
        n = max(1, math.ceil((c - a) / element_size - 1e-9))
        out.append(np.linspace(a, c, n + 1)[1:])
    return np.concatenate(out)


def _axis_lines(boxes, element_size, soft_points):
    lines = []
    for ax in range(3):
        br = [bx.lo[ax] for bx in boxes] + [bx.hi[ax] for bx in boxes]
        lines.append(grid_lines(br, element_size, soft=soft_points[ax]))
    return tuple(lines)


def count_grid(boxes, element_size: float, soft_points=((), (), ())) -> tuple[int, int]:
    """Cheap count of (nodes, elements) before any mesh array is built (memory guard)."""
    xs, ys, zs = _axis_lines(boxes, element_size, soft_points)
    n_el = 0
    n_nodes_box = 0
    for bx in boxes:
        c = [int(np.sum((l > bx.lo[a] - 1e-9) & (l < bx.hi[a] + 1e-9)))
             for a, l in enumerate((xs, ys, zs))]
        n_el += (c[0] - 1) * (c[1] - 1) * (c[2] - 1)
        n_nodes_box += c[0] * c[1] * c[2]
    return n_nodes_box, n_el


def check_parts(boxes, *, where: str = "parts") -> None:
    """Parts must not overlap and must form one piece touching face to face."""
    n = len(boxes)
    if n == 0:
        raise ScenarioError("no parts given; allowed: one or more boxes", where=where)
    lo = np.array([b.lo for b in boxes])
    hi = np.array([b.hi for b in boxes])
    tol = 1e-9 * max(1.0, float(np.max(hi - lo)))
    ov = np.minimum(hi[:, None], hi[None]) - np.maximum(lo[:, None], lo[None])  # (n, n, 3)
    for a in range(n):
        for c in range(a + 1, n):
            if np.all(ov[a, c] > tol):
                raise ScenarioError(f"parts {boxes[a].name!r} and {boxes[c].name!r} overlap; "
                                    "allowed: boxes that touch face to face", where=where)
    # face contact: overlap zero in one axis, positive in the other two
    touch = (np.sum(np.abs(ov) <= tol, axis=2) == 1) & (np.sum(ov > tol, axis=2) == 2)
    seen = {0}
    todo = [0]
    while todo:
        a = todo.pop()
        for c in np.flatnonzero(touch[a]):
            if c not in seen:
                seen.add(int(c))
                todo.append(int(c))
    if len(seen) != n:
        lone = [boxes[i].name for i in range(n) if i not in seen]
        raise ScenarioError(f"part(s) {lone} do not touch the others face to face; "
                            "allowed: one connected block", where=where)


def mesh_boxes(boxes, element_size: float, soft_points=((), (), ())) -> GridMesh:
    """Mesh the union of ``boxes`` on one structured grid.

    Parameters
    ----------
    boxes : list of :class:`Box`.
    element_size : target edge length [m].
    soft_points : three sequences of coordinates [m] (x, y, z) that should be grid lines.
    """
    if not (element_size > 0):
        raise ScenarioError(f"given {element_size}; allowed > 0", param="mesh.element_size",
                            value=element_size)
    check_parts(boxes)
    xs, ys, zs = _axis_lines(boxes, element_size, soft_points)
    cx, cy, cz = (xs[:-1] + xs[1:]) / 2, (ys[:-1] + ys[1:]) / 2, (zs[:-1] + zs[1:]) / 2
    part = np.full((len(cz), len(cy), len(cx)), -1, dtype=np.int32)
    for p, bx in enumerate(boxes):
        ix = (cx > bx.lo[0]) & (cx < bx.hi[0])
        iy = (cy > bx.lo[1]) & (cy < bx.hi[1])
        iz = (cz > bx.lo[2]) & (cz < bx.hi[2])
        part[np.ix_(iz, iy, ix)] = p
    filled = part >= 0
    nx, ny, nz = len(xs), len(ys), len(zs)
    touched = np.zeros((nz, ny, nx), dtype=bool)
    for dk in (0, 1):
        for dj in (0, 1):
            for di in (0, 1):
                touched[dk:dk + nz - 1, dj:dj + ny - 1, di:di + nx - 1] |= filled
    node_id = np.full(touched.shape, -1, dtype=np.int64)
    node_id[touched] = np.arange(int(touched.sum()))
    kk, jj, ii = np.nonzero(touched)
    nodes = np.column_stack([xs[ii], ys[jj], zs[kk]])
    ek, ej, ei = np.nonzero(filled)
    from ._elements import NODE_SIGNS
    off = ((NODE_SIGNS + 1) / 2).astype(int)  # (8, 3) offsets (i, j, k)
    elements = node_id[ek[:, None] + off[None, :, 2], ej[:, None] + off[None, :, 1],
                       ei[:, None] + off[None, :, 0]]
    return GridMesh(lines=(xs, ys, zs), filled=filled, cell_part=part, node_id=node_id,
                    nodes=nodes, elements=elements,
                    element_cell=np.column_stack([ei, ej, ek]),
                    element_part=part[ek, ej, ei].astype(np.int64))
