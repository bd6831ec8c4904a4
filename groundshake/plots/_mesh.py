"""The block in 3-D: the mesh on its grid, parts, equipment, anchor bolts, sensors, and mode
shapes.

The mesh is a set of cells of one rectilinear grid (:class:`VoxelGrid`); its outer faces
come from :func:`exterior_faces`, the one face finder of the package. The report builds the
grid from the output folder's ``mesh.json``; :func:`block_model_figure` and
:func:`block_mode_figure` build it from a :class:`~groundshake.model.BlockModel`.
Coordinates arrive in the length unit the figure names.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Sequence

import numpy as np

from .._grid import grid_faces
from ._base import PALETTE, mpl_text, new_figure, shape_map

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

    from ..dynamics import Modes
    from ..model import BlockModel

__all__ = ["VoxelGrid", "exterior_faces", "draw_bricks", "set_box_aspect", "model_figure",
           "mode_shapes_figure", "block_model_figure", "block_mode_figure"]


@dataclass(frozen=True)
class VoxelGrid:
    """Hex elements placed on a rectilinear grid (parts are boxes on one grid).

    Attributes
    ----------
    xs, ys, zs : ndarray
        Grid-line coordinates [m], sorted, shapes (nx+1,), (ny+1,), (nz+1,).
    index : ndarray, shape (n_el, 3)
        Cell (i, j, k) of each element.
    filled : ndarray of bool, shape (nx, ny, nz)
    """

    xs: np.ndarray
    ys: np.ndarray
    zs: np.ndarray
    index: np.ndarray
    filled: np.ndarray

    @classmethod
    def from_cells(cls, xs, ys, zs, cells) -> "VoxelGrid":
        """The grid of lines ``xs, ys, zs`` with the cells ``cells`` (n_el, 3) filled."""
        xs, ys, zs = (np.asarray(a, float) for a in (xs, ys, zs))
        idx = np.asarray(cells, int).reshape(-1, 3)
        filled = np.zeros((xs.size - 1, ys.size - 1, zs.size - 1), bool)
        filled[tuple(idx.T)] = True
        return cls(xs=xs, ys=ys, zs=zs, index=idx, filled=filled)

    @property
    def corners(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Undeformed corner coordinates, each shaped (nx+1, ny+1, nz+1)."""
        return tuple(np.meshgrid(self.xs, self.ys, self.zs, indexing="ij"))

    def cell_values(self, values: np.ndarray) -> np.ndarray:
        """Element values (n_el,) on the grid (nx, ny, nz), NaN where there is no element."""
        out = np.full(self.filled.shape, np.nan)
        out[tuple(self.index.T)] = values
        return out

    def node_index(self, nodes: np.ndarray) -> np.ndarray | None:
        """Grid indices (n_nodes, 3) of nodes [m], or None if a node is off the grid."""
        idx = []
        for axis, lines in enumerate((self.xs, self.ys, self.zs)):
            c = nodes[:, axis]
            tol = 1e-6 * max(1.0, float(np.ptp(lines)))
            i = np.clip(np.searchsorted(lines, c - tol), 0, lines.size - 1)
            if np.any(np.abs(lines[i] - c) > tol):
                return None
            idx.append(i)
        return np.stack(idx, axis=1)


def set_box_aspect(ax, lo: np.ndarray, hi: np.ndarray, unit: str = "m") -> None:
    """Limits of a 3-D axis around the box lo-hi (3,) with true proportions; axes labelled
    in ``unit``."""
    span = np.maximum(hi - lo, 1e-9)
    span = np.maximum(span, 0.12 * span.max())
    mid = 0.5 * (lo + hi)
    ax.set_xlim(mid[0] - span[0] / 2, mid[0] + span[0] / 2)
    ax.set_ylim(mid[1] - span[1] / 2, mid[1] + span[1] / 2)
    ax.set_zlim(mid[2] - span[2] / 2, mid[2] + span[2] / 2)
    ax.set_box_aspect(tuple(span))
    ax.set_xlabel(f"x [{unit}]", fontsize=7.5)
    ax.set_ylabel(f"y [{unit}]", fontsize=7.5)
    ax.set_zlabel(f"z [{unit}]", fontsize=7.5)
    ax.tick_params(labelsize=6.5)


