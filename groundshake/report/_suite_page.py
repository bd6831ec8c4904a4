"""suite.html: the page of a suite of records, at the standard of the run report.

Quantities are named in words (never JSON paths), bolts are numbered from 1, values are
shown in display units taken from the output contract (``results/_schema.py``), and the
first screen holds the key figures: how many record sets ran, the median and 84th
percentile of the governing peaks, and the statistics of the worst bolt demand/capacity.
:func:`write_suite_page` reads the suite's ``suite.json`` (the contract's ``SUITE_FILES``)
and writes ``suite.html`` beside it, with the spectra bands drawn from the statistics it
is given.
"""
from __future__ import annotations

import datetime as _dt
import json
import os
import re
from pathlib import Path
from typing import Any, Mapping, Sequence

import numpy as np

from .. import __version__
from .._atomic import atomic_write_text
from .._cautions import CAUTIONS, SCREENING_NOTE
from .._constants import DIRECTIONS
from .._errors import InputError
from ..results._schema import SUITE_FILES, kind_of
from ._figures import data_uri, spectra_figure
from ._html import CSS, esc, figure, raw, section, table
from ._units import check_system, display_unit, fmt, to_display

__all__ = ["quantity_words", "suite_kind", "render_suite_page", "suite_spectra_html",
           "write_suite_page"]

_WORDS = {
    "base_shear": "peak base shear", "base_axial": "peak vertical base force",
    "overturning_moment": "peak overturning moment about", "torsion": "peak torsion",
    "relative_displacement": "peak displacement relative to the ground",
    "von_mises": "peak von Mises stress", "principal_tension": "peak principal tension",
    "principal_compression": "peak principal compression",
    "peak_absolute_acceleration": "peak absolute acceleration",
    "peak_relative_displacement": "peak displacement relative to the ground",
    "peak_angular_acceleration": "peak angular acceleration",
    "peak_tension": "peak tension", "peak_shear": "peak shear",
    "dc_tension": "demand/capacity in tension", "dc_shear": "demand/capacity in shear",
    "interaction_ratio": "tension–shear interaction",
    "worst_dc": "largest bolt demand/capacity", "value": "",
}

_INDEX = re.compile(r"\[(\d+)\]")


def _parts(path: str) -> list[str]:
    """``a.b[2].c`` → ``["a", "b", "2", "c"]`` (names may hold blanks, not dots)."""
    return [p for p in _INDEX.sub(r".\1", path).split(".") if p != ""]


def suite_kind(path: str) -> str | None:
    """Quantity kind of a suite statistic's path (``equipment.NAME.anchors[0].peak_tension``)
    from the output contract; a peak given by its value alone (``peaks.relative_displacement.x``)
    takes the kind of its ``.value``."""
    parts = _parts(path)
    return kind_of(parts) or kind_of(parts + ["value"])


def quantity_words(path: str) -> str:
    """Plain words for a suite statistic's path; bolts numbered from 1.

    >>> quantity_words("equipment.pump.anchors[2].peak_tension")
    'pump, bolt 3: peak tension'
    >>> quantity_words("peaks.overturning_moment.x")
    'peak overturning moment about x'
    """
    p = _parts(path)

    def w(key: str) -> str:
        return _WORDS.get(key, key.replace("_", " "))

    if p and p[0] == "peaks":
        rest = [w(x) if x in _WORDS else x for x in p[1:]]
        return " ".join(x for x in rest if x)
    if len(p) >= 2 and p[0] in ("sensors", "equipment"):
        name = p[1]
        if len(p) >= 5 and p[2] == "anchors" and p[3].isdigit():
            return f"{name}, bolt {int(p[3]) + 1}: {w(p[4])}"
        tail = " ".join(w(x) if x in _WORDS else x for x in p[2:])
        return f"{name}: {tail}".strip()
    if p and p[0] == "worst_dc":
        return w("worst_dc")
    return " ".join(w(x) if x in _WORDS else x for x in p)


