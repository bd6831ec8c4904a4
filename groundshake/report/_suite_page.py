"""suite.html: the page of a suite of records, at the standard of the run report.

Quantities are named in words (never JSON paths), bolts are numbered from 1, values are
shown in display units taken from the output contract (``results/_schema.py``), and the
first screen holds the key figures: how many record sets ran, the median and 84th
percentile of the governing peaks, and the statistics of the worst bolt demand/capacity.
"""
from __future__ import annotations

import datetime as _dt
import re
from typing import Any, Mapping, Sequence

import numpy as np

from .. import __version__
from .._cautions import CAUTIONS, SCREENING_NOTE
from ..results._schema import kind_of
from ._html import CSS, esc, raw, section, table
from ._units import check_system, display_unit, fmt

__all__ = ["quantity_words", "suite_kind", "render_suite_page"]

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
