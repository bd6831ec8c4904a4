"""The run report: one self-contained HTML file built from a run's output folder.

``write_report(out_dir)`` reads ``summary.json`` and the CSV files a run wrote (the
file contract of docs/INTERNALS.md) and writes ``out_dir/report.html``: figures are
embedded PNG data, the style sheet is inline, there are no scripts and no network
resources, and every piece of user text is escaped.
"""
from __future__ import annotations

import datetime as _dt
import hashlib
import re
from pathlib import Path
from typing import Any, Callable, Mapping

import numpy as np

from .. import __version__
from .._atomic import atomic_write_text
from .._cautions import CAUTIONS, SCREENING_NOTE
from .._constants import STANDARD_GRAVITY
from .._progress import Progress
from ..results._schema import REPORT_FILE
from . import _figures as F
from ._html import (CSS, esc, figure, key_values, num, section, table, toml_text,
                    unit_of_key, value_html)
from ._load import OutputFolder, Table, damping_of, label_words, load_output, split_header

__all__ = ["write_report", "render_report", "SECTIONS", "fp_force"]

#: Section ids and headings, in order (ids are stable: tests and links use them).
SECTIONS: tuple[tuple[str, str], ...] = (
    ("inputs", "Inputs"),
    ("model", "Model"),
    ("modes", "Modes"),
    ("results", "Results"),
    ("anchorage", "Anchorage"),
    ("floor-spectra", "Floor spectra"),
    ("warnings", "Warnings"),
    ("cautions", "Cautions"),
    ("provenance", "Provenance"),
)

_MAX_STRIPS = 12
_MAX_TABLE_ROWS = 80


# ----------------------------------------------------------------------------- API
def write_report(out_dir: str | Path, *, path: str | Path | None = None,
                 progress: bool = True) -> Path:
    """Write the HTML report of a run's output folder.

    Parameters
    ----------
    out_dir : path
        Folder written by ``groundshake run`` (summary.json and the CSV files).
    path : path, optional
        Where to write; default ``out_dir/report.html``. Written atomically.
    progress : bool
        Show a progress bar on stderr (only when it is a terminal).

    Returns
    -------
    Path
        The report written.

    Raises
    ------
    InputError
        If ``out_dir`` has no readable summary.json.
    """
    out = Path(out_dir)
    text = render_report(out, progress=progress)
    target = out / REPORT_FILE if path is None else Path(path)
    return atomic_write_text(target, text)


def render_report(out_dir: str | Path, *, progress: bool = True) -> str:
    """The report of ``out_dir`` as HTML text (see :func:`write_report`)."""
    folder = load_output(out_dir)
    builder = _Builder(folder)
    steps: list[tuple[str, Callable[[], str]]] = [
        ("inputs", builder.inputs), ("model", builder.model), ("modes", builder.modes),
        ("results", builder.results), ("anchorage", builder.anchorage),
        ("floor-spectra", builder.floor_spectra),
    ]
    bodies: dict[str, str] = {}
    with Progress("report", total=len(steps) + 1) as bar:
        if not progress:
            bar.enabled = False
        for sid, make in steps:
            bodies[sid] = make()
            bar.advance()
        bodies["warnings"] = builder.warnings()
        bodies["cautions"] = builder.cautions()
        bodies["provenance"] = builder.provenance()
        bar.advance()
    return builder.page(bodies)


# ----------------------------------------------------------------------- helpers
def _get(d: Any, *keys: str, default: Any = None) -> Any:
    for k in keys:
        if not isinstance(d, Mapping) or k not in d:
            return default
        d = d[k]
    return d


def _as_float(v: Any) -> float | None:
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if np.isfinite(f) else None


def _named(d: Any) -> list[tuple[str, Any]]:
    """``{name: obj}`` or ``[{name: ..., ...}]`` as (name, obj) pairs."""
    if isinstance(d, Mapping):
        return [(str(k), v) for k, v in d.items()]
    if isinstance(d, list):
        return [(str(x.get("name", i + 1)) if isinstance(x, Mapping) else str(i + 1), x)
                for i, x in enumerate(d)]
    return []


def _header_cell(table_: Table, i: int) -> str:
    label, unit = split_header(table_.header[i])
    return f"{label} [{unit}]" if unit else label


def fp_force(*, weight: float, sds: float, ap: float = 1.0, rp: float = 2.5,
             ip: float = 1.0, z_over_h: float = 0.0) -> dict[str, float]:
    """Horizontal and vertical equivalent static forces of ASCE 7-16 §13.3.1.

    Fp = 0.4·ap·SDS·Wp·(1 + 2z/h)/(Rp/Ip), held between 0.3·SDS·Ip·Wp and
    1.6·SDS·Ip·Wp; the vertical force is 0.2·SDS·Wp (§13.3.1.2).

    Parameters
    ----------
    weight : float
        Operating weight Wp [N].
    sds : float
        Design short-period spectral acceleration SDS [g].
    ap, rp, ip : float
        Amplification, response-modification and importance factors (–).
    z_over_h : float
        Height of attachment over roof height (0 at grade, 1 at the roof).

    Returns
    -------
    dict
        ``fp`` (the governing value), ``fp_formula``, ``fp_min``, ``fp_max``,
        ``fv`` — all in N.
    """
    z = min(max(float(z_over_h), 0.0), 1.0)
    formula = 0.4 * ap * sds * weight * (1.0 + 2.0 * z) / (rp / ip)
    lo = 0.3 * sds * ip * weight
    hi = 1.6 * sds * ip * weight
    return {"fp": float(min(max(formula, lo), hi)), "fp_formula": float(formula),
            "fp_min": float(lo), "fp_max": float(hi), "fv": float(0.2 * sds * weight)}


