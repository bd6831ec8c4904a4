"""The scenario spec engine: how a TOML value is checked against the metadata of a
dataclass field (kind, range, units, choices) and turned into the field's value, with
``FILE:LINE: key.path: given VALUE; allowed WHAT`` messages."""
from __future__ import annotations

import copy
import dataclasses
import difflib
import functools
import json
import math
import os
import re
import types
import warnings
from pathlib import Path
from typing import Any

from .._errors import (GroundshakeError, GroundshakeWarning, InputError, RecordError,
                       ScenarioError, ScenarioRecordError)
from ..processing._settings import value_type
from ._lines import key_lines, line_of
from ._types import Scenario


_SPEC_RE = re.compile(r"^[A-Za-z][A-Za-z0-9_]+:")
_BARE_KEY = re.compile(r"^[A-Za-z0-9_-]+$")


# --- messages ----------------------------------------------------------------------------

def format_path(path: tuple) -> str:
    """``("parts", 0, "size")`` → ``"parts[0].size"``; odd keys are quoted."""
    out = ""
    for k in path:
        if isinstance(k, int):
            out += f"[{k}]"
        else:
            text = k if _BARE_KEY.match(k) else json.dumps(k)  # quoted, control chars escaped
            out += ("." if out else "") + text
    return out or "(top level)"


def _show(value: Any, limit: int = 80) -> str:
    if isinstance(value, bool):
        text = "true" if value else "false"
    elif isinstance(value, dict):
        text = "a table {" + ", ".join(format_path((str(k),)) for k in list(value)[:8]) + (
            "…" if len(value) > 8 else "") + "}"
    elif isinstance(value, Path):
        text = repr(str(value))
    else:
        try:
            text = repr(value)
        except Exception:  # pragma: no cover - repr of odd objects
            text = f"<{type(value).__name__}>"
    text = text.replace("\n", "\\n").replace("\r", "\\r")
    return text if len(text) <= limit else text[: limit - 1] + "…"


class _Context:
    def __init__(self, source: str, text: str | None, base_dir: Path) -> None:
        self.source = source
        self.lines = key_lines(text) if text else None
        self.base_dir = base_dir
        self.notes: list[str] = []

    def where(self, path: tuple) -> str:
        line = line_of(self.lines, path)
        return f"{self.source}:{line}" if line is not None else self.source

    def error(self, path: tuple, given: str, allowed: str) -> ScenarioError:
        names = [k for k in path if isinstance(k, str)]
        e = ScenarioError(f"given {given}; allowed {allowed}",
                          param=names[-1] if names else None)
        return self.located(e, path)

    def located(self, err: GroundshakeError, path: tuple) -> ScenarioError:
        """``err`` shown at the key ``path``: ``FILE:LINE: key.path`` in front of its message,
        as a :class:`ScenarioError` that keeps its ``param`` and ``value`` and gains
        ``key``, ``line`` and ``file``."""
        key = format_path(path)
        cls = ScenarioRecordError if isinstance(err, RecordError) else ScenarioError
        return err.located(f"{self.where(path)}: {key}", cls=cls, key=key,
                           line=line_of(self.lines, path), file=self.source)

    def keyed(self, err: GroundshakeError, path: tuple, params=()) -> ScenarioError:
        """A library error met while checking the key ``path``.

        Its ``param`` names a key of that table (one of ``params``): shown at that key.
        Otherwise it is shown at ``path`` itself, its own location (a parameter of a target
        spec, a record file) kept after the key.
        """
        if err.param is not None and err.param in params:
            return self.located(err, tuple(path) + (err.param,))
        inner = err.location
        out = self.located(err, path)
        if inner and inner != out.key:
            out.where = f"{out.where}: {inner}"
        return out

    def bad(self, path: tuple, value: Any, allowed: str) -> ScenarioError:
        return self.error(path, _show(value), allowed)

    def warn(self, path: tuple, text: str) -> None:
        msg = f"{self.where(path)}: {format_path(path)}: {text}"
        self.notes.append(msg)
        warnings.warn(msg, GroundshakeWarning, stacklevel=4)


# --- conversions by kind -----------------------------------------------------------------

def _fmt(x: float) -> str:
    return f"{x:g}"


