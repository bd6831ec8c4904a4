"""Response spectra: panels on a logarithmic period axis, the three-panel view of the
``spectrum`` command, and the before/after view of spectral matching.

Every curve is drawn by one function, :func:`draw_curves`, from (label, periods [s],
values, kind); the kind sets the style, so a target or a record looks alike in every
figure. Values arrive in the unit the figure names.
"""
from __future__ import annotations

from typing import TYPE_CHECKING, Callable, Sequence

import numpy as np

from .._cautions import SCREENING_NOTE
from ._base import (G, LINESTYLES, PALETTE, finite, margins, mpl_text, new_figure,
                    plain_log_axis, style_axes)
from ._records import MOTION_ROWS, before_after_axes

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

__all__ = ["CURVE_KINDS", "draw_curves", "spectra_figure", "spectra_overview_figure",
           "match_figure"]

#: The kinds of spectrum curve, each with its own style.
CURVE_KINDS = ("line", "bold", "raw", "ground", "target", "envelope")

Curve = tuple[str, np.ndarray, np.ndarray, str]


def draw_curves(ax, curves: Sequence[Curve], *, positive_periods: bool = True,
                transform: Callable[[np.ndarray, np.ndarray], np.ndarray] | None = None
                ) -> list[np.ndarray]:
    """Draw spectrum curves on ``ax``; return the values drawn (after ``transform``).

    Parameters
    ----------
    curves : sequence of (label, periods [s] (n,), values (n,), kind)
        ``kind`` is one of :data:`CURVE_KINDS`: ``"line"`` (a record or a point, coloured),
        ``"bold"`` (a thick coloured line, e.g. RotDnn), ``"raw"`` (a faint coloured
        line, e.g. before broadening), ``"ground"`` (grey), ``"target"`` (black dashed),
        ``"envelope"`` (thick black, e.g. a median or an envelope).
    positive_periods : bool
        Leave out periods ≤ 0 (for a logarithmic period axis).
    transform : callable (periods, values) -> values, optional
        Applied before drawing (e.g. PSA to PSV).
    """
    k = g = e = 0
    drawn = []
    for label, per, val, kind in curves:
        per, val = finite(np.asarray(per, float), np.asarray(val, float))
        if positive_periods:
            ok = per > 0
            per, val = per[ok], val[ok]
        if not per.size:
            continue
        if transform is not None:
            val = transform(per, val)
        if kind == "ground":
            style = dict(color="#777777", linewidth=0.9, linestyle=(":", "-.", "--")[g % 3])
            g += 1
        elif kind == "target":
            style = dict(color=PALETTE[0], linewidth=1.6, linestyle="--")
        elif kind == "envelope":
            style = dict(color=PALETTE[0], linewidth=1.8, linestyle=("-", "--", ":")[e % 3])
            e += 1
        elif kind == "raw":
            style = dict(color=PALETTE[1 + k % 6], linewidth=0.9, alpha=0.55,
                         linestyle=LINESTYLES[k % len(LINESTYLES)])
        else:
            style = dict(color=PALETTE[1 + k % 6], linewidth=2.0 if kind == "bold" else 1.3,
                         linestyle=LINESTYLES[k % len(LINESTYLES)])
            k += 1
        ax.plot(per, val, label=mpl_text(label), **style)
        drawn.append(val)
    return drawn


def spectra_figure(panels: Sequence[tuple[str, Sequence[Curve]]], *, ylabel: str = "PSA [m/s²]",
                   columns: int = 2, shared_legend: bool = False) -> "Figure":
    """Response spectra on a logarithmic period axis, one panel per point or component.

    Parameters
    ----------
    panels : sequence of (title, curves)
        ``curves`` as for :func:`draw_curves`, values in the unit ``ylabel`` names.
    shared_legend : bool
        One legend under the panels (the curves of the first panel) instead of one each.
    """
    n = max(1, len(panels))
    cols = min(columns, n)
    rows = int(np.ceil(n / cols))
    below = 0.45 if shared_legend else 0.0
    fig = new_figure(9.0 if cols > 1 else 7.0, 0.5 + 3.0 * rows + below)
    axes = fig.subplots(rows, cols, squeeze=False).ravel()
    margins(fig, left=0.7, top=0.35, bottom=0.5 + below, hspace=0.45 * 3.0 / 2.6, wspace=0.22)
    for ax in axes[n:]:
        ax.set_visible(False)
    for ax, (title, curves) in zip(axes, panels):
        draw_curves(ax, curves)
        ax.set_xscale("log")
        plain_log_axis(ax.xaxis)
        ax.set_xlabel("period [s]", fontsize=8)
        ax.set_ylabel(mpl_text(ylabel), fontsize=8)
        ax.set_title(mpl_text(title), fontsize=9, color=PALETTE[0])
        style_axes(ax)
        if ax.get_legend_handles_labels()[0] and not shared_legend:
            ax.legend(fontsize=6.8, frameon=False, loc="best")
    if shared_legend and n:
        handles, labels = axes[0].get_legend_handles_labels()
        if handles:
            fig.legend(handles, labels, loc="lower center", ncol=min(4, len(handles)),
                       fontsize=7, frameon=False)
    return fig


