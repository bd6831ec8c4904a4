"""Small HTML builders for the report. Every piece of text passes through :func:`esc`.

Nothing here trusts its input: titles, names and file metadata come from users and
files, so they are escaped wherever they appear (element text and attribute values).
Only the builders below produce markup.
"""
from __future__ import annotations

import html
import math
from typing import Any, Iterable, Mapping, Sequence

from .._toml import toml_key, toml_value

__all__ = ["esc", "num", "raw", "table", "figure", "section", "toml_text", "CSS"]


def esc(value: Any) -> str:
    """HTML-escape any value's text (``& < > " '``)."""
    return html.escape("" if value is None else str(value), quote=True)


def num(value: Any, digits: int = 4) -> str:
    """A number with ``digits`` significant digits; text is escaped; None is a dash."""
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int,)) and not isinstance(value, bool):
        return f"{value:d}"
    try:
        f = float(value)
    except (TypeError, ValueError):
        return esc(value)
    if not math.isfinite(f):
        return "—"
    if f == 0:
        return "0"
    if 1e-3 <= abs(f) < 1e6:
        decimals = max(0, digits - 1 - int(math.floor(math.log10(abs(f)))))
        text = f"{round(f, decimals):.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
        return text
    mant, exp = f"{f:.{digits - 1}e}".split("e")
    if "." in mant:
        mant = mant.rstrip("0").rstrip(".")
    return f"{mant}×10<sup>{int(exp)}</sup>"


def table(rows: Iterable[Sequence[Any]], header: Sequence[Any], *, depth: int = 0,
          cls: str = "grid", row_classes: Sequence[str] | None = None) -> str:
    """A table with a header row. Cells are escaped (numbers formatted); only cells
    made by :func:`raw` (markup built here, never user text) go in as they are."""
    head = "".join(f"<th>{esc(h)}</th>" for h in header)
    body = []
    for n, r in enumerate(rows):
        cells = []
        for c in r:
            if isinstance(c, _Html):
                cells.append(f"<td>{c}</td>")
            elif isinstance(c, (int, float)) and not isinstance(c, bool) or c is None:
                cells.append(f'<td class="n">{num(c)}</td>')
            elif isinstance(c, bool):
                cells.append(f"<td>{'yes' if c else 'no'}</td>")
            else:
                cells.append(f"<td>{esc(c)}</td>")
        rc = f' class="{esc(row_classes[n])}"' if row_classes and row_classes[n] else ""
        body.append(f"<tr{rc}>" + "".join(cells) + "</tr>")
    return (f'<table class="{esc(cls)}"><thead><tr>{head}</tr></thead><tbody>'
            + "".join(body) + "</tbody></table>")


class _Html(str):
    """A string already built as HTML by this module (not user text)."""


def raw(markup: str) -> _Html:
    return _Html(markup)


def figure(uri: str, caption: str, *, fid: str = "") -> str:
    """An ``<img>`` of a data URI with an escaped caption."""
    if not uri.startswith("data:image/"):
        raise ValueError("figures must be embedded data URIs")
    ident = f' id="{esc(fid)}"' if fid else ""
    return (f'<figure{ident}><img src="{esc(uri)}" alt="{esc(caption)}">'
            f"<figcaption>{esc(caption)}</figcaption></figure>")


def section(sid: str, title: str, body: str) -> str:
    return f'<section id="{esc(sid)}"><h2>{esc(title)}</h2>{body}</section>'


# ---------------------------------------------------------------- scenario echo
def toml_text(d: Mapping[str, Any]) -> str:
    """A mapping written as TOML text (for display; keys set to None become comments).

    Scalars first, then ``[tables]`` and ``[[arrays of tables]]``, one level deep
    as a scenario file has them; deeper mappings are inline tables.
    """
    head: list[str] = []
    tail: list[str] = []

    def put(lines: list[str], k: str, v: Any) -> None:
        if v is None:
            lines.append(f"# {toml_key(k)}: not set")
        else:
            lines.append(f"{toml_key(k)} = {toml_value(v)}")

    for k, v in d.items():
        k = str(k)
        if isinstance(v, Mapping) and v and all(isinstance(x, Mapping) for x in v.values()) \
                and k in ("materials",):
            for name, sub in v.items():
                tail.append("")
                tail.append(f"[{toml_key(k)}.{toml_key(str(name))}]")
                for kk, vv in sub.items():
                    put(tail, str(kk), vv)
        elif isinstance(v, Mapping):
            tail.append("")
            tail.append(f"[{toml_key(k)}]")
            for kk, vv in v.items():
                put(tail, str(kk), vv)
        elif isinstance(v, (list, tuple)) and v and all(isinstance(x, Mapping) for x in v):
            for item in v:
                tail.append("")
                tail.append(f"[[{toml_key(k)}]]")
                for kk, vv in item.items():
                    put(tail, str(kk), vv)
        else:
            put(head, k, v)
    return "\n".join(head + tail).strip() + "\n"


