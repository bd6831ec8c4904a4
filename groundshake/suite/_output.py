"""Suite outputs beyond suite.json: spectra statistics as CSV and figures, suite.html."""
from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import Sequence

import numpy as np

from .._atomic import atomic_write_text

__all__ = ["write_suite_outputs"]

from .._constants import DIRECTIONS
_STATS = ("median", "p16", "p84", "mean", "min", "max")


def _csv(header: Sequence[str], columns: Sequence[np.ndarray]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for row in zip(*columns):
        w.writerow([f"{float(v):.9g}" for v in row])
    return buf.getvalue()


def _spectra_csv(spec: dict) -> dict[str, str]:
    periods = np.asarray(spec["periods"], dtype=float)
    damp = [f"{100 * d:g}%" for d in spec["damping"]]
    files = {}
    if "ground_psa" in spec:
        header, cols = ["period [s]"], [periods]
        for j, d in enumerate(DIRECTIONS):
            for i, dl in enumerate(damp):
                for st in _STATS:
                    header.append(f"ground {d} psa {dl} {st} [m/s2]")
                    cols.append(spec["ground_psa"][st][j, i])
        files["ground_spectra_statistics.csv"] = _csv(header, cols)
    header, cols = ["period [s]"], [periods]
    for key, word in (("floor_psa", "raw"), ("floor_psa_broadened", "broadened")):
        if key not in spec:
            continue
        for p, name in enumerate(spec["points"]):
            for j, d in enumerate(DIRECTIONS):
                for i, dl in enumerate(damp):
                    for st in _STATS:
                        header.append(f"{name} {d} psa {dl} {word} {st} [m/s2]")
                        cols.append(spec[key][st][p, j, i])
    if len(header) > 1:
        files["floor_spectra_statistics.csv"] = _csv(header, cols)
    return files


def _band_panels(spec: dict, key: str, names: Sequence[str], target=None) -> list:
    periods = np.asarray(spec["periods"], dtype=float)
    panels = []
    i = len(spec["damping"]) - 1 if 0.05 not in spec["damping"] else list(spec["damping"]).index(0.05)
    dl = f"{100 * spec['damping'][i]:g}%"
    top = float(np.nanmax(np.abs(spec[key]["max"]))) if np.size(spec[key]["max"]) else 0.0
    for p, name in enumerate(names):
        for j, d in enumerate(DIRECTIONS):
            st = spec[key]
            sel = (j, i) if key == "ground_psa" else (p, j, i)
            med = st["median"][sel]
            # a direction with no motion holds only round-off (below 1e-9 of the largest)
            if not np.any(np.abs(st["max"][sel]) > 1e-9 * top) or not np.any(med > 0):
                continue
            curves = [(f"median (geometric mean), {dl} damping", periods, med, "line"),
                      ("16th and 84th percentiles (log-normal)", periods, st["p16"][sel], "raw"),
                      ("_nolegend_", periods, st["p84"][sel], "raw"),
                      ("largest", periods, st["max"][sel], "ground")]
            if target is not None and key == "ground_psa" and d != "z":
                curves.append(("target", periods, target, "target"))
            panels.append((f"{name}, direction {d}", curves))
    return panels


def _scaling_html(doc: dict, esc, table) -> str:
    """A plain paragraph and table: the rule, the band, each set's factor, the combination."""
    lo, hi = doc["range"]
    text = (f"<p>Each record set was scaled to {esc(doc['target_label'])} by the rule "
            f"{esc(doc['rule'])} ({esc(doc['source'])}): the mean of the sets' "
            f"{esc(doc['spectrum'])} at {100 * doc['damping']:g} % damping reaches "
            f"{100 * doc['share']:g} % of the target at every period from "
            f"{doc['band'][0]:.3g} s to {doc['band'][1]:.3g} s (T = {doc['period_s']:.3g} s, "
            f"{esc(doc['period_from'])}; least ratio {doc['least_ratio']:.3f}). Mode "
            f"{esc(doc['mode'])}; common factor {doc['set_factor']:.4g}. {esc(doc['note'])}.</p>")
    rows = [(f["record"], f"{f['factor']:.4g}", f"{f['own']:.4g}",
             "yes" if f["in_range"] else f"no — outside {lo:g}–{hi:g}") for f in doc["factors"]]
    text += table(rows, ["record set", "scale factor", "own fit", f"within {lo:g}–{hi:g}"])
    if "combination" in doc:
        text += (f"<p>Results combined by the <strong>{esc(doc['combination'])}</strong> over "
                 f"{doc['count']} set(s): {esc(doc['combination_note'])} (the last column of "
                 "the statistics below).</p>")
    return text


def write_suite_outputs(result, scenario, *, target: str | None = None,
                        units: str | None = None) -> list[Path]:
    """Write the spectra statistics (CSV, PNG) and ``suite.html`` into ``result.out_dir``.

    Parameters
    ----------
    result : SuiteResult
    scenario : Scenario
    target : str, optional
        A target spectrum spec (see :func:`groundshake.spectra.parse_target`) drawn
        over the ground-spectra band; the scenario's ``motion.target`` if not given.
    units : {"si", "us"}, optional
        Display units of suite.html; default the scenario's ``[report] units``, else SI.
        The CSV files stay SI.
    """
    from ..report._figures import data_uri, spectra_figure
    from ..report._html import figure
    from ..report._suite_page import render_suite_page
    from ..report._units import display_unit, to_display

    units = units or getattr(getattr(scenario, "report", None), "units", None) or "si"
    out = Path(result.out_dir)
    written: list[Path] = []
    spec = result.spectra_statistics
    figures_html = []
    target_psa = None
    target = target or getattr(getattr(scenario, "motion", None), "target", None)
    g = to_display(1.0, "acceleration", units)
    ylabel = f"PSA [{display_unit('acceleration', units)}]"
    if spec:
        for name, text in _spectra_csv(spec).items():
            written.append(atomic_write_text(out / name, text))
        if target:
            from ..spectra import parse_target
            target_psa = np.asarray(parse_target(target, base_dir=scenario.base_dir)
                                    .psa(np.asarray(spec["periods"], dtype=float)))
        if "ground_psa" in spec:
            panels = _scaled(_band_panels(spec, "ground_psa", ["ground"], target_psa), g)
            fig = spectra_figure(panels, columns=3, ylabel=ylabel, shared_legend=True)
            figures_html.append(figure(data_uri(fig), "Ground spectra over the suite: median, "
                                       "16th and 84th percentiles (log-normal) and the largest "
                                       "value at each period", fid="fig-ground-band"))
        if "floor_psa_broadened" in spec and spec["points"]:
            panels = _scaled(_band_panels(spec, "floor_psa_broadened", spec["points"]), g)
            fig = spectra_figure(panels, columns=3, ylabel=ylabel, shared_legend=True)
            figures_html.append(figure(data_uri(fig), "Broadened floor spectra over the suite: "
                                       "median, 16th and 84th percentiles and the largest value",
                                       fid="fig-floor-band"))
    engine = getattr(result, "engine", None)
    source = getattr(scenario, "source", None)
    prov = {"version": None, "scenario": Path(str(source)).name if source else None,
            "how it ran": engine.line() if engine is not None else None}
    scaling = getattr(result, "scaling", None)
    from ..report._html import esc, table
    page = render_suite_page(title=str(getattr(scenario, "title", "suite")),
                             records=result.records, statistics=result.statistics,
                             spectra_html="".join(figures_html), units=units,
                             provenance={k: v for k, v in prov.items() if v is not None},
                             scaling_html=_scaling_html(scaling, esc, table)
                             if scaling is not None else "",
                             combined=(scaling or {}).get("combined"),
                             combination=str((scaling or {}).get("combination", "")))
    written.append(atomic_write_text(out / "suite.html", page))
    return written


def _scaled(panels: list, factor: float) -> list:
    """Spectra panels with every curve's values multiplied by ``factor`` (display units)."""
    return [(title, [(lab, per, np.asarray(val, float) * factor, kind)
                     for lab, per, val, kind in curves]) for title, curves in panels]
