"""Reading and validating scenario files.

Every check runs up front and the first failure raises one
:class:`~groundshake.ScenarioError` of the form
``FILE:LINE: key.path: given VALUE; allowed WHAT``.
"""
from __future__ import annotations

import dataclasses
import difflib
import functools
import json
import math
import os
import re
import tomllib
import warnings
from pathlib import Path
from typing import Any

from .._errors import GroundshakeWarning, ScenarioError
from .._plausible import judge
from . import _geometry, _types
from ._lines import key_lines, line_of
from ._types import (
    Equipment,
    MotionComponent,
    MotionSettings,
    Scenario,
)

__all__ = [
    "load_scenario",
    "parse_scenario_text",
    "scenario_from_dict",
    "scenario_to_dict",
    "format_path",
    "MAX_ESTIMATED_DOFS",
]

MAX_ESTIMATED_DOFS = _geometry.MAX_ESTIMATED_DOFS

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
        key = format_path(path)
        e = ScenarioError(f"{self.where(path)}: {key}: given {given}; allowed {allowed}")
        e.key = key
        e.line = line_of(self.lines, path)
        e.file = self.source
        return e

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
        return "a target spec (asce7:..., en1998:...) or a path to a CSV file"
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
    return tuple(f for f in dataclasses.fields(cls) if not f.metadata.get("internal"))


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
    except TypeError as e:  # pragma: no cover - schema error
        raise ctx.error(path, "an incomplete table", str(e)) from None


# --- the scenario as a whole -------------------------------------------------------------

def _build(data: Any, ctx: _Context) -> Scenario:
    if not isinstance(data, dict):
        raise ctx.bad((), data, "a TOML document (a table of sections)")
    values = _parse_obj(Scenario, data, (), ctx)
    if "title" not in values:
        stem = Path(ctx.source).stem if ctx.source and not ctx.source.startswith("<") else ""
        values["title"] = stem or "untitled"
    _check_processing(values, ctx)
    _check_materials_and_parts(values, ctx)
    _check_support(values, ctx)
    _check_plausible(values, ctx)
    _check_damping(values, ctx)
    _check_motion(values, ctx)
    _check_floor_spectra(values, ctx)
    values["equipment"] = _complete_equipment(values, ctx)
    _check_names(values, "sensors", ctx)
    _geometry.check_geometry(values, ctx)
    return Scenario(**values, source=ctx.source, base_dir=ctx.base_dir, notes=tuple(ctx.notes))


def _check_processing(values, ctx):
    p = values.get("processing")
    if p is None:
        return
    if p.lowpass_hz and p.highpass_hz and not p.lowpass_hz > p.highpass_hz:
        raise ctx.bad(("processing", "lowpass_hz"), p.lowpass_hz,
                      f"a number > highpass_hz = {_fmt(p.highpass_hz)} [Hz]")
    if p.mean_removal == "pre-event" and not p.pre_event_s > 0:
        raise ctx.bad(("processing", "pre_event_s"), p.pre_event_s,
                      'a number > 0 [s] when mean_removal = "pre-event"')


def _check_materials_and_parts(values, ctx):
    materials = values.get("materials")
    if materials is None:
        raise ctx.error(("materials",), "nothing (no [materials.NAME] table)",
                        "at least one [materials.NAME] table with youngs_modulus, "
                        "poisson_ratio, density")
    if not materials:
        raise ctx.error(("materials",), "an empty table", "at least one [materials.NAME] table")
    parts = values.get("parts")
    if parts is None or not parts:
        raise ctx.error(("parts",), "nothing (no [[parts]] entry)" if parts is None else "an empty array",
                        "at least one [[parts]] table with name, material, origin, size")
    for i, part in enumerate(parts):
        if part.material not in materials:
            raise ctx.bad(("parts", i, "material"), part.material,
                          "one of " + ", ".join(f"'{m}'" for m in materials)
                          + _did_you_mean(part.material, materials))
    _check_names(values, "parts", ctx)
    if "mesh" not in values:
        raise ctx.error(("mesh",), "nothing (no [mesh] table)",
                        "a [mesh] table with element_size (required), element, mass")


def _check_names(values, section, ctx):
    seen: dict[str, int] = {}
    for i, item in enumerate(values.get(section) or ()):
        if item.name in seen:
            raise ctx.bad((section, i, "name"), item.name,
                          f"a name not used before ({section}[{seen[item.name]}] has it)")
        seen[item.name] = i


