"""The run report: one self-contained HTML file built from a run's output folder.

``write_report(out_dir)`` reads the files a run wrote, through the output contract
(``groundshake.results._schema``: file names, CSV headers, summary keys and their
quantity kinds), and writes ``out_dir/report.html``. The answers come first; tables have
plain headings and engineering units (SI or US customary); the inputs are a folded
appendix. Figures are embedded PNG data, the style sheet is inline, there are no
scripts and no network resources, and every piece of user text is escaped.
"""
from __future__ import annotations

import datetime as _dt
import hashlib
from pathlib import Path
from typing import Any, Callable, Mapping

import numpy as np

from .. import __version__
from .._atomic import atomic_write_text
from .._cautions import CAUTIONS, SCREENING_NOTE
from .._errors import InputError
from .._progress import Progress
from ..results._schema import (COLUMNS, DIRECTIONS, FILES, HISTORY_BASE, header, history_label,
                               iter_values, kind_of)
from . import _figures as F
from ._html import CSS, esc, figure, raw, section, table, toml_text
from ._load import OutputFolder, load_output
from ._units import check_system, display_unit, fmt, to_display

__all__ = ["write_report", "render_report", "SECTIONS"]

#: Section ids and headings, in order (ids are stable: tests and links use them).
SECTIONS: tuple[tuple[str, str], ...] = (
    ("summary", "Summary"),
    ("model", "Model"),
    ("modes", "Modes"),
    ("response", "Response of the block"),
    ("anchorage", "Anchorage"),
    ("floor-spectra", "Floor response spectra"),
    ("motion", "Ground motion"),
    ("inputs", "Appendix: inputs"),
    ("provenance", "Provenance"),
)

_DIR_WORDS = {"x": "x", "y": "y", "z": "z (vertical)"}


# ----------------------------------------------------------------------------- API
def write_report(out_dir: str | Path, *, path: str | Path | None = None,
                 progress: bool = True, units: str | None = None) -> Path:
    """Write the HTML report of a run's output folder.

    Parameters
    ----------
    out_dir : path
        Folder written by ``groundshake run`` (summary.json, the CSV files, mesh.json).
    path : path, optional
        Where to write; default ``out_dir/report.html``. Written atomically.
    progress : bool
        Show a progress bar on stderr (only when it is a terminal).
    units : {"si", "us"}, optional
        Display units; default the scenario's ``[report] units``, else ``"si"``.

    Returns
    -------
    Path
        The report written.

    Raises
    ------
    InputError
        If ``out_dir`` has no readable summary.json, or ``units`` is not si/us.
    """
    out = Path(out_dir)
    text = render_report(out, progress=progress, units=units)
    target = out / FILES["report"] if path is None else Path(path)
    return atomic_write_text(target, text)


def render_report(out_dir: str | Path, *, progress: bool = True, units: str | None = None) -> str:
    """The report of ``out_dir`` as HTML text (see :func:`write_report`)."""
    folder = load_output(out_dir)
    if units is None:
        scen = folder.summary.get("scenario") or {}
        units = ((scen.get("report") or {}).get("units") if isinstance(scen, Mapping) else None) or "si"
    try:
        check_system(str(units))
    except ValueError as e:
        raise InputError(f"report units: {e}") from None
    b = _Builder(folder, str(units))
    steps: list[tuple[str, Callable[[], str]]] = [
        ("model", b.model), ("modes", b.modes), ("response", b.response),
        ("anchorage", b.anchorage), ("floor-spectra", b.floor_spectra), ("motion", b.motion),
        ("inputs", b.inputs), ("provenance", b.provenance), ("summary", b.summary)]
    bodies: dict[str, str] = {}
    with Progress("report", total=len(steps)) as bar:
        if not progress:
            bar.enabled = False
        for sid, make in steps:
            bodies[sid] = make()
            bar.advance()
    return b.page(bodies)


# ----------------------------------------------------------------------- helpers
def _get(d: Any, *keys: Any, default: Any = None) -> Any:
    for k in keys:
        if isinstance(d, Mapping) and k in d:
            d = d[k]
        elif isinstance(d, list) and isinstance(k, int) and -len(d) <= k < len(d):
            d = d[k]
        else:
            return default
    return d


def _f(v: Any) -> float | None:
    if isinstance(v, bool):
        return None
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if np.isfinite(f) else None


def _named(d: Any) -> list[tuple[str, Any]]:
    if isinstance(d, Mapping):
        return [(str(k), v) for k, v in d.items()]
    if isinstance(d, list):
        return [(str(x.get("name", i + 1)) if isinstance(x, Mapping) else str(i + 1), x)
                for i, x in enumerate(d)]
    return []


def _sentence(text: str) -> str:
    text = str(text).strip()
    return text[:1].upper() + text[1:] if text else text