def _range_text(meta: dict, noun: str = "a number") -> str:
    if meta.get("allowed"):
        return meta["allowed"]
    lo = ("gt", meta["gt"]) if meta.get("gt") is not None else (
        ("ge", meta["ge"]) if meta.get("ge") is not None else None)
    hi = ("lt", meta["lt"]) if meta.get("lt") is not None else (
        ("le", meta["le"]) if meta.get("le") is not None else None)
    if lo and hi:
        text = f"{noun} in {'(' if lo[0] == 'gt' else '['}{_fmt(lo[1])}, {_fmt(hi[1])}{')' if hi[0] == 'lt' else ']'}"
    elif lo:
        text = f"{noun} {'>' if lo[0] == 'gt' else '≥'} {_fmt(lo[1])}"
    elif hi:
        text = f"{noun} {'<' if hi[0] == 'lt' else '≤'} {_fmt(hi[1])}"
    else:
        text = f"{noun}, not zero" if meta.get("nonzero") else noun
    unit = meta.get("unit")
    if unit and unit not in ("%",):
        text += f" [{unit}]"
    elif unit == "%":
        text += " [%]"
    return text


_ALLOWED_CACHE: dict[int, tuple[Any, str]] = {}


def allowed_text(meta: dict) -> str:
    """What a key accepts, in words (used in messages and the README table)."""
    hit = _ALLOWED_CACHE.get(id(meta))
    if hit is not None and hit[0] is meta:
        return hit[1]
    text = _allowed_text(meta)
    _ALLOWED_CACHE[id(meta)] = (meta, text)
    return text


def _allowed_text(meta: dict) -> str:
    kind = meta["kind"]
    if kind == "number":
        return _range_text(meta)
    if kind == "integer":
        return _range_text(meta, "an integer")
    if kind == "bool":
        return "true or false"
    if kind == "string":
        return "a non-empty string"
    if kind == "choice":
        return "one of " + ", ".join(f'"{c}"' for c in meta["choices"])
    if kind == "units":
        return "one of g, m/s2, cm/s2 (gal), mm/s2, ft/s2, in/s2 (common spellings such as m/s^2 too)"
    if kind == "vector":
        each = _range_text({**meta, "unit": ""}, "")
        each = f", each {each.strip()}" if each.strip() else ""
        unit = f" [{meta['unit']}]" if meta.get("unit") else ""
        return f"an array of {meta['length']} numbers{each}{unit}"
    if kind == "numbers":
        each = _range_text({**meta, "unit": ""}, "").strip()
        unit = f" [{meta['unit']}]" if meta.get("unit") else ""
        return f"an array of numbers, each {each}{unit}"
    if kind == "points":
        unit = f" [{meta['unit']}]" if meta.get("unit") else ""
        return f"an array of [x, y] pairs{unit}"
    if kind == "path":
        return "a path to an existing file, relative to the scenario file"
    if kind == "trace":
        return "an integer ≥ 0 or a channel code"
    if kind == "target":
        return "a target spec (asce7:..., en1998:...), a CSV file or a CSMIP Volume 3 file"
    if kind == "table":
        names = [f.name for f in _schema_fields(meta["cls"])]
        return "a table with keys " + ", ".join(names)
    if kind == "array":
        return "an array of tables ([[...]]) with keys " + ", ".join(
            f.name for f in _schema_fields(meta["cls"]))
    if kind == "named":
        return "tables [NAME] with keys " + ", ".join(f.name for f in _schema_fields(meta["cls"]))
    raise AssertionError(kind)  # pragma: no cover - schema error, not user input


@functools.lru_cache(maxsize=None)
def _schema_fields(cls) -> tuple[dataclasses.Field, ...]:
    """The fields of a table of the schema, each with its key's metadata (``kind`` ...).

    A scenario type declares it with :func:`spec`; a library's settings (plain metadata:
    doc, unit, limits, choices) get the kind of their values' type (:func:`_adopted`).
    """
    return tuple(f if "kind" in f.metadata else _adopted(cls, f)
                 for f in dataclasses.fields(cls) if not f.metadata.get("internal"))


_KIND_OF_TYPE = {bool: "bool", int: "integer", float: "number", str: "string"}


def _adopted(cls, f: dataclasses.Field) -> dataclasses.Field:
    """A field of a library's settings dataclass as a key of the schema: its plain metadata
    with the ``kind`` of its values (``choice`` where it lists choices) and no derived
    default."""
    base, _ = value_type(cls, f.name)
    kind = "choice" if f.metadata.get("choices") else _KIND_OF_TYPE[base]
    out = copy.copy(f)
    out.metadata = types.MappingProxyType({"kind": kind, "derived": None, **f.metadata})
    return out


def _is_number(v: Any) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def _to_float(v: Any, path: tuple, ctx: _Context, allowed: str) -> float:
    if not _is_number(v):
        raise ctx.bad(path, v, allowed)
    try:
        x = float(v)
    except OverflowError:
        raise ctx.bad(path, v, allowed) from None
    if not math.isfinite(x):
        raise ctx.bad(path, v, allowed + " (finite)")
    return x


