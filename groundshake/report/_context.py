"""The shared state and number formatting of the report's parts (see ``_report.py``).

Every part of the report is a mixin over :class:`Context`: it reads the output folder
(``self.f``), the summary (``self.s``), the scenario echo (``self.scenario``) and shows
numbers with :meth:`Context.n` / :meth:`Context.q` in the display units ``self.sys``,
round-off shown as 0 against the largest value of the same kind in the run.
"""
from __future__ import annotations

from typing import Any, Callable, Mapping

import numpy as np

from ..results._schema import DIRECTIONS, SCHEMA_VERSION, header, iter_values, kind_of, read
from ..plots import to_data_uri
from ._html import esc, figure, raw
from ._load import OutputFolder
from ._units import display_unit, fmt

__all__ = ["Context", "as_float", "named", "sentence", "DIR_WORDS"]

DIR_WORDS = {"x": "x", "y": "y", "z": "z (vertical)"}


def as_float(v: Any) -> float | None:
    if isinstance(v, bool):
        return None
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if np.isfinite(f) else None



def named(d: Any) -> list[tuple[str, Any]]:
    if isinstance(d, Mapping):
        return [(str(k), v) for k, v in d.items()]
    if isinstance(d, list):
        return [(str(x.get("name", i + 1)) if isinstance(x, Mapping) else str(i + 1), x)
                for i, x in enumerate(d)]
    return []



def sentence(text: str) -> str:
    text = str(text).strip()
    return text[:1].upper() + text[1:] if text else text



class Context:
    """What every part of the report shares: the folder, the units, number formatting."""

    def __init__(self, folder: OutputFolder, system: str):
        self.f = folder
        self.s = folder.summary
        self.sys = system
        scen = self.s.get("scenario")
        self.scenario = scen if isinstance(scen, Mapping) else {}
        self.notes: list[str] = list(folder.notes)
        version = read(self.s, "schema", "version")
        if not isinstance(version, int) or version < SCHEMA_VERSION:
            self.notes.insert(0, f"This output folder was written under an older output "
                                 f"contract (version {version or 1}, now {SCHEMA_VERSION}); "
                                 "tables and figures it lacks are left out: run the scenario "
                                 "again for the full report.")
        an = self.s.get("analysis")
        if isinstance(an, Mapping) and an.get("method") == "spectrum":
            # a response-spectrum run has no histories and reads no records: not a loss
            self.notes = [n for n in self.notes
                          if not n.startswith(("histories.csv", "records.csv"))]
        self.ref: dict[str, float] = {}
        for path, v in iter_values(self.s):
            k = kind_of(path)
            fv = as_float(v)
            if k and fv is not None:
                self.ref[k] = max(self.ref.get(k, 0.0), abs(fv))
        self._grid: Any = False

    def n(self, value: Any, kind: str | None, *, digits: int = 3) -> str:
        """A number in display units (no unit), round-off shown as 0."""
        return fmt(value, kind, self.sys, ref=self.ref.get(kind) if kind else None,
                   digits=digits)

    def q(self, value: Any, kind: str, *, digits: int = 3) -> str:
        """A number with its display unit."""
        if as_float(value) is None:
            return "—"
        u = display_unit(kind, self.sys)
        return self.n(value, kind, digits=digits) + (("" if u == "%" else "\u202f") + u if u else "")

    def h(self, label: str, kind: str | None) -> str:
        """A column heading with its display unit."""
        u = display_unit(kind, self.sys) if kind else ""
        return f"{label} [{u}]" if u else label

    def timed_table(self, name: str):
        """``(table, time [s])`` of the CSV file ``name`` of the output contract, or None
        when the file is missing, empty or has no time column."""
        t = self.f.table(name)
        if t is None or t.n_rows == 0:
            return None
        time = t.get(header("time", "time"))
        return None if time is None else (t, time)

    def cell(self, value: Any, kind: str | None, *, digits: int = 3) -> Any:
        return raw(f'<span class="n">{esc(self.n(value, kind, digits=digits))}</span>')

    def _fig(self, make: Callable[[], Any], caption: str, fid: str = "") -> str:
        """Draw one figure; a failure leaves a note instead of the figure."""
        try:
            fig = make()
            if fig is None:
                return ""
            return figure(to_data_uri(fig), caption, fid=fid)
        except Exception as e:  # a figure must never sink the report
            self.notes.append(f"The figure '{caption[:60]}' could not be drawn "
                              f"({type(e).__name__}: {e}).")
            return ""

    def title(self) -> str:
        t = self.s.get("title") or self.scenario.get("title")
        return str(t) if t else self.f.path.name

    def _when(self, t: Any) -> str:
        return "" if as_float(t) is None else f"t = {self.q(t, 'time')}"

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