CSS = """
:root { --ink:#22303c; --teal:#1f7a7a; --amber:#d08c1f; --brick:#a8432a; --paper:#fbfaf7;
        --rule:#d9dee2; --soft:#eef3f3; }
* { box-sizing: border-box; }
html { background: #e9ecee; }
body { margin: 0 auto; max-width: 1180px; background: var(--paper); color: var(--ink);
       font: 14px/1.45 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; padding: 0 28px 40px; }
header.top { border-bottom: 4px solid var(--teal); padding: 22px 0 12px; }
header.top h1 { margin: 0 0 4px; font-size: 24px; letter-spacing: .01em; }
header.top .sub { color: #51667a; font-size: 13px; }
.banner { margin: 14px 0; padding: 10px 14px; border-left: 6px solid var(--brick);
          background: #f7ece7; font-weight: 600; }
.keyfigs { display: flex; flex-wrap: wrap; gap: 10px; margin: 12px 0 4px; }
.keyfigs div { flex: 1 1 150px; border: 1px solid var(--rule); background: #fff; padding: 8px 10px; }
.keyfigs b { display: block; font-size: 18px; color: var(--teal); }
.keyfigs span { font-size: 11.5px; color: #51667a; text-transform: uppercase; letter-spacing: .04em; }
nav.toc { margin: 10px 0 0; font-size: 13px; }
nav.toc a { color: var(--teal); text-decoration: none; margin-right: 14px; white-space: nowrap; }
section { margin-top: 30px; }
h2 { font-size: 19px; border-bottom: 1px solid var(--rule); padding-bottom: 4px; color: var(--teal); }
h3 { font-size: 15px; margin: 20px 0 6px; }
table { border-collapse: collapse; margin: 6px 0 12px; font-size: 12.5px; background: #fff; }
th, td { border: 1px solid var(--rule); padding: 3px 7px; vertical-align: top; text-align: left; }
thead th { background: var(--soft); }
table.kv th { background: var(--soft); font-weight: 600; width: 30%; }
table.kv table.kv th { background: #f6f8f8; }
td.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.over td { background: #f7e0d8; font-weight: 600; }
table.kv2 td:first-child { white-space: nowrap; }
table.answers td:nth-child(2) { text-align: right; font-variant-numeric: tabular-nums; }
b.dc { font-size: 13px; }
tr.over b.dc { color: #a8432a; }
ul.exceed li { margin: 4px 0; font-weight: 600; color: #7a2414; }
ul.exceed li::marker { content: "■ "; color: #a8432a; }
p.ok { color: #1f5f3f; font-weight: 600; }
p.exceed-note { border-left: 5px solid #e9c46a; background: #fbf3dc; padding: 6px 10px; }
.flag { display: inline-block; margin-left: 8px; padding: 1px 8px; border-radius: 3px;
        font-size: 12.5px; }
.flag.over { background: #a8432a; color: #fff; }
.flag.warn { background: #e9c46a; color: #22303c; }
span.n { font-variant-numeric: tabular-nums; }
details summary { cursor: pointer; color: #1f5f7a; }
.unit { color: #6a7784; font-size: 11.5px; }
.none { color: #6a7784; font-style: italic; }
pre { background: #fff; border: 1px solid var(--rule); padding: 10px; font-size: 12px;
      overflow-x: auto; white-space: pre-wrap; }
figure { margin: 10px 0 18px; }
figure img { max-width: 100%; height: auto; border: 1px solid var(--rule); background: #fff; }
figcaption { font-size: 12px; color: #51667a; margin-top: 3px; }
ul.warn li { margin: 4px 0; padding-left: 4px; }
ul.warn li::marker { content: "▲ "; color: var(--amber); }
ol.cautions li { margin: 6px 0; font-weight: 600; }
.note { font-size: 12.5px; color: #51667a; }
.scroll { overflow-x: auto; }
footer { margin-top: 34px; border-top: 1px solid var(--rule); padding-top: 8px; font-size: 12px;
         color: #6a7784; }
@page { size: A4; margin: 14mm 12mm; }
@media print {
  html, body { background: #fff; }
  body { max-width: none; padding: 0; font-size: 11px; }
  nav.toc { display: none; }
  section { break-before: auto; }
  h2 { break-after: avoid; }
  figure { break-inside: avoid; }
  figure img { max-height: 150mm; width: auto; max-width: 100%; }
  section#summary table { font-size: 9.5px; }
  section#summary ul.warn li, section#summary ol.cautions li { margin: 1px 0; font-size: 9.5px; }
  ol.cautions li { font-weight: normal; }
  section { margin-top: 14px; }
  h3 { margin: 10px 0 4px; }
  table { font-size: 9px; }
  tr { break-inside: avoid; }
  td, th { overflow-wrap: anywhere; }
  figure img { border: 0; }
  .scroll { overflow: visible; }
  a { color: inherit; text-decoration: none; }
}
"""