def render_suite_page(*, title: str, records: Sequence[Mapping[str, Any]],
                      statistics: Mapping[str, Mapping[str, Any]], spectra_html: str = "",
                      units: str = "si", provenance: Mapping[str, Any] | None = None,
                      scaling_html: str = "", combined: Mapping[str, float] | None = None,
                      combination: str = "") -> str:
    """The HTML text of suite.html.

    Parameters
    ----------
    title : str
        The scenario's title.
    records : sequence of dict
        One per record set: ``record``, ``status``, ``files`` {direction: path},
        ``peaks`` (the run's peak tree), ``warnings``, ``error`` (failed sets),
        ``worst_dc`` (optional {value, equipment, bolt}).
    statistics : dict
        Path → statistics (``count``, ``median``, ``p16``, ``p84``, ``max``,
        ``lognormal_median``, ``beta``), SI values.
    spectra_html : str
        Figures already built (markup from this package only).
    units : {"si", "us"}
        Display units.
    provenance : dict, optional
        ``version``, ``date``, ``command``, ``scenario`` shown at the end.
    scaling_html : str
        The scaling section (markup from this package only) when the sets were scaled.
    combined : dict, optional
        Path → the value the combination rule keeps (SI), shown as a last column
        ``combined (RULE)`` with ``combination`` naming the rule.
    """
    check_system(units)
    ref: dict[str, float] = {}
    for path, st in statistics.items():
        k = suite_kind(path)
        if k and isinstance(st, Mapping) and st.get("max") is not None:
            ref[k] = max(ref.get(k, 0.0), abs(float(st["max"])))

    def n(v, kind):
        return fmt(v, kind, units, ref=ref.get(kind) if kind else None)

    def h(label, kind):
        u = display_unit(kind, units) if kind else ""
        return f"{label} [{u}]" if u else label

    ok = [r for r in records if r.get("status") == "ok"]
    failed = [r for r in records if r.get("status") != "ok"]

    # ---- key figures: the governing peaks and the bolt D/C over the suite
    key_rows = [["record sets run", f"{len(ok)} of {len(records)}", "", "", ""]]
    for path in ("peaks.base_shear.x", "peaks.base_shear.y", "peaks.overturning_moment.x",
                 "peaks.overturning_moment.y"):
        st = statistics.get(path)
        if isinstance(st, Mapping) and st.get("count"):
            k = suite_kind(path)
            key_rows.append([quantity_words(path), n(st.get("median"), k), n(st.get("p84"), k),
                             n(st.get("max"), k), display_unit(k, units) if k else ""])
    dcs = [float(r["worst_dc"]["value"]) for r in ok
           if isinstance(r.get("worst_dc"), Mapping) and r["worst_dc"].get("value") is not None]
    classes = [""] * len(key_rows)
    if dcs:
        a = np.asarray(dcs)
        key_rows.append(["largest bolt demand/capacity of each record",
                         n(float(np.median(a)), "ratio"), n(float(np.percentile(a, 84)), "ratio"),
                         n(float(a.max()), "ratio"),
                         f"above 1 in {int((a > 1).sum())} of {a.size}"])
        classes.append("over" if (a > 1).any() else "")
    key_html = table(key_rows, ["quantity", "median", "84th percentile", "largest", "unit"],
                     row_classes=classes, cls="grid answers")

    # ---- statistics of every peak, in words and display units
    rows = []
    for path, st in statistics.items():
        if not isinstance(st, Mapping) or not st.get("count"):
            continue
        k = suite_kind(path)
        roundoff = k is not None and ref.get(k, 0) > 0 and abs(float(st.get("max") or 0)) < 1e-9 * ref[k]
        if roundoff:                 # every record's value is round-off: no spread to show
            st = {c: (0.0 if c != "beta" else None) for c in st} | {"count": st.get("count")}
        rows.append([quantity_words(path), display_unit(k, units) if k else "", st.get("count"),
                     *(raw(f'<span class="n">{esc(n(st.get(c), k))}</span>')
                       for c in ("median", "p16", "p84", "max", "lognormal_median")),
                     raw(f'<span class="n">{esc(fmt(st.get("beta"), None))}</span>')]
                    + ([raw(f'<span class="n">{esc(n((combined or {}).get(path), k))}</span>')]
                       if combined is not None else []))
    stats_html = table(rows, ["quantity", "unit", "records", "median", "16th percentile",
                              "84th percentile", "largest", "log-normal median", "β (ln)"]
                       + ([f"combined ({combination})"] if combined is not None else []))

    # ---- the record sets, numbered from 1
    rec_rows, rec_cls = [], []
    for i, r in enumerate(records, start=1):
        bs = (r.get("peaks") or {}).get("peaks", {}).get("base_shear", {}) if isinstance(
            r.get("peaks"), Mapping) else {}
        wd = r.get("worst_dc") if isinstance(r.get("worst_dc"), Mapping) else {}
        files = ", ".join(f"{c}: {str(f).replace(chr(92), '/').rsplit('/', 1)[-1]}"
                          for c, f in (r.get("files") or {}).items())
        dc = wd.get("value")
        rec_rows.append([i, r.get("record", ""), "ran" if r.get("status") == "ok" else "FAILED",
                         files, n(bs.get("x"), "force"), n(bs.get("y"), "force"),
                         "—" if dc is None else f"{n(dc, 'ratio')} (bolt {wd.get('bolt')})"])
        rec_cls.append("over" if r.get("status") != "ok" or (dc is not None and dc > 1) else "")
    rec_html = table(rec_rows, ["no.", "record set", "status", "files", h("peak base shear x", "force"),
                                h("peak base shear y", "force"), "largest bolt D/C"],
                     row_classes=rec_cls)

    # ---- failures, warnings (with how many records gave each), cautions, provenance
    fail_html = (table([[r.get("record", ""), r.get("error", "")] for r in failed],
                       ["record set", "why it failed"]) if failed
                 else '<p class="none">No record set failed.</p>')
    counts: dict[str, int] = {}
    for r in ok:
        for wtext in r.get("warnings") or []:
            counts[str(wtext)] = counts.get(str(wtext), 0) + 1
    warn_html = ('<ul class="warn">' + "".join(
        f"<li>{esc(wtext)} <span class=\"unit\">({c} of {len(ok)} record sets)</span></li>"
        for wtext, c in sorted(counts.items(), key=lambda t: -t[1])) + "</ul>"
                 if counts else '<p class="none">No automatic warnings.</p>')
    caut_html = '<ol class="cautions">' + "".join(f"<li>{esc(c)}</li>" for c in CAUTIONS) + "</ol>"
    prov = dict(provenance or {})
    prov.setdefault("version", __version__)
    prov.setdefault("date", _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds"))
    prov_rows = [[k.replace("_", " "), str(v)] for k, v in prov.items() if v is not None]
    prov_html = table(prov_rows, ["item", "value"], cls="grid kv2")

    name_of = {"si": "SI", "us": "US customary"}[units]
    body = [section("suite-summary", "Summary", key_html
                    + ('<p class="note">Demand/capacity compares bolt peaks with the capacities '
                       "entered: a screening comparison, not a code check.</p>" if dcs else "")),
            *([section("suite-scaling", "Scaling to a target", scaling_html)] if scaling_html else []),
            section("suite-statistics", "Statistics of the peaks over the record sets", stats_html),
            section("suite-spectra", "Spectra over the record sets",
                    spectra_html or '<p class="none">No spectra.</p>'),
            section("suite-records", "Record sets", rec_html),
            section("suite-failures", "Record sets that failed", fail_html),
            section("warnings", "Warnings", warn_html),
            section("cautions", "Cautions", caut_html),
            section("provenance", "Provenance", prov_html)]
    head = f"{title} — suite of {len(records)} record sets"
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            '<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{esc(head)}</title><style>{CSS}</style></head><body>"
            f'<header class="top"><h1>{esc(head)}</h1>'
            f'<div class="sub">Seismic screening of a suite · groundshake {esc(__version__)} · '
            f"units {name_of}</div>"
            f'<div class="banner">{esc(SCREENING_NOTE)} Linear-elastic model; screening, not '
            "design; verify against the governing code and have a licensed engineer review."
            "</div></header><main>" + "".join(body) + "</main>"
            f"<footer>{esc(SCREENING_NOTE)} Generated by groundshake {esc(__version__)}.</footer>"
            "</body></html>\n")


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


