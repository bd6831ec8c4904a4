"""The run report: one self-contained HTML file built from a run's output folder.

``write_report(out_dir)`` reads the files a run wrote, through the output contract
(``groundshake.results._schema``: file names, CSV headers, summary keys and their
quantity kinds), and writes ``out_dir/report.html``. The answers come first; tables have
plain headings and engineering units (SI or US customary); the inputs are a folded
appendix. Each part of the report is a module of its own (``_answers``, ``_model_part``,
``_response_part``, ``_motion_part``, ``_appendix``) over the shared ``_context``.
Figures are embedded PNG data, the style sheet is inline, there are no
scripts and no network resources, and every piece of user text is escaped.
"""
from __future__ import annotations

from pathlib import Path
from typing import Callable, Mapping

from .. import __version__
from .._atomic import atomic_write_text
from .._cautions import SCREENING_NOTE
from .._errors import InputError
from .._progress import Progress
from ..results._schema import FILES
from ._answers import AnswersPart
from ._appendix import AppendixPart
from ._html import CSS, esc, section
from ._load import load_output
from ._model_part import ModelPart
from ._motion_part import MotionPart
from ._response_part import ResponsePart
from ._units import check_system

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
        ("inputs", b.inputs), ("summary", b.summary), ("provenance", b.provenance)]
    bodies: dict[str, str] = {}
    with Progress("report", total=len(steps)) as bar:
        if not progress:
            bar.enabled = False
        for sid, make in steps:
            try:
                bodies[sid] = make()
            except Exception as e:  # one part must never sink the report; say what failed
                b.notes.append(f"The part '{sid}' could not be built ({type(e).__name__}: {e}).")
                bodies[sid] = ('<p class="none">This part could not be built from the output '
                               "folder; see the notes under Provenance.</p>")
            bar.advance()
    return b.page(bodies)


class _Builder(AnswersPart, ModelPart, ResponsePart, MotionPart, AppendixPart):
    """The report: its parts (one module each) and the page around them."""

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