def _check_support(values, ctx):
    s = values.get("support")
    if s is None or s.kind != "soil":
        if s is not None and (any(v is not None for v in (s.shear_wave_velocity, s.poisson_ratio,
                                                          s.density, s.variation,
                                                          s.modulus_ratio, s.strain_compatible))
                              or s.embedment_depth or s.frequency_dependent):
            ctx.notes.append(f"{ctx.where(('support',))}: support: soil properties given with "
                             f'kind = "fixed" are not used')
        return
    if s.sidewall_contact_depth is not None and s.sidewall_contact_depth > s.embedment_depth:
        raise ctx.bad(("support", "sidewall_contact_depth"), s.sidewall_contact_depth,
                      f"a number in [0, embedment_depth = {_fmt(s.embedment_depth)}] [m]")
    if s.modulus_ratio is not None and s.strain_compatible is not None:
        raise ctx.bad(("support", "modulus_ratio"), s.modulus_ratio,
                      "either modulus_ratio or strain_compatible, not both")
    if s.sidewall_contact_depth is None:
        values["support"] = dataclasses.replace(s, sidewall_contact_depth=s.embedment_depth)
    from ._types import SupportSettings
    meta = {f.name: f.metadata for f in _schema_fields(SupportSettings)}
    for key in ("shear_wave_velocity", "poisson_ratio", "density"):
        if getattr(s, key) is None:
            raise ctx.error(("support", key), "nothing (the key is missing)",
                            allowed_text(meta[key]) + ' (required when kind = "soil")')


def _plausible(quantity: str, value, path: tuple, ctx: _Context) -> None:
    """Error for a value no real case has (a unit slip), warning for an unusual one."""
    if value is None:
        return
    level, text = judge(quantity, float(value), key=format_path(path))
    if level == "error":
        e = ScenarioError(f"{ctx.where(path)}: {text}")
        e.key, e.line, e.file = format_path(path), line_of(ctx.lines, path), ctx.source
        raise e
    if level == "warn":
        msg = f"{ctx.where(path)}: {text}"
        ctx.notes.append(msg)
        warnings.warn(msg, GroundshakeWarning, stacklevel=5)


def _check_plausible(values, ctx):
    """Unit slips in materials, soil, equipment and damping (ranges in groundshake._plausible)."""
    for name, m in (values.get("materials") or {}).items():
        for key in ("youngs_modulus", "density", "poisson_ratio"):
            _plausible(key, getattr(m, key), ("materials", name, key), ctx)
    s = values.get("support")
    if s is not None and s.kind == "soil":
        for key, quantity in (("shear_wave_velocity", "shear_wave_velocity"),
                              ("density", "soil_density"), ("poisson_ratio", "soil_poisson_ratio")):
            _plausible(quantity, getattr(s, key), ("support", key), ctx)
    d = values.get("damping")
    if d is not None:
        _plausible("damping_percent", d.ratio_percent, ("damping", "ratio_percent"), ctx)
    for i, e in enumerate(values.get("equipment") or ()):
        _plausible("equipment_mass", e.mass, ("equipment", i, "mass"), ctx)
        _plausible("damping_percent", e.damping_percent, ("equipment", i, "damping_percent"), ctx)
        if getattr(e, "fp", None) is not None:
            _plausible("sds", e.fp.sds, ("equipment", i, "fp", "sds"), ctx)
    fs = values.get("floor_spectra")
    if fs is not None:
        for z in fs.damping_percent:
            _plausible("damping_percent", z, ("floor_spectra", "damping_percent"), ctx)
    m = values.get("motion")
    if m is not None and m.target is not None:
        _check_target(m.target, ("motion", "target"), ctx)


def _check_target(spec: str, path: tuple, ctx: _Context) -> None:
    """Parse the target now, so its unit slips (sds=9.81) name the file and line."""
    from .._errors import InputError
    from ..spectra._targets import parse_target

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", GroundshakeWarning)
        try:
            parse_target(spec, base_dir=ctx.base_dir)
        except InputError as e:
            err = ScenarioError(f"{ctx.where(path)}: {format_path(path)}: {e}")
            err.key, err.line, err.file = format_path(path), line_of(ctx.lines, path), ctx.source
            raise err from None
    for w in caught:
        if issubclass(w.category, GroundshakeWarning):
            ctx.warn(path, str(w.message))


def _check_damping(values, ctx):
    d = values.get("damping")
    if d is not None and d.rayleigh_hz is not None and not d.rayleigh_hz[0] < d.rayleigh_hz[1]:
        raise ctx.bad(("damping", "rayleigh_hz"), list(d.rayleigh_hz),
                      "two frequencies f1 < f2 [Hz]")


