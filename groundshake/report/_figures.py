"""Figures of the report, drawn with matplotlib (Agg, no pyplot state) into PNG data.

Every function takes plain arrays in SI units and returns a ``Figure``; :func:`data_uri`
turns it into a ``data:image/png;base64,...`` string for an ``<img>`` element, so the
report needs no file beside it and no network.
"""
from __future__ import annotations

import base64
import io
from dataclasses import dataclass
from typing import Sequence

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.colors import LinearSegmentedColormap, Normalize
from matplotlib.cm import ScalarMappable
from matplotlib.figure import Figure

__all__ = ["PALETTE", "STRESS_MAP", "SHAPE_MAP", "VoxelGrid", "voxel_grid", "data_uri",
           "mpl_text", "strip_figure", "record_figure", "spectra_figure", "model_figure",
           "stress_figure", "mode_shapes_figure", "exterior_faces"]

DPI = 96
#: Our colours: ink, teal, amber, brick, plum, moss, slate, sand.
PALETTE = ("#22303c", "#1f7a7a", "#d08c1f", "#a8432a", "#6b4c8a", "#5d7f2f", "#51667a",
           "#b99a6b")
RAW_COLOUR = "#a9b1b8"
STRESS_MAP = LinearSegmentedColormap.from_list(
    "groundshake_stress", ["#f3efe2", "#e9c46a", "#d08c1f", "#a8432a", "#4a2545"])
SHAPE_MAP = LinearSegmentedColormap.from_list(
    "groundshake_shape", ["#e6eef0", "#8fc1c1", "#1f7a7a", "#123f4a"])


def mpl_text(s: object) -> str:
    """Text safe for matplotlib: a ``$`` would otherwise start mathtext."""
    return str(s).replace("\\", "\\\\").replace("$", r"\$")


def _figure(width: float, height: float) -> Figure:
    # A fixed layout (margins in inches, set by each figure): matplotlib's automatic
    # layouts draw every figure twice, which doubled the report's time.
    fig = Figure(figsize=(width, height), dpi=DPI)
    FigureCanvasAgg(fig)
    return fig


def _margins(fig: Figure, *, left: float = 0.75, right: float = 0.2, top: float = 0.35,
             bottom: float = 0.45, hspace: float = 0.25, wspace: float = 0.3) -> None:
    """Set the subplot margins in inches (converted to the figure's fractions)."""
    w, h = fig.get_size_inches()
    fig.subplots_adjust(left=left / w, right=1 - right / w, top=1 - top / h,
                        bottom=bottom / h, hspace=hspace, wspace=wspace)


def data_uri(fig: Figure) -> str:
    """The figure as a ``data:image/png;base64,...`` URI (white background)."""
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=DPI, facecolor="white")
    return "data:image/png;base64," + base64.b64encode(buf.getvalue()).decode("ascii")


def _style(ax) -> None:
    ax.grid(True, color="#d9dee2", linewidth=0.6)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.tick_params(labelsize=8)