def _in_range(x: float, meta: dict) -> bool:
    if meta.get("gt") is not None and not x > meta["gt"]:
        return False
    if meta.get("ge") is not None and not x >= meta["ge"]:
        return False
    if meta.get("lt") is not None and not x < meta["lt"]:
        return False
    if meta.get("le") is not None and not x <= meta["le"]:
        return False
    if meta.get("nonzero") and x == 0.0:
        return False
    return True


def _number(v, meta, path, ctx) -> float:
    allowed = allowed_text(meta)
    x = _to_float(v, path, ctx, allowed)
    if not _in_range(x, meta):
        raise ctx.bad(path, v, allowed)
    return x


def _numbers_in_range(v, meta: dict, path: tuple, ctx: _Context, allowed: str) -> tuple:
    """Every item a number within ``meta``'s range, as a tuple of floats; else the key's error."""
    out = []
    for x in v:
        if not _is_number(x) or not _in_range(_to_float(x, path, ctx, allowed), meta):
            raise ctx.bad(path, v, allowed)
        out.append(float(x))
    return tuple(out)


def _convert(f: dataclasses.Field, v: Any, path: tuple, ctx: _Context) -> Any:
    meta = f.metadata
    kind = meta["kind"]
    allowed = allowed_text(meta)
    if kind == "number":
        return _number(v, meta, path, ctx)
    if kind == "integer":
        if not isinstance(v, int) or isinstance(v, bool):
            raise ctx.bad(path, v, allowed)
        if not _in_range(v, meta):
            raise ctx.bad(path, v, allowed)
        return int(v)
    if kind == "bool":
        if not isinstance(v, bool):
            raise ctx.bad(path, v, allowed)
        return v
    if kind == "string":
        if not isinstance(v, str) or not v.strip():
            raise ctx.bad(path, v, allowed)
        return v
    if kind == "choice":
        if not isinstance(v, str) or v not in meta["choices"]:
            hint = _did_you_mean(v, meta["choices"]) if isinstance(v, str) else ""
            raise ctx.bad(path, v, allowed + hint)
        return v
    if kind == "units":
        from ..records._units import canonical_units
        from .._errors import RecordError
        if not isinstance(v, str):
            raise ctx.bad(path, v, allowed)
        try:
            return canonical_units(v)
        except RecordError:
            raise ctx.bad(path, v, allowed) from None
    if kind == "vector":
        if not isinstance(v, (list, tuple)) or len(v) != meta["length"]:
            raise ctx.bad(path, v, allowed)
        return _numbers_in_range(v, meta, path, ctx, allowed)
    if kind == "numbers":
        if _is_number(v):
            v = [v]
        if not isinstance(v, (list, tuple)) or not v:
            raise ctx.bad(path, v, allowed)
        return _numbers_in_range(v, meta, path, ctx, allowed)
    if kind == "points":
        if not isinstance(v, (list, tuple)):
            raise ctx.bad(path, v, allowed)
        out = []
        for i, p in enumerate(v):
            if not isinstance(p, (list, tuple)) or len(p) != 2:
                raise ctx.bad(path + (i,), p, allowed)
            out.append(tuple(_to_float(x, path + (i,), ctx, allowed) for x in p))
        return tuple(out)
    if kind == "path":
        return _existing_file(v, path, ctx, allowed)
    if kind == "trace":
        if isinstance(v, bool) or not isinstance(v, (int, str)):
            raise ctx.bad(path, v, allowed)
        if isinstance(v, int) and v < 0 or isinstance(v, str) and not v.strip():
            raise ctx.bad(path, v, allowed)
        return v
    if kind == "target":
        if not isinstance(v, str) or not v.strip():
            raise ctx.bad(path, v, allowed)
        if _SPEC_RE.match(v.strip()):
            return v.strip()
        head, sep, options = v.strip().rpartition(":")
        if sep and "=" in options and head.strip() and not (ctx.base_dir / v.strip()).exists():
            # FILE:key=value,... (a CSMIP Volume 3 file with its damping and channel)
            return f"{_existing_file(head.strip(), path, ctx, allowed)}:{options}"
        return str(_existing_file(v, path, ctx, allowed))
    if kind == "table":
        return _parse_obj(meta["cls"], v, path, ctx)
    if kind == "array":
        if isinstance(v, dict):
            raise ctx.bad(path, v, allowed + f" (write [[{format_path(path)}]], not [{format_path(path)}])")
        if not isinstance(v, (list, tuple)):
            raise ctx.bad(path, v, allowed)
        return tuple(_parse_obj(meta["cls"], item, path + (i,), ctx) for i, item in enumerate(v))
    if kind == "named":
        if not isinstance(v, dict):
            raise ctx.bad(path, v, allowed)
        out = {}
        for name, item in v.items():
            if not isinstance(name, str) or not name.strip():
                raise ctx.bad(path, name, "a non-empty name")
            out[name] = _parse_obj(meta["cls"], item, path + (name,), ctx)
        return out
    raise AssertionError(kind)  # pragma: no cover


