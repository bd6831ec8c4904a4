"""The files of a run's output folder (see docs/INTERNALS.md), written atomically."""
from __future__ import annotations

import csv
import io
import os
from pathlib import Path
from typing import Callable, Iterable, Sequence

import numpy as np
import scipy.sparse as sp

from .._atomic import atomic_directory
from .._json import json_dumps
from ._schema import OUTPUT_FILES, SCHEMA_VERSION, SUMMARY_FILE
from ..dynamics._motion import DIRECTIONS

__all__ = ["write_outputs", "OUTPUT_FILES"]

# the file names come from the output contract (_schema.py)



def _csv_text(header: Sequence[str], columns: Iterable[np.ndarray | Sequence], *,
              blank_nan: bool = False) -> str:
    cols = [np.asarray(c) for c in columns]
    n = max((c.shape[0] for c in cols), default=0)
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for i in range(n):
        w.writerow([(("" if blank_nan and not np.isfinite(c[i]) else f"{float(c[i]):.10g}")
                     if np.issubdtype(c.dtype, np.floating) else str(c[i]))
                    if i < c.shape[0] else "" for c in cols])
    return buf.getvalue()


def _write(folder: Path, name: str, text: str) -> None:
    with open(folder / name, "w", encoding="utf-8", newline="") as fh:
        fh.write(text)


def _damp_label(r: float) -> str:
    return f"{100 * r:g}%"


def write_outputs(results, out_dir: str | os.PathLike, *, overwrite: bool = False,
                  n_shapes: int = 6,
                  also: Callable[[Path], object] | None = None) -> Path:
    """Write a run's files into ``out_dir`` (a new folder, moved into place when complete).

    Parameters
    ----------
    results : RunResults
        From :func:`groundshake.analyse`.
    out_dir : path
        The folder to create; an existing one is replaced only with ``overwrite``.
    n_shapes : int
        Mode shapes written to mode_shapes.csv.
    also : callable, optional
        Called with the temporary folder after the files are written, inside the same
        atomic step (the application layer writes report.html this way:
        :func:`groundshake.pipeline.write_run`).

    Returns
    -------
    Path
        ``out_dir``.

    Raises
    ------
    FileExistsError
        ``out_dir`` exists and ``overwrite`` is false.
    """
    out_dir = Path(out_dir)
    if out_dir.exists() and not overwrite:
        raise FileExistsError(17, "already exists (use --force to replace it)", str(out_dir))
    with atomic_directory(out_dir, overwrite=overwrite) as tmp:
        summary = {"schema_version": SCHEMA_VERSION, **results.summary}
        _write(tmp, SUMMARY_FILE, json_dumps(summary) + "\n")
        h = results.histories
        if h:           # a response-spectrum run has no histories and reads no records
            _write(tmp, "histories.csv", _csv_text(list(h), list(h.values())))
            _write(tmp, "records.csv", _records_csv(results.motion))
        _write(tmp, "ground_spectra.csv", _ground_csv(results))
        _write(tmp, "floor_spectra.csv", _floor_csv(results))
        _write(tmp, "modes.csv", _modes_csv(results.modes))
        _write(tmp, "element_peaks.csv", _elements_csv(results))
        _write(tmp, "mode_shapes.csv", _shapes_csv(results, n_shapes))
        if also is not None:
            also(tmp)
    return out_dir


def _records_csv(motion) -> str:
    """records.csv: one time column on the as-read axis (t = 0 at the first sample as
    read, pads at negative times), then raw and corrected acc/vel/disp of each
    component on the same rows; blank where a series has no sample. A raw record on
    another step than the motion's is linearly interpolated onto its rows."""
    from ..processing import integrate

    time = motion.time
    if not (motion.raw or motion.corrected):         # motion given as arrays
        vel, disp = integrate(np.asarray(motion.acc), motion.dt)
        header = ["time [s]"]
        cols = [time]
        for j, d in enumerate(DIRECTIONS):
            header += [f"{d} corrected acc [m/s2]", f"{d} corrected vel [m/s]",
                       f"{d} corrected disp [m]"]
            cols += [motion.acc[j], vel[j], disp[j]]
        return _csv_text(header, cols)
    header, cols = ["time [s]"], [time]
    for d in DIRECTIONS:
        for kind, recs in (("raw", motion.raw), ("corrected", motion.corrected)):
            rec = recs.get(d) if recs else None
            if rec is None:
                continue
            vel, disp = integrate(np.asarray(rec.acc), rec.dt)
            header += [f"{d} {kind} acc [m/s2]", f"{d} {kind} vel [m/s]",
                       f"{d} {kind} disp [m]"]
            cols += _on_rows(time, motion.dt, rec, (np.asarray(rec.acc), vel, disp))
    return _csv_text(header, cols, blank_nan=True)