def _finite(t: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    ok = np.isfinite(t) & np.isfinite(y)
    return t[ok], y[ok]


def strip_figure(time: np.ndarray, strips: Sequence[tuple[str, Sequence[tuple[str, np.ndarray]], str]],
                 *, title: str = "") -> Figure:
    """Time histories one above the other on a shared time axis.

    Parameters
    ----------
    time : ndarray, shape (n_t,)
        Time [s].
    strips : sequence of (label, curves, unit)
        One strip each; ``curves`` is a sequence of (name, values (n_t,)) drawn together
        (e.g. the x, y and z components). The peak |value| of the strip and its time
        are written on it.
    """
    from matplotlib.ticker import MaxNLocator

    n = max(1, len(strips))
    fig = _figure(9.0, 0.8 + 0.95 * n)
    axes = fig.subplots(n, 1, sharex=True, squeeze=False)[:, 0]
    _margins(fig, left=1.0, top=0.4 if title else 0.15, hspace=0.12)
    t_all = np.asarray(time, float)
    for k, (ax, (label, curves, unit)) in enumerate(zip(axes, strips)):
        best = None
        # a tension's peak is its largest positive value (compression is not tension)
        signed = "tension" in str(label).lower()
        for c, (name, y) in enumerate(curves):
            t, v = _finite(t_all, np.asarray(y, float))
            colour = PALETTE[1 + (c if len(curves) > 1 else k) % (len(PALETTE) - 1)]
            ax.plot(t, v, color=colour, linewidth=0.7,
                    label=mpl_text(name) if len(curves) > 1 and name else None)
            if v.size:
                i = int(np.argmax(v if signed else np.abs(v)))
                score = v[i] if signed else abs(v[i])
                if best is None or score > best[3]:
                    best = (t[i], v[i], name, score)
        if best is not None:
            ax.plot([best[0]], [best[1]], "o", color=PALETTE[0], markersize=3)
            which = f" ({mpl_text(best[2])})" if len(curves) > 1 and best[2] else ""
            word = "largest" if signed else "peak"
            ax.text(0.995, 0.92, f"{word} {best[3]:.4g} {mpl_text(unit)}{which} at "
                    f"{best[0]:.3g} s", transform=ax.transAxes, ha="right", va="top",
                    fontsize=7.5, color=PALETTE[0])
        ax.text(0.005, 0.92, mpl_text(label), transform=ax.transAxes, ha="left", va="top",
                fontsize=7.5, color=PALETTE[0])
        ax.set_ylabel(f"[{mpl_text(unit)}]" if unit else "", fontsize=7.5)
        ax.yaxis.set_major_locator(MaxNLocator(3))
        _style(ax)
        if len(curves) > 1:
            ax.legend(fontsize=6.5, frameon=False, loc="lower right", ncol=min(len(curves), 8),
                      handlelength=1.2, columnspacing=0.8)
    span = _active_span(t_all, [y for _, curves, _ in strips for _, y in curves])
    if span is not None:
        axes[-1].set_xlim(*span)
    axes[-1].set_xlabel("time from the first sample as read [s]", fontsize=8)
    if title:
        fig.suptitle(mpl_text(title), fontsize=10, color=PALETTE[0])
    return fig


def _active_span(time: np.ndarray, series: Sequence[np.ndarray], *, level: float = 0.01
                 ) -> tuple[float, float] | None:
    """The time span where any series exceeds ``level`` of its own peak change from its
    first value, widened by 5 % of the record; None when that is most of the record."""
    t = np.asarray(time, float)
    if t.size < 10 or not np.all(np.isfinite(t[[0, -1]])):
        return None
    active = np.zeros(t.size, bool)
    for y in series:
        y = np.asarray(y, float)
        if y.shape != t.shape:
            continue
        d = np.abs(np.nan_to_num(y - (y[0] if np.isfinite(y[0]) else 0.0)))
        top = d.max() if d.size else 0.0
        if top > 0:
            active |= d > level * top
    if not active.any():
        return None
    i, j = np.flatnonzero(active)[[0, -1]]
    pad = 0.05 * (t[-1] - t[0])
    lo, hi = max(t[0], t[i] - pad), min(t[-1], t[j] + pad)
    if hi - lo > 0.8 * (t[-1] - t[0]):
        return None
    return float(lo), float(hi)


def record_figure(rows: Sequence[tuple[str, str, tuple[np.ndarray, np.ndarray] | None,
                                       tuple[np.ndarray, np.ndarray] | None]], *,
                  title: str = "") -> Figure:
    """Acceleration, velocity and displacement of one component, before and after correction.

    Parameters
    ----------
    rows : sequence of (quantity, unit, (t, raw) or None, (t, corrected) or None)
        Usually three: acceleration [m/s²], velocity [m/s], displacement [m].
    """
    from matplotlib.ticker import MaxNLocator

    n = max(1, len(rows))
    fig = _figure(9.0, 0.8 + 1.3 * n)
    axes = fig.subplots(n, 1, sharex=True, squeeze=False)[:, 0]
    _margins(fig, left=0.9, top=0.4 if title else 0.15, hspace=0.12)
    for ax, (quantity, unit, raw, cor) in zip(axes, rows):
        if raw is not None:
            t, v = _finite(*map(np.asarray, raw))
            ax.plot(t, v, color=RAW_COLOUR, linewidth=0.8, label="as read")
        if cor is not None:
            t, v = _finite(*map(np.asarray, cor))
            ax.plot(t, v, color=PALETTE[1], linewidth=0.8, label="corrected")
        ax.set_ylabel(f"{mpl_text(quantity)}\n[{mpl_text(unit)}]", fontsize=8)
        ax.yaxis.set_major_locator(MaxNLocator(4))
        _style(ax)
    axes[0].legend(fontsize=7.5, loc="upper right", frameon=False, ncol=2)
    axes[-1].set_xlabel("time from the first sample as read [s]", fontsize=8)
    if title:
        fig.suptitle(mpl_text(title), fontsize=10, color=PALETTE[0])
    return fig


def spectra_figure(panels: Sequence[tuple[str, Sequence[tuple[str, np.ndarray, np.ndarray, str]]]],
                   *, ylabel: str = "PSA [m/s²]", columns: int = 2) -> Figure:
    """Response spectra on a logarithmic period axis, one panel per point or component.

    Parameters
    ----------
    panels : sequence of (title, curves)
        ``curves`` is a sequence of (label, periods [s] (n,), values (n,), kind) with
        ``kind`` one of ``"raw"``, ``"broadened"``, ``"ground"``, ``"target"``,
        ``"line"``; the kind sets the line style.
    """
    n = max(1, len(panels))
    cols = min(columns, n)
    rows = int(np.ceil(n / cols))
    fig = _figure(9.0 if cols > 1 else 7.0, 0.5 + 3.0 * rows)
    axes = fig.subplots(rows, cols, squeeze=False).ravel()
    _margins(fig, left=0.7, top=0.35, bottom=0.5, hspace=0.45 * 3.0 / 2.6, wspace=0.22)
    for ax in axes[n:]:
        ax.set_visible(False)
    for ax, (title, curves) in zip(axes, panels):
        k = g = 0
        for label, per, val, kind in curves:
            per, val = _finite(np.asarray(per, float), np.asarray(val, float))
            ok = per > 0
            per, val = per[ok], val[ok]
            if not per.size:
                continue
            if kind == "ground":
                style = dict(color=(PALETTE[0], PALETTE[6], PALETTE[7])[g % 3], linewidth=1.0,
                             linestyle=(":", "-.", "--")[g % 3])
                g += 1
            elif kind == "target":
                style = dict(color=PALETTE[3], linewidth=1.4, linestyle="--")
            elif kind == "raw":
                style = dict(color=PALETTE[1 + k % 6], linewidth=0.9, alpha=0.55)
            else:
                style = dict(color=PALETTE[1 + k % 6], linewidth=1.3)
                k += 1
            ax.plot(per, val, label=mpl_text(label), **style)
        ax.set_xscale("log")
        from matplotlib.ticker import NullLocator
        ax.xaxis.set_minor_locator(NullLocator())     # minor log ticks cost more than they tell
        ax.set_xlabel("period [s]", fontsize=8)
        ax.set_ylabel(mpl_text(ylabel), fontsize=8)
        ax.set_title(mpl_text(title), fontsize=9, color=PALETTE[0])
        _style(ax)
        if ax.get_legend_handles_labels()[0]:
            ax.legend(fontsize=6.8, frameon=False, loc="best")
    return fig


# ----------------------------------------------------------------------------- 3D
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


def _unique(values: np.ndarray, scale: float) -> np.ndarray:
    v = np.sort(np.asarray(values, float))
    if v.size == 0:
        return v
    keep = np.concatenate([[True], np.diff(v) > 1e-6 * max(scale, 1.0)])
    return v[keep]


def voxel_grid(centres: np.ndarray, nodes: np.ndarray | None = None) -> VoxelGrid | None:
    """Place element centres (n_el, 3) [m] on the grid of the node coordinates.

    With ``nodes`` (n_nodes, 3) the grid lines are the distinct node coordinates
    (exact for boxes on one grid). Without, they are guessed halfway between distinct
    centres (exact for uniform spacing). Returns None if the centres do not sit in
    the middle of grid cells, i.e. the mesh is not a box grid.
    """
    centres = np.asarray(centres, float)
    if centres.ndim != 2 or centres.shape[1] != 3 or centres.shape[0] == 0:
        return None
    scale = float(np.max(np.ptp(centres, axis=0))) if centres.shape[0] > 1 else 1.0
    lines = []
    for axis in range(3):
        if nodes is not None and len(nodes):
            g = _unique(np.asarray(nodes, float)[:, axis], scale)
        else:
            c = _unique(centres[:, axis], scale)
            if c.size == 1:
                return None
            mids = 0.5 * (c[1:] + c[:-1])
            g = np.concatenate([[c[0] - (mids[0] - c[0])], mids, [c[-1] + (c[-1] - mids[-1])]])
        if g.size < 2:
            return None
        lines.append(g)
    index = np.empty(centres.shape, dtype=int)
    for axis, g in enumerate(lines):
        i = np.searchsorted(g, centres[:, axis]) - 1
        if np.any(i < 0) or np.any(i >= g.size - 1):
            return None
        mid = 0.5 * (g[i] + g[i + 1])
        if np.any(np.abs(mid - centres[:, axis]) > 1e-3 * (g[i + 1] - g[i])):
            return None
        index[:, axis] = i
    filled = np.zeros((lines[0].size - 1, lines[1].size - 1, lines[2].size - 1), bool)
    filled[tuple(index.T)] = True
    return VoxelGrid(*lines, index=index, filled=filled)


def _aspect(ax, lo: np.ndarray, hi: np.ndarray) -> None:
    span = np.maximum(hi - lo, 1e-9)
    span = np.maximum(span, 0.12 * span.max())
    mid = 0.5 * (lo + hi)
    ax.set_xlim(mid[0] - span[0] / 2, mid[0] + span[0] / 2)
    ax.set_ylim(mid[1] - span[1] / 2, mid[1] + span[1] / 2)
    ax.set_zlim(mid[2] - span[2] / 2, mid[2] + span[2] / 2)
    ax.set_box_aspect(tuple(span))
    ax.set_xlabel("x [m]", fontsize=7.5)
    ax.set_ylabel("y [m]", fontsize=7.5)
    ax.set_zlabel("z [m]", fontsize=7.5)
    ax.tick_params(labelsize=6.5)


def exterior_faces(filled: np.ndarray, corners: tuple[np.ndarray, np.ndarray, np.ndarray]
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The outer faces of a set of grid cells, found with whole-array operations.

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
    verts, cells, axes = [], [], []
    for axis in range(3):
        pad = [(0, 0)] * 3
        pad[axis] = (1, 1)
        f = np.pad(filled, pad)
        lo = np.take(f, range(0, f.shape[axis] - 1), axis=axis)
        hi = np.take(f, range(1, f.shape[axis]), axis=axis)
        face = lo != hi                       # plane index along `axis`
        idx = np.argwhere(face)
        if not idx.size:
            continue
        owner = idx.copy()
        owner[:, axis] -= lo[tuple(idx.T)].astype(int)   # the filled side
        a1, a2 = [d for d in range(3) if d != axis]
        quad = []
        for da, db in ((0, 0), (1, 0), (1, 1), (0, 1)):
            c = idx.copy()
            c[:, a1] += da
            c[:, a2] += db
            quad.append(P[tuple(c.T)])
        verts.append(np.stack(quad, axis=1))
        cells.append(owner)
        axes.append(np.full(len(idx), axis) + 3 * lo[tuple(idx.T)].astype(int))
    if not verts:
        return np.zeros((0, 4, 3)), np.zeros((0, 3), int), np.zeros(0, int)
    return np.concatenate(verts), np.concatenate(cells), np.concatenate(axes)


#: Light on the faces: by normal (−x, −y, −z, +x, +y, +z as numbered by exterior_faces).
_SHADE = np.array([0.80, 0.88, 0.70, 0.80, 0.88, 1.0])


def _bricks(ax, grid: VoxelGrid, colours: np.ndarray, corners=None, *, edges: bool = True,
            values: np.ndarray | None = None) -> None:
    """Draw the outer faces of the filled cells, coloured per cell (nx, ny, nz, 4)."""
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
                 sensors: Sequence[tuple[str, np.ndarray]] = ()) -> Figure:
    """The block: parts coloured, mesh lines, equipment boxes, anchor bolts, sensors.

    Parameters
    ----------
    grid : VoxelGrid or None
        The mesh; None draws the part boxes only.
    cell_part : ndarray of int, shape (nx, ny, nz), optional
        Part number of each cell (−1 where empty).
    part_boxes : sequence of (lo (3,), hi (3,)) [m]
    equipment : sequence of (name, lo (3,), hi (3,)) [m], the equipment envelope.
    anchors : ndarray, shape (k, 3) [m], optional
    sensors : sequence of (name, position (3,)) [m]
    """
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    fig = _figure(8.0, 5.6)
    fig.subplots_adjust(left=0.0, right=1.0, top=1.0, bottom=0.02)
    ax = fig.add_subplot(projection="3d")
    # Draw in call order (block, equipment, bolts, sensors) so that the bolts under an
    # equipment envelope stay visible through it.
    ax.computed_zorder = False
    pts = []
    tints = ["#c9d6d8", "#e3d3b3", "#cfc4da", "#cbd7bb", "#e2c2b8", "#c3cdd8"]
    if grid is not None:
        colours = np.zeros(grid.filled.shape + (4,))
        from matplotlib.colors import to_rgba
        base = np.array(to_rgba(tints[0], 0.9))
        colours[...] = base
        if cell_part is not None:
            for p in np.unique(cell_part[cell_part >= 0]):
                colours[cell_part == p] = to_rgba(tints[int(p) % len(tints)], 0.9)
        _bricks(ax, grid, colours)
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
        _aspect(ax, p.min(axis=0), p.max(axis=0))
    ax.view_init(elev=24, azim=-58)
    if ax.get_legend_handles_labels()[0]:
        ax.legend(fontsize=7, loc="upper left", frameon=False)
    return fig


def stress_figure(grid: VoxelGrid, values: np.ndarray, *, label: str = "peak von Mises stress"
                  ) -> Figure:
    """Peak stress of each element drawn on the outer faces of the block, two views.

    Parameters
    ----------
    grid : VoxelGrid
    values : ndarray, shape (n_el,)
        Peak stress of each element [Pa]; drawn in MPa with a colour scale.
    """
    v = np.asarray(values, float) / 1e6
    top = float(np.nanmax(v)) if np.any(np.isfinite(v)) else 1.0
    norm = Normalize(vmin=0.0, vmax=top if top > 0 else 1.0)
    cells = grid.cell_values(v)
    colours = STRESS_MAP(norm(np.nan_to_num(cells)))
    fig = _figure(10.0, 4.6)
    fig.subplots_adjust(left=0.0, right=0.85, top=0.95, bottom=0.02, wspace=0.15)
    lo = np.array([grid.xs[0], grid.ys[0], grid.zs[0]])
    hi = np.array([grid.xs[-1], grid.ys[-1], grid.zs[-1]])
    axes = []
    for k, (elev, azim, name) in enumerate(((26, -58, "from above, +x/−y side"),
                                            (-26, 122, "from below, −x/+y side"))):
        ax = fig.add_subplot(1, 2, k + 1, projection="3d")
        _bricks(ax, grid, colours, edges=grid.filled.sum() <= 1500)
        _aspect(ax, lo, hi)
        ax.view_init(elev=elev, azim=azim)
        ax.set_title(name, fontsize=8.5, color=PALETTE[0])
        axes.append(ax)
    sm = ScalarMappable(norm=norm, cmap=STRESS_MAP)
    cax = fig.add_axes([0.925, 0.15, 0.014, 0.7])
    cb = fig.colorbar(sm, cax=cax)
    cb.set_label(f"{mpl_text(label)} [MPa]", fontsize=8)
    cb.ax.tick_params(labelsize=7)
    return fig


def mode_shapes_figure(grid: VoxelGrid, node_index: np.ndarray,
                       shapes: Sequence[tuple[str, np.ndarray]], *, columns: int = 2) -> Figure:
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
    fig = _figure(9.0, 0.3 + 3.6 * rows)
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
        colours = SHAPE_MAP(np.clip(0.15 + 0.85 * shade, 0, 1))
        _bricks(ax, grid, colours, corners, edges=grid.filled.sum() <= 1500)
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
        _aspect(ax, lo, hi)
        ax.view_init(elev=24, azim=-58)
        ax.set_title(mpl_text(title), fontsize=8.5, color=PALETTE[0])
    return fig
