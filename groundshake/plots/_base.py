"""What every figure shares: a pyplot-free Agg figure, colours, text, axes style, output.

matplotlib is imported inside the functions, never when this module is imported, so the
stages that only compute (and the report, until it draws) load no plotting library. A
figure is a ``matplotlib.figure.Figure`` on an Agg canvas (no pyplot state, no window);
it is written only through :func:`save_figure` (a file, atomically) or
:func:`to_data_uri` (PNG data for an HTML page).
"""
from __future__ import annotations

import base64
import functools
import io
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from .. import _atomic
from .._constants import STANDARD_GRAVITY

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

__all__ = ["DPI", "PALETTE", "LINESTYLES", "RAW_COLOUR", "G", "stress_map", "shape_map",
           "mpl_text", "new_figure", "margins", "style_axes", "plain_log_axis", "plain_number",
           "finite", "save_figure", "to_data_uri"]

DPI = 96
#: Colour-blind-safe colours (Okabe & Ito 2008, "Color Universal Design"): black, blue,
#: orange, bluish green, vermillion, reddish purple, sky blue, yellow.
PALETTE = ("#000000", "#0072B2", "#E69F00", "#009E73", "#D55E00", "#CC79A7", "#56B4E9",
           "#F0E442")
#: Line styles cycled with the colours, so curves differ in print and to every reader.
LINESTYLES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (1, 1)))
RAW_COLOUR = "#a9b1b8"
#: Standard gravity [m/s²]: accelerations are shown in g where a figure says so.
G = STANDARD_GRAVITY


@functools.lru_cache(maxsize=None)
def stress_map():
    """Colour map of stresses (light to dark), made on first use."""
    from matplotlib.colors import LinearSegmentedColormap

    return LinearSegmentedColormap.from_list(
        "groundshake_stress", ["#f3efe2", "#e9c46a", "#d08c1f", "#a8432a", "#4a2545"])


@functools.lru_cache(maxsize=None)
def shape_map():
    """Colour map of mode-shape displacement (light to dark), made on first use."""
    from matplotlib.colors import LinearSegmentedColormap

    return LinearSegmentedColormap.from_list(
        "groundshake_shape", ["#e6eef0", "#8fc1c1", "#1f7a7a", "#123f4a"])


def mpl_text(s: object) -> str:
    """Text safe for matplotlib: a ``$`` would otherwise start mathtext."""
    return str(s).replace("\\", "\\\\").replace("$", r"\$")


def new_figure(width: float, height: float, dpi: float = DPI) -> "Figure":
    """An empty figure ``width`` × ``height`` [in] on an Agg canvas (no pyplot)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), dpi=dpi)
    FigureCanvasAgg(fig)
    return fig


def margins(fig, *, left: float = 0.75, right: float = 0.2, top: float = 0.35,
            bottom: float = 0.45, hspace: float = 0.25, wspace: float = 0.3) -> None:
    """Set the subplot margins in inches (converted to the figure's fractions).

    A fixed layout: matplotlib's automatic layouts draw every figure twice, which doubled
    the report's time.
    """
    w, h = fig.get_size_inches()
    fig.subplots_adjust(left=left / w, right=1 - right / w, top=1 - top / h,
                        bottom=bottom / h, hspace=hspace, wspace=wspace)


def style_axes(ax) -> None:
    """Light grid behind the data, no top and right spines, small tick labels."""
    ax.grid(True, color="#d9dee2", linewidth=0.6)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.tick_params(labelsize=8)


def plain_log_axis(axis) -> None:
    """Label a logarithmic axis with plain numbers (0.05, 0.1, 0.2, 0.5, 1, 2) instead of
    powers of ten."""
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullLocator

    lo, hi = axis.get_view_interval()
    lo, hi = (min(lo, hi), max(lo, hi))
    ticks = [m * 10.0 ** e for e in range(-4, 5) for m in (1, 2, 5)
             if lo * 0.999 <= m * 10.0 ** e <= hi * 1.001]
    if len(ticks) >= 2:
        axis.set_major_locator(FixedLocator(ticks))
    axis.set_minor_locator(NullLocator())
    axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))


def plain_number(v: float) -> str:
    """A number with 3 significant digits and no exponent (3180, 0.0412)."""
    if v == 0 or not np.isfinite(v):
        return f"{v:g}"
    digits = max(0, 2 - int(np.floor(np.log10(abs(v)))))
    return f"{round(v, digits):.{digits}f}" if digits else f"{round(v, digits):.0f}"


def finite(t: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The samples (t, y) where both are finite."""
    ok = np.isfinite(t) & np.isfinite(y)
    return t[ok], y[ok]


def save_figure(fig, path: str | Path, **savefig_kw) -> Path:
    """Write ``fig`` to ``path`` atomically, in the format its extension names (.png,
    .pdf, .svg); ``savefig_kw`` go to ``Figure.savefig`` (``dpi``, ``bbox_inches``)."""
    return _atomic.atomic_savefig(fig, path, **savefig_kw)


def to_data_uri(fig) -> str:
    """The figure as a ``data:image/png;base64,...`` URI (white background, :data:`DPI`),
    for an ``<img>`` element of a page that needs no file beside it."""
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=DPI, facecolor="white")
    return "data:image/png;base64," + base64.b64encode(buf.getvalue()).decode("ascii")