# ------------------------------------------------------------------ the builder
class _Builder:
    def __init__(self, folder: OutputFolder, system: str):
        self.f = folder
        self.s = folder.summary
        self.sys = system
        scen = self.s.get("scenario")
        self.scenario = scen if isinstance(scen, Mapping) else {}
        self.notes: list[str] = list(folder.notes)
        self.ref: dict[str, float] = {}
        for path, v in iter_values(self.s):
            k = kind_of(path)
            fv = _f(v)
            if k and fv is not None:
                self.ref[k] = max(self.ref.get(k, 0.0), abs(fv))
        self._grid: Any = False

    # ---------------------------------------------------------------- numbers
    def n(self, value: Any, kind: str | None, *, digits: int = 3) -> str:
        """A number in display units (no unit), round-off shown as 0."""
        return fmt(value, kind, self.sys, ref=self.ref.get(kind) if kind else None,
                   digits=digits)

    def q(self, value: Any, kind: str, *, digits: int = 3) -> str:
        """A number with its display unit."""
        if _f(value) is None:
            return "—"
        u = display_unit(kind, self.sys)
        return self.n(value, kind, digits=digits) + (("" if u == "%" else "\u202f") + u if u else "")

    def h(self, label: str, kind: str | None) -> str:
        """A column heading with its display unit."""
        u = display_unit(kind, self.sys) if kind else ""
        return f"{label} [{u}]" if u else label

    def cell(self, value: Any, kind: str | None, *, digits: int = 3) -> Any:
        return raw(f'<span class="n">{esc(self.n(value, kind, digits=digits))}</span>')

    def _fig(self, make: Callable[[], Any], caption: str, fid: str = "") -> str:
        """Draw one figure; a failure leaves a note instead of the figure."""
        try:
            fig = make()
            if fig is None:
                return ""
            return figure(F.data_uri(fig), caption, fid=fid)
        except Exception as e:  # a figure must never sink the report
            self.notes.append(f"The figure '{caption[:60]}' could not be drawn "
                              f"({type(e).__name__}: {e}).")
            return ""

    def title(self) -> str:
        t = self.s.get("title") or self.scenario.get("title")
        return str(t) if t else self.f.path.name

    # ------------------------------------------------------------ exceedances
    def exceedances(self) -> list[str]:
        """Every comparison above 1 (or a safety factor below 1) and lost contact, in words."""
        out = []
        for name, eq in _named(self.s.get("equipment")):
            for k, a in enumerate(_get(eq, "anchors") or [], start=1):
                for key, what in (("dc_tension", "tension"), ("dc_shear", "shear"),
                                  ("interaction_ratio", "tension–shear interaction")):
                    v = _f(_get(a, key))
                    if v is not None and v > 1.0:
                        out.append(f"Bolt {k} of {name}: {what} demand is {self.n(v, 'ratio')} "
                                   f"times the capacity entered (above 1).")
        st = self.s.get("stability") if isinstance(self.s.get("stability"), Mapping) else {}
        for key, what in (("sliding", "sliding"), ("overturning", "overturning")):
            v = _f(_get(st, key, "min_safety_factor"))
            if v is not None and v < 1.0:
                out.append(f"Least {what} safety factor {self.n(v, 'ratio')} is below 1.")
        v = _f(_get(st, "bearing", "ratio_to_allowable"))
        if v is not None and v > 1.0:
            out.append(f"Peak bearing pressure is {self.n(v, 'ratio')} times the allowable entered.")
        c = _get(self.s, "base", "contact")
        if isinstance(c, Mapping) and c.get("uplift"):
            out.append(f"The base loses contact: the linear contact pressure falls to "
                       f"{self.q(c.get('min_pressure'), 'pressure')} at "
                       f"{self.q(c.get('time_of_min_pressure'), 'time')}; the bonded-spring "
                       f"model does not hold there.")
        return out

    def warning_list(self) -> list[str]:
        w = self.s.get("warnings") or []
        if isinstance(w, (str, Mapping)):
            w = [w]
        return [str(x.get("message") or x) if isinstance(x, Mapping) else str(x) for x in w]

    # ------------------------------------------------------------------ summary
    def summary(self) -> str:
        rows: list[list[Any]] = []
        classes: list[str] = []

        def add(label, value, kind, where="", over=False):
            rows.append([label, self.cell(value, kind), display_unit(kind, self.sys) if kind else "",
                         where])
            classes.append("over" if over else "")

        pk = self.s.get("peaks") or {}
        bp = _get(self.s, "base", "peaks") or {}
        for d, key in (("x", "Fx"), ("y", "Fy")):
            add(f"Peak base shear, {d}", _get(pk, "base_shear", d), "force",
                self._when(_get(bp, key, "time")))
        add("Peak vertical base force (dynamic part)", _get(pk, "base_axial"), "force",
            self._when(_get(bp, "Fz", "time")))
        for d, key in (("x", "Mx"), ("y", "My")):
            add(f"Peak overturning moment about {d}", _get(pk, "overturning_moment", d),
                "moment", self._when(_get(bp, key, "time")))
        rd = _get(pk, "relative_displacement") or {}
        if isinstance(rd, Mapping) and rd:
            d = max(rd, key=lambda k: _f(_get(rd, k, "value")) or 0.0)
            add("Peak displacement relative to the ground", _get(rd, d, "value"), "displacement",
                f"{d}, at {self._at(_get(rd, d, 'at'))}, {self._when(_get(rd, d, 'time'))}")
        st = self.s.get("stresses") or {}
        vm = _get(st, "von_mises")
        if isinstance(vm, Mapping):
            away = _get(vm, "away_from_features", "value")
            if _f(away) is not None:
                add("Peak von Mises stress (away from local features)", away, "stress",
                    f"at {self._at(_get(vm, 'away_from_features', 'at'))}")
            add("Peak von Mises stress (anywhere)", vm.get("value"), "stress",
                f"at {self._at(vm.get('at'))}" + (f", {vm['feature']}" if vm.get("feature") else ""))
        elif _f(pk.get("von_mises")) is not None:
            add("Peak von Mises stress", pk.get("von_mises"), "stress")
        pt = _get(st, "principal_tension")
        if isinstance(pt, Mapping):
            add("Peak principal tension", pt.get("value"), "stress", f"at {self._at(pt.get('at'))}")
        c = _get(self.s, "base", "contact")
        if isinstance(c, Mapping):
            add("Peak contact pressure under the base", c.get("peak_pressure"), "pressure",
                self._when(c.get("time_of_peak_pressure")))
            add("Least contact pressure (negative: uplift)", c.get("min_pressure"), "pressure",
                self._when(c.get("time_of_min_pressure")), over=bool(c.get("uplift")))
        stab = self.s.get("stability") if isinstance(self.s.get("stability"), Mapping) else {}
        for key, label in (("sliding", "Least sliding safety factor"),
                           ("overturning", "Least overturning safety factor")):
            v = _f(_get(stab, key, "min_safety_factor"))
            if v is not None:
                case = _get(stab, key, "case")
                where = self._when(_get(stab, key, "time"))
                add(label, v, "ratio", (f"{case} soil, " if case else "") + where, over=v < 1.0)
        q = _f(_get(stab, "bearing", "peak_pressure"))
        if q is not None:
            r = _f(_get(stab, "bearing", "ratio_to_allowable"))
            add("Peak bearing pressure (no-tension base)", q, "pressure",
                "" if r is None else f"{self.n(r, 'ratio')} × allowable entered",
                over=r is not None and r > 1.0)
        for name, eq in _named(self.s.get("equipment")):
            pa = _get(eq, "peak_absolute_acceleration") or {}
            if isinstance(pa, Mapping) and pa:
                d = max(pa, key=lambda k: _f(pa[k]) or 0.0)
                add(f"Peak acceleration of {name} (centre of mass)", pa[d], "acceleration", d)
        w = self.s.get("worst_dc")
        if isinstance(w, Mapping) and _f(w.get("value")) is not None:
            v = float(w["value"])
            add("Largest bolt demand / entered capacity", v, "ratio",
                f"{w.get('equipment')}, bolt {w.get('bolt')}", over=v > 1.0)
        wi = self.s.get("worst_interaction")
        if isinstance(wi, Mapping) and _f(wi.get("value")) is not None:
            v = float(wi["value"])
            add("Largest bolt tension–shear interaction", v, "ratio",
                f"{wi.get('equipment')}, bolt {wi.get('bolt')}", over=v > 1.0)
        for md in (_get(self.s, "modes", "modes") or [])[:3]:
            if isinstance(md, Mapping):
                add(f"Mode {md.get('mode')} frequency", md.get("frequency"), "frequency",
                    self._direction_words(md.get("dominant_direction")))
        html_ = [table(rows, ["quantity", "value", "unit", "where, when"], row_classes=classes,
                       cls="grid answers")]
        cases = [c for c in self.s.get("soil_cases") or [] if isinstance(c, Mapping)]
        if cases:
            html_.append('<p class="note">Peaks are the envelope over the soil cases ' + ", ".join(
                f"{esc(c.get('name'))} (G = {esc(self.q(c.get('shear_modulus'), 'modulus'))})"
                for c in cases) + ".</p>")
        ex = self.exceedances()
        ws = self.warning_list()
        if ex:
            html_.append('<h3>Exceedances</h3><ul class="exceed">'
                         + "".join(f"<li>{esc(x)}</li>" for x in ex) + "</ul>")
        else:
            html_.append('<p class="ok">No entered capacity or safety factor is exceeded.</p>')
        if ws:
            html_.append(f'<h3>Warnings of this run ({len(ws)})</h3><ul class="warn">'
                         + "".join(f"<li>{esc(_sentence(x))}</li>" for x in ws) + "</ul>")
        else:
            html_.append('<p class="none">No automatic warnings for this run.</p>')
        html_.append('<h3>Cautions</h3><ol class="cautions">'
                     + "".join(f"<li>{esc(c)}</li>" for c in self.caution_list()) + "</ol>")
        return "".join(html_)

    def caution_list(self) -> list[str]:
        items = list(CAUTIONS)
        extra = self.s.get("cautions") or []
        for c in extra if isinstance(extra, list) else [extra]:
            if str(c) not in items:
                items.append(str(c))
        return items

    def _when(self, t: Any) -> str:
        return "" if _f(t) is None else f"t = {self.q(t, 'time')}"

    def _at(self, p: Any) -> str:
        try:
            xyz = [float(v) for v in p]
        except (TypeError, ValueError):
            return "—"
        return "(" + ", ".join(self.n(v, "length") for v in xyz) + f") {display_unit('length', self.sys)}"

    def _character(self, dom: str, rot: list[float]) -> str:
        """Words for a mode: its dominant direction, and the rocking that goes with a sway
        when a rotation holds 20 % or more."""
        words = self._direction_words(dom)
        if dom in ("x", "y"):
            k = int(np.argmax(rot))
            if rot[k] >= 0.2 and k < 2:
                words += f", rocking about {DIRECTIONS[k]}"
        return words

    @staticmethod
    def _direction_words(d: Any) -> str:
        if not d:
            return ""
        d = str(d)
        return {"x": "sways in x", "y": "sways in y", "z": "vertical"}.get(
            d, "torsion" if d == "rotation about z" else d)

    # ------------------------------------------------------------------- model
    def grid(self):
        if self._grid is not False:
            return self._grid
        self._grid = None
        m = self.f.mesh
        if isinstance(m, Mapping) and isinstance(m.get("lines"), Mapping) and m.get("cells"):
            xs, ys, zs = (np.asarray(m["lines"][a], float) for a in "xyz")
            idx = np.asarray(m["cells"], int).reshape(-1, 3)
            filled = np.zeros((xs.size - 1, ys.size - 1, zs.size - 1), bool)
            filled[tuple(idx.T)] = True
            self._grid = F.VoxelGrid(xs=xs, ys=ys, zs=zs, index=idx, filled=filled)
        return self._grid

    def model(self) -> str:
        grid = self.grid()
        m = self.f.mesh if isinstance(self.f.mesh, Mapping) else {}
        md = self.s.get("model") if isinstance(self.s.get("model"), Mapping) else {}
        html_ = []
        if grid is not None:
            parts = [str(p) for p in m.get("parts", [])]
            cell_part = np.full(grid.filled.shape, -1)
            cp = np.asarray(m.get("cell_part", np.zeros(grid.index.shape[0])), int)
            cell_part[tuple(grid.index.T)] = cp
            boxes = [(e["name"], np.asarray(e["footprint_lo"], float),
                      np.asarray(e["footprint_hi"], float)
                      + [0, 0, 2.0 * (float(e["cg"][2]) - float(e["footprint_lo"][2]))])
                     for e in m.get("equipment", [])]
            anchors = [a for e in m.get("equipment", []) for a in e.get("anchors", [])]
            sensors = [(s["name"], np.asarray(s["at"], float)) for s in m.get("sensors", [])]
            html_.append(self._fig(lambda: F.model_figure(
                grid, cell_part=cell_part, part_names=parts, equipment=boxes,
                anchors=np.asarray(anchors, float) if anchors else None, sensors=sensors),
                f"The block as modelled: {int(grid.filled.sum())} hexahedral elements, the "
                "equipment envelope (footprint × twice the height of its centre of mass), anchor "
                "bolts (triangles) and sensors (stars). Lengths in m.", fid="fig-model"))
        rows = []
        mats = _named(md.get("materials"))
        for name, mat in mats:
            rows.append([f"Material {name}: Young's modulus, Poisson's ratio, density",
                         f"{self.q(_get(mat, 'youngs_modulus'), 'modulus')}, "
                         f"{self.n(_get(mat, 'poisson_ratio'), 'ratio')}, "
                         f"{self.q(_get(mat, 'density'), 'density')}"])
        rows.append(["Elements, nodes, degrees of freedom",
                     f"{md.get('n_elements', '—')} {md.get('element', '')}, {md.get('n_nodes', '—')}, "
                     f"{md.get('n_dof', '—')}"])
        if _f(md.get("weight")) is not None:
            rows.append(["Weight of block and equipment", self.q(md.get("weight"), "weight")])
        sup = md.get("support") if isinstance(md.get("support"), Mapping) else {}
        base = md.get("base") if isinstance(md.get("base"), Mapping) else {}
        if base:
            rows.append(["Base footprint", f"{self.n(base.get('lx'), 'length')} × "
                         f"{self.n(base.get('ly'), 'length')} {display_unit('length', self.sys)}"])
        rows.append(["Support", str(sup.get("kind", "—"))])
        if _f(sup.get("shear_modulus")) is not None:
            rows.append(["Soil shear modulus", self.q(sup["shear_modulus"], "modulus")])
        html_.append(table(rows, ["item", "value"], cls="grid kv2"))
        springs = sup.get("springs") if isinstance(sup.get("springs"), Mapping) else {}
        dash = sup.get("dashpots") if isinstance(sup.get("dashpots"), Mapping) else {}
        if springs:
            srows = []
            for d in ("x", "y", "z"):
                srows.append([f"translation {d}", self.cell(springs.get(f"k_{d}"), "stiffness"),
                              self.cell(dash.get(f"c_{d}"), "dashpot"),
                              f"rotation about {d}", self.cell(springs.get(f"k_r{d}"), "rotational_stiffness"),
                              self.cell(dash.get(f"c_r{d}"), "rotational_dashpot")])
            html_.append("<h3>Soil springs and dashpots</h3>" + table(
                srows, ["motion", self.h("stiffness", "stiffness"), self.h("dashpot", "dashpot"),
                        "motion", self.h("stiffness", "rotational_stiffness"),
                        self.h("dashpot", "rotational_dashpot")]))
            formulas = sup.get("formulas") or []
            if formulas:
                html_.append('<p class="note">' + esc(" ".join(str(x) for x in formulas)) + "</p>")
        eqs = [(n, e) for n, e in _named(self.s.get("equipment")) if isinstance(e, Mapping)]
        if eqs:
            erows = []
            for name, e in eqs:
                fh = e.get("frequency_hz")
                erows.append([name, self.cell(e.get("mass"), "mass"),
                              self._at(e.get("cg")),
                              "rigid" if not fh else ", ".join(self.n(v, "frequency") for v in fh),
                              self.cell(e.get("damping"), "damping"), len(e.get("anchors") or [])])
            html_.append("<h3>Equipment</h3>" + table(
                erows, ["equipment", self.h("mass", "mass"), "centre of mass",
                        self.h("support frequency x, y, z", "frequency"),
                        self.h("damping", "damping"), "bolts"]))
        return "".join(html_)

    # ------------------------------------------------------------------- modes
    def modes(self) -> str:
        t = self.f.table("modes")
        if t is None or t.n_rows == 0:
            return '<p class="none">No modes in this output.</p>'
        cols = {c.label: c for c in COLUMNS["modes"]}

        def col(label):
            return t.get(cols[label].header)

        dom = t.strings(cols["dominant direction"].header) or [""] * t.n_rows
        rows = []
        for i in range(min(t.n_rows, 30)):
            rows.append([int(col("mode")[i]), self.cell(col("frequency")[i], "frequency"),
                         self.cell(col("period")[i], "time"),
                         self.cell(col("damping")[i], "damping", digits=2),
                         *(self.cell(100 * col(f"effective mass ratio {d}")[i], "percent", digits=2)
                           for d in DIRECTIONS),
                         *(self.cell(100 * col(f"rotational participation {d}")[i], "percent",
                                     digits=2) for d in DIRECTIONS),
                         self._character(dom[i], [col(f"rotational participation {d}")[i]
                                                  for d in DIRECTIONS])])
        self.ref["percent"] = 100.0
        html_ = ['<p class="note">Effective mass in each direction and rotational participation '
                 "(the same ratio for a rigid rotation about axes through the centre of the base), "
                 "in percent of the total; values below round-off show as 0.</p>",
                 table(rows, ["mode", self.h("frequency", "frequency"), self.h("period", "time"),
                              self.h("damping", "damping"),
                              *(f"mass {d} [%]" for d in DIRECTIONS),
                              *(f"rotation about {d} [%]" for d in DIRECTIONS), "character"])]
        if t.n_rows > 30:
            html_.append(f'<p class="note">First 30 of {t.n_rows} modes; all are in modes.csv.</p>')
        cap = _get(self.s, "analysis", "retained_mass_ratio")
        if isinstance(cap, Mapping):
            html_.append('<p class="note">Mass held by the modes kept: ' + ", ".join(
                f"{d} {self.n(100 * (_f(cap.get(d)) or 0), 'percent', digits=4)} %"
                for d in DIRECTIONS) + "; the rest is carried by the missing-mass term.</p>")
        html_.append(self.mode_shapes())
        return "".join(html_)

    def mode_shapes(self) -> str:
        m = self.f.table("mode_shapes")
        grid = self.grid()
        mesh = self.f.mesh if isinstance(self.f.mesh, Mapping) else {}
        if m is None or grid is None or not mesh.get("node_cells"):
            return ""
        index = np.asarray(mesh["node_cells"], int).reshape(-1, 3)
        if index.shape[0] != m.n_rows:
            return '<p class="none">mode_shapes.csv and mesh.json do not hold the same nodes.</p>'
        modes_t = self.f.table("modes")
        freq = modes_t.get(header("frequency", "frequency")) if modes_t is not None else None
        shapes = []
        for k in range(1, 5):
            cs = [m.get(header(f"mode {k} u{d}", "length")) for d in DIRECTIONS]
            if any(c is None for c in cs):
                break
            f = freq[k - 1] if freq is not None and k - 1 < freq.size else None
            shapes.append((f"mode {k}" + (f" · {self.q(f, 'frequency')}" if f is not None else ""),
                           np.nan_to_num(np.column_stack(cs))))
        if not shapes:
            return ""
        return self._fig(lambda: F.mode_shapes_figure(grid, index, shapes),
                         "The first mode shapes, exaggerated (largest displacement drawn as 12 % of "
                         "the block's size); shade runs from the smallest displacement (light) to "
                         "the largest (dark); the dashed box is the undeformed block.",
                         fid="fig-mode-shapes")

    # ---------------------------------------------------------------- response
    def response(self) -> str:
        html_ = []
        bp = _get(self.s, "base", "peaks") or {}
        if isinstance(bp, Mapping) and bp:
            rows = []
            for key, what, kind in (("Fx", "shear x", "force"), ("Fy", "shear y", "force"),
                                    ("Fz", "vertical force", "force"),
                                    ("Mx", "overturning moment about x", "moment"),
                                    ("My", "overturning moment about y", "moment"),
                                    ("Mz", "torsion about z", "moment")):
                p = bp.get(key)
                if isinstance(p, Mapping):
                    rows.append([what, self.cell(p.get("value"), kind),
                                 display_unit(kind, self.sys), self.cell(p.get("time"), "time")])
            html_.append("<h3>Base resultants</h3>"
                         '<p class="note">Peaks of the forces the block exerts on its support, '
                         "about the centre of the base (dynamic part; the weight is not "
                         "included).</p>"
                         + table(rows, ["resultant", "peak", "unit", self.h("time", "time")]))
        html_.append(self.stress_table())
        html_.append(self.contact_table())
        html_.append(self.points_table())
        html_.append(self.history_figures())
        return "".join(html_)

    def stress_table(self) -> str:
        st = self.s.get("stresses")
        if not isinstance(st, Mapping):
            return ""
        rows = []
        for key, what in (("von_mises", "von Mises"), ("principal_tension", "principal tension"),
                          ("principal_compression", "principal compression (negative)")):
            e = st.get(key)
            if not isinstance(e, Mapping):
                continue
            away = e.get("away_from_features") if isinstance(e.get("away_from_features"), Mapping) else {}
            rows.append([what, self.cell(e.get("value"), "stress"), self._at(e.get("at")),
                         str(e.get("feature") or ""), self.cell(away.get("value"), "stress"),
                         self._at(away.get("at")) if away else "—"])
        if not rows:
            return ""
        html_ = ["<h3>Stresses</h3>", table(rows, [
            "stress", self.h("peak", "stress"), "at", "local feature there",
            self.h("peak away from features", "stress"), "at"])]
        if st.get("points"):
            text = _sentence(st["points"])
            html_.append(f'<p class="note">{esc(text if text.endswith(".") else text + ".")}</p>')
        html_.append(self.stress_figure())
        return "".join(html_)

    def stress_figure(self) -> str:
        e = self.f.table("element_peaks")
        grid = self.grid()
        if e is None or grid is None:
            return ""
        v = e.get(header("von mises", "stress"))
        if v is None or v.size != grid.index.shape[0] or not np.any(np.isfinite(v)):
            return ""
        unit = display_unit("stress", self.sys)
        top = float(np.nanmax(v))
        return self._fig(lambda: F.stress_figure(grid, v, unit=unit,
                                                 factor=to_display(1.0, "stress", self.sys)),
                         "Peak von Mises stress of each element over the record on the block's "
                         f"outer faces; the largest element value is {self.q(top, 'stress')}.",
                         fid="fig-stress")

    def contact_table(self) -> str:
        c = _get(self.s, "base", "contact")
        st = self.s.get("stability") if isinstance(self.s.get("stability"), Mapping) else {}
        rows, classes = [], []
        if isinstance(c, Mapping):
            rows.append(["contact pressure from the weight alone", self.cell(c.get("static_pressure"), "pressure"), ""])
            rows.append(["peak contact pressure (linear)", self.cell(c.get("peak_pressure"), "pressure"),
                         self._when(c.get("time_of_peak_pressure"))])
            rows.append(["least contact pressure (linear; negative is uplift)",
                         self.cell(c.get("min_pressure"), "pressure"), self._when(c.get("time_of_min_pressure"))])
            classes += ["", "", "over" if c.get("uplift") else ""]
        for key, what in (("sliding", "least sliding safety factor"),
                          ("overturning", "least overturning safety factor")):
            e = st.get(key) if isinstance(st.get(key), Mapping) else None
            if e is None:
                continue
            v = _f(e.get("min_safety_factor"))
            extra = f", edge {e['edge']}" if e.get("edge") else ""
            if v is None and key == "sliding":
                shown = "not evaluated (no friction coefficient entered)"
            else:
                shown = self.cell(v, "ratio") if v is not None else "not evaluated"
            rows.append([what, shown, self._when(e.get("time")) + extra])
            classes.append("over" if v is not None and v < 1.0 else "")
        br = st.get("bearing") if isinstance(st.get("bearing"), Mapping) else None
        if br is not None and _f(br.get("peak_pressure")) is not None:
            r = _f(br.get("ratio_to_allowable"))
            rows.append(["peak bearing pressure (no-tension base)", self.cell(br["peak_pressure"], "pressure"),
                         self._when(br.get("time")) + ("" if r is None else
                                                        f"; {self.n(r, 'ratio')} × allowable entered")])
            classes.append("over" if r is not None and r > 1.0 else "")
        cases = []
        for case in self.s.get("soil_cases") or []:
            if isinstance(case, Mapping):
                cases.append([str(case.get("name", "")),
                              self.cell(case.get("shear_modulus"), "modulus"),
                              self.cell(_get(case, "modes", 0, "frequency"), "frequency"),
                              self.cell(_get(case, "stability", "sliding", "min_safety_factor"), "ratio"),
                              self.cell(_get(case, "stability", "overturning", "min_safety_factor"), "ratio"),
                              self.cell(_get(case, "stability", "bearing", "peak_pressure"), "pressure")])
        if not rows and not cases:
            return ""
        note = ('<p class="note">Rigid-base statics from the base resultants with the weights: '
                "screening comparisons with the values entered, not a code check.</p>")
        html_ = ("<h3>Contact and stability</h3>" + note
                 + table(rows, ["quantity", self.h("value", "pressure") + " or factor", "when, where"],
                         row_classes=classes))
        if cases:
            html_ += ("<h4>Soil cases</h4>" + table(cases, [
                "soil case", self.h("shear modulus G", "modulus"), self.h("first mode", "frequency"),
                "least sliding safety factor", "least overturning safety factor",
                self.h("peak bearing pressure", "pressure")])
                + '<p class="note">The peaks of this report are the envelope over these cases.</p>')
        return html_

    def points_table(self) -> str:
        rows = []
        for group, word in (("sensors", "sensor"), ("equipment", "equipment")):
            for name, obj in _named(self.s.get(group)):
                if not isinstance(obj, Mapping):
                    continue
                pa = obj.get("peak_absolute_acceleration") or {}
                rd = obj.get("peak_relative_displacement") or {}
                rows.append([f"{word} {name}",
                             *(self.cell(_get(pa, d), "acceleration") for d in DIRECTIONS),
                             *(self.cell(_get(rd, d), "displacement") for d in DIRECTIONS)])
        if not rows:
            return ""
        return ("<h3>Peaks at sensors and equipment</h3>"
                + table(rows, ["point", *(self.h(f"acceleration {d}", "acceleration") for d in DIRECTIONS),
                               *(self.h(f"displacement {d}", "displacement") for d in DIRECTIONS)])
                + '<p class="note">Acceleration is absolute; displacement is relative to the '
                  "ground. Equipment values are at its centre of mass.</p>")

    def _hist(self, col) -> np.ndarray | None:
        h = self.f.table("histories")
        if h is None:
            return None
        v = h.get(col.header)
        return None if v is None else to_display(1.0, col.kind, self.sys) * v

    def history_figures(self) -> str:
        h = self.f.table("histories")
        if h is None or h.n_rows == 0:
            return ""
        time = h.get(header("time", "time"))
        if time is None:
            return ""
        out = []
        fu, mu = display_unit("force", self.sys), display_unit("moment", self.sys)
        strips = []
        forces = [(c.label.split()[-1], self._hist(c)) for c in HISTORY_BASE[:3]]
        strips.append(("base forces Fx, Fy, Fz", [(n, v) for n, v in forces if v is not None], fu))
        moments = [(c.label.split()[-1], self._hist(c)) for c in HISTORY_BASE[3:]]
        strips.append(("base moments Mx, My, Mz", [(n, v) for n, v in moments if v is not None], mu))
        ground = [(d, self._hist(history_label("ground acc", direction=d))) for d in DIRECTIONS]
        strips.insert(0, ("ground acceleration", [(d, v) for d, v in ground if v is not None],
                          display_unit("acceleration", self.sys)))
        strips = [s for s in strips if s[1]]
        if strips:
            out.append(self._fig(lambda: F.strip_figure(time, strips),
                                 "Ground acceleration and the resultants the block exerts on its "
                                 "support, on the time of the record as read (each strip on its "
                                 "own scale; the axis is cropped to the shaking).", fid="fig-base"))
        pts = []
        for group in ("sensors", "equipment"):
            for name, _ in _named(self.s.get(group)):
                acc = [(d, self._hist(history_label("abs acc", name=name, direction=d))) for d in DIRECTIONS]
                acc = [(d, v) for d, v in acc if v is not None]
                if acc:
                    pts.append((f"{name}: absolute acceleration", acc,
                                display_unit("acceleration", self.sys)))
        eq_strips = []
        for name, eq in _named(self.s.get("equipment")):
            k = len(_get(eq, "anchors") or [])
            ax = [(f"bolt {b}", self._hist(history_label("tension", name=name, bolt=b)))
                  for b in range(1, k + 1)]
            sh = [(f"bolt {b}", self._hist(history_label("shear", name=name, bolt=b)))
                  for b in range(1, k + 1)]
            ax = [(n, v) for n, v in ax if v is not None]
            sh = [(n, v) for n, v in sh if v is not None]
            if ax:
                eq_strips.append((f"{name}: bolt axial force, tension positive", ax, fu))
            if sh:
                eq_strips.append((f"{name}: bolt shear", sh, fu))
        if pts or eq_strips:
            out.append(self._fig(lambda: F.strip_figure(time, pts + eq_strips),
                                 "Absolute acceleration at sensors and equipment, and the bolt "
                                 "forces (axial force drawn signed: tension above zero, compression "
                                 "below; the marked value is the largest tension).",
                                 fid="fig-points"))
        return "".join(out)

    # --------------------------------------------------------------- anchorage
    def anchorage(self) -> str:
        html_ = ['<p class="note">Peak bolt forces over the record, from the equipment\'s base '
                 "reactions shared among its bolts (rigid plate, elastic bolt group). "
                 "Demand/capacity ratios compare these peaks with the capacities entered in the "
                 "scenario: a screening comparison, not a code check.</p>"]
        found = False
        for name, eq in _named(self.s.get("equipment")):
            anchors = _get(eq, "anchors") or []
            if not anchors:
                continue
            found = True
            cap = eq.get("capacity") if isinstance(eq.get("capacity"), Mapping) else {}
            body, classes = [], []
            has_ir = any(_f(_get(a, "interaction_ratio")) is not None for a in anchors)
            for k, a in enumerate(anchors, start=1):
                dct, dcv = _f(_get(a, "dc_tension")), _f(_get(a, "dc_shear"))
                ir = _f(_get(a, "interaction_ratio"))
                over = any(d is not None and d > 1.0 for d in (dct, dcv, ir))
                have = dct is not None or dcv is not None
                pos = _get(a, "position") or []
                row = [k, ", ".join(self.n(v, "length") for v in pos),
                       self.cell(_get(a, "peak_tension"), "force"),
                       self.cell(_get(a, "peak_shear"), "force"),
                       raw(f'<b class="dc">{esc(self.n(dct, "ratio"))}</b>'),
                       raw(f'<b class="dc">{esc(self.n(dcv, "ratio"))}</b>')]
                if has_ir:
                    row.append(raw(f'<b class="dc">{esc(self.n(ir, "ratio"))}</b>'))
                row.append("ABOVE the capacity entered" if over else
                           ("within the capacity entered" if have else "no capacity entered"))
                body.append(row)
                classes.append("over" if over else "")
            heads = ["bolt", self.h("offset from mount x, y", "length"), self.h("peak tension", "force"),
                     self.h("peak shear", "force"), "D/C tension", "D/C shear"]
            if has_ir:
                heads.append("interaction")
            heads.append("screening comparison")
            capt = ""
            if cap:
                capt = (f" Capacities entered per bolt: tension {self.q(cap.get('tension'), 'force')}, "
                        f"shear {self.q(cap.get('shear'), 'force')}.")
            html_.append(f"<h3>{esc(name)}</h3>")
            if capt:
                html_.append(f'<p class="note">{esc(capt.strip())}</p>')
            html_.append(table(body, heads, row_classes=classes))
            fp = eq.get("fp")
            if isinstance(fp, Mapping) and _f(fp.get("fp")) is not None:
                rows = [["horizontal force Fp", self.cell(fp.get("fp"), "force"), ""],
                        ["vertical force Fv", self.cell(fp.get("fv"), "force"), ""]]
                for label, a, b in (("bolt tension", "peak_tension", "time_history_peak_tension"),
                                    ("bolt shear", "peak_shear", "time_history_peak_shear")):
                    fa, fb = _f(fp.get(a)), _f(fp.get(b))
                    rows.append([f"largest {label}: under Fp / time history",
                                 raw(f'<span class="n">{esc(self.n(fa, "force"))} / '
                                     f'{esc(self.n(fb, "force"))}</span>'),
                                 "" if not fa else f"ratio {self.n(fb / fa, 'ratio')}"])
                html_.append(f"<h4>Equivalent static force ({esc(fp.get('source') or 'Fp')})</h4>"
                             + table(rows, ["quantity", self.h("value", "force"), "comparison"])
                             + '<p class="note">From the parameters entered; a screening '
                               "comparison, not a code check.</p>")
        if not found:
            html_.append('<p class="none">No anchor bolts in this scenario.</p>')
        return "".join(html_)

    # ------------------------------------------------------------ floor spectra
    def floor_spectra(self) -> str:
        t = self.f.table("floor_spectra")
        if t is None or t.n_rows == 0:
            return '<p class="none">No floor response spectra in this output.</p>'
        c = COLUMNS["floor_spectra"]
        point, dirs = t.strings(c[0].header), t.strings(c[1].header)
        damp, per = t.get(c[2].header), t.get(c[3].header)
        psa, psab = t.get(c[4].header), t.get(c[5].header)
        if any(x is None for x in (point, dirs, damp, per, psa, psab)):
            return '<p class="none">floor_spectra.csv does not follow the output contract.</p>'
        point, dirs = np.asarray(point), np.asarray(dirs)
        g = to_display(1.0, "acceleration", self.sys)
        curves: dict[tuple[str, str, float], tuple[np.ndarray, np.ndarray, np.ndarray]] = {}
        for key in dict.fromkeys(zip(point, dirs, damp)):
            sel = (point == key[0]) & (dirs == key[1]) & (damp == key[2])
            curves[key] = (per[sel], g * psa[sel], g * psab[sel])
        top = max((float(np.nanmax(b)) for _, _, b in curves.values() if b.size), default=0.0)
        # a direction without motion holds only round-off: left out of table and figure
        curves = {k: v for k, v in curves.items()
                  if v[2].size and float(np.nanmax(np.abs(v[2]))) > 1e-9 * top}
        rows = []
        for (p, d, z), (pp, a, b) in curves.items():
            if p == "envelope":
                continue
            i = int(np.nanargmax(b))
            rows.append([p, d, self.cell(z, "damping"),
                         raw(f'<span class="n">{esc(_round3(np.nanmax(a)))}</span>'),
                         raw(f'<span class="n">{esc(_round3(b[i]))}</span>'),
                         self.cell(pp[i], "time"), raw(f'<span class="n">{esc(_round3(a[-1] if pp[-1] < pp[0] else a[0]))}</span>')])
        unit = display_unit("acceleration", self.sys)
        html_ = [table(rows, ["point", "direction", self.h("damping", "damping"),
                              f"peak PSA [{unit}]", f"peak PSA broadened [{unit}]",
                              self.h("at period", "time"), f"PSA at the shortest period [{unit}]"])]
        info = self.s.get("floor_spectra") if isinstance(self.s.get("floor_spectra"), Mapping) else {}
        if info.get("broadening"):
            html_.append(f'<p class="note">Broadening ±{self.n(info.get("broadening_percent"), "percent")} %: '
                         f'{esc(info["broadening"])}.</p>')
        panels = []
        for d in DIRECTIONS:
            cs = []
            for (p, dd, z), (pp, a, b) in curves.items():
                if dd != d:
                    continue
                lab = f"{p} {self.n(z, 'damping')} %"
                cs.append((lab, pp, b, "envelope" if p == "envelope" else "broadened"))
            if cs:
                panels.append((f"direction {_DIR_WORDS[d]}", cs))
        if panels:
            html_.append(self._fig(lambda: F.spectra_figure(panels, ylabel=f"PSA [{unit}]", columns=3,
                                                            shared_legend=True),
                                   "Broadened floor response spectra (pseudo-spectral acceleration) "
                                   "at each point and damping, with their envelope over the points (thick black, one "
                                   "line style per damping).",
                                   fid="fig-floor-spectra"))
        return "".join(html_)

    # ------------------------------------------------------------------ motion
    def record_list(self) -> list[dict[str, Any]]:
        return [dict(r) for r in self.s.get("records") or [] if isinstance(r, Mapping)]

    def motion(self) -> str:
        html_ = []
        recs = self.record_list()
        measures = (("pga", "PGA", "acceleration"), ("pgv", "PGV", "velocity"),
                    ("pgd", "PGD", "displacement"), ("arias_intensity", "Arias intensity", "arias"),
                    ("d5_95", "significant duration D5–95", "time"), ("cav", "CAV", "velocity"))
        rows = []
        for r in recs:
            m = r.get("measures") if isinstance(r.get("measures"), Mapping) else r
            rows.append([_DIR_WORDS.get(str(r.get("direction")), r.get("direction", "")),
                         r.get("name", ""), Path(str(r.get("source") or "")).name,
                         *(self.cell(_get(m, k), kind) for k, _, kind in measures)])
        if rows:
            html_.append(table(rows, ["direction", "record", "file",
                                      *(self.h(lab, kind) for _, lab, kind in measures)]))
            items = []
            for r in recs:
                hist = r.get("history") or []
                if hist:
                    items.append(f"<li><b>{esc(r.get('name'))}</b>: "
                                 + esc("; ".join(str(x) for x in hist)) + "</li>")
            if items:
                html_.append("<details><summary>Processing of each record</summary><ul>"
                             + "".join(items) + "</ul></details>")
        html_.append(self.records_figure())
        html_.append(self.ground_spectra())
        html_.append(self.matching())
        return "".join(html_)

    def records_figure(self) -> str:
        t = self.f.table("records")
        if t is None or t.n_rows == 0:
            return ""
        time = t.get(header("time", "time"))
        if time is None:
            return ""
        kinds = (("acc", "acceleration", "acceleration"), ("vel", "velocity", "velocity"),
                 ("disp", "displacement", "displacement"))
        figs = []
        for d in DIRECTIONS:
            rows = []
            for short, kind, word in kinds:
                si = {"acceleration": "m/s2", "velocity": "m/s", "displacement": "m"}[kind]
                a, b = t.get(f"{d} raw {short} [{si}]"), t.get(f"{d} corrected {short} [{si}]")
                if a is None and b is None:
                    continue
                fac = to_display(1.0, kind, self.sys)
                rows.append((word, display_unit(kind, self.sys),
                             None if a is None else (time, fac * a),
                             None if b is None else (time, fac * b)))
            if rows:
                figs.append((d, rows))
        out = []
        matched = _get(self.s, "motion", "matching") or {}
        for d, rows in figs:
            what = "corrected and matched to the target" if d in matched else "corrected"
            out.append(self._fig(lambda rows=rows, d=d: F.record_figure(rows, title=f"direction {_DIR_WORDS[d]}"),
                                 f"Direction {_DIR_WORDS[d]}: acceleration, velocity and displacement "
                                 f"as read (grey, dashed) and {what} (blue), on the time of the "
                                 "record as read (pads added by processing lie outside it).",
                                 fid=f"fig-record-{d}"))
        return "".join(out)

    def ground_spectra(self) -> str:
        t = self.f.table("ground_spectra")
        if t is None or t.n_rows == 0:
            return ""
        c = COLUMNS["ground_spectra"]
        dirs = t.strings(c[0].header)
        damp, per, psa = (t.get(x.header) for x in c[1:])
        if dirs is None or damp is None or per is None or psa is None:
            return '<p class="none">ground_spectra.csv does not follow the output contract.</p>'
        dirs = np.asarray(dirs)
        g = to_display(1.0, "acceleration", self.sys)
        unit = display_unit("acceleration", self.sys)
        target = None
        if np.any(dirs == "target"):
            sel = dirs == "target"
            target = (per[sel], g * psa[sel])
        panels = []
        top = float(np.nanmax(np.abs(psa))) if psa.size else 0.0
        for d in DIRECTIONS:
            cs = []
            for z in dict.fromkeys(damp[dirs == d]):
                sel = (dirs == d) & (damp == z)
                if not np.nanmax(np.abs(psa[sel]), initial=0.0) > 1e-9 * top:
                    continue                      # no motion in this direction: round-off
                cs.append((f"{self.n(z, 'damping')} % damping", per[sel], g * psa[sel], "broadened"))
            if target is not None and cs and d != "z":          # a horizontal target
                cs.append(("target (horizontal)", target[0], target[1], "target"))
            if cs:
                panels.append((f"direction {_DIR_WORDS[d]}", cs))
        if not panels:
            return ""
        return self._fig(lambda: F.spectra_figure(panels, ylabel=f"PSA [{unit}]", columns=3,
                                                  shared_legend=True),
                         "Response spectra (pseudo-spectral acceleration) of the corrected ground "
                         "motion" + (", with the target" if target is not None else "") + ".",
                         fid="fig-ground-spectra")

    def matching(self) -> str:
        """Acceptance of each matched component and its spectra before and after."""
        mt = _get(self.s, "motion", "matching")
        if not isinstance(mt, Mapping) or not mt:
            return ""
        checks_words = {"shortfall": ("largest shortfall below the target", "largest_shortfall",
                                      "max_shortfall", "percent100"),
                        "excess": ("largest excess above the target", "largest_excess",
                                   "max_excess", "percent100"),
                        "adjacent_below": ("most adjacent periods below the target",
                                           "longest_run_below", "max_adjacent_below", "count"),
                        "husid_change": ("largest change of the normalised Husid curve",
                                         "husid_max_change", "max_husid_change", "ratio")}
        rows, classes, panels = [], [], []
        g = to_display(1.0, "acceleration", self.sys)
        for d, m in mt.items():
            if not isinstance(m, Mapping):
                continue
            acc = m.get("acceptance") if isinstance(m.get("acceptance"), Mapping) else {}
            crit = acc.get("criteria") if isinstance(acc.get("criteria"), Mapping) else {}
            its = m.get("iterations")
            n_it = len(its) if isinstance(its, list) else its
            rows.append([_DIR_WORDS.get(str(d), str(d)), "match",
                         f"{m.get('status', '—')} after {n_it if n_it is not None else '—'} iterations; "
                         f"largest misfit {self.n(100 * (_f(m.get('max_misfit')) or 0), None)} %",
                         f"misfit within {self.n(100 * (_f(m.get('tolerance')) or 0), None)} %",
                         "yes" if m.get("converged") else "no"])
            classes.append("" if m.get("converged") else "over")
            for key, ok in (acc.get("checks") or {}).items():
                words, vkey, ckey, how = checks_words.get(key, (key.replace("_", " "), key, key, "ratio"))
                val, lim = _f(acc.get(vkey)), _f(crit.get(ckey))
                if how == "percent100":
                    vtxt = f"{self.n(None if val is None else 100 * val, None)} %"
                    ltxt = f"at most {self.n(None if lim is None else 100 * lim, None)} %"
                elif how == "count":
                    vtxt, ltxt = self.n(val, None), f"at most {self.n(lim, None)}"
                else:
                    vtxt, ltxt = self.n(val, None), f"at most {self.n(lim, None)}"
                rows.append(["", words, vtxt, ltxt, "yes" if ok else "NO"])
                classes.append("" if ok else "over")
            per = np.asarray(m.get("periods") or [], float)
            tgt = np.asarray(m.get("target_psa") or [], float).reshape(-1, per.size) if per.size else None
            bef = np.asarray(m.get("psa_before") or [], float).reshape(-1, per.size) if per.size else None
            aft = np.asarray(m.get("psa_after") or [], float).reshape(-1, per.size) if per.size else None
            if per.size and tgt is not None and tgt.size and bef.size and aft.size:
                panels.append((f"direction {_DIR_WORDS.get(str(d), d)}",
                               [("before matching", per, g * bef[0], "raw"),
                                ("after matching", per, g * aft[0], "broadened"),
                                (f"target {m.get('target') or ''}".strip(), per, g * tgt[0], "target")]))
        if not rows:
            return ""
        html_ = ["<h3>Spectrum matching</h3>",
                 '<p class="note">Each horizontal component was adjusted to the target spectrum '
                 "before the analysis; the acceptance figures compare the matched spectrum with "
                 "the target over the matching band (limits of common practice, from the "
                 "matching stage).</p>",
                 table(rows, ["direction", "check", "value", "limit", "met"], row_classes=classes)]
        if panels:
            unit = display_unit("acceleration", self.sys)
            html_.append(self._fig(lambda: F.spectra_figure(panels, ylabel=f"PSA [{unit}]", columns=3,
                                                            shared_legend=True),
                                   "Spectra of each matched component before and after matching, "
                                   "with the target.", fid="fig-matching"))
        return "".join(html_)

    # ------------------------------------------------------------------ inputs
    def scenario_as_run(self) -> dict:
        """The scenario echo, made re-runnable: no ``notes``, record paths relative to
        the scenario file, unset keys dropped."""
        def clean(v):
            if isinstance(v, Mapping):
                return {k: clean(x) for k, x in v.items() if x is not None and k != "notes"}
            if isinstance(v, list):
                return [clean(x) for x in v if x is not None]
            return v

        scen = clean(dict(self.scenario))
        scen_file = None
        for k in (_get(self.s, "provenance", "inputs") or {}):
            if str(k).endswith(".toml"):
                scen_file = Path(str(k))
        motion = scen.get("motion") if isinstance(scen.get("motion"), Mapping) else None
        if motion and scen_file is not None:
            for d, m in list(motion.items()):
                if isinstance(m, Mapping) and isinstance(m.get("file"), str):
                    p = Path(m["file"])
                    if p.is_absolute():
                        try:
                            rel = Path(_relpath(p, scen_file.parent))
                            motion[d] = dict(m, file=rel.as_posix())
                        except ValueError:
                            pass
            if isinstance(motion.get("inventory"), str) and Path(motion["inventory"]).is_absolute():
                try:
                    motion["inventory"] = Path(_relpath(Path(motion["inventory"]), scen_file.parent)).as_posix()
                except ValueError:
                    pass
        return scen

    def inputs(self) -> str:
        if not self.scenario:
            return '<p class="none">summary.json holds no scenario echo.</p>'
        text = toml_text(self.scenario_as_run())
        return ("<details><summary>The scenario as run, with every default filled in "
                "(TOML; save it beside the original to run it again)</summary>"
                f"<pre>{esc(text)}</pre></details>")

    # -------------------------------------------------------------- provenance
    def provenance(self) -> str:
        prov = self.s.get("provenance") if isinstance(self.s.get("provenance"), Mapping) else {}
        rows = [["groundshake version", str(prov.get("version", "—"))],
                ["run at (UTC)", str(prov.get("date", "—"))],
                ["command", str(prov.get("command", "—"))]]
        a = self.s.get("analysis") if isinstance(self.s.get("analysis"), Mapping) else {}
        if a:
            rows.append(["method", f"{a.get('method', '—')}; {a.get('n_modes', '—')} modes up to "
                                   f"{self.q(a.get('cutoff_hz'), 'frequency')}; time step "
                                   f"{self.q(a.get('dt'), 'time')}, {a.get('n_steps', '—')} steps"])
            for x in a.get("assumptions") or []:
                rows.append(["assumption", str(x)])
        for name, digest in (prov.get("inputs") or {}).items():
            rows.append([f"input {Path(str(name)).name}", f"SHA-256 {digest}"])
        html_ = [table(rows, ["item", "value"], cls="grid kv2")]
        files = []
        for p in sorted(self.f.path.glob("*")):
            if p.is_file() and p.suffix in (".json", ".csv"):
                files.append([p.name, p.stat().st_size, _sha256(p)])
        html_.append("<details><summary>Files this report was built from</summary>"
                     + table(files, ["file", "bytes", "SHA-256"]) + "</details>")
        if self.notes:
            html_.append("<h3>Notes from the report writer</h3><ul>"
                         + "".join(f"<li>{esc(n)}</li>" for n in self.notes) + "</ul>")
        html_.append(f'<p class="note">Report written by groundshake {esc(__version__)} at '
                     f'{_dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M")} UTC; '
                     f'display units: {"US customary" if self.sys == "us" else "SI"}.</p>')
        return "".join(html_)

    # -------------------------------------------------------------------- page
    def page(self, bodies: Mapping[str, str]) -> str:
        title = self.title()
        prov = self.s.get("provenance") if isinstance(self.s.get("provenance"), Mapping) else {}
        when = str(prov.get("date") or "")
        toc = "".join(f'<a href="#{sid}">{esc(name)}</a>' for sid, name in SECTIONS)
        sections = "".join(section(sid, name, bodies.get(sid, "")) for sid, name in SECTIONS)
        n_ex, n_w = len(self.exceedances()), len(self.warning_list())
        flags = []
        if n_ex:
            flags.append(f'<span class="flag over">{n_ex} exceedance{"s" if n_ex > 1 else ""}</span>')
        if n_w:
            flags.append(f'<span class="flag warn">{n_w} warning{"s" if n_w > 1 else ""}</span>')
        return (
            "<!DOCTYPE html>\n"
            '<html lang="en"><head><meta charset="utf-8">'
            '<meta name="viewport" content="width=device-width, initial-scale=1">'
            f'<meta name="generator" content="groundshake {esc(__version__)}">'
            f"<title>{esc(title)} — groundshake screening report</title>"
            f"<style>{CSS}</style></head><body>"
            '<header class="top">'
            f"<h1>{esc(title)}</h1>"
            f'<div class="sub">Seismic screening report · groundshake {esc(__version__)}'
            + (f" · run {esc(when)}" if when else "")
            + f" · units {'US customary' if self.sys == 'us' else 'SI'}</div>"
            f'<div class="banner">{esc(SCREENING_NOTE)} Linear-elastic model; screening, not '
            "design; verify against the governing code and have a licensed engineer review. "
            + " ".join(flags) + "</div>"
            f'<nav class="toc">{toc}</nav></header>'
            f"<main>{sections}</main>"
            f"<footer>{esc(SCREENING_NOTE)} Generated by groundshake {esc(__version__)}.</footer>"
            "</body></html>\n")


def _round3(v: float) -> str:
    return fmt(v, None, digits=3)


def _relpath(path: Path, start: Path) -> str:
    import os

    return os.path.relpath(str(path), str(start))


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