def _scaled(panels: list, factor: float) -> list:
    """Spectra panels with every curve's values multiplied by ``factor`` (display units)."""
    return [(title, [(lab, per, np.asarray(val, float) * factor, kind)
                     for lab, per, val, kind in curves]) for title, curves in panels]


def _scaling_html(doc: Mapping[str, Any]) -> str:
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


def suite_spectra_html(spectra: Mapping[str, Any] | None, *, target_psa=None,
                       units: str = "si") -> str:
    """The figures of the spectra bands over a suite (markup), or "" without statistics.

    Parameters
    ----------
    spectra : mapping, optional
        Statistics of the spectra over the sets: ``periods`` [s] (n_p,), ``damping``,
        ``points`` and for ``ground_psa`` (3, n_d, n_p) and ``floor_psa_broadened``
        (n_points, 3, n_d, n_p) a mapping of ``median``, ``p16``, ``p84``, ``max``
        [m/s²].
    target_psa : array (n_p,), optional
        A target spectrum at ``periods`` [m/s²], drawn over the horizontal ground bands.
    units : {"si", "us"}
        Display units of the axes.
    """
    if not spectra:
        return ""
    g = to_display(1.0, "acceleration", units)
    ylabel = f"PSA [{display_unit('acceleration', units)}]"
    figures_html = []
    if "ground_psa" in spectra:
        panels = _scaled(_band_panels(spectra, "ground_psa", ["ground"], target_psa), g)
        fig = spectra_figure(panels, columns=3, ylabel=ylabel, shared_legend=True)
        figures_html.append(figure(data_uri(fig), "Ground spectra over the suite: median, "
                                   "16th and 84th percentiles (log-normal) and the largest "
                                   "value at each period", fid="fig-ground-band"))
    if "floor_psa_broadened" in spectra and spectra["points"]:
        panels = _scaled(_band_panels(spectra, "floor_psa_broadened", spectra["points"]), g)
        fig = spectra_figure(panels, columns=3, ylabel=ylabel, shared_legend=True)
        figures_html.append(figure(data_uri(fig), "Broadened floor spectra over the suite: "
                                   "median, 16th and 84th percentiles and the largest value",
                                   fid="fig-floor-band"))
    return "".join(figures_html)


