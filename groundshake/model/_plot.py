"""Figures of the block model: mesh, equipment, anchors, sensors, and mode shapes."""
from __future__ import annotations

from pathlib import Path

import numpy as np

from .._atomic import atomic_savefig

__all__ = ["boundary_faces", "plot_model", "plot_mode"]

# the six faces of a brick in the local node order of _elements (outward order not needed)
_FACES = np.array([[0, 1, 2, 3], [4, 5, 6, 7], [0, 1, 5, 4], [3, 2, 6, 7],
                   [0, 3, 7, 4], [1, 2, 6, 5]])


def boundary_faces(elements: np.ndarray) -> np.ndarray:
    """Quads (f, 4) of node numbers on the outer surface (faces used by one element)."""
    quads = elements[:, _FACES].reshape(-1, 4)
    key = np.sort(quads, axis=1)
    _, idx, counts = np.unique(key, axis=0, return_index=True, return_counts=True)
    return quads[idx[counts == 1]]


def _figure():
    import matplotlib
    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt
    fig = plt.figure(figsize=(8, 6), dpi=110)
    ax = fig.add_subplot(projection="3d")
    return plt, fig, ax


def _equal_axes(ax, pts):
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    c = (lo + hi) / 2
    r = max(float((hi - lo).max()) / 2, 1e-9)
    ax.set_xlim(c[0] - r, c[0] + r)
    ax.set_ylim(c[1] - r, c[1] + r)
    ax.set_zlim(c[2] - r, c[2] + r)
    ax.set_xlabel("x [m]")
    ax.set_ylabel("y [m]")
    ax.set_zlabel("z [m]")


def _surface(ax, nodes, quads, **kw):
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection
    pc = Poly3DCollection(nodes[quads], **kw)
    ax.add_collection3d(pc)


def _save(fig, plt, path: Path) -> Path:
    atomic_savefig(fig, path, bbox_inches="tight")
    plt.close(fig)
    return path


def plot_model(model, path, *, title: str = "") -> Path:
    """Mesh, equipment (footprint box and CG), anchors and sensors; written to ``path``."""
    plt, fig, ax = _figure()
    quads = boundary_faces(model.elements)
    _surface(ax, model.nodes, quads, facecolor=(0.75, 0.75, 0.78, 0.35),
             edgecolor=(0.3, 0.3, 0.3, 0.6), linewidth=0.3)
    pts = [model.nodes]
    for e in model.equipment:
        bx, by = e.footprint
        x0, y0, z0 = e.mount - np.array([bx / 2, by / 2, 0.0])
        hz = 2 * (e.cg[2] - e.mount[2])
        corners = np.array([[x0 + i * bx, y0 + j * by, z0 + k * hz]
                            for k in (0, 1) for j in (0, 1) for i in (0, 1)])
        for a, b in [(0, 1), (1, 3), (3, 2), (2, 0), (4, 5), (5, 7), (7, 6), (6, 4),
                     (0, 4), (1, 5), (2, 6), (3, 7)]:
            ax.plot(*corners[[a, b]].T, color="tab:blue", lw=1.0)
        ax.scatter(*e.cg, color="tab:blue", s=30)
        ax.text(*e.cg, f" {e.name}", color="tab:blue", fontsize=8)
        if len(e.anchors):
            an = np.column_stack([e.anchors + e.mount[:2], np.full(len(e.anchors), e.mount[2])])
            ax.scatter(*an.T, color="tab:red", marker="x", s=25, label="anchors")
        pts.append(corners)
    for s in model.sensors:
        ax.scatter(*s.position, color="tab:green", marker="^", s=30)
        ax.text(*s.position, f" {s.name}", color="tab:green", fontsize=8)
    _equal_axes(ax, np.vstack(pts))
    ax.set_title(title or f"block model: {model.elements.shape[0]} elements, "
                 f"{model.n_dof} DOFs, {model.support_kind} base")
    return _save(fig, plt, Path(path))


def plot_mode(model, modes, index: int, path, *, scale: float | None = None) -> Path:
    """Mode ``index`` (0-based) deformed (coloured by |u|) over the undeformed mesh."""
    plt, fig, ax = _figure()
    quads = boundary_faces(model.elements)
    u = np.asarray(model.node_map @ modes.shapes[:, index]).reshape(-1, 3)
    umax = float(np.abs(u).max()) or 1.0
    size = float(np.ptp(model.nodes, axis=0).max())
    s = scale if scale is not None else 0.12 * size / umax
    _surface(ax, model.nodes, quads, facecolor=(0, 0, 0, 0), edgecolor=(0.5, 0.5, 0.5, 0.35),
             linewidth=0.3)
    deformed = model.nodes + s * u
    mag = np.linalg.norm(u, axis=1)[quads].mean(axis=1) / umax
    import matplotlib
    colors = matplotlib.colormaps["viridis"](mag)
    colors[:, 3] = 0.85
    _surface(ax, deformed, quads, facecolors=colors, edgecolor=(0.1, 0.1, 0.1, 0.4),
             linewidth=0.2)
    _equal_axes(ax, np.vstack([model.nodes, deformed]))
    f = modes.frequency[index]
    r = modes.effective_mass_ratio[index]
    ax.set_title(f"mode {index + 1}: {f:.3g} Hz, effective mass x {100 * r[0]:.1f} %, "
                 f"y {100 * r[1]:.1f} %, z {100 * r[2]:.1f} % (shape scaled)")
    return _save(fig, plt, Path(path))