def _fourway_grid(ax, t_lo, t_hi, v_lo, v_hi):
    """Diagonal lines of constant SD [m] and PSA [g] on a log PSV-T axis, labelled."""
    tt = np.array([t_lo, t_hi])
    for e in range(-6, 3):
        sd = 10.0 ** e                                   # PSV = 2π·SD/T
        v = 2 * np.pi * sd / tt
        if not (v.max() < v_lo or v.min() > v_hi):
            ax.plot(tt, v, color="0.8", lw=0.6, zorder=0)
            tl = max(2 * np.pi * sd / v_hi, t_lo)
            vl = 2 * np.pi * sd / tl
            if t_lo <= tl <= t_hi and v_lo <= vl <= v_hi:
                ax.text(tl, vl, f" SD {sd:g} m", fontsize=6, color="0.45", rotation=-30,
                        va="top", ha="left")
        psa = 10.0 ** e * G                              # PSV = PSA·T/(2π)
        v = psa * tt / (2 * np.pi)
        if v.max() < v_lo or v.min() > v_hi:
            continue
        ax.plot(tt, v, color="0.85", lw=0.6, ls="--", zorder=0)
        th = 2 * np.pi * v_hi / psa
        if t_lo <= th <= t_hi:
            ax.text(th, v_hi, f"PSA {10.0 ** e:g} g ", fontsize=6, color="0.45", rotation=30,
                    va="top", ha="right")


def _psv_from_g(per: np.ndarray, psa_g: np.ndarray) -> np.ndarray:
    """PSV [m/s] = PSA·T/(2π) of PSA in g (Chopra, Dynamics of Structures, §6.6)."""
    return psa_g * G * per / (2 * np.pi)


def spectra_overview_figure(spectra: Sequence, *, target=None, rotds=(), band: dict | None = None,
                            band_damping: float | None = None,
                            title: str = "Response spectra") -> "Figure":
    """Three panels: PSA [g] on linear axes, PSA [g] on log axes, and a four-way log plot
    (PSV [m/s] against period with diagonals of constant SD and PSA).

    Parameters
    ----------
    spectra : sequence of Spectrum
        One per record, each (n_damping, n_periods) in SI; names label the curves.
    target : TargetSpectrum, optional
        Drawn as a black dashed line on every panel.
    rotds : sequence of (label, RotD)
        Orientation-independent spectra, drawn as thick lines for each percentile.
    band : dict, optional
        Output of :func:`~groundshake.spectra.spectrum_statistics` over the records for
        one damping [m/s²]: the geometric median is drawn and the 16-84 % band shaded.
    band_damping : float, optional
        Damping ratio the band is for (legend).
    """
    curves: list[Curve] = []
    for s in spectra:
        curves += [(f"{s.name or 'record'} {100 * z:g} %", s.periods, s.psa[j] / G, "line")
                   for j, z in enumerate(s.damping)]
    for label, r in rotds:
        curves += [(f"RotD{q:g} {label} {100 * z:g} %", r.periods, r.psa[q_i, j] / G, "bold")
                   for q_i, q in enumerate(r.percentiles) for j, z in enumerate(r.damping)]
    t_all = np.concatenate([s.periods for s in spectra] or [np.array([0.01, 10.0])])
    t_lo, t_hi = float(t_all.min()), float(t_all.max())
    zl = "" if band_damping is None else f" ({100 * band_damping:g} %)"
    if band is not None and spectra:
        curves.append((f"median (geometric){zl}", spectra[0].periods, band["median"] / G,
                       "envelope"))
    if target is not None:
        tt = np.concatenate([[0.0], np.geomspace(max(t_lo, 1e-3), t_hi, 300)])
        curves.append((target.label, tt, target.psa(tt) / G, "target"))

    fig = new_figure(16.5, 5.2, dpi=100)
    lin, lg, four = fig.subplots(1, 3)
    draw_curves(lin, curves, positive_periods=False)
    draw_curves(lg, curves)
    v_vals = draw_curves(four, curves, transform=_psv_from_g)
    if band is not None and spectra:
        for ax in (lin, lg):
            ax.fill_between(spectra[0].periods, band["p16"] / G, band["p84"] / G, color="0.6",
                            alpha=0.3, lw=0, label=f"16-84 % (log-normal){zl}")
    lg.set_xscale("log")
    lg.set_yscale("log")
    four.set_xscale("log")
    four.set_yscale("log")
    lin.set_xlim(0, t_hi)
    lin.set_ylim(bottom=0)
    lin.set_xlabel("period [s]")
    lin.set_ylabel("pseudo-spectral acceleration PSA [g]")
    lin.set_title("PSA, linear axes")
    lg.set_xlabel("period [s]")
    lg.set_ylabel("PSA [g]")
    lg.set_title("PSA, log axes")
    v = np.concatenate([np.ravel(x) for x in v_vals]) if v_vals else np.array([1e-3, 1.0])
    v = v[np.isfinite(v) & (v > 0)]
    v_lo, v_hi = (float(v.min()) / 3, float(v.max()) * 3) if v.size else (1e-4, 1.0)
    four.set_xlim(t_lo, t_hi)
    four.set_ylim(v_lo, v_hi)
    _fourway_grid(four, t_lo, t_hi, v_lo, v_hi)
    four.set_xlabel("period [s]")
    four.set_ylabel("pseudo-spectral velocity PSV [m/s]")
    four.set_title("four-way log plot (SD: solid, PSA: dashed diagonals)")
    for ax in (lin, lg, four):
        ax.grid(alpha=0.3, which="both")
    lin.legend(fontsize=7, loc="upper right")
    fig.suptitle(f"{title} — {SCREENING_NOTE}", fontsize=10)
    fig.tight_layout()
    return fig