def write_suite_page(out_dir: str | os.PathLike, *, spectra: Mapping[str, Any] | None = None,
                     target_psa=None, units: str = "si",
                     provenance: Mapping[str, Any] | None = None) -> Path:
    """Write ``suite.html`` from the ``suite.json`` of a suite's output folder.

    The title, the record sets, the statistics of the peaks and the scaling come from
    ``suite.json`` (SI values; kinds from the output contract); the spectra bands from
    ``spectra`` (see :func:`suite_spectra_html`), which the file does not hold.

    Parameters
    ----------
    out_dir : path
        The suite's output folder; ``suite.html`` is written there atomically.
    spectra, target_psa
        See :func:`suite_spectra_html`.
    units : {"si", "us"}
        Display units.
    provenance : mapping, optional
        Items shown at the end (the scenario file, how the suite ran).

    Returns
    -------
    Path
        The page written.

    Raises
    ------
    InputError
        The folder holds no readable suite.json.
    """
    out = Path(out_dir)
    path = out / SUITE_FILES["suite"]
    try:
        doc = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError) as e:
        raise InputError(f"{path}: cannot read the suite's results ({e})") from None
    spectra_html = suite_spectra_html(spectra, target_psa=target_psa, units=units)
    scaling = doc.get("scaling")
    page = render_suite_page(title=str(doc.get("title", "suite")), records=doc.get("records", []),
                             statistics=doc.get("statistics", {}), spectra_html=spectra_html,
                             units=units, provenance=provenance,
                             scaling_html=_scaling_html(scaling) if scaling is not None else "",
                             combined=(scaling or {}).get("combined"),
                             combination=str((scaling or {}).get("combination", "")))
    return atomic_write_text(out / SUITE_FILES["page"], page)
