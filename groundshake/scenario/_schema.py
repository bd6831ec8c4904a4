"""The schema as rows, for the key tables of docs/guide/scenario.md and docs/reference/scenario.md
and their tests (so they cannot drift)."""
from __future__ import annotations

import dataclasses

from ._spec import _schema_fields, allowed_text
from ._types import MotionComponent, Scenario

__all__ = ["schema_rows", "schema_markdown"]


def _default_text(f: dataclasses.Field) -> str:
    meta = f.metadata
    if meta.get("derived"):
        return meta["derived"]
    if f.default_factory is not dataclasses.MISSING:  # a sub-table: defaults are on its rows
        return "(table)"
    if f.default is dataclasses.MISSING:
        return "required"
    d = f.default
    if d is None:
        return "none"
    if isinstance(d, bool):
        return "true" if d else "false"
    if isinstance(d, str):
        return f'"{d}"'
    if isinstance(d, tuple):
        return "[" + ", ".join(f"{x:g}" if isinstance(x, float) else str(x) for x in d) + "]"
    if isinstance(d, float):
        return f"{d:g}"
    return str(d)


def schema_rows() -> list[tuple[str, str, str, str]]:
    """Every key of the scenario file: ``(key, default, allowed, description)``.

    Keys are written ``motion.{x,y,z}.file`` for the three components,
    ``parts[].size`` for arrays of tables and ``materials.NAME.density`` for
    named tables. A sub-table row (``equipment[].capacity``) is followed by its keys.
    """
    rows: list[tuple[str, str, str, str]] = []

    def walk(cls, prefix: str) -> None:
        for f in _schema_fields(cls):
            meta = f.metadata
            kind = meta["kind"]
            if cls is not MotionComponent and meta.get("cls") is MotionComponent:
                if f.name != "x":
                    continue
                key = f"{prefix}{{x,y,z}}"
            else:
                key = prefix + f.name
            doc = meta["doc"]
            if kind == "table":
                default = ("required" if (f.default is dataclasses.MISSING
                                          and f.default_factory is dataclasses.MISSING)
                           else "none" if f.default is None else "(table)")
                if key.endswith("{x,y,z}"):
                    doc = "one component: x and y horizontal, z vertical"
                rows.append((key, default, "a table", doc))
                walk(meta["cls"], key + ".")
            elif kind == "array":
                rows.append((key, _default_text(f) if f.default is not dataclasses.MISSING else "required",
                             "an array of tables", doc))
                walk(meta["cls"], key + "[].")
            elif kind == "named":
                rows.append((key, "required", "one table per name", doc))
                walk(meta["cls"], key + ".NAME.")
            else:
                rows.append((key, _default_text(f), allowed_text(meta), doc))

    walk(Scenario, "")
    return rows


def schema_markdown() -> str:
    """The key table (Markdown) of the scenario guide and reference, generated from the schema."""
    out = ["| key | default | allowed | meaning |", "|---|---|---|---|"]
    for key, default, allowed, doc in schema_rows():
        cells = [f"`{key}`", default, allowed, doc]
        out.append("| " + " | ".join(c.replace("|", "\\|") for c in cells) + " |")
    return "\n".join(out) + "\n"


if __name__ == "__main__":  # python -m groundshake.scenario._schema > table.md
    print(schema_markdown(), end="")
