"""The first page: the summary table, every exceedance and warning in words, the cautions."""
from __future__ import annotations

from typing import Any, Mapping

from .._cautions import CAUTIONS
from ..results._schema import read, read_list, read_number, read_table
from ._html import esc, table
from ._units import display_unit
from ._context import Context, as_float as _f, named as _named
from ._context import sentence as _sentence

__all__ = ["AnswersPart", "bolt_exceedances"]


def bolt_exceedances(summary: Mapping[str, Any]) -> list[tuple[str, str, list[int], float, int]]:
    """Bolt comparisons above 1, grouped: (equipment, what, bolts numbered from 1, the
    largest ratio, the bolt where it is) for each equipment and each of tension, shear and
    tension–shear interaction (ratios from summary.json; none is computed here)."""
    out = []
    for name, _ in _named(read(summary, "equipment")):
        anchors = read_list(summary, "equipment", name, "anchors")
        for key, what in (("dc_tension", "tension"), ("dc_shear", "shear"),
                          ("interaction_ratio", "tension–shear interaction")):
            over = [(k, v) for k in range(1, len(anchors) + 1)
                    if (v := read_number(summary, "equipment", name, "anchors", k - 1, key))
                    is not None and v > 1.0]
            if over:
                at, top = max(over, key=lambda t: t[1])
                out.append((name, what, [k for k, _ in over], top, at))
    return out


