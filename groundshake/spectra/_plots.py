"""Figures of response spectra: PSA in linear and log axes, and a four-way log plot."""
from __future__ import annotations

from pathlib import Path
from typing import Sequence

import numpy as np

from .._atomic import atomic_savefig
from .._cautions import SCREENING_NOTE
from .._constants import STANDARD_GRAVITY

__all__ = ["plot_spectra"]

G = STANDARD_GRAVITY
_STYLES = ("-", "--", ":", "-.")


def _fourway_grid(ax, t_lo, t_hi, v_lo, v_hi):
    """Diagonal lines of constant SD [m] and PSA [g] on a log PSV-T axis, labelled."""
    tt = np.array([t_lo, t_hi])
    for e in range(-6, 3):
        for m in (1.0,):
            sd = m * 10.0 ** e                          # PSV = 2π·SD/T
            v = 2 * np.pi * sd / tt
            if v.max() < v_lo or v.min() > v_hi:
                continue
            ax.plot(tt, v, color="0.8", lw=0.6, zorder=0)
            tl = 2 * np.pi * sd / v_hi if 2 * np.pi * sd / v_hi > t_lo else t_lo
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


def plot_spectra(path: str | Path, spectra: Sequence, *, target=None, rotds=(),
                 band: dict | None = None, band_damping: float | None = None,
                 title: str = "Response spectra") -> Path:
    """Write a three-panel figure: PSA (linear), PSA (log-log), four-way log plot.

    Parameters
    ----------
    path : path
        Output file (.png, .pdf or .svg), written atomically.
    spectra : sequence of Spectrum
        One per record, each (n_damping, n_periods); names label the curves.
    target : TargetSpectrum, optional
        Drawn as a black dashed line on every panel.
    rotds : sequence of (label, RotD)
        Orientation-independent spectra, drawn as thick lines for each percentile.
    band : dict, optional
        Output of :func:`spectrum_statistics` over the records for one damping:
        the median and the 16-84 % band are shaded.
    band_damping : float, optional
        Damping ratio the band is for (legend).

    Returns
    -------
    Path
    """
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    path = Path(path)
    fig, axes = plt.subplots(1, 3, figsize=(16.5, 5.2))
    lin, lg, four = axes
    colors = plt.rcParams["axes.prop_cycle"].by_key()["color"]
    t_all = np.concatenate([s.periods for s in spectra] or [np.array([0.01, 10.0])])
    t_lo, t_hi = float(t_all.min()), float(t_all.max())
    v_vals = []
    for i, s in enumerate(spectra):
        c = colors[i % len(colors)]
        for j, z in enumerate(s.damping):
            ls = _STYLES[j % len(_STYLES)]
            lab = f"{s.name or 'record'} {100 * z:g} %"
            lin.plot(s.periods, s.psa[j] / G, color=c, ls=ls, lw=1.0, label=lab)
            lg.loglog(s.periods, s.psa[j] / G, color=c, ls=ls, lw=1.0)
            four.loglog(s.periods, s.psv[j], color=c, ls=ls, lw=1.0, label=lab)
            v_vals.append(s.psv[j])
    for k, (label, r) in enumerate(rotds):
        for q_i, q in enumerate(r.percentiles):
            for j, z in enumerate(r.damping):
                c = colors[(len(spectra) + k * len(r.percentiles) + q_i) % len(colors)]
                lab = f"RotD{q:g} {label} {100 * z:g} %"
                ls = _STYLES[j % len(_STYLES)]
                lin.plot(r.periods, r.psa[q_i, j] / G, color=c, ls=ls, lw=2.0, alpha=0.8,
                         label=lab)
                lg.loglog(r.periods, r.psa[q_i, j] / G, color=c, ls=ls, lw=2.0, alpha=0.8)
                four.loglog(r.periods, r.psv[q_i, j], color=c, ls=ls, lw=2.0, alpha=0.8)
                v_vals.append(r.psv[q_i, j])
    if band is not None and spectra:
        t = spectra[0].periods
        zl = "" if band_damping is None else f" ({100 * band_damping:g} %)"
        for ax in (lin, lg):
            ax.fill_between(t, band["p16"] / G, band["p84"] / G, color="0.6", alpha=0.3,
                            lw=0, label=f"16-84 % (log-normal){zl}")
            ax.plot(t, band["median"] / G, color="k", lw=1.6, label=f"median (geometric){zl}")
    if target is not None:
        tt = np.geomspace(max(t_lo, 1e-3), t_hi, 300)
        tt_lin = np.concatenate([[0.0], tt])
        psa_t = target.psa(tt_lin) / G
        lin.plot(tt_lin, psa_t, "k--", lw=1.4, label=target.label)
        lg.loglog(tt, psa_t[1:], "k--", lw=1.4)
        four.loglog(tt, psa_t[1:] * G * tt / (2 * np.pi), "k--", lw=1.4, label=target.label)
        v_vals.append(psa_t[1:] * G * tt / (2 * np.pi))
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
    for ax in axes:
        ax.grid(alpha=0.3, which="both")
    lin.legend(fontsize=7, loc="upper right")
    fig.suptitle(f"{title} — {SCREENING_NOTE}", fontsize=10)
    fig.tight_layout()
    atomic_savefig(fig, path, dpi=110)
    plt.close(fig)
    return path