def _on_rows(time: np.ndarray, dt: float, rec, series) -> list[np.ndarray]:
    """Series of ``rec`` (each (rec.n,)) placed on the rows ``time`` (n_t,) [s]; NaN
    outside the record."""
    t_rec = rec.time - float(rec.metadata.get("pad_before_s", 0.0) or 0.0)
    exact = (t_rec[0] - time[0]) / dt
    k = int(round(exact))
    out = []
    for y in series:
        col = np.full(time.size, np.nan)
        if abs(rec.dt - dt) <= 1e-9 * dt and abs(exact - k) <= 1e-6:
            lo, hi = max(k, 0), min(k + rec.n, time.size)
            if hi > lo:
                col[lo:hi] = y[lo - k:hi - k]
        else:
            inside = (time >= t_rec[0] - 1e-9 * dt) & (time <= t_rec[-1] + 1e-9 * dt)
            col[inside] = np.interp(time[inside], t_rec, y)
        out.append(col)
    return out


def _ground_csv(results) -> str:
    g = results.ground_spectra
    header, cols = ["period [s]"], [g["periods"]]
    for j, d in enumerate(DIRECTIONS):
        if d not in results.motion.components:
            continue
        for i, z in enumerate(g["damping"]):
            header.append(f"ground {d} psa {_damp_label(z)} [m/s2]")
            cols.append(g["psa"][j, i])
    if results.target_psa is not None:
        header.append("target psa [m/s2]")
        cols.append(results.target_psa)
    return _csv_text(header, cols)


def _floor_csv(results) -> str:
    f = results.floor
    g = results.ground_spectra
    header, cols = ["period [s]"], [f["periods"]]
    names = f.get("points", [])
    for p, nm in enumerate(names):
        for j, d in enumerate(DIRECTIONS):
            for i, z in enumerate(f["damping"]):
                header += [f"{nm} {d} psa {_damp_label(z)} raw [m/s2]",
                           f"{nm} {d} psa {_damp_label(z)} broadened [m/s2]"]
                cols += [f["psa"][p, j, i], f["psa_broadened"][p, j, i]]
    if names:
        for j, d in enumerate(DIRECTIONS):
            for i, z in enumerate(f["damping"]):
                header += [f"envelope {d} psa {_damp_label(z)} raw [m/s2]",
                           f"envelope {d} psa {_damp_label(z)} broadened [m/s2]"]
                cols += [f["envelope_psa"][j, i], f["envelope_psa_broadened"][j, i]]
    for j, d in enumerate(DIRECTIONS):
        if d not in results.motion.components:
            continue
        for i, z in enumerate(g["damping"]):
            header.append(f"ground {d} psa {_damp_label(z)} [m/s2]")
            cols.append(g["psa"][j, i])
    return _csv_text(header, cols)


def _modes_csv(modes) -> str:
    m = int(np.asarray(modes.omega).size)
    header = ["mode", "frequency [Hz]", "period [s]", "damping [ratio]"]
    cols = [np.arange(1, m + 1), np.asarray(modes.frequency, float), np.asarray(modes.period, float),
            np.asarray(modes.damping, float)]
    emr = np.asarray(modes.effective_mass_ratio, float).reshape(m, 3)
    cum = np.asarray(modes.cumulative_ratio, float).reshape(m, 3)
    for j, d in enumerate(DIRECTIONS):
        header.append(f"effective mass ratio {d} [ratio]")
        cols.append(emr[:, j])
    for j, d in enumerate(DIRECTIONS):
        header.append(f"cumulative mass ratio {d} [ratio]")
        cols.append(cum[:, j])
    return _csv_text(header, cols)


def _elements_csv(results) -> str:
    c = np.asarray(results.model.element_centres, float)
    header = ["x [m]", "y [m]", "z [m]"]
    cols = [c[:, 0], c[:, 1], c[:, 2]]
    s = results.stress
    if s is not None and not results.histories:      # response spectrum: no times
        header += ["von mises [Pa]", "principal tension [Pa]", "principal compression [Pa]",
                   "part"]
        cols += [s.von_mises, s.tension, s.compression, np.asarray(results.model.element_part)]
    elif s is not None:
        header += ["von mises [Pa]", "principal tension [Pa]", "principal compression [Pa]",
                   "time of von mises peak [s]", "part"]
        cols += [s.von_mises, s.tension, s.compression,
                 results.motion.time_of_step(s.von_mises_step),
                 np.asarray(results.model.element_part)]
    return _csv_text(header, cols)


def _shapes_csv(results, n_shapes: int) -> str:
    model, modes = results.model, results.modes
    nodes = np.asarray(model.nodes, float)
    header = ["x [m]", "y [m]", "z [m]"]
    cols = [nodes[:, 0], nodes[:, 1], nodes[:, 2]]
    m = min(n_shapes, int(np.asarray(modes.omega).size))
    if m:
        U = np.asarray(sp.csr_matrix(model.node_map) @ np.asarray(modes.shapes)[:, :m])
        for k in range(m):
            for j, comp in enumerate(("ux", "uy", "uz")):
                header.append(f"mode {k + 1} {comp} [m]")
                cols.append(U[j::3, k])
    return _csv_text(header, cols)