# ------------------------------------------------------------------ the builder
class _Builder:
    def __init__(self, folder: OutputFolder):
        self.f = folder
        self.s = folder.summary
        self.scenario = self.s.get("scenario") if isinstance(self.s.get("scenario"), Mapping) else {}
        self.notes: list[str] = list(folder.notes)
        self._grid_cache: Any = False

    # ------------------------------------------------------------------ generic
    def _fig(self, make: Callable[[], Any], caption: str, fid: str = "") -> str:
        """Draw one figure; a failure leaves a note instead of the figure."""
        try:
            fig = make()
            if fig is None:
                return ""
            return figure(F.data_uri(fig), caption, fid=fid)
        except Exception as e:  # a figure must never sink the report
            self.notes.append(f"The figure '{caption}' could not be drawn "
                              f"({type(e).__name__}: {e}).")
            return ""

    def title(self) -> str:
        t = self.s.get("title") or self.scenario.get("title")
        return str(t) if t else self.f.path.name

    # ------------------------------------------------------------------ header
    def key_figures(self) -> str:
        items = []
        bs = _get(self.s, "peaks", "base_shear")
        if isinstance(bs, Mapping):
            for d in ("x", "y"):
                v = _as_float(bs.get(d))
                if v is not None:
                    items.append((f"base shear {d}", f"{num(v)} N"))
        acc = []
        for name, eq in _named(self.s.get("equipment")):
            pa = _get(eq, "peak_absolute_acceleration")
            if isinstance(pa, Mapping):
                acc += [(_as_float(v), name, d) for d, v in pa.items() if _as_float(v) is not None]
        if acc:
            v, name, d = max(acc, key=lambda t: t[0])
            items.append((f"equipment peak acc. ({name}, {d})", f"{num(v)} m/s²"))
        worst = _as_float(_get(self.s, "worst_dc", "value"))
        if worst is None:
            worst = self.worst_dc()
        if worst is not None:
            items.append(("largest demand / entered capacity", num(worst, 3)))
        st = self.s.get("stability")
        if isinstance(st, Mapping):
            for key, label in (("sliding", "least sliding FS"),
                               ("overturning", "least overturning FS")):
                v = _as_float(_get(st, key, "min_safety_factor"))
                if v is not None:
                    items.append((label, num(v, 3)))
            q = _as_float(_get(st, "bearing", "peak_pressure"))
            if q is not None:
                items.append(("peak bearing pressure", f"{num(q / 1e3)} kPa"))
        wi = _as_float(_get(self.s, "worst_interaction", "value"))
        if wi is not None:
            items.append(("largest bolt interaction", num(wi, 3)))
        freq = self.first_frequency()
        if freq is not None:
            items.append(("first mode", f"{num(freq)} Hz"))
        items.append(("warnings", str(len(self.warning_list()))))
        return '<div class="keyfigs">' + "".join(
            f"<div><span>{esc(k)}</span><b>{v}</b></div>" for k, v in items) + "</div>"

    def first_frequency(self) -> float | None:
        t = self.f.table("modes")
        if t is not None and t.n_rows:
            i = t.first("frequency")
            if i is not None:
                return _as_float(np.nanmin(t.column(i)))
        modes = self.s.get("modes")
        if isinstance(modes, Mapping):
            modes = modes.get("modes", modes.get("frequency"))
        if isinstance(modes, list) and modes:
            if isinstance(modes[0], Mapping):
                return _as_float(modes[0].get("frequency"))
            return _as_float(modes[0])
        return None

    # ------------------------------------------------------------------ inputs
    def inputs(self) -> str:
        parts = ["<h3>Scenario as run (every default filled in)</h3>"]
        if self.scenario:
            parts.append(f"<pre>{esc(toml_text(self.scenario))}</pre>")
        else:
            parts.append('<p class="none">summary.json holds no scenario echo.</p>')
        parts.append("<h3>Records and their measures</h3>")
        parts.append(self.records_table())
        parts.append(self.records_figures())
        parts.append("<h3>Ground response spectra</h3>")
        parts.append(self.ground_spectra())
        return "".join(parts)

    def record_list(self) -> list[dict[str, Any]]:
        recs = self.s.get("records")
        out = []
        for name, r in _named(recs):
            if isinstance(r, Mapping):
                d = dict(r)
                d.setdefault("name", name)
                out.append(d)
        return out

    def records_table(self) -> str:
        recs = self.record_list()
        if not recs:
            return '<p class="none">summary.json lists no records.</p>'
        skip = {"name", "history", "metadata", "component", "source", "file", "units", "measures",
                "raw_measures", "processing", "direction"}
        cols: list[str] = []
        rows_measures = []
        for r in recs:
            m = dict(r.get("measures") or {})
            m.update({k: v for k, v in r.items() if k not in skip and _as_float(v) is not None
                      and not isinstance(v, bool)})
            rows_measures.append(m)
            cols += [k for k in m if k not in cols]
        head = ["direction", "record", "component", "file"] + [
            f"{k} [{unit_of_key(k)}]" if unit_of_key(k) else k for k in cols]
        rows = [[r.get("direction", ""), r.get("name"), r.get("component", ""), r.get("source", r.get("file", ""))]
                + [m.get(k) for k in cols] for r, m in zip(recs, rows_measures)]
        html_ = ['<div class="scroll">', table(rows, head), "</div>",
                 "<h3>Processing history</h3>"]
        for r in recs:
            hist = r.get("history") or r.get("processing") or []
            if isinstance(hist, str):
                hist = [hist]
            items = "".join(f"<li>{value_html(h)}</li>" for h in hist) or "<li>as read</li>"
            html_.append(f"<p><b>{esc(r.get('name'))}</b></p><ol>{items}</ol>")
            md = r.get("metadata")
            if isinstance(md, Mapping) and md:
                html_.append("<details><summary>file metadata</summary>"
                             + key_values(md, units=False) + "</details>")
        return "".join(html_)

    def records_figures(self) -> str:
        t = self.f.table("records")
        if t is None or t.n_rows == 0:
            return '<p class="none">records.csv is missing: no before/after plots.</p>'
        time_cols = [i for i in range(len(t.header)) if "time" in label_words(t.header[i])]
        series: dict[str, dict[tuple[str, str], int]] = {}
        for i in range(len(t.header)):
            if i in time_cols or i == 0:
                continue
            w = label_words(t.header[i])
            q = ("acc" if any(x.startswith("acc") for x in w) else
                 "vel" if any(x.startswith("vel") for x in w) else
                 "disp" if any(x.startswith("disp") for x in w) else None)
            state = ("raw" if any(x in ("raw", "uncorrected", "before", "read") for x in w) else
                     "corrected" if any(x in ("corrected", "processed", "after") for x in w)
                     else None)
            if q is None or state is None:
                continue
            rest = [x for x in w if not (x.startswith(("acc", "vel", "disp")) or x in
                                         ("raw", "uncorrected", "before", "read", "as",
                                          "corrected", "processed", "after", "record"))]
            comp = " ".join(rest) or "record"
            series.setdefault(comp, {})[(q, state)] = i

        def time_for(i: int, comp: str, state: str) -> np.ndarray:
            best = 0
            for j in time_cols:
                w = label_words(t.header[j])
                if state in w and (comp in " ".join(w) or best == 0):
                    best = j
            return t.column(best)

        def own_time(state: str) -> bool:
            return any(state in label_words(t.header[j]) for j in time_cols)

        names = {"acc": ("acceleration", "m/s²"), "vel": ("velocity", "m/s"),
                 "disp": ("displacement", "m")}
        out = []
        for comp, cols in series.items():
            rows = []
            for q in ("acc", "vel", "disp"):
                if (q, "raw") not in cols and (q, "corrected") not in cols:
                    continue
                pair = []
                for state in ("raw", "corrected"):
                    i = cols.get((q, state))
                    if i is None:
                        pair.append(None)
                        continue
                    tt = time_for(i, comp, state)
                    if state == "corrected" and own_time(state):
                        # older folders: the corrected series had its own time column
                        # counted from the start of its pad; now one as-read column
                        tt = tt - self.pad_before(comp, cols, time_for)
                    pair.append((tt, t.column(i)))
                unit = t.unit(cols.get((q, "corrected"), cols.get((q, "raw")))) or names[q][1]
                rows.append((names[q][0], unit, pair[0], pair[1]))
            if rows:
                out.append(self._fig(lambda rows=rows, comp=comp: F.record_figure(
                    rows, title=f"component {comp}"),
                    f"Component {comp}: acceleration, velocity and displacement as read (grey) "
                    f"and after correction (colour); the corrected record's leading pad is "
                    f"drawn at negative time, so both share the time of the original record."))
        return "".join(out) or '<p class="none">records.csv has no raw/corrected columns.</p>'

    def pad_before(self, comp: str, cols: Mapping[tuple[str, str], int], time_for) -> float:
        """Length [s] of the zero pad ahead of the corrected record of ``comp``.

        Taken from summary.json (``records[i].pad_before_s`` or its metadata) when
        given; otherwise, when both time columns start together and the corrected
        series is longer, half the difference in length (processing pads both ends
        equally, Boore 2005); else 0.
        """
        for r in self.record_list():
            if str(r.get("direction", r.get("component", ""))).lower() != comp.lower():
                continue
            for src in (r, r.get("metadata") or {}):
                v = _as_float(src.get("pad_before_s")) if isinstance(src, Mapping) else None
                if v is not None:
                    return v
        t = self.f.table("records")
        i_raw = next((cols[k] for k in cols if k[1] == "raw"), None)
        i_cor = next((cols[k] for k in cols if k[1] == "corrected"), None)
        if t is None or i_raw is None or i_cor is None:
            return 0.0
        spans = []
        for i, state in ((i_raw, "raw"), (i_cor, "corrected")):
            tt = time_for(i, comp, state)
            ok = np.isfinite(tt) & np.isfinite(t.column(i))
            if not ok.any():
                return 0.0
            spans.append((float(tt[ok][0]), float(tt[ok][-1])))
        (r0, r1), (c0, c1) = spans
        step = (r1 - r0) / max(1, t.n_rows - 1)
        if abs(r0 - c0) <= step and (c1 - c0) > (r1 - r0) * 1.001:
            return 0.5 * ((c1 - c0) - (r1 - r0))
        return 0.0

    def ground_spectra(self) -> str:
        t = self.f.table("ground_spectra")
        if t is None or t.n_rows == 0:
            return '<p class="none">ground_spectra.csv is missing.</p>'
        per = t.column(0)
        target = [i for i in t.find("target")]
        panels: dict[str, list] = {}
        for i in range(1, len(t.header)):
            if i in target:
                continue
            w = label_words(re.sub(r"\d+(?:\.\d+)?\s*%", " ", t.header[i]))
            comp = " ".join(x for x in w if x not in ("psa", "sa", "ground", "spectrum",
                                                      "damping", "pseudo", "acceleration",
                                                      "spectral", "response", "rotd50",
                                                      "rotd100")) or t.label(i)
            for r in ("rotd50", "rotd100"):
                if r in w:
                    comp = f"{comp} {r.replace('rotd', 'RotD')}".strip()
            d = damping_of(t.header[i])
            key = f"{num(d)} % damping" if d is not None else "ground"
            panels.setdefault(key, []).append((comp, per, t.column(i), "broadened"))
        for key, curves in panels.items():
            for i in target:
                curves.append((t.label(i), per, t.column(i), "target"))
        unit = t.unit(1) if len(t.header) > 1 else "m/s2"
        html_ = self._fig(lambda: F.spectra_figure(list(panels.items()),
                                                   ylabel=f"PSA [{unit or 'm/s²'}]"),
                          "Ground response spectra (pseudo-spectral acceleration) of the corrected "
                          "components" + (", with the target" if target else "") + ".",
                          fid="fig-ground-spectra")
        return html_

    # ------------------------------------------------------------------- model
    def grid(self):
        if self._grid_cache is not False:
            return self._grid_cache
        self._grid_cache = None
        e = self.f.table("element_peaks")
        if e is None or e.n_rows == 0:
            return None
        xyz = self._xyz(e)
        if xyz is None:
            return None
        nodes = None
        m = self.f.table("mode_shapes")
        if m is not None and m.n_rows:
            nodes = self._xyz(m)
        grid = F.voxel_grid(xyz, nodes)
        if grid is None and nodes is not None:
            grid = F.voxel_grid(xyz, None)
        self._grid_cache = grid
        return grid

    @staticmethod
    def _xyz_cols(t: Table) -> list[int] | None:
        idx = []
        for c in ("x", "y", "z"):
            exact = [i for i in range(len(t.header)) if label_words(t.header[i]) in
                     ([c], [c, "centre"], ["centre", c], [c, "center"], ["center", c],
                      ["node", c], [c, "node"])]
            if not exact:
                return None
            idx.append(exact[0])
        return idx

    def _xyz(self, t: Table) -> np.ndarray | None:
        idx = self._xyz_cols(t)
        if idx is None:
            return None
        xyz = t.data[:, idx]
        xyz = xyz[np.all(np.isfinite(xyz), axis=1)]
        return xyz if xyz.size else None

    def part_boxes(self) -> list[tuple[str, np.ndarray, np.ndarray, str]]:
        out = []
        for name, p in _named(self.scenario.get("parts")):
            o, sz = p.get("origin"), p.get("size")
            try:
                lo = np.asarray(o, float).reshape(3)
                hi = lo + np.asarray(sz, float).reshape(3)
            except (TypeError, ValueError):
                continue
            out.append((str(p.get("name", name)), lo, hi, str(p.get("material", ""))))
        return out

    def top_at(self, x: float, y: float) -> float:
        z = [hi[2] for _, lo, hi, _ in self.part_boxes()
             if lo[0] - 1e-9 <= x <= hi[0] + 1e-9 and lo[1] - 1e-9 <= y <= hi[1] + 1e-9]
        if z:
            return float(max(z))
        g = self.grid()
        return float(g.zs[-1]) if g is not None else 0.0

    def equipment_geometry(self):
        boxes, anchors = [], []
        for name, eq in _named(self.scenario.get("equipment")):
            try:
                mx, my = (float(v) for v in eq.get("mount")[:2])
            except (TypeError, ValueError, IndexError):
                continue
            bx, by = (float(v) for v in (eq.get("footprint") or [0.5, 0.5])[:2])
            h = 2.0 * float(eq.get("cg_height") or 0.5)
            z0 = self.top_at(mx, my)
            boxes.append((str(eq.get("name", name)), np.array([mx - bx / 2, my - by / 2, z0]),
                          np.array([mx + bx / 2, my + by / 2, z0 + h])))
            for a in eq.get("anchors") or []:
                try:
                    anchors.append([mx + float(a[0]), my + float(a[1]), z0])
                except (TypeError, ValueError, IndexError):
                    pass
        return boxes, np.array(anchors) if anchors else None

    def sensor_points(self):
        pts = []
        for name, s in _named(self.scenario.get("sensors")):
            try:
                pts.append((str(s.get("name", name)), np.asarray(s.get("at"), float).reshape(3)))
            except (TypeError, ValueError, AttributeError):
                pass
        return pts

    def model(self) -> str:
        grid = self.grid()
        parts = self.part_boxes()
        boxes, anchors = self.equipment_geometry()
        cell_part = None
        if grid is not None and parts:
            cell_part = np.full(grid.filled.shape, -1)
            cx = 0.5 * (grid.xs[1:] + grid.xs[:-1])
            cy = 0.5 * (grid.ys[1:] + grid.ys[:-1])
            cz = 0.5 * (grid.zs[1:] + grid.zs[:-1])
            X, Y, Z = np.meshgrid(cx, cy, cz, indexing="ij")
            for k, (_, lo, hi, _) in enumerate(parts):
                inside = ((X >= lo[0]) & (X <= hi[0]) & (Y >= lo[1]) & (Y <= hi[1])
                          & (Z >= lo[2]) & (Z <= hi[2]) & grid.filled & (cell_part < 0))
                cell_part[inside] = k
        html_ = []
        if grid is not None or parts:
            n_el = int(grid.filled.sum()) if grid is not None else 0
            cap = ("The block as modelled: parts (tinted), " +
                   (f"the mesh of {n_el} hexahedral elements, " if n_el else "") +
                   "the equipment envelope (footprint × twice the height of its centre of mass), "
                   "anchor bolts (triangles) and sensors (stars). Lengths in m.")
            html_.append(self._fig(lambda: F.model_figure(
                grid, cell_part=cell_part, part_names=[p[0] for p in parts],
                part_boxes=[(p[1], p[2]) for p in parts], equipment=boxes, anchors=anchors,
                sensors=self.sensor_points()), cap, fid="fig-model"))
        else:
            html_.append('<p class="none">No geometry to draw (no parts in the scenario echo '
                         'and no element_peaks.csv).</p>')
        mats = _named(self.scenario.get("materials"))
        if mats:
            html_.append("<h3>Materials</h3>")
            html_.append(table([[n, m.get("youngs_modulus"), m.get("poisson_ratio"),
                                 m.get("density")] for n, m in mats if isinstance(m, Mapping)],
                               ["material", "Young's modulus [Pa]", "Poisson's ratio [–]",
                                "density [kg/m³]"]))
        if parts:
            html_.append("<h3>Parts</h3>")
            html_.append(table([[n, mat, list(np.round(lo, 6)), list(np.round(hi - lo, 6))]
                                for n, lo, hi, mat in parts],
                               ["part", "material", "origin x, y, z [m]", "size lx, ly, lz [m]"]))
        model = self.s.get("model")
        support = self.scenario.get("support")
        html_.append("<h3>Support</h3>")
        if isinstance(support, Mapping):
            html_.append(key_values(support))
        springs = {k: v for k, v in (model or {}).items()
                   if isinstance(model, Mapping) and re.search(r"spring|support|soil|imped|dashpot", k)}
        if springs:
            html_.append("<p class=\"note\">Soil springs and dashpots with the formula each "
                         "came from, as the model built them:</p>")
            html_.append(key_values(springs))
        if isinstance(model, Mapping):
            rest = {k: v for k, v in model.items() if k not in springs}
            if rest:
                html_.append("<h3>Mesh and model</h3>")
                html_.append(key_values(rest))
        eqs = _named(self.scenario.get("equipment"))
        if eqs:
            html_.append("<h3>Equipment</h3>")
            keys: list[str] = []
            for _, e in eqs:
                keys += [k for k in e if k not in keys and k != "anchors"]
            rows = [[e.get(k) for k in keys] + [len(e.get("anchors") or [])] for _, e in eqs]
            html_.append('<div class="scroll">' + table(
                rows, [f"{k} [{unit_of_key(k)}]" if unit_of_key(k) and k not in ("fp", "capacity")
                       else k for k in keys] + ["bolts"]) + "</div>")
        sensors = self.sensor_points()
        if sensors:
            html_.append("<h3>Sensors</h3>")
            html_.append(table([[n, list(p)] for n, p in sensors], ["sensor", "at x, y, z [m]"]))
        return "".join(html_)

    # ------------------------------------------------------------------- modes
    def modes(self) -> str:
        html_ = []
        t = self.f.table("modes")
        if t is not None and t.n_rows:
            rows = [[None if not np.isfinite(v) else (int(v) if j == 0 and float(v).is_integer()
                                                      else float(v))
                     for j, v in enumerate(r)] for r in t.data[:_MAX_TABLE_ROWS]]
            html_.append('<div class="scroll">' + table(
                rows, [_header_cell(t, i) for i in range(len(t.header))]) + "</div>")
            if t.n_rows > _MAX_TABLE_ROWS:
                html_.append(f'<p class="note">First {_MAX_TABLE_ROWS} of {t.n_rows} modes; '
                             "all are in modes.csv.</p>")
        else:
            modes = self.s.get("modes")
            if modes:
                html_.append(value_html(modes))
            else:
                html_.append('<p class="none">No modes in this output.</p>')
        info = self.s.get("modes")
        if isinstance(info, Mapping):
            extra = {k: v for k, v in info.items() if not isinstance(v, list)}
            if extra:
                html_.append(key_values(extra))
        html_.append(self.mode_shapes())
        return "".join(html_)

    def mode_shapes(self) -> str:
        m = self.f.table("mode_shapes")
        grid = self.grid()
        if m is None or grid is None or m.n_rows == 0:
            return '<p class="none">mode_shapes.csv is missing: no mode shapes drawn.</p>'
        nodes = self._xyz(m)
        if nodes is None or nodes.shape[0] != m.n_rows:
            return '<p class="none">mode_shapes.csv has no x, y, z columns.</p>'
        index = grid.node_index(nodes)
        if index is None:
            return '<p class="none">mode_shapes.csv nodes are not on the mesh grid.</p>'
        cols: dict[int, dict[str, int]] = {}
        for i in range(len(m.header)):
            mm = re.search(r"mode\D*(\d+)\D*?\bu?([xyz])\b", " ".join(label_words(m.header[i])))
            if mm:
                cols.setdefault(int(mm.group(1)), {})[mm.group(2)] = i
        freqs = {}
        t = self.f.table("modes")
        if t is not None:
            fi = t.first("frequency")
            if fi is not None:
                for r in range(t.n_rows):
                    n = int(t.data[r, 0]) if np.isfinite(t.data[r, 0]) else r + 1
                    freqs[n] = t.data[r, fi]
        shapes = []
        for n in sorted(cols)[:4]:
            c = cols[n]
            u = np.column_stack([m.column(c[d]) if d in c else np.zeros(m.n_rows)
                                 for d in "xyz"])
            f = freqs.get(n)
            shapes.append((f"mode {n}" + (f" · {f:.4g} Hz" if f is not None and np.isfinite(f)
                                          else ""), np.nan_to_num(u)))
        if not shapes:
            return '<p class="none">mode_shapes.csv has no mode columns.</p>'
        return self._fig(lambda: F.mode_shapes_figure(grid, index, shapes),
                         "The first mode shapes, exaggerated (largest displacement drawn as 12 % "
                         "of the block's size); shade runs from the smallest |u| (light) to the "
                         "largest (dark); the dashed box is the undeformed block.",
                         fid="fig-mode-shapes")

    # ----------------------------------------------------------------- results
    def stability(self) -> str:
        """Compact table: sliding, overturning, bearing and bolt interaction per soil case."""
        st = self.s.get("stability")
        if not isinstance(st, Mapping) or not st:
            return ""

        def row(name: str, g, f1, stab: Any, wi: Any) -> list:
            stab = stab if isinstance(stab, Mapping) else {}
            sl, ot, br = (stab.get(k) or {} for k in ("sliding", "overturning", "bearing"))
            q = _as_float(br.get("peak_pressure"))
            return [name, None if g is None else g / 1e6, f1,
                    _as_float(sl.get("min_safety_factor")),
                    _as_float(ot.get("min_safety_factor")), ot.get("edge") or "—",
                    None if q is None else q / 1e3, _as_float(br.get("ratio_to_allowable")),
                    _as_float(_get(wi, "value"))]

        rows = []
        for c in self.s.get("soil_cases") or []:
            if isinstance(c, Mapping):
                modes = c.get("modes") or []
                f1 = _as_float(modes[0].get("frequency")) if modes and isinstance(
                    modes[0], Mapping) else None
                rows.append(row(str(c.get("name")), _as_float(c.get("shear_modulus")), f1,
                                c.get("stability"), c.get("worst_interaction")))
        label = "envelope (governs)" if rows else "this run"
        rows.append(row(label, None, None if rows else self.first_frequency(), st,
                        self.s.get("worst_interaction")))
        sl = st.get("sliding") or {}
        note = ("Rigid-block statics from the base resultants (weights of block and equipment "
                "with the vertical motion): sliding FS = (μN + P)/|V|, overturning FS = "
                "stabilising/overturning moment about each base edge, bearing = peak edge "
                "pressure (linear; the no-tension rigid-base value where contact is lost), bolt "
                "interaction against the entered capacities. Screening comparisons with "
                "user-entered values, not a code check.")
        if sl.get("min_safety_factor") is None and sl.get("note"):
            note += " " + str(sl["note"]) + "."
        cases = [c for c in self.s.get("soil_cases") or [] if isinstance(c, Mapping)]
        if cases and _as_float(cases[0].get("modulus_ratio")) not in (None, 1.0):
            note += (f" G is the strain-compatible modulus, G/G0 = "
                     f"{num(_as_float(cases[0]['modulus_ratio']), 3)} "
                     f"({cases[0].get('modulus_source', '')}).")
        if len(cases) > 1:
            note += " " + str(self.s.get("soil_case_practice", ""))
        return ('<div class="stability"><h3>Foundation stability</h3>'
                + f'<p class="note">{esc(note)}</p>'
                + table(rows, ["soil case", "G [MPa]", "first mode [Hz]", "sliding FS min",
                               "overturning FS min", "edge", "peak bearing [kPa]",
                               "bearing / allowable", "bolt interaction max"]) + "</div>")

    def results(self) -> str:
        html_ = [self.spectrum_note(), "<h3>Governing peaks</h3>"]
        peaks = self.s.get("peaks")
        html_.append(key_values(peaks) if isinstance(peaks, Mapping) and peaks
                     else '<p class="none">No peaks in summary.json.</p>')
        for group, label in (("sensors", "sensor"), ("equipment", "equipment")):
            rows = []
            for name, obj in _named(self.s.get(group)):
                if not isinstance(obj, Mapping):
                    continue
                for q, v in obj.items():
                    if isinstance(v, Mapping) and any(d in v for d in ("x", "y", "z")):
                        u = unit_of_key(q)
                        rows.append([name, f"{q} [{u}]" if u else q,
                                     *(_as_float(v.get(d)) for d in ("x", "y", "z"))])
                    elif _as_float(v) is not None and not isinstance(v, bool):
                        u = unit_of_key(q)
                        rows.append([name, f"{q} [{u}]" if u else q, _as_float(v), None, None])
            if rows:
                html_.append(f"<h3>Peaks at each {label}</h3>")
                html_.append(table(rows, [label, "quantity", "x", "y", "z"]))
        stresses = self.s.get("stresses")
        html_.append("<h3>Stresses</h3>")
        if isinstance(stresses, Mapping) and stresses:
            html_.append(key_values(stresses))
        html_.append(self.stress_figure())
        base = self.s.get("base")
        html_.append("<h3>Base reactions</h3>")
        if isinstance(base, Mapping) and base:
            html_.append(key_values(base))
        html_.append(self.history_figures())
        return "".join(html_)

    def spectrum_note(self) -> str:
        """For a response-spectrum run: what its peaks are (signs and times lost)."""
        an = self.s.get("analysis")
        if not (isinstance(an, Mapping) and an.get("method") == "spectrum"):
            return ""
        items = "".join(f"<li>{esc(str(a))}</li>" for a in an.get("assumptions") or [])
        out = ('<p class="note">Response-spectrum analysis of the design spectrum: every '
               "value below is a peak magnitude estimated on its own, without sign or time; "
               "peaks of different quantities need not occur together.</p>"
               f"<ul>{items}</ul>")
        side = an.get("spectrum_motions")
        if isinstance(side, Mapping) and side.get("comparison"):
            rows = [[r.get("quantity"), _as_float(r.get("spectrum")),
                     _as_float(r.get("time_history_mean")), _as_float(r.get("time_history_sd")),
                     _as_float(r.get("ratio"))]
                    for r in side["comparison"] if isinstance(r, Mapping)]
            out += (f"<h3>Side by side: spectrum method and {esc(str(side.get('n')))} "
                    "spectrum-compatible motions</h3>"
                    + table(rows, ["quantity", "spectrum method", "time-history mean",
                                   "standard deviation", "ratio"])
                    + f'<p class="note">{esc(str(side.get("note", "")))}</p>')
        return out

    def stress_figure(self) -> str:
        e = self.f.table("element_peaks")
        grid = self.grid()
        if e is None or grid is None:
            return '<p class="none">element_peaks.csv is missing or not on a box grid: ' \
                   'no stress figure.</p>'
        i = e.first("von mises") or e.first("mises") or e.first("vm")
        if i is None:
            return '<p class="none">element_peaks.csv has no von Mises column.</p>'
        cols = self._xyz_cols(e)
        ok = np.all(np.isfinite(e.data[:, cols]), axis=1)
        v = e.column(i)[ok]
        if v.size != int(grid.filled.sum()) and v.size != grid.index.shape[0]:
            return '<p class="none">element_peaks.csv rows do not match its mesh.</p>'
        top = float(np.nanmax(v)) if v.size else 0.0
        where = ""
        if v.size and np.isfinite(top):
            k = int(np.nanargmax(v))
            c = e.data[ok][k, cols]
            where = f" The largest, {num(top / 1e6)} MPa, is in the element centred at " \
                    f"({c[0]:.3g}, {c[1]:.3g}, {c[2]:.3g}) m."
        html_ = self._fig(lambda: F.stress_figure(grid, v),
                          "Peak von Mises stress of each element over the record, shown on the "
                          "block's outer faces (colour scale in MPa)." + where,
                          fid="fig-stress")
        rows = []
        for words, name in ((("von mises",), "von Mises"), (("tension",), "principal tension"),
                            (("compression",), "principal compression")):
            j = e.first(*words)
            if j is not None and np.any(np.isfinite(e.column(j))):
                col = e.column(j)
                rows.append([name, float(np.nanmax(np.abs(col)))])
        if rows:
            html_ += table(rows, ["largest element peak", f"value [{e.unit(i) or 'Pa'}]"])
        return html_

    def history_figures(self) -> str:
        h = self.f.table("histories")
        if h is None or h.n_rows == 0:
            return '<p class="none">histories.csv is missing: no time histories.</p>'
        time = h.column(0)
        used = {0}
        out = []

        def strips(cols: list[int]):
            """Columns that differ only in a direction or a number share one strip."""
            groups: dict[tuple[str, str], list[tuple[str, np.ndarray]]] = {}
            for i in cols:
                words = label_words(h.header[i])
                tag = [w for w in words if w in ("x", "y", "z") or w.isdigit()]
                key = " ".join(w for w in words if w not in tag) or h.label(i)
                groups.setdefault((key, h.unit(i)), []).append((" ".join(tag), h.column(i)))
            return [(key, curves, unit) for (key, unit), curves in groups.items()]

        def add(cols: list[int], title: str, caption: str, fid: str = "") -> None:
            cols = [c for c in cols if c not in used]
            if not cols:
                return
            used.update(cols)
            groups = strips(cols)
            shown = groups[:_MAX_STRIPS]
            extra = (f" ({len(groups) - len(shown)} more groups of columns in histories.csv.)"
                     if len(groups) > len(shown) else "")
            out.append(self._fig(lambda: F.strip_figure(time, shown, title=title),
                                 caption + extra, fid=fid))

        ground = h.find("ground")
        base = [i for i in h.find("base") if i not in ground]
        if not base:
            base = [i for i in range(1, len(h.header))
                    if set(label_words(h.header[i])) & {"fx", "fy", "fz", "mx", "my", "mz"}]
        add(base, "base resultants", "Resultants the block exerts on its support, about the "
                  "centre of the base face (forces in N, moments in N·m). Time axes of these "
                  "figures are cropped to the strong shaking when the record is much longer.",
            fid="fig-base")
        add(ground, "ground motion", "Ground acceleration driving the model.")
        for group in ("sensors", "equipment"):
            names = [n for n, _ in _named(self.s.get(group))]
            if not names:
                names = [n for n, _ in _named(self.scenario.get(group))]
            for name in sorted(names, key=len, reverse=True):
                cols = [i for i in range(1, len(h.header))
                        if name.lower() in split_header(h.header[i])[0].lower()]
                anchors = [i for i in cols if set(label_words(h.header[i])) & {"anchor", "bolt",
                                                                                "anchors", "bolts"}]
                add([i for i in cols if i not in anchors],
                    f"{group[:-1] if group == 'sensors' else 'equipment'} {name}",
                    f"Histories at {'sensor' if group == 'sensors' else 'equipment'} '{name}'.")
                add(anchors, f"anchor bolts of {name}",
                    f"Bolt forces of '{name}' (tension positive).")
        rest = [i for i in range(1, len(h.header)) if i not in used]
        if rest:
            add(rest, "other histories", "Other columns of histories.csv.")
        return "".join(out)

    # --------------------------------------------------------------- anchorage
    def anchor_rows(self):
        """(equipment name, rows, capacity) for each equipment with bolts."""
        scen_eq = {n: e for n, e in _named(self.scenario.get("equipment"))
                   if isinstance(e, Mapping)}
        scen_eq.update({str(e.get("name")): e for e in scen_eq.values() if e.get("name")})
        out = []
        for name, eq in _named(self.s.get("equipment")):
            if not isinstance(eq, Mapping):
                continue
            anchors = eq.get("anchors") or []
            if not isinstance(anchors, list) or not anchors:
                continue
            cap = eq.get("capacity") or _get(scen_eq.get(name, {}), "capacity") or {}
            positions = _get(scen_eq.get(name, {}), "anchors") or []
            rows = []
            for k, a in enumerate(anchors):
                if not isinstance(a, Mapping):
                    continue
                t = _as_float(a.get("peak_tension"))
                v = _as_float(a.get("peak_shear"))
                ct = _as_float((a.get("capacity") or {}).get("tension") if isinstance(
                    a.get("capacity"), Mapping) else None) or _as_float(
                    cap.get("tension") if isinstance(cap, Mapping) else None)
                cv = _as_float((a.get("capacity") or {}).get("shear") if isinstance(
                    a.get("capacity"), Mapping) else None) or _as_float(
                    cap.get("shear") if isinstance(cap, Mapping) else None)
                dct = _as_float(a.get("dc_tension"))
                dcv = _as_float(a.get("dc_shear"))
                if dct is None and t is not None and ct:
                    dct = max(t, 0.0) / ct
                if dcv is None and v is not None and cv:
                    dcv = v / cv
                pos = positions[k] if k < len(positions) else a.get("position")
                rows.append({"bolt": k + 1, "position": pos, "tension": t, "shear": v,
                             "cap_t": ct, "cap_v": cv, "dc_t": dct, "dc_v": dcv,
                             "ir": _as_float(a.get("interaction_ratio"))})
            out.append((name, rows))
        return out

    def worst_dc(self) -> float | None:
        vals = [d for _, rows in self.anchor_rows() for r in rows
                for d in (r["dc_t"], r["dc_v"]) if d is not None]
        return max(vals) if vals else None

    def anchorage(self) -> str:
        html_ = ['<p class="note">Peak bolt forces over the record, from the equipment\'s base '
                 "reactions shared among its bolts. Demand/capacity ratios compare these peaks "
                 "with the capacities entered in the scenario: a screening comparison, not a "
                 "code check.</p>"]
        found = False
        for name, rows in self.anchor_rows():
            found = True
            html_.append(f"<h3>{esc(name)}</h3>")
            body, classes = [], []
            for r in rows:
                over = any(d is not None and d > 1.0 for d in (r["dc_t"], r["dc_v"], r["ir"]))
                have = r["dc_t"] is not None or r["dc_v"] is not None
                body.append([r["bolt"], r["position"], r["tension"], r["shear"], r["cap_t"],
                             r["cap_v"], r["dc_t"], r["dc_v"], r["ir"],
                             "above entered capacity" if over else
                             ("within entered capacity" if have else "no capacity entered")])
                classes.append("over" if over else "")
            html_.append(table(body, ["bolt", "offset from mount x, y [m]", "peak tension [N]",
                                      "peak shear [N]", "entered tension capacity [N]",
                                      "entered shear capacity [N]", "D/C tension [–]",
                                      "D/C shear [–]", "tension–shear interaction [–]",
                                      "screening comparison"],
                               row_classes=classes))
        if not found:
            html_.append('<p class="none">No anchor bolts in this scenario.</p>')
        html_.append(self.fp_section())
        return "".join(html_)

    def fp_section(self) -> str:
        scen_eq = {str(e.get("name", n)): e for n, e in _named(self.scenario.get("equipment"))
                   if isinstance(e, Mapping)}
        out = []
        for name, eq in _named(self.s.get("equipment")) or list(scen_eq.items()):
            if not isinstance(eq, Mapping):
                continue
            given = eq.get("fp")
            params = _get(scen_eq.get(name, {}), "fp")
            if isinstance(given, Mapping) and given:
                out.append(f"<h3>Fp comparison: {esc(name)}</h3>")
                rows, used = [], set()
                for q, a, b in (("bolt tension [N]", "peak_tension", "time_history_peak_tension"),
                                ("bolt shear [N]", "peak_shear", "time_history_peak_shear")):
                    fa, fb = _as_float(given.get(a)), _as_float(given.get(b))
                    if fa is not None and fb is not None:
                        rows.append([q, fa, fb, fb / fa if fa > 0 else None])
                        used.update((a, b))
                if rows:
                    out.append('<p class="note">Largest bolt forces under the equivalent static '
                               "force Fp (from the parameters entered) beside the time-history "
                               "peaks: a screening comparison, not a code check.</p>"
                               + table(rows, ["quantity", "under Fp (static)",
                                              "time-history peak", "ratio [–]"]))
                out.append(key_values({k: v for k, v in given.items() if k not in used}))
                continue
            if not isinstance(params, Mapping) or _as_float(params.get("sds")) is None:
                continue
            mass = _as_float(_get(scen_eq.get(name, {}), "mass"))
            if mass is None:
                continue
            kw = {k: float(params[k]) for k in ("ap", "rp", "ip", "z_over_h")
                  if _as_float(params.get(k)) is not None}
            fp = fp_force(weight=mass * STANDARD_GRAVITY, sds=float(params["sds"]), **kw)
            pa = eq.get("peak_absolute_acceleration") if isinstance(eq, Mapping) else None
            ah = max((_as_float(pa.get(d)) or 0.0) for d in ("x", "y")) if isinstance(pa, Mapping) else None
            av = _as_float(pa.get("z")) if isinstance(pa, Mapping) else None
            rows = [["horizontal", fp["fp"], None if ah is None else mass * ah,
                     None if ah is None or fp["fp"] <= 0 else mass * ah / fp["fp"]],
                    ["vertical", fp["fv"], None if av is None else mass * av,
                     None if av is None or fp["fv"] <= 0 else mass * av / fp["fv"]]]
            out.append(f"<h3>Fp comparison: {esc(name)}</h3>"
                       '<p class="note">Equivalent static force of ASCE 7-16 §13.3.1 (Fp = '
                       "0.4·ap·SDS·Wp·(1 + 2z/h)/(Rp/Ip), between 0.3 and 1.6·SDS·Ip·Wp; vertical "
                       "0.2·SDS·Wp) from the parameters entered, beside the peak inertial force "
                       "of the time history (mass × peak absolute acceleration at the centre of "
                       "mass). A screening comparison, not a code check.</p>"
                       + table(rows, ["direction", "Fp from the entered parameters [N]",
                                      "time-history peak m·a [N]", "ratio [–]"])
                       + key_values({"formula value": fp["fp_formula"], "lower bound": fp["fp_min"],
                                     "upper bound": fp["fp_max"]}, units=False))
        return "".join(out)

    # ------------------------------------------------------------ floor spectra
    def floor_spectra(self) -> str:
        html_ = []
        info = self.s.get("floor_spectra")
        if isinstance(info, Mapping) and info:
            small = {k: v for k, v in info.items()
                     if not (isinstance(v, list) and len(v) > 24)}
            html_.append(key_values(small))
        t = self.f.table("floor_spectra")
        if t is None or t.n_rows == 0:
            html_.append('<p class="none">floor_spectra.csv is missing.</p>')
            return "".join(html_)
        per = t.column(0)
        known = {"psa", "sa", "raw", "broadened", "unbroadened", "damping", "envelope", "ground",
                 "floor", "spectrum", "spectra", "abs", "pseudo", "absolute", "acceleration",
                 "spectral", "response", "target", "of", "at", "point"}
        points: dict[str, list] = {}
        ground: dict[str, list] = {}
        env: dict[str, list] = {}
        for i in range(1, len(t.header)):
            w = set(label_words(t.header[i]))
            d = damping_of(t.header[i])
            dl = f"{num(d)} %" if d is not None else ""
            rest = [x for x in label_words(re.sub(r"\d+(?:\.\d+)?\s*(?:%|pct|percent)", " ",
                                                  t.header[i])) if x not in known]
            kind = "raw" if (w & {"raw", "unbroadened"}) else "broadened"
            if "ground" in w:
                ground.setdefault(dl, []).append((f"ground {' '.join(rest)} {dl}".strip(), per,
                                                  t.column(i), "ground"))
            elif "envelope" in w:
                env.setdefault(" ".join(rest), []).append(
                    (f"{kind} {dl}".strip(), per, t.column(i), kind))
            else:
                points.setdefault(" ".join(rest) or "point", []).append(
                    (f"{kind} {dl}".strip(), per, t.column(i), kind))
        if not ground:
            g = self.f.table("ground_spectra")
            if g is not None and g.n_rows:
                for i in range(1, len(g.header)):
                    if "target" in label_words(g.header[i]):
                        continue
                    d = damping_of(g.header[i])
                    dl = f"{num(d)} %" if d is not None else ""
                    comp = " ".join(x for x in label_words(re.sub(r"\d+(?:\.\d+)?\s*%", " ",
                                                                   g.header[i])) if x not in known)
                    ground.setdefault(dl, []).append((f"ground {comp} {dl}".strip(),
                                                      g.column(0), g.column(i), "ground"))

        def with_ground(curves, direction: str | None = None):
            dls = {c[0].split(maxsplit=1)[1] for c in curves if " " in c[0]}
            extra = []
            for dl, cs in ground.items():
                if dls and dl and dl not in dls:
                    continue
                for c in cs:
                    dirs = {x for x in c[0].split() if x in ("x", "y", "z")}
                    if direction is None or not dirs or direction in dirs:
                        extra.append(c)
            return list(curves) + extra[:6]

        panels = []
        for name, curves in points.items():
            direction = next((x for x in name.split() if x in ("x", "y", "z")), None)
            panels.append((name, with_ground(curves, direction)))
        env_panels = [(f"envelope {name}".strip(),
                       with_ground(c, next((x for x in name.split() if x in ("x", "y", "z")),
                                           None)))
                      for name, c in env.items()]
        unit = t.unit(1) if len(t.header) > 1 else ""
        cap = ("Floor response spectra (PSA) at each point: unbroadened (thin) and broadened "
               "(thick), with the ground spectrum (dotted).")
        if panels:
            html_.append(self._fig(lambda: F.spectra_figure(panels, ylabel=f"PSA [{unit or 'm/s²'}]"),
                                   cap, fid="fig-floor-spectra"))
        if env_panels:
            html_.append(self._fig(lambda: F.spectra_figure(env_panels,
                                                            ylabel=f"PSA [{unit or 'm/s²'}]"),
                                   "Envelope of the floor response spectra over all points.",
                                   fid="fig-floor-envelope"))
        if not panels and not env_panels:
            html_.append('<p class="none">floor_spectra.csv has no spectra columns.</p>')
        return "".join(html_)

    # ---------------------------------------------------------------- warnings
    def warning_list(self) -> list[str]:
        w = self.s.get("warnings") or []
        if isinstance(w, (str, Mapping)):
            w = [w]
        out = []
        for x in w:
            if isinstance(x, Mapping):
                out.append(str(x.get("message") or x.get("text") or x))
            else:
                out.append(str(x))
        return out

    def warnings(self) -> str:
        ws = self.warning_list()
        html_ = ['<p class="note">Automatic checks of this run.</p>']
        if ws:
            html_.append('<ul class="warn">' + "".join(f"<li>{esc(x)}</li>" for x in ws) + "</ul>")
        else:
            html_.append('<p class="none">No automatic warnings for this run.</p>')
        if self.notes:
            html_.append("<h3>Notes from the report writer</h3><ul>"
                         + "".join(f"<li>{esc(n)}</li>" for n in self.notes) + "</ul>")
        return "".join(html_)

    def cautions(self) -> str:
        items = list(CAUTIONS)
        extra = self.s.get("cautions") or []
        for c in extra if isinstance(extra, list) else [extra]:
            if str(c) not in items:
                items.append(str(c))
        return ('<ol class="cautions">' + "".join(f"<li>{esc(c)}</li>" for c in items) + "</ol>")

    def provenance(self) -> str:
        prov = self.s.get("provenance")
        html_ = []
        if isinstance(prov, Mapping) and prov:
            html_.append(key_values(prov, units=False))
        else:
            html_.append('<p class="none">summary.json holds no provenance.</p>')
        analysis = self.s.get("analysis")
        if isinstance(analysis, Mapping) and analysis:
            html_.append("<h3>Analysis settings</h3>" + key_values(analysis))
        files = []
        for p in sorted(self.f.path.glob("*")):
            if p.is_file() and p.suffix in (".json", ".csv"):
                files.append([p.name, p.stat().st_size, _sha256(p)])
        html_.append("<h3>Files this report was built from</h3>")
        html_.append(table(files, ["file", "bytes", "SHA-256"]))
        html_.append(key_values({"report written by": f"groundshake {__version__}",
                                 "report written at (UTC)":
                                     _dt.datetime.now(_dt.timezone.utc).strftime(
                                         "%Y-%m-%d %H:%M:%S")}, units=False))
        return "".join(html_)

    # -------------------------------------------------------------------- page
    def page(self, bodies: Mapping[str, str]) -> str:
        title = self.title()
        prov = self.s.get("provenance") if isinstance(self.s.get("provenance"), Mapping) else {}
        when = prov.get("date") or prov.get("time") or ""
        version = prov.get("version") or prov.get("groundshake") or __version__
        toc = "".join(f'<a href="#{sid}">{esc(name)}</a>' for sid, name in SECTIONS)
        sections = "".join(section(sid, name, bodies.get(sid, "")) for sid, name in SECTIONS)
        return (
            "<!DOCTYPE html>\n"
            '<html lang="en"><head><meta charset="utf-8">'
            '<meta name="viewport" content="width=device-width, initial-scale=1">'
            f'<meta name="generator" content="groundshake {esc(__version__)}">'
            f"<title>{esc(title)} — groundshake screening report</title>"
            f"<style>{CSS}</style></head><body>"
            '<header class="top">'
            f"<h1>{esc(title)}</h1>"
            f'<div class="sub">Screening report · groundshake {esc(version)}'
            + (f" · run {esc(when)}" if when else "") +
            f" · output folder {esc(_folder_name(self.f.path))}</div>"
            f'<div class="banner">{esc(SCREENING_NOTE)} Linear-elastic model; verify against '
            "the governing code and have a licensed engineer review. See "
            '<a href="#cautions">Cautions</a>.</div>'
            + self.key_figures() + self.stability() +
            f'<nav class="toc">{toc}</nav></header>'
            f"<main>{sections}</main>"
            f"<footer>{esc(SCREENING_NOTE)} Generated by groundshake {esc(__version__)}.</footer>"
            "</body></html>\n")


def _folder_name(path: Path) -> str:
    """The folder's name; inside a run's temporary folder (``.NAME.xxxx.part``, see
    groundshake._atomic) the name it will have once moved into place."""
    m = re.match(r"^\.(.+)\.[^.]+\.part$", path.name)
    return m.group(1) if m else path.name


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()
