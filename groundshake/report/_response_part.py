"""The response of the block: base resultants, stresses, contact and stability, peaks at
points, histories; the anchorage; the floor response spectra."""
from __future__ import annotations

from typing import Mapping

import numpy as np

from ..results._schema import (COLUMNS, DIRECTIONS, HISTORY_BASE, KIND_OF_UNIT, header,
                               history_label, kind_of, parse_header, read, read_list,
                               read_number, read_table)
from . import _figures as F
from ._html import esc, raw, table
from ._units import display_unit, fmt, to_display
from ._context import DIR_WORDS as _DIR_WORDS, Context, as_float as _f, named as _named, sentence as _sentence

__all__ = ["ResponsePart"]


class ResponsePart(Context):
    """One part of the report (see the module docstring)."""

    def spectrum_note(self) -> str:
        """For a response-spectrum run: what its peaks are (no signs, no times) and the
        side-by-side table with spectrum-compatible motions, in display units."""
        an = read(self.s, "analysis")
        if not (isinstance(an, Mapping) and an.get("method") == "spectrum"):
            return ""
        out = ('<p class="note">Response-spectrum analysis of the design spectrum: every '
               "value below is a peak magnitude estimated on its own, without sign or time; "
               "peaks of different quantities need not occur together.</p>")
        side = an.get("spectrum_motions")
        if isinstance(side, Mapping) and side.get("comparison"):
            rows = []
            for r in side["comparison"]:
                if not isinstance(r, Mapping):
                    continue
                key = [str(k) for k in r.get("key") or []]
                label, si = parse_header(str(r.get("quantity", "")))
                kind = (kind_of(key) or kind_of(key + ["value"]) if key else None) \
                    or KIND_OF_UNIT.get(si)
                unit = display_unit(kind, self.sys) if kind else ""
                rows.append([label, unit,
                             self.cell(r.get("spectrum"), kind),
                             self.cell(r.get("time_history_mean"), kind),
                             self.cell(r.get("time_history_sd"), kind),
                             self.cell(r.get("ratio"), "ratio")])
            out += (f"<h3>Side by side: the spectrum method and {esc(str(side.get('n')))} "
                    "spectrum-compatible motions</h3>"
                    + table(rows, ["quantity", "unit", "spectrum method", "time-history mean",
                                   "standard deviation", "ratio"])
                    + f'<p class="note">{esc(_sentence(str(side.get("note", ""))))}.</p>')
        return out

    def response(self) -> str:
        html_ = [self.spectrum_note()]
        bp = read_table(self.s, "base", "peaks")
        if bp:
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
        st = read(self.s, "stresses")
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
        lu = display_unit("length", self.sys)
        return self._fig(lambda: F.stress_figure(grid, v, unit=unit, length_unit=lu,
                                                 factor=to_display(1.0, "stress", self.sys)),
                         "Peak von Mises stress of each element over the record on the block's "
                         f"outer faces; the largest element value is {self.q(top, 'stress')}.",
                         fid="fig-stress")

    def contact_table(self) -> str:
        c = read(self.s, "base", "contact")
        st = read(self.s, "stability") if isinstance(read(self.s, "stability"), Mapping) else {}
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
        for i, case in enumerate(read_list(self.s, "soil_cases")):
            if isinstance(case, Mapping):
                def at(*keys):
                    return read(self.s, "soil_cases", i, *keys)
                cases.append([str(case.get("name", "")),
                              self.cell(case.get("shear_modulus"), "modulus"),
                              self.cell(at("modes", 0, "frequency"), "frequency"),
                              self.cell(at("stability", "sliding", "min_safety_factor"), "ratio"),
                              self.cell(at("stability", "overturning", "min_safety_factor"), "ratio"),
                              self.cell(at("stability", "bearing", "peak_pressure"), "pressure")])
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
            for name, obj in _named(read(self.s, group)):
                if not isinstance(obj, Mapping):
                    continue
                rows.append([f"{word} {name}",
                             *(self.cell(read(self.s, group, name, "peak_absolute_acceleration",
                                              d), "acceleration") for d in DIRECTIONS),
                             *(self.cell(read(self.s, group, name, "peak_relative_displacement",
                                              d), "displacement") for d in DIRECTIONS)])
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
        found = self.timed_table("histories")
        if found is None:
            return ""
        h, time = found
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
            for name, _ in _named(read(self.s, group)):
                acc = [(d, self._hist(history_label("abs acc", name=name, direction=d))) for d in DIRECTIONS]
                acc = [(d, v) for d, v in acc if v is not None]
                if acc:
                    pts.append((f"{name}: absolute acceleration", acc,
                                display_unit("acceleration", self.sys)))
        eq_strips = []
        for name, _ in _named(read(self.s, "equipment")):
            k = len(read_list(self.s, "equipment", name, "anchors"))
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

    def anchorage(self) -> str:
        html_ = ['<p class="note">Peak bolt forces over the record, from the equipment\'s base '
                 "reactions shared among its bolts (rigid plate, elastic bolt group). "
                 "Demand/capacity ratios compare these peaks with the capacities entered in the "
                 "scenario: a screening comparison, not a code check.</p>"]
        found = False
        for name, eq in _named(read(self.s, "equipment")):
            anchors = read_list(self.s, "equipment", name, "anchors")
            if not anchors:
                continue
            found = True
            cap = read_table(self.s, "equipment", name, "capacity")
            body, classes = [], []

            def bolt(k, key):
                return read(self.s, "equipment", name, "anchors", k - 1, key)

            has_ir = any(read_number(self.s, "equipment", name, "anchors", i,
                                     "interaction_ratio") is not None
                         for i in range(len(anchors)))
            for k in range(1, len(anchors) + 1):
                dct, dcv = _f(bolt(k, "dc_tension")), _f(bolt(k, "dc_shear"))
                ir = _f(bolt(k, "interaction_ratio"))
                over = any(d is not None and d > 1.0 for d in (dct, dcv, ir))
                have = dct is not None or dcv is not None
                pos = bolt(k, "position") or []
                row = [k, ", ".join(self.n(v, "length") for v in pos),
                       self.cell(bolt(k, "peak_tension"), "force"),
                       self.cell(bolt(k, "peak_shear"), "force"),
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
        info = read(self.s, "floor_spectra") if isinstance(read(self.s, "floor_spectra"), Mapping) else {}
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


def _round3(v: float) -> str:
    return fmt(v, None, digits=3)