class AnswersPart(Context):
    """One part of the report (see the module docstring)."""

    def exceedances(self) -> list[str]:
        """Every comparison above 1 (or a safety factor below 1) and lost contact, in words."""
        out = []
        for name, what, bolts, top, at in bolt_exceedances(self.s):
            if len(bolts) == 1:
                out.append(f"Bolt {bolts[0]} of {name}: {what} demand is {self.n(top, 'ratio')} "
                           f"times the capacity entered (above 1).")
            else:
                listed = ", ".join(map(str, bolts[:-1])) + f" and {bolts[-1]}"
                out.append(f"Bolts {listed} of {name}: {what} demand above the capacity "
                           f"entered, up to {self.n(top, 'ratio')} times (bolt {at}).")
        for key, what in (("sliding", "sliding"), ("overturning", "overturning")):
            v = read_number(self.s, "stability", key, "min_safety_factor")
            if v is not None and v < 1.0:
                out.append(f"Least {what} safety factor {self.n(v, 'ratio')} is below 1.")
        v = read_number(self.s, "stability", "bearing", "ratio_to_allowable")
        if v is not None and v > 1.0:
            out.append(f"Peak bearing pressure is {self.n(v, 'ratio')} times the allowable entered.")
        c = read(self.s, "base", "contact")
        if isinstance(c, Mapping) and c.get("uplift"):
            when = self._when(c.get("time_of_min_pressure"))
            out.append(f"The base loses contact: the linear contact pressure falls to "
                       f"{self.q(c.get('min_pressure'), 'pressure')}"
                       + (f" at {when}" if when else "")
                       + "; the bonded-spring model does not hold there.")
        return out

    def warning_list(self) -> list[str]:
        w = read(self.s, "warnings") or []
        if isinstance(w, (str, Mapping)):
            w = [w]
        return [str(x.get("message") or x) if isinstance(x, Mapping) else str(x) for x in w]

    def summary(self) -> str:
        rows: list[list[Any]] = []
        classes: list[str] = []

        def add(label, value, kind, where="", over=False):
            rows.append([label, self.cell(value, kind), display_unit(kind, self.sys) if kind else "",
                         where])
            classes.append("over" if over else "")

        s = self.s
        for d, key in (("x", "Fx"), ("y", "Fy")):
            add(f"Peak base shear, {d}", read(s, "peaks", "base_shear", d), "force",
                self._when(read(s, "base", "peaks", key, "time")))
        add("Peak vertical base force (dynamic part)", read(s, "peaks", "base_axial"), "force",
            self._when(read(s, "base", "peaks", "Fz", "time")))
        for d, key in (("x", "Mx"), ("y", "My")):
            add(f"Peak overturning moment about {d}", read(s, "peaks", "overturning_moment", d),
                "moment", self._when(read(s, "base", "peaks", key, "time")))
        rd = read_table(s, "peaks", "relative_displacement")
        if rd:
            def disp(k, what):
                return read(s, "peaks", "relative_displacement", k, what)
            d = max(rd, key=lambda k: _f(disp(k, "value")) or 0.0)
            add("Peak displacement relative to the ground", disp(d, "value"), "displacement",
                f"{d}, at {self._at(disp(d, 'at'))}, {self._when(disp(d, 'time'))}")
        vm = read(s, "stresses", "von_mises")
        if isinstance(vm, Mapping):
            away = read(s, "stresses", "von_mises", "away_from_features", "value")
            if _f(away) is not None:
                add("Peak von Mises stress (away from local features)", away, "stress",
                    f"at {self._at(read(s, 'stresses', 'von_mises', 'away_from_features', 'at'))}")
            add("Peak von Mises stress (anywhere)", vm.get("value"), "stress",
                f"at {self._at(vm.get('at'))}" + (f", {vm['feature']}" if vm.get("feature") else ""))
        elif _f(read(s, "peaks", "von_mises")) is not None:
            add("Peak von Mises stress", read(s, "peaks", "von_mises"), "stress")
        pt = read(s, "stresses", "principal_tension")
        if isinstance(pt, Mapping):
            add("Peak principal tension", pt.get("value"), "stress", f"at {self._at(pt.get('at'))}")
        c = read(s, "base", "contact")
        if isinstance(c, Mapping):
            add("Peak contact pressure under the base", c.get("peak_pressure"), "pressure",
                self._when(c.get("time_of_peak_pressure")))
            add("Least contact pressure (negative: uplift)", c.get("min_pressure"), "pressure",
                self._when(c.get("time_of_min_pressure")), over=bool(c.get("uplift")))
        for key, label in (("sliding", "Least sliding safety factor"),
                           ("overturning", "Least overturning safety factor")):
            v = read_number(s, "stability", key, "min_safety_factor")
            if v is not None:
                case = read(s, "stability", key, "case")
                where = self._when(read(s, "stability", key, "time"))
                add(label, v, "ratio", (f"{case} soil, " if case else "") + where, over=v < 1.0)
        q = read_number(s, "stability", "bearing", "peak_pressure")
        if q is not None:
            r = read_number(s, "stability", "bearing", "ratio_to_allowable")
            add("Peak bearing pressure (no-tension base)", q, "pressure",
                "" if r is None else f"{self.n(r, 'ratio')} × allowable entered",
                over=r is not None and r > 1.0)
        for name, _ in _named(read(s, "equipment")):
            pa = read_table(s, "equipment", name, "peak_absolute_acceleration")
            if pa:
                d = max(pa, key=lambda k: _f(pa[k]) or 0.0)
                add(f"Peak acceleration of {name} (centre of mass)", pa[d], "acceleration", d)
        w = read(self.s, "worst_dc")
        if isinstance(w, Mapping) and _f(w.get("value")) is not None:
            v = float(w["value"])
            add("Largest bolt demand / entered capacity", v, "ratio",
                f"{w.get('equipment')}, bolt {w.get('bolt')}", over=v > 1.0)
        wi = read(self.s, "worst_interaction")
        if isinstance(wi, Mapping) and _f(wi.get("value")) is not None:
            v = float(wi["value"])
            add("Largest bolt tension–shear interaction", v, "ratio",
                f"{wi.get('equipment')}, bolt {wi.get('bolt')}", over=v > 1.0)
        for md in read_list(s, "modes", "modes")[:3]:
            if isinstance(md, Mapping):
                add(f"Mode {md.get('mode')} frequency", md.get("frequency"), "frequency",
                    self._direction_words(md.get("dominant_direction")))
        html_ = [f'<p class="exceed-note">{esc(n)}</p>' for n in self.notes
                 if n.startswith("This output folder was written under an older")]
        html_.append(table(rows, ["quantity", "value", "unit", "where, when"],
                           row_classes=classes, cls="grid answers"))
        cases = [c for c in read(self.s, "soil_cases") or [] if isinstance(c, Mapping)]
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
        extra = read(self.s, "cautions") or []
        for c in extra if isinstance(extra, list) else [extra]:
            if str(c) not in items:
                items.append(str(c))
        return items

