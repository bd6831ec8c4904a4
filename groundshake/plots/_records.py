"""Time series: records before and after correction or matching, and strips of histories.

Values arrive in the units the figure names (the caller converts SI values at the display
edge); the figures built from :class:`~groundshake.records.Record` objects show m/s², m/s
and m, as the records hold them.
"""
from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

import numpy as np

from ._base import (LINESTYLES, PALETTE, RAW_COLOUR, finite, margins, mpl_text, new_figure,
                    plain_number, style_axes)

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

__all__ = ["strip_figure", "record_figure", "correction_figure", "before_after_axes"]

#: The three rows of a motion: quantity and SI unit.
MOTION_ROWS = (("acceleration", "m/s²"), ("velocity", "m/s"), ("displacement", "m"))


def strip_figure(time: np.ndarray, strips: Sequence[tuple[str, Sequence[tuple[str, np.ndarray]], str]],
                 *, title: str = "") -> "Figure":
    """Time histories one above the other on a shared time axis.

    Parameters
    ----------
    time : ndarray, shape (n_t,)
        Time [s].
    strips : sequence of (label, curves, unit)
        One strip each; ``curves`` is a sequence of (name, values (n_t,)) drawn together
        (e.g. the x, y and z components), in ``unit``. The peak |value| of the strip and
        its time are written on it.
    """
    from matplotlib.ticker import MaxNLocator

    n = max(1, len(strips))
    fig = new_figure(9.0, 0.8 + 0.95 * n)
    axes = fig.subplots(n, 1, sharex=True, squeeze=False)[:, 0]
    margins(fig, left=1.0, top=0.4 if title else 0.15, hspace=0.12)
    t_all = np.asarray(time, float)
    for k, (ax, (label, curves, unit)) in enumerate(zip(axes, strips)):
        best = None
        # a tension's peak is its largest positive value (compression is not tension)
        signed = "tension" in str(label).lower()
        for c, (name, y) in enumerate(curves):
            t, v = finite(t_all, np.asarray(y, float))
            colour = PALETTE[(1 + c) % 7] if len(curves) > 1 else PALETTE[1]
            ax.plot(t, v, color=colour, linewidth=0.8, linestyle=LINESTYLES[c % len(LINESTYLES)],
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
        style_axes(ax)
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


def before_after_axes(ax, quantity: str, unit: str,
                      before: tuple[np.ndarray, np.ndarray] | None,
                      after: tuple[np.ndarray, np.ndarray] | None, *,
                      labels: tuple[str, str] = ("as read", "corrected"),
                      fontsize: float = 8) -> tuple[float, float] | None:
    """Draw one quantity before (grey, dashed) and after (blue) on ``ax``.

    ``before`` and ``after`` are (time [s] (n,), values (n,)) in ``unit``. When the
    "before" curve is more than three times larger than the "after" curve (the drift of a
    record as read), the axis is scaled to the "after" curve and the larger peak is named.
    Returns the time span of the "before" curve (None without one).
    """
    from matplotlib.ticker import MaxNLocator

    span = bv = av = None
    if before is not None:
        t, bv = finite(*map(np.asarray, before))
        ax.plot(t, bv, color=RAW_COLOUR, linewidth=0.9, linestyle="--", label=labels[0])
        if t.size:
            span = (float(t[0]), float(t[-1]))
    if after is not None:
        t, av = finite(*map(np.asarray, after))
        ax.plot(t, av, color=PALETTE[1], linewidth=0.8, label=labels[1])
    if av is not None and av.size and bv is not None and bv.size:
        top = float(np.max(np.abs(av)))
        if top > 0 and float(np.max(np.abs(bv))) > 3.0 * top:
            # the drift of the record as read would flatten the corrected curve
            ax.set_ylim(-1.3 * top, 1.3 * top)
            ax.text(0.005, 0.04, f"{mpl_text(labels[0])} reaches "
                    f"{plain_number(float(np.max(np.abs(bv))))} {mpl_text(unit)} (off this "
                    "scale)", transform=ax.transAxes, fontsize=7, color="#555555")
    ax.set_ylabel(f"{mpl_text(quantity)}\n[{mpl_text(unit)}]", fontsize=fontsize)
    ax.yaxis.set_major_locator(MaxNLocator(4))
    style_axes(ax)
    return span


def record_figure(rows: Sequence[tuple[str, str, tuple[np.ndarray, np.ndarray] | None,
                                       tuple[np.ndarray, np.ndarray] | None]], *,
                  title: str = "") -> "Figure":
    """Acceleration, velocity and displacement of one component, before and after correction.

    Parameters
    ----------
    rows : sequence of (quantity, unit, (t, raw) or None, (t, corrected) or None)
        Usually three: acceleration, velocity, displacement, each in its ``unit``; t [s].
    """
    n = max(1, len(rows))
    fig = new_figure(9.0, 0.8 + 1.3 * n)
    axes = fig.subplots(n, 1, sharex=True, squeeze=False)[:, 0]
    margins(fig, left=0.9, top=0.4 if title else 0.15, hspace=0.12)
    span = None
    for ax, (quantity, unit, raw, cor) in zip(axes, rows):
        span = before_after_axes(ax, quantity, unit, raw, cor) or span
    if span is not None and span[1] > span[0]:
        axes[-1].set_xlim(*span)            # the record's own time, as read
    axes[0].legend(fontsize=7.5, loc="upper right", frameon=False, ncol=2)
    axes[-1].set_xlabel("time from the first sample as read [s]", fontsize=8)
    if title:
        fig.suptitle(mpl_text(title), fontsize=10, color=PALETTE[0])
    return fig


def correction_figure(raws: Sequence, corrected: Sequence) -> "Figure":
    """Acceleration [m/s²], velocity [m/s] and displacement [m] of records as read and
    corrected, one column per record, on the time axis of the file as read.

    Parameters
    ----------
    raws, corrected : sequences of Record
        Each record as read and the same record corrected (with its zero pads;
        ``metadata["pad_before_s"]`` [s] shifts it onto the as-read axis).
    """
    from ..processing import integrate

    ncol = max(1, len(raws))
    fig = new_figure(6.5 * ncol, 7.5)
    axes = fig.subplots(3, ncol, sharex="col", squeeze=False)
    for j, (r, c) in enumerate(zip(raws, corrected)):
        shift = float(c.metadata.get("pad_before_s", 0.0) or 0.0)
        before = (r.acc, *integrate(r.acc, r.dt))
        after = (c.acc, *integrate(c.acc, c.dt))
        for i, ((quantity, unit), yb, ya) in enumerate(zip(MOTION_ROWS, before, after)):
            before_after_axes(axes[i, j], quantity, unit, (r.time, yb), (c.time - shift, ya),
                              labels=("as read", "corrected (with pads)"))
        axes[0, j].set_title(mpl_text(c.name), fontsize=9)
        axes[0, j].legend(loc="upper right", fontsize=8, frameon=False)
        axes[2, j].set_xlabel("time from the first sample as read [s]", fontsize=8)
    fig.suptitle("Record correction (screening only)", fontsize=10)
    fig.tight_layout()
    return fig
