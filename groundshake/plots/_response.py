"""The block's response: the peak stress of every element on the block's outer faces.

(Histories of the response are time series: :func:`~groundshake.plots.strip_figure`.)
"""
from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ._base import PALETTE, mpl_text, new_figure, stress_map
from ._mesh import VoxelGrid, draw_bricks, set_box_aspect

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

__all__ = ["stress_figure"]


def stress_figure(grid: VoxelGrid, values: np.ndarray, *, label: str = "peak von Mises stress",
                  unit: str = "MPa", factor: float = 1e-6, length_unit: str = "m") -> "Figure":
    """Peak stress of each element drawn on the outer faces of the block, two views.

    Parameters
    ----------
    grid : VoxelGrid
    values : ndarray, shape (n_el,)
        Peak stress of each element [Pa]; drawn times ``factor`` in ``unit`` (default
        MPa) with a colour scale.
    """
    from matplotlib.cm import ScalarMappable
    from matplotlib.colors import Normalize

    cmap = stress_map()
    v = np.asarray(values, float) * factor
    top = float(np.nanmax(v)) if np.any(np.isfinite(v)) else 1.0
    norm = Normalize(vmin=0.0, vmax=top if top > 0 else 1.0)
    cells = grid.cell_values(v)
    colours = cmap(norm(np.nan_to_num(cells)))
    fig = new_figure(10.0, 4.6)
    fig.subplots_adjust(left=0.0, right=0.85, top=0.95, bottom=0.02, wspace=0.15)
    lo = np.array([grid.xs[0], grid.ys[0], grid.zs[0]])
    hi = np.array([grid.xs[-1], grid.ys[-1], grid.zs[-1]])
    for k, (elev, azim, name) in enumerate(((26, -58, "from above, +x/−y side"),
                                            (-26, 122, "from below, −x/+y side"))):
        ax = fig.add_subplot(1, 2, k + 1, projection="3d")
        draw_bricks(ax, grid, colours, edges=grid.filled.sum() <= 1500)
        set_box_aspect(ax, lo, hi, length_unit)
        ax.view_init(elev=elev, azim=azim)
        ax.set_title(name, fontsize=8.5, color=PALETTE[0])
    sm = ScalarMappable(norm=norm, cmap=cmap)
    cax = fig.add_axes([0.925, 0.15, 0.014, 0.7])
    cb = fig.colorbar(sm, cax=cax)
    cb.set_label(f"{mpl_text(label)} [{mpl_text(unit)}]", fontsize=8)
    cb.ax.tick_params(labelsize=7)
    return fig