def _match_motion(r) -> tuple[np.ndarray, tuple, tuple]:
    """Time on the as-read axis [s], and acc/vel/disp before (scaled) and after matching."""
    from ..processing import integrate

    dt = r.record.dt
    pad = int(round(r.pad_s / dt))
    before = np.concatenate([np.zeros(pad), r.original.acc, np.zeros(pad)])
    before = np.pad(before, (0, max(0, r.record.n - before.size)))[:r.record.n]
    before = before * r.scale_factor
    # as-read axis: t = 0 at the first sample as read, every pad at negative times
    t = r.record.time - float(r.record.metadata.get("pad_before_s", r.pad_s) or 0.0)
    return t, (before, *integrate(before, dt)), (r.record.acc, *integrate(r.record.acc, dt))


def match_figure(results: Sequence) -> "Figure":
    """Spectral matching, one row per record: PSA [m/s²] of the target, the record before
    (scaled) and after; acceleration [m/s²], velocity [m/s] and displacement [m] before
    (scaled) and after, on the time axis of the file as read.

    Parameters
    ----------
    results : sequence of MatchResult
    """
    n = max(1, len(results))
    fig = new_figure(12.0, 6.5 * n, dpi=100)
    grid = fig.add_gridspec(3 * n, 2, width_ratios=(1, 1.3))
    for k, r in enumerate(results):
        ax = fig.add_subplot(grid[3 * k:3 * k + 3, 0])
        curves: list[Curve] = []
        for i, z in enumerate(r.damping):
            curves += [(f"target {100 * z:g} %", r.periods, r.target_psa[i], "envelope"),
                       (f"before (scaled ×{r.scale_factor:.3g}) {100 * z:g} %", r.periods,
                        r.psa_before[i] * r.scale_factor, "raw"),
                       (f"after {100 * z:g} %", r.periods, r.psa_after[i], "line")]
        draw_curves(ax, curves)
        ax.set_xscale("log")
        ax.set_yscale("log")
        plain_log_axis(ax.xaxis)
        plain_log_axis(ax.yaxis)
        ax.set_xlabel("period [s]")
        ax.set_ylabel("PSA [m/s²]")
        ax.set_title(f"{mpl_text(r.record.name)}: {r.status}, max misfit "
                     f"{100 * r.max_misfit:.1f} %", fontsize=9)
        style_axes(ax)
        ax.legend(fontsize=7, frameon=False)
        t, before, after = _match_motion(r)
        label = f"before, scaled ×{r.scale_factor:.3g}"
        for row, ((quantity, unit), yb, ya) in enumerate(zip(MOTION_ROWS, before, after)):
            ax = fig.add_subplot(grid[3 * k + row, 1])
            before_after_axes(ax, quantity, unit, (t, yb), (t, ya), labels=(label, "after"))
            if row == 0:
                ax.legend(fontsize=7, loc="upper right", frameon=False)
            if row == 2:
                ax.set_xlabel("time from the first sample as read [s]", fontsize=8)
    fig.suptitle("Spectral matching (screening only)", fontsize=10)
    fig.tight_layout()
    return fig