def _check_motion(values, ctx):
    m = values.get("motion")
    if m is None:
        return
    if not m.components():
        raise ctx.error(("motion",), "a [motion] table without components",
                        "at least one of x, y, z (or leave [motion] out for modes only)")
    if m.match_target and m.target is None:
        raise ctx.bad(("motion", "match_target"), True, "true only with a target")


def _check_floor_spectra(values, ctx):
    fs = values.get("floor_spectra")
    if fs is not None and not fs.periods.min < fs.periods.max:
        raise ctx.bad(("floor_spectra", "periods", "max"), fs.periods.max,
                      f"a number > periods.min = {_fmt(fs.periods.min)} [s]")


def _complete_equipment(values, ctx) -> tuple[Equipment, ...]:
    _check_names(values, "equipment", ctx)
    damping = values.get("damping")
    block = damping.ratio_percent if damping is not None else 5.0
    out = []
    for i, e in enumerate(values.get("equipment") or ()):
        changes = {}
        if e.damping_percent is None:
            changes["damping_percent"] = block
        if e.rotary_inertia is None:
            changes["rotary_inertia"] = box_rotary_inertia(e.mass, e.footprint, e.cg_height)
        for j, (ax, ay) in enumerate(e.anchors):
            if abs(ax) > e.footprint[0] / 2 * (1 + 1e-9) or abs(ay) > e.footprint[1] / 2 * (1 + 1e-9):
                ctx.warn(("equipment", i, "anchors", j),
                         f"anchor [{_fmt(ax)}, {_fmt(ay)}] m lies outside the "
                         f"{_fmt(e.footprint[0])} × {_fmt(e.footprint[1])} m footprint")
        out.append(dataclasses.replace(e, **changes) if changes else e)
    return tuple(out)


def box_rotary_inertia(mass: float, footprint: tuple[float, float],
                       cg_height: float) -> tuple[float, float, float]:
    """Rotary inertia [kg·m²] of a solid box bx × by × 2·cg_height about its centre.

    I_x = m (by² + hz²)/12, I_y = m (bx² + hz²)/12, I_z = m (bx² + by²)/12 with
    hz = 2·cg_height (a uniform box whose centre is the CG).
    """
    bx, by = footprint
    hz = 2.0 * cg_height
    return (mass * (by * by + hz * hz) / 12.0,
            mass * (bx * bx + hz * hz) / 12.0,
            mass * (bx * bx + by * by) / 12.0)


# --- public entry points -----------------------------------------------------------------

def parse_scenario_text(text: str, *, source: str = "<string>",
                        base_dir: str | os.PathLike | None = None) -> Scenario:
    """Validate a scenario given as TOML text.

    Parameters
    ----------
    text : str
        The TOML document.
    source : str, keyword-only
        Name used in messages (normally the file path).
    base_dir : path, keyword-only
        Folder that relative paths are resolved against; default the current folder.

    Raises
    ------
    ScenarioError
        On a TOML syntax error or any failed check (one line, with ``file:line``).
    """
    base = Path(base_dir) if base_dir is not None else Path.cwd()
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise _syntax_error(source, str(e), len(text.splitlines())) from None
    except RecursionError:
        raise ScenarioError(f"{source}: given arrays or tables nested too deeply for the TOML "
                            f"parser; allowed the scenario schema (at most a few levels)") from None
    except ValueError as e:  # pragma: no cover - tomllib raises TOMLDecodeError for bad text
        raise ScenarioError(f"{source}: TOML syntax error: {_show(str(e), 120)}") from None
    ctx = _Context(source, text, base)
    return _build(data, ctx)


def _syntax_error(source: str, message: str, last_line: int) -> ScenarioError:
    m = re.search(r"\s*\(at line (\d+), column (\d+)\)\s*$", message)
    if m:
        text = message[: m.start()]
        e = ScenarioError(f"{source}:{m.group(1)}: TOML syntax error at column {m.group(2)}: {text}")
        e.line = int(m.group(1))
    else:
        m = re.search(r"\s*\(at end of document\)\s*$", message)
        text = message[: m.start()] if m else message
        e = ScenarioError(f"{source}:{last_line}: TOML syntax error at the end of the "
                          f"document: {text}")
        e.line = last_line
    e.file, e.key = source, None
    return e