def exterior_faces(filled: np.ndarray, corners: tuple[np.ndarray, np.ndarray, np.ndarray]
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The outer faces of a set of grid cells, with their coordinates (:func:`grid_faces`).

    Parameters
    ----------
    filled : ndarray of bool, shape (nx, ny, nz)
    corners : three arrays shaped (nx+1, ny+1, nz+1)
        Corner coordinates [m] (deformed or not).

    Returns
    -------
    verts : ndarray, shape (n_faces, 4, 3)
    cell : ndarray of int, shape (n_faces, 3)
        The cell each face belongs to.
    normal : ndarray of int, shape (n_faces,)
        Outward normal of each face: 0, 1, 2 for −x, −y, −z and 3, 4, 5 for +x, +y, +z.
    """
    P = np.stack(corners, axis=-1)
    verts, cells, normals = [], [], []
    for axis in range(3):
        c, cell, plus = grid_faces(filled, axis)
        verts.append(P[tuple(np.moveaxis(c, -1, 0))])
        cells.append(cell)
        normals.append(axis + 3 * plus.astype(int))
    return np.concatenate(verts), np.concatenate(cells), np.concatenate(normals)


#: Light on the faces: by normal (−x, −y, −z, +x, +y, +z as numbered by exterior_faces).
_SHADE = np.array([0.80, 0.88, 0.70, 0.80, 0.88, 1.0])


def draw_bricks(ax, grid: VoxelGrid, colours: np.ndarray, corners=None, *, edges: bool = True
                ) -> None:
    """Draw the outer faces of the filled cells, coloured per cell (nx, ny, nz, 4), at
    ``corners`` (default: the undeformed grid)."""
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    corners = grid.corners if corners is None else corners
    verts, cell, normal = exterior_faces(grid.filled, corners)
    if not len(verts):
        return
    fc = np.array(colours[tuple(cell.T)], float)
    fc[:, :3] *= _SHADE[normal][:, None]
    coll = Poly3DCollection(verts, facecolors=fc,
                            edgecolors=(0.13, 0.19, 0.24, 0.35) if edges else fc,
                            linewidths=0.3 if edges else 0.1)
    ax.add_collection3d(coll)


def _box_faces(lo, hi) -> list[np.ndarray]:
    x0, y0, z0 = lo
    x1, y1, z1 = hi
    v = np.array([[x0, y0, z0], [x1, y0, z0], [x1, y1, z0], [x0, y1, z0],
                  [x0, y0, z1], [x1, y0, z1], [x1, y1, z1], [x0, y1, z1]])
    quads = [(0, 1, 2, 3), (4, 5, 6, 7), (0, 1, 5, 4), (1, 2, 6, 5), (2, 3, 7, 6), (3, 0, 4, 7)]
    return [v[list(q)] for q in quads]


def model_figure(grid: VoxelGrid | None, *, cell_part: np.ndarray | None = None,
                 part_names: Sequence[str] = (),
                 part_boxes: Sequence[tuple[np.ndarray, np.ndarray]] = (),
                 equipment: Sequence[tuple[str, np.ndarray, np.ndarray]] = (),
                 anchors: np.ndarray | None = None,
                 sensors: Sequence[tuple[str, np.ndarray]] = (),
                 length_unit: str = "m", title: str = "") -> "Figure":
    """The block: parts coloured, mesh lines, equipment boxes, anchor bolts, sensors
    (coordinates in ``length_unit``, the unit named on the axes).

    Parameters
    ----------
    grid : VoxelGrid or None
        The mesh; None draws the part boxes only.
    cell_part : ndarray of int, shape (nx, ny, nz), optional
        Part number of each cell (−1 where empty).
    part_boxes : sequence of (lo (3,), hi (3,))
    equipment : sequence of (name, lo (3,), hi (3,)), the equipment envelope.
    anchors : ndarray, shape (k, 3), optional
    sensors : sequence of (name, position (3,))
    title : str
        Written above the block (none by default).
    """
    from matplotlib.colors import to_rgba
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    fig = new_figure(8.0, 5.6)
    fig.subplots_adjust(left=0.0, right=1.0, top=0.94 if title else 1.0, bottom=0.02)
    ax = fig.add_subplot(projection="3d")
    # Draw in call order (block, equipment, bolts, sensors) so that the bolts under an
    # equipment envelope stay visible through it.
    ax.computed_zorder = False
    pts = []
    tints = ["#c9d6d8", "#e3d3b3", "#cfc4da", "#cbd7bb", "#e2c2b8", "#c3cdd8"]
    if grid is not None:
        colours = np.zeros(grid.filled.shape + (4,))
        colours[...] = np.array(to_rgba(tints[0], 0.9))
        if cell_part is not None:
            for p in np.unique(cell_part[cell_part >= 0]):
                colours[cell_part == p] = to_rgba(tints[int(p) % len(tints)], 0.9)
        draw_bricks(ax, grid, colours)
        pts += [np.array([grid.xs[0], grid.ys[0], grid.zs[0]]),
                np.array([grid.xs[-1], grid.ys[-1], grid.zs[-1]])]
    else:
        for k, (lo, hi) in enumerate(part_boxes):
            ax.add_collection3d(Poly3DCollection(_box_faces(lo, hi), facecolor=tints[k % 6],
                                                 edgecolor=PALETTE[0], linewidth=0.5,
                                                 alpha=0.8))
            pts += [np.asarray(lo), np.asarray(hi)]
    for k, name in enumerate(part_names):
        ax.plot([], [], "s", color=tints[k % len(tints)], label=f"part: {mpl_text(name)}")
    for name, lo, hi in equipment:
        ax.add_collection3d(Poly3DCollection(_box_faces(lo, hi), facecolor=PALETTE[2],
                                             edgecolor="#7a5210", linewidth=0.7, alpha=0.2))
        ax.text(*(0.5 * (np.asarray(lo) + np.asarray(hi)) + [0, 0, 0.5 * (hi[2] - lo[2])]),
                mpl_text(name), fontsize=7.5, color="#7a5210", ha="center")
        pts += [np.asarray(lo), np.asarray(hi)]
    if len(equipment):
        ax.plot([], [], "s", color=PALETTE[2], alpha=0.5, label="equipment")
    if anchors is not None and len(anchors):
        a = np.asarray(anchors, float)
        ax.scatter(a[:, 0], a[:, 1], a[:, 2], marker="^", s=22, color=PALETTE[3],
                   depthshade=False, label="anchor bolts")
    for k, (name, at) in enumerate(sensors):
        at = np.asarray(at, float)
        ax.scatter([at[0]], [at[1]], [at[2]], marker="*", s=70, color=PALETTE[4],
                   depthshade=False, label="sensors" if k == 0 else None)
        ax.text(at[0], at[1], at[2], "  " + mpl_text(name), fontsize=7, color=PALETTE[4])
        pts.append(at)
    if pts:
        p = np.array(pts)
        set_box_aspect(ax, p.min(axis=0), p.max(axis=0), length_unit)
    ax.view_init(elev=24, azim=-58)
    if ax.get_legend_handles_labels()[0]:
        ax.legend(fontsize=7, loc="upper left", frameon=False)
    if title:
        fig.suptitle(mpl_text(title), fontsize=9, color=PALETTE[0])
    return fig


def mode_shapes_figure(grid: VoxelGrid, node_index: np.ndarray,
                       shapes: Sequence[tuple[str, np.ndarray]], *, columns: int = 2,
                       length_unit: str = "m") -> "Figure":
    """Deformed shapes of the first modes drawn on the block's outer faces.

    Parameters
    ----------
    grid : VoxelGrid
    node_index : ndarray of int, shape (n_nodes, 3)
        Grid index of each node (:meth:`VoxelGrid.node_index`).
    shapes : sequence of (title, displacement (n_nodes, 3))
        Each shape is scaled so its largest displacement is 12 % of the block's size;
        shade runs from the smallest to the largest |u| on the block; the dashed box is
        the undeformed block.
    """
    n = max(1, len(shapes))
    cols = min(columns, n)
    rows = int(np.ceil(n / cols))
    fig = new_figure(9.0, 0.3 + 3.6 * rows)
    fig.subplots_adjust(left=0.0, right=1.0, top=0.96, bottom=0.02, wspace=0.02, hspace=0.08)
    X0, Y0, Z0 = grid.corners
    size = max(np.ptp(grid.xs), np.ptp(grid.ys), np.ptp(grid.zs))
    i, j, k = node_index.T
    for m, (title, u) in enumerate(shapes):
        ax = fig.add_subplot(rows, cols, m + 1, projection="3d")
        u = np.asarray(u, float)
        umax = float(np.max(np.linalg.norm(u, axis=1))) if u.size else 0.0
        s = 0.12 * size / umax if umax > 0 else 0.0
        U = np.zeros(X0.shape + (3,))
        U[i, j, k] = u
        corners = (X0 + s * U[..., 0], Y0 + s * U[..., 1], Z0 + s * U[..., 2])
        mag = np.linalg.norm(U, axis=-1)
        cellmag = 0.125 * sum(mag[a:a + mag.shape[0] - 1, b:b + mag.shape[1] - 1,
                                  c:c + mag.shape[2] - 1]
                              for a in (0, 1) for b in (0, 1) for c in (0, 1))
        inside = cellmag[grid.filled]
        lo_m, hi_m = (float(inside.min()), float(inside.max())) if inside.size else (0.0, 1.0)
        shade = (cellmag - lo_m) / (hi_m - lo_m) if hi_m > lo_m else np.full(cellmag.shape, 0.6)
        colours = shape_map()(np.clip(0.15 + 0.85 * shade, 0, 1))
        draw_bricks(ax, grid, colours, corners, edges=grid.filled.sum() <= 1500)
        # the undeformed block's bounding box, for scale
        bx = (grid.xs[[0, -1]], grid.ys[[0, -1]], grid.zs[[0, -1]])
        for a in range(3):
            b_, c_ = [d for d in range(3) if d != a]
            for vb in bx[b_]:
                for vc in bx[c_]:
                    line = np.zeros((2, 3))
                    line[:, a] = bx[a]
                    line[:, b_] = vb
                    line[:, c_] = vc
                    ax.plot(line[:, 0], line[:, 1], line[:, 2], color=PALETTE[6],
                            linewidth=0.6, linestyle="--")
        lo = np.array([c.min() for c in corners])
        hi = np.array([c.max() for c in corners])
        set_box_aspect(ax, lo, hi, length_unit)
        ax.view_init(elev=24, azim=-58)
        ax.set_title(mpl_text(title), fontsize=8.5, color=PALETTE[0])
    return fig


# ----------------------------------------------------------------- from a BlockModel
def _model_grid(model: BlockModel) -> VoxelGrid:
    mesh = model.mesh
    if mesh is None:
        raise ValueError("the model has no grid mesh (model.mesh) to draw")
    return VoxelGrid.from_cells(*mesh.lines, mesh.element_cell)


def block_model_figure(model: BlockModel, *, title: str = "") -> "Figure":
    """:func:`model_figure` of a :class:`~groundshake.model.BlockModel` (lengths in m):
    parts, equipment envelopes (footprint × twice the height of the centre of mass),
    anchor bolts and sensors; titled with the mesh size unless ``title`` is given."""
    grid = _model_grid(model)
    cell_part = np.full(grid.filled.shape, -1)
    cell_part[tuple(grid.index.T)] = np.asarray(model.mesh.element_part, int)
    boxes, anchors = [], []
    for e in model.equipment:
        mount = np.asarray(e.mount, float).reshape(3)
        half = 0.5 * np.append(np.asarray(e.footprint, float).reshape(2), 0.0)
        height = np.array([0.0, 0.0, 2.0 * (float(e.cg[2]) - mount[2])])
        boxes.append((e.name, mount - half, mount + half + height))
        a = np.asarray(e.anchors, float).reshape(-1, 2)
        anchors += [np.column_stack([a + mount[:2], np.full(len(a), mount[2])])]
    anchors = np.vstack(anchors) if anchors else None
    sensors = [(s.name, np.asarray(s.position, float)) for s in model.sensors]
    return model_figure(grid, cell_part=cell_part,
                        part_names=[str(p) for p in model.part_names],
                        equipment=boxes, anchors=anchors, sensors=sensors,
                        title=title or f"block model: {model.elements.shape[0]} elements, "
                                       f"{model.n_dof} DOFs, {model.support_kind} base")


def block_mode_figure(model: BlockModel, modes: Modes, index: int) -> "Figure":
    """Mode ``index`` (0-based) of ``modes`` (:class:`~groundshake.dynamics.Modes`) drawn
    on the block of ``model`` (:func:`mode_shapes_figure`, lengths in m), titled with its
    frequency [Hz] and effective mass ratios [%]."""
    grid = _model_grid(model)
    node_index = grid.node_index(np.asarray(model.nodes, float))
    if node_index is None:
        raise ValueError("the model's nodes are not on its grid lines")
    u = np.asarray(model.node_map @ modes.shapes[:, index]).reshape(-1, 3)
    f = modes.frequency[index]
    r = modes.effective_mass_ratio[index]
    title = (f"mode {index + 1}: {f:.3g} Hz, effective mass x {100 * r[0]:.1f} %, "
             f"y {100 * r[1]:.1f} %, z {100 * r[2]:.1f} % (shape scaled)")
    return mode_shapes_figure(grid, node_index, [(title, u)], columns=1)