def _did_you_mean(word: str, options) -> str:
    close = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f" (did you mean '{close[0]}'?)" if close else ""


def _existing_file(v: Any, path: tuple, ctx: _Context, allowed: str) -> Path:
    if not isinstance(v, (str, os.PathLike)) or not str(v).strip():
        raise ctx.bad(path, v, allowed)
    try:
        p = Path(os.path.expanduser(str(v)))
        if not p.is_absolute():
            p = ctx.base_dir / p
        resolved = p.resolve()
        ok = resolved.is_file()
    except (OSError, ValueError, RuntimeError):
        raise ctx.bad(path, v, allowed) from None
    if not ok:
        what = "a folder" if resolved.is_dir() else "missing"
        raise ctx.error(path, f"{_show(str(v))} (resolved to {str(resolved)!r}, {what})", allowed)
    try:
        root = ctx.base_dir.resolve()
        inside = resolved.is_relative_to(root)
    except (OSError, ValueError, RuntimeError):  # pragma: no cover
        inside = False
    if not inside:
        ctx.notes.append(f"{ctx.where(path)}: {format_path(path)}: {str(v)!r} resolves to "
                         f"{str(resolved)!r}, outside the scenario's folder {str(root)!r}")
    return resolved


def _parse_obj(cls, data: Any, path: tuple, ctx: _Context):
    schema = _schema_fields(cls)
    names = [f.name for f in schema]
    if not isinstance(data, dict):
        raise ctx.bad(path, data, "a table with keys " + ", ".join(names))
    for key in data:
        if not isinstance(key, str) or key not in names:
            hint = _did_you_mean(key, names) if isinstance(key, str) else ""
            raise ctx.error(path + (str(key),), "an unknown key" + hint,
                            "keys " + ", ".join(names))
    values = {}
    for f in schema:
        v = data.get(f.name)
        if v is None:
            required = (f.default is dataclasses.MISSING
                        and f.default_factory is dataclasses.MISSING)
            if required and not f.metadata.get("derived"):
                raise ctx.error(path + (f.name,), "nothing (the key is missing)",
                                allowed_text(f.metadata) + " (required)")
            continue
        values[f.name] = _convert(f, v, path + (f.name,), ctx)
    try:
        return cls(**values) if cls is not Scenario else values
    except InputError as e:  # a library's settings checking their keys together
        raise ctx.keyed(e, path, names) from None
    except TypeError as e:  # pragma: no cover - schema error
        raise ctx.error(path, "an incomplete table", str(e)) from None


def table_keys(path: tuple) -> tuple[str, ...]:
    """The keys of the scenario table at ``path`` (``("motion", "x")`` → file, channel,
    trace, ...); empty when ``path`` is no table of the schema."""
    cls = Scenario
    for k in path:
        if isinstance(k, int):
            continue
        hit = next((f for f in _schema_fields(cls) if f.name == k), None)
        if hit is None or "cls" not in hit.metadata:
            return ()
        cls = hit.metadata["cls"]
    return tuple(f.name for f in _schema_fields(cls))


_PATH_PART = re.compile(r"\[(\d+)\]|([A-Za-z0-9_-]+)")


def schema_path(text: str) -> tuple | None:
    """``"equipment[0].footprint"`` → ``("equipment", 0, "footprint")`` when it names a key
    of the scenario schema (names of ``[materials.NAME]`` tables taken as given); else None."""
    if not isinstance(text, str) or not text or _PATH_PART.sub("", text).strip(".") != "":
        return None
    parts = [int(m.group(1)) if m.group(1) is not None else m.group(2)
             for m in _PATH_PART.finditer(text)]
    cls, expect = Scenario, "key"
    for part in parts:
        if isinstance(part, int):
            if expect not in ("index", "leaf"):
                return None
            expect = "key" if expect == "index" else "leaf"
            continue
        if expect == "name":
            expect = "key"
            continue
        if expect != "key":
            return None
        hit = next((f for f in _schema_fields(cls) if f.name == part), None)
        if hit is None:
            return None
        kind = hit.metadata["kind"]
        cls = hit.metadata.get("cls")
        expect = {"array": "index", "named": "name", "table": "key"}.get(kind, "leaf")
    return tuple(parts)


# --- the scenario as a whole -------------------------------------------------------------