def load_scenario(path: str | os.PathLike) -> Scenario:
    """Read and validate a scenario file (TOML, UTF-8); the file is only read.

    Parameters
    ----------
    path : path
        The scenario file; relative paths inside it are resolved against its folder.

    Returns
    -------
    Scenario
        Every key with its default filled in; ``scenario.notes`` lists what the
        summary should show.

    Raises
    ------
    ScenarioError
        The file cannot be read, is not TOML, or fails a check. The message is one
        line: ``FILE:LINE: key.path: given VALUE; allowed WHAT``.
    """
    p = Path(path)
    try:
        with open(p, "rb") as fh:  # read-only
            raw = fh.read()
    except FileNotFoundError:
        raise ScenarioError(f"{p}: given a path that does not exist; allowed an existing "
                            f"scenario file (TOML)") from None
    except IsADirectoryError:
        raise ScenarioError(f"{p}: given a folder; allowed a scenario file (TOML)") from None
    except OSError as e:
        raise ScenarioError(f"{p}: cannot be read ({e.strerror or e})") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as e:
        line = raw[: e.start].count(b"\n") + 1
        raise ScenarioError(f"{p}:{line}: given bytes that are not UTF-8 at offset {e.start}; "
                            f"allowed a UTF-8 TOML file") from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return parse_scenario_text(text, source=str(p), base_dir=p.resolve().parent)


def scenario_from_dict(data: Any, *, source: str = "<dict>",
                       base_dir: str | os.PathLike | None = None) -> Scenario:
    """Validate a scenario given as nested dicts (as ``tomllib`` or ``to_dict`` give).

    A top-level ``"notes"`` entry (added by ``to_dict``) is ignored.
    """
    base = Path(base_dir) if base_dir is not None else Path.cwd()
    ctx = _Context(source, None, base)
    if isinstance(data, dict) and "notes" in data:
        data = {k: v for k, v in data.items() if k != "notes"}
    try:
        return _build(data, ctx)
    except RecursionError:
        raise ScenarioError(f"{source}: given a table nested too deeply; allowed the "
                            f"scenario schema") from None


def _plain(value: Any) -> Any:
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        return {f.name: _plain(getattr(value, f.name)) for f in _schema_fields(type(value))}
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, Path):
        return str(value)
    return value


def scenario_to_dict(scenario: Scenario) -> dict:
    """Every key of the scenario with its value or default; JSON-able (paths as strings).

    ``"notes"`` (a list of str: paths leaving the scenario's folder, doubtful input)
    is added last so that any output echoing the scenario shows them; it is not a
    schema key and :func:`scenario_from_dict` drops it (notes are recomputed on load).
    """
    out = _plain(scenario)
    out["notes"] = list(scenario.notes)
    return out


def replace_motion(scenario: Scenario, components: dict, target, match_target,
                   keep: Any = None) -> Scenario:
    """A copy of ``scenario`` with another motion (see :meth:`Scenario.with_motion`).

    ``target`` or ``match_target`` equal to ``keep`` (or to ``_KEEP``) are kept from
    ``scenario``.
    """
    if keep is not None:
        target = _KEEP if target is keep else target
        match_target = _KEEP if match_target is keep else match_target
    ctx = _Context(scenario.source, None, scenario.base_dir)
    old = scenario.motion
    given = {}
    for axis, comp in components.items():
        if comp is None:
            continue
        if isinstance(comp, MotionComponent):
            comp = _plain(comp)
        elif isinstance(comp, (str, os.PathLike)):
            comp = {"file": os.fspath(comp)}
        given[axis] = comp
    if not given:
        return dataclasses.replace(scenario, motion=None)
    data = {**given}
    tgt = old.target if (old is not None and target is _KEEP) else (None if target is _KEEP else target)
    mt = old.match_target if (old is not None and match_target is _KEEP) else (
        False if match_target is _KEEP else match_target)
    if tgt is not None:
        data["target"] = tgt
    data["match_target"] = mt
    if old is not None and old.inventory is not None:  # the station inventory stays
        data["inventory"] = os.fspath(old.inventory)
    motion = _parse_obj(MotionSettings, data, ("motion",), ctx)
    values = {"motion": motion}
    _check_motion(values, ctx)
    keep = [n for n in scenario.notes if "motion." not in n]
    return dataclasses.replace(scenario, motion=motion, notes=tuple(keep + ctx.notes))


class _Keep:
    def __repr__(self) -> str:
        return "<keep>"


_KEEP = _Keep()


_types._CODEC.update(from_dict=scenario_from_dict, to_dict=scenario_to_dict,
                     replace_motion=replace_motion)
