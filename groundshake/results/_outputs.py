"""The files of a run's output folder (see docs/INTERNALS.md), written atomically."""
from __future__ import annotations

import csv
import io
import os
from pathlib import Path
from typing import TYPE_CHECKING, Callable, Iterable, Sequence

import numpy as np
import scipy.sparse as sp

from .._atomic import atomic_directory
from .._json import json_dumps
from ._schema import COLUMNS, DIRECTIONS, FILES, OUTPUT_FILES, SCHEMA_VERSION, UNITS

if TYPE_CHECKING:  # pragma: no cover
    from ..dynamics import Modes
    from ..model import BlockModel
    from ._common import RunResults

__all__ = ["write_outputs", "OUTPUT_FILES", "rotational_participation", "dominant_direction",
           "mesh_description"]

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


def write_outputs(results: RunResults, out_dir: str | os.PathLike, *, overwrite: bool = False,
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
        raise FileExistsError(17, "already exists; not replaced (overwrite is off)", str(out_dir))
    rot = rotational_participation(results.model, results.modes)
    summary = _summary_with_contract(results.summary, rot)
    with atomic_directory(out_dir, overwrite=overwrite) as tmp:
        _write(tmp, FILES["summary"], json_dumps(summary) + "\n")
        h = results.histories
        if h:           # a response-spectrum run has no histories and reads no records
            _write(tmp, FILES["histories"], _csv_text(list(h), list(h.values())))
            _write(tmp, FILES["records"], _records_csv(results.motion))
        _write(tmp, FILES["ground_spectra"], _ground_csv(results))
        _write(tmp, FILES["floor_spectra"], _floor_csv(results))
        _write(tmp, FILES["modes"], _modes_csv(results.modes, rot))
        _write(tmp, FILES["element_peaks"], _elements_csv(results))
        _write(tmp, FILES["mode_shapes"], _shapes_csv(results, n_shapes))
        _write(tmp, FILES["mesh"], json_dumps(mesh_description(results.model), indent=None) + "\n")
        if also is not None:
            also(tmp)
    return out_dir


def _summary_with_contract(summary: dict, rot: np.ndarray) -> dict:
    """The summary as written: the contract's version and units added, each mode's
    rotational participation and dominant direction filled in (the run's dict is not
    changed)."""
    out = dict(summary)
    out = {"schema_version": SCHEMA_VERSION, **out}
    out["schema"] = {"version": SCHEMA_VERSION, "files": dict(FILES),
                     "units": {k: v for k, v in UNITS.items() if v}}
    modes = out.get("modes")
    if isinstance(modes, dict) and isinstance(modes.get("modes"), list):
        new = []
        for i, md in enumerate(modes["modes"]):
            md = dict(md)
            if i < rot.shape[0]:
                md["rotational_participation"] = dict(zip(DIRECTIONS, map(float, rot[i])))
                emr = md.get("effective_mass_ratio") or {}
                md["dominant_direction"] = dominant_direction(
                    np.array([[float(emr.get(d, 0.0)) for d in DIRECTIONS]]), rot[i:i + 1])[0]
            new.append(md)
        out["modes"] = dict(modes, modes=new)
    return out


def mesh_description(model: BlockModel) -> dict:
    """The mesh once, for figures: grid lines [m], the filled cells in element order,
    each element's part, each node's grid indices, equipment and sensor positions.

    Returns
    -------
    dict
        ``lines`` {x, y, z} [m]; ``cells`` (n_el, 3) int grid indices (i, j, k) in the
        row order of element_peaks.csv; ``cell_part`` (n_el,) index into ``parts``;
        ``node_cells`` (n_nodes, 3) int grid-line indices in the row order of
        mode_shapes.csv; ``equipment`` [{name, footprint_lo, footprint_hi, cg, anchors}]
        and ``sensors`` [{name, at}] [m].
    """
    mesh = model.mesh
    out: dict = {"schema_version": SCHEMA_VERSION, "units": "m"}
    if mesh is None:
        return out
    xs, ys, zs = (np.asarray(a, float) for a in mesh.lines)
    out["lines"] = {"x": xs.tolist(), "y": ys.tolist(), "z": zs.tolist()}
    out["parts"] = [str(p) for p in model.part_names]
    out["cells"] = np.asarray(mesh.element_cell, int).tolist()
    out["cell_part"] = np.asarray(mesh.element_part, int).tolist()
    nodes = np.asarray(model.nodes, float)
    out["node_cells"] = np.column_stack([_nearest(xs, nodes[:, 0]), _nearest(ys, nodes[:, 1]),
                                         _nearest(zs, nodes[:, 2])]).astype(int).tolist()
    eqs = []
    for e in model.equipment:
        mount = np.asarray(e.mount, float).reshape(3)
        half = 0.5 * np.asarray(e.footprint, float).reshape(2)
        anchors = np.asarray(e.anchors, float).reshape(-1, 2)
        eqs.append({"name": e.name,
                    "footprint_lo": [mount[0] - half[0], mount[1] - half[1], mount[2]],
                    "footprint_hi": [mount[0] + half[0], mount[1] + half[1], mount[2]],
                    "cg": [float(v) for v in e.cg],
                    "anchors": [[float(mount[0] + a[0]), float(mount[1] + a[1]), float(mount[2])]
                                for a in anchors]})
    out["equipment"] = eqs
    out["sensors"] = [{"name": s.name, "at": [float(v) for v in s.position]}
                      for s in model.sensors]
    return out


def _nearest(lines: np.ndarray, v: np.ndarray) -> np.ndarray:
    """Index of the grid line nearest each value (nodes sit on grid lines)."""
    i = np.searchsorted(lines, v).clip(1, lines.size - 1)
    return np.where(np.abs(v - lines[i - 1]) <= np.abs(lines[i] - v), i - 1, i)


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


def _long_csv(columns, rows: list[list[np.ndarray]]) -> str:
    """A long-format table: ``rows`` is a list of column blocks stacked top to bottom."""
    if not rows:
        return _csv_text([c.header for c in columns], [[] for _ in columns])
    cols = [np.concatenate([np.asarray(r[j]) for r in rows]) for j in range(len(columns))]
    return _csv_text([c.header for c in columns], cols)


def _ground_csv(results: RunResults) -> str:
    g = results.ground_spectra
    per = np.asarray(g["periods"], float)
    n = per.size
    rows = []
    for j, d in enumerate(DIRECTIONS):
        if d not in results.motion.components:
            continue
        for i, z in enumerate(np.asarray(g["damping"], float)):
            rows.append([np.full(n, d, dtype=object), np.full(n, float(z)), per,
                         np.asarray(g["psa"][j, i], float)])
    if results.target_psa is not None:
        z = 0.05 if results.target_damping is None else float(results.target_damping)
        rows.append([np.full(n, "target", dtype=object), np.full(n, z), per,
                     np.asarray(results.target_psa, float)])
    return _long_csv(COLUMNS["ground_spectra"], rows)


def _floor_csv(results: RunResults) -> str:
    f = results.floor
    per = np.asarray(f["periods"], float)
    n = per.size
    names = list(f.get("points", []))
    rows = []
    for p, nm in enumerate(names):
        for j, d in enumerate(DIRECTIONS):
            for i, z in enumerate(np.asarray(f["damping"], float)):
                rows.append([np.full(n, nm, dtype=object), np.full(n, d, dtype=object),
                             np.full(n, float(z)), per, np.asarray(f["psa"][p, j, i], float),
                             np.asarray(f["psa_broadened"][p, j, i], float)])
    if names:
        for j, d in enumerate(DIRECTIONS):
            for i, z in enumerate(np.asarray(f["damping"], float)):
                rows.append([np.full(n, "envelope", dtype=object), np.full(n, d, dtype=object),
                             np.full(n, float(z)), per,
                             np.asarray(f["envelope_psa"][j, i], float),
                             np.asarray(f["envelope_psa_broadened"][j, i], float)])
    return _long_csv(COLUMNS["floor_spectra"], rows)


def rotational_participation(model: BlockModel, modes: Modes) -> np.ndarray:
    """Effective-mass ratios of each mode for rigid rotation about x, y and z.

    The rotation axes pass through the centre of the base. For axis a the rigid-body
    vector ι_a (the model's DOFs moved by a unit rotation about a) gives, for
    mass-normalised shapes φ_n, Γ_na = φ_nᵀ M ι_a and the ratio Γ_na² / (ι_aᵀ M ι_a),
    the rotational counterpart of the effective mass ratio (Chopra, Dynamics of
    Structures, §13.1: Σ_n Γ_n² = ιᵀ M ι over all modes, so the ratios of all modes
    sum to 1).

    Parameters
    ----------
    model : BlockModel
        ``M`` (n, n) [kg], ``nodes`` (n_nodes, 3) [m], ``node_map`` (3·n_nodes, n),
        ``equipment`` (each with ``cg`` [m] and ``operator`` (6, n)), ``base["centre"]``.
    modes : Modes
        ``shapes`` (n, m), mass-normalised.

    Returns
    -------
    ndarray, shape (m, 3)
        Ratios (–) for rotation about x, y, z; zeros when no rigid vector can be made.
    """
    import scipy.sparse.linalg as spla

    phi = np.asarray(modes.shapes)
    m = phi.shape[1] if phi.ndim == 2 else 0
    out = np.zeros((m, 3))
    if m == 0:
        return out
    try:
        P = sp.csr_matrix(model.node_map)
        nodes = np.asarray(model.nodes, float)
        c = np.asarray(model.base.get("centre", np.zeros(3)), float)
        blocks = [P]
        eq_ops = [(np.asarray(e.cg, float), sp.csr_matrix(e.operator))
                  for e in model.equipment]
        for _, op in eq_ops:
            blocks.append(op)
        A = sp.vstack(blocks).tocsr()
        M = sp.csr_matrix(model.M)
        for a in range(3):
            theta = np.zeros(3)
            theta[a] = 1.0
            rhs = [np.cross(theta, nodes - c).reshape(-1)]
            for cg, _ in eq_ops:
                rhs.append(np.concatenate([np.cross(theta, cg - c), theta]))
            b = np.concatenate(rhs)
            iota = spla.lsqr(A, b, atol=1e-12, btol=1e-12, iter_lim=2000)[0]
            denom = float(iota @ (M @ iota))
            if denom > 0:
                gamma = phi.T @ (M @ iota)
                out[:, a] = gamma ** 2 / denom
    except Exception:  # a missing attribute of an unusual model: no rotational ratios
        return np.zeros((m, 3))
    return out


def _modes_csv(modes: Modes, rot: np.ndarray | None = None) -> str:
    m = int(np.asarray(modes.omega).size)
    emr = np.asarray(modes.effective_mass_ratio, float).reshape(m, 3)
    cum = np.asarray(modes.cumulative_ratio, float).reshape(m, 3)
    rot = np.zeros((m, 3)) if rot is None else rot
    cols = [np.arange(1, m + 1), np.asarray(modes.frequency, float),
            np.asarray(modes.period, float), np.asarray(modes.damping, float),
            *emr.T, *cum.T, *rot.T, np.asarray(dominant_direction(emr, rot), dtype=object)]
    return _csv_text([c.header for c in COLUMNS["modes"]], cols)


def dominant_direction(effective_mass_ratio: np.ndarray, rotational: np.ndarray) -> list[str]:
    """Per mode, the direction with the largest effective-mass ratio (``"x"``, ``"y"``,
    ``"z"``), or when no translation holds 0.1 % of the mass the axis of the largest
    rotational ratio (``"rotation about z"``), else ``"local"``.

    Parameters
    ----------
    effective_mass_ratio, rotational : ndarray, shape (m, 3)
        Translational and rotational ratios (–).
    """
    out = []
    for t, r in zip(np.asarray(effective_mass_ratio).reshape(-1, 3),
                    np.asarray(rotational).reshape(-1, 3)):
        if t.max() >= 1e-3:
            out.append(DIRECTIONS[int(np.argmax(t))])
        elif r.max() >= 1e-3:
            out.append(f"rotation about {DIRECTIONS[int(np.argmax(r))]}")
        else:
            out.append("local")
    return out


def _elements_csv(results: RunResults) -> str:
    """element_peaks.csv (COLUMNS["element_peaks"]); a response-spectrum run has no
    times, so its ``time of von mises peak`` column is left out."""
    c = np.asarray(results.model.element_centres, float)
    spec = COLUMNS["element_peaks"]
    cols = [c[:, 0], c[:, 1], c[:, 2]]
    keep = list(spec[:3])
    s = results.stress
    if s is not None:
        timed = bool(results.histories)
        keep += [col for col in spec[3:] if timed or col.label != "time of von mises peak"]
        cols += [s.von_mises, s.tension, s.compression]
        if timed:
            cols.append(results.motion.time_of_step(s.von_mises_step))
        cols.append(np.asarray(results.model.element_part))
    return _csv_text([col.header for col in keep], cols)


def _shapes_csv(results: RunResults, n_shapes: int) -> str:
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
