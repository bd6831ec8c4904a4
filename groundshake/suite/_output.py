"""Suite outputs beyond suite.json: spectra statistics as CSV and figures, suite.html."""
from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import Sequence

import numpy as np

from .._atomic import atomic_write_text
from .._cautions import CAUTIONS, SCREENING_NOTE
from .._constants import DIRECTIONS

__all__ = ["write_suite_outputs"]

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
    for p, name in enumerate(names):
        for j, d in enumerate(DIRECTIONS):
            st = spec[key]
            sel = (j, i) if key == "ground_psa" else (p, j, i)
            med = st["median"][sel]
            if not np.any(med > 0):
                continue
            curves = [(f"median {dl}", periods, med, "line"),
                      ("16th percentile", periods, st["p16"][sel], "raw"),
                      ("84th percentile", periods, st["p84"][sel], "raw"),
                      ("envelope", periods, st["max"][sel], "ground")]
            if target is not None and key == "ground_psa" and d != "z":
                curves.append(("target", periods, target, "target"))
            panels.append((f"{name} {d}", curves))
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


def write_suite_outputs(result, scenario, *, target: str | None = None) -> list[Path]:
    """Write the spectra statistics (CSV, PNG) and ``suite.html`` into ``result.out_dir``.

    Parameters
    ----------
    result : SuiteResult
    scenario : Scenario
    target : str, optional
        A target spectrum spec (see :func:`groundshake.spectra.parse_target`) drawn
        over the ground-spectra band; the scenario's ``motion.target`` if not given.
    """
    from ..report._figures import data_uri, spectra_figure
    from ..report._html import CSS, esc, figure, section, table

    out = Path(result.out_dir)
    written: list[Path] = []
    spec = result.spectra_statistics
    figures_html = []
    target_psa = None
    target = target or getattr(getattr(scenario, "motion", None), "target", None)
    if spec:
        for name, text in _spectra_csv(spec).items():
            written.append(atomic_write_text(out / name, text))
        if target:
            from ..spectra import parse_target
            target_psa = np.asarray(parse_target(target, base_dir=scenario.base_dir)
                                    .psa(np.asarray(spec["periods"], dtype=float)))
        if "ground_psa" in spec:
            fig = spectra_figure(_band_panels(spec, "ground_psa", ["ground"], target_psa),
                                 columns=3)
            figures_html.append(figure(data_uri(fig), "Ground spectra over the suite: median "
                                       "(geometric mean), 16th–84th percentile band and envelope",
                                       fid="fig-ground-band"))
        if "floor_psa_broadened" in spec and spec["points"]:
            fig = spectra_figure(_band_panels(spec, "floor_psa_broadened", spec["points"]),
                                 columns=3)
            figures_html.append(figure(data_uri(fig), "Broadened floor spectra over the suite",
                                       fid="fig-floor-band"))
    stats_rows = [(k, v.get("count"), v.get("mean"), v.get("median"), v.get("p16"), v.get("p84"),
                   v.get("max"), v.get("lognormal_median"), v.get("beta"))
                  for k, v in result.statistics.items()]
    scaling = getattr(result, "scaling", None)
    stats_head = ["quantity", "n", "mean", "median", "16th", "84th", "max",
                  "log-normal median", "β (ln)"]
    if scaling is not None and "combined" in scaling:       # the value the rule keeps
        stats_head.append(f"combined ({scaling['combination']})")
        stats_rows = [row + (scaling["combined"].get(row[0]),) for row in stats_rows]
    failures = [(r["record"], r.get("error", "")) for r in result.records if r.get("status") != "ok"]
    warnings_ = sorted({w for r in result.records for w in r.get("warnings", [])})
    engine = getattr(result, "engine", None)
    body = [
        section("suite-engine", "How it ran",
                f"<p>{esc(engine.line())}</p>" if engine is not None else "<p>—</p>"),
        section("suite-records", "Record sets",
                table([(r["record"], r["status"], ", ".join(f"{c}: {Path(f).name}" for c, f in
                                                           r.get("files", {}).items()))
                       for r in result.records], ["record set", "status", "files"])),
        *([section("suite-scaling", "Scaling to a target", _scaling_html(scaling, esc, table))]
          if scaling is not None else []),
        section("suite-statistics", "Statistics of the peaks (SI units)",
                table(stats_rows, stats_head)),
        section("suite-spectra", "Spectra", "".join(figures_html) or "<p>No spectra.</p>"),
        section("suite-failures", "Record failures",
                table(failures, ["record set", "error"]) if failures
                else "<p>No record failed.</p>"),
        section("warnings", "Warnings", "<ul>" + "".join(f"<li>{esc(w)}</li>" for w in warnings_)
                + "</ul>" if warnings_ else "<p>None.</p>"),
        section("cautions", "Cautions", "<ul>" + "".join(f"<li>{esc(c)}</li>" for c in CAUTIONS)
                + "</ul>"),
    ]
    title = f"{getattr(scenario, 'title', 'suite')} — suite of {len(result.records)} record sets"
    page = ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>{esc(title)}</title><style>{CSS}</style></head><body>"
            f"<header class=\"top\"><h1>{esc(title)}</h1>"
            f"<div class=\"banner\">{esc(SCREENING_NOTE)}</div></header><main>"
            + "".join(body) + "</main></body></html>\n")
    written.append(atomic_write_text(out / "suite.html", page))
    return written
