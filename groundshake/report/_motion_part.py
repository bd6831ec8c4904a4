"""The ground motion: records and their measures, before/after plots, ground spectra,
spectrum matching."""
from __future__ import annotations

from pathlib import Path
from typing import Any, Mapping

import numpy as np

from ..results._schema import COLUMNS, DIRECTIONS, read, read_list, read_table
from . import _figures as F
from ._html import esc, table
from ._units import display_unit, to_display
from ._context import DIR_WORDS as _DIR_WORDS, Context, as_float as _f

__all__ = ["MotionPart"]


class MotionPart(Context):
    """One part of the report (see the module docstring)."""

    def record_list(self) -> list[dict[str, Any]]:
        return [dict(r) for r in read_list(self.s, "records") if isinstance(r, Mapping)]

    def motion(self) -> str:
        html_ = []
        recs = self.record_list()
        measures = (("pga", "PGA", "acceleration"), ("pgv", "PGV", "velocity"),
                    ("pgd", "PGD", "displacement"), ("arias_intensity", "Arias intensity", "arias"),
                    ("d5_95", "significant duration D5–95", "time"), ("cav", "CAV", "velocity"))
        rows = []
        for i, r in enumerate(read_list(self.s, "records")):
            if not isinstance(r, Mapping):
                continue
            rows.append([_DIR_WORDS.get(str(r.get("direction")), r.get("direction", "")),
                         r.get("name", ""), Path(str(r.get("source") or "")).name,
                         *(self.cell(read(self.s, "records", i, "measures", k), kind)
                           for k, _, kind in measures)])
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
        found = self.timed_table("records")
        if found is None:
            return ""
        t, time = found
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
        matched = read_table(self.s, "motion", "matching")
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
        mt = read(self.s, "motion", "matching")
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

