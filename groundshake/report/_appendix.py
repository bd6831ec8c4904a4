"""The appendix: the scenario as run (re-runnable) and the provenance."""
from __future__ import annotations

import datetime as _dt
import hashlib
from pathlib import Path
from typing import Mapping

from .. import __version__
from ._html import esc, table, toml_text
from ..results._schema import read_table
from ._context import Context

__all__ = ["AppendixPart"]


class AppendixPart(Context):
    """One part of the report (see the module docstring)."""

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
        for k in read_table(self.s, "provenance", "inputs"):
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

    def provenance(self) -> str:
        prov = read_table(self.s, "provenance")
        rows = [["groundshake version", str(prov.get("version", "—"))],
                ["run at (UTC)", str(prov.get("date", "—"))],
                ["command", str(prov.get("command", "—"))]]
        a = read_table(self.s, "analysis")
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


def _relpath(path: Path, start: Path) -> str:
    import os

    return os.path.relpath(str(path), str(start))


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()

