"""Checks across keys of a scenario (names, materials, support, damping, motion, floor
spectra, plausibility) and the scenario built from validated tables."""
from __future__ import annotations

import contextlib
import dataclasses
import warnings
from pathlib import Path
from typing import Any

from .._errors import GroundshakeWarning, ScenarioError
from .._plausible import verdict
from . import _geometry
from ._types import Equipment, MotionComponent, MotionSettings, Scenario
from ._spec import (_Context, _did_you_mean, _fmt, _parse_obj, _schema_fields, allowed_text,
                    format_path)


def _build(data: Any, ctx: _Context) -> Scenario:
    if not isinstance(data, dict):
        raise ctx.bad((), data, "a TOML document (a table of sections)")
    values = _parse_obj(Scenario, data, (), ctx)
    if "title" not in values:
        stem = Path(ctx.source).stem if ctx.source and not ctx.source.startswith("<") else ""
        values["title"] = stem or "untitled"
    _check_materials_and_parts(values, ctx)
    _check_support(values, ctx)
    _check_plausible(values, ctx)
    _check_damping(values, ctx)
    _check_motion(values, ctx)
    _check_floor_spectra(values, ctx)
    _check_suite(values, ctx)
    values["equipment"] = _complete_equipment(values, ctx)
    _check_names(values, "sensors", ctx)
    _geometry.check_geometry(values, ctx)
    return Scenario(**values, source=ctx.source, base_dir=ctx.base_dir, notes=tuple(ctx.notes),
                    key_lines=ctx.lines)


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
    level, text = verdict(quantity, float(value))
    if level == "error":
        raise ctx.located(ScenarioError(text, param=quantity, value=value, sep=" = "), path)
    if level == "warn":
        msg = f"{ctx.where(path)}: {format_path(path)} = {text}"
        ctx.notes.append(msg)
        warnings.warn(msg, GroundshakeWarning, stacklevel=5)


def _check_plausible(values, ctx):
    """Unit slips in materials, soil, equipment and damping (ranges in groundshake._plausible)."""
    for name, m in (values.get("materials") or {}).items():
        for key in ("youngs_modulus", "density", "poisson_ratio"):
            _plausible(key, getattr(m, key), ("materials", name, key), ctx)
    for i, part in enumerate(values.get("parts") or ()):
        for j, length in enumerate(part.size):
            _plausible("part_size", length, ("parts", i, "size", j), ctx)
    s = values.get("support")
    if s is not None and s.kind == "soil":
        for key, quantity in (("shear_wave_velocity", "shear_wave_velocity"),
                              ("density", "soil_density"), ("poisson_ratio", "soil_poisson_ratio"),
                              ("variation", "variation"), ("embedment_depth", "embedment_depth"),
                              ("modulus_ratio", "modulus_ratio")):
            _plausible(quantity, getattr(s, key), ("support", key), ctx)
        if s.strain_compatible is not None:
            _plausible("shaking_g", s.strain_compatible.shaking_g,
                       ("support", "strain_compatible", "shaking_g"), ctx)
    if s is not None:
        for key in ("friction_coefficient", "allowable_bearing_pressure"):
            _plausible(key, getattr(s, key), ("support", key), ctx)
    d = values.get("damping")
    if d is not None:
        _plausible("damping_percent", d.ratio_percent, ("damping", "ratio_percent"), ctx)
    for i, e in enumerate(values.get("equipment") or ()):
        _plausible("equipment_mass", e.mass, ("equipment", i, "mass"), ctx)
        _plausible("damping_percent", e.damping_percent, ("equipment", i, "damping_percent"), ctx)
        _plausible("cg_height", e.cg_height, ("equipment", i, "cg_height"), ctx)
        if e.capacity is not None:
            for key in ("tension", "shear"):
                _plausible("bolt_capacity", getattr(e.capacity, key),
                           ("equipment", i, "capacity", key), ctx)
        if e.fp is not None:
            _plausible("sds", e.fp.sds, ("equipment", i, "fp", "sds"), ctx)
    fs = values.get("floor_spectra")
    if fs is not None:
        for z in fs.damping_percent:
            _plausible("damping_percent", z, ("floor_spectra", "damping_percent"), ctx)
    m = values.get("motion")
    for d in ("x", "y", "z"):
        comp = None if m is None else getattr(m, d)   # the component tables by axis name
        if comp is not None:
            _plausible("record_scale", abs(comp.scale), ("motion", d, "scale"), ctx)
    if m is not None and m.target is not None:
        _check_target(m.target, ("motion", "target"), ctx)
    if m is not None and m.target_z is not None:
        _check_target(m.target_z, ("motion", "target_z"), ctx)


def _check_target(spec: str, path: tuple, ctx: _Context) -> None:
    """Parse the target now, so its unit slips (sds=9.81) name the file and line."""
    from ..spectra._targets import parse_target

    with _keyed(path, ctx):
        parse_target(spec, base_dir=ctx.base_dir)


@contextlib.contextmanager
def _keyed(path: tuple, ctx: _Context, params=()):
    """Run a check of one key: its InputError becomes that key's ScenarioError (file and
    line; an error whose ``param`` is one of ``params`` at the key ``path + (param,)``),
    its GroundshakeWarnings that key's warnings and notes."""
    from .._errors import InputError

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", GroundshakeWarning)
        try:
            yield
        except InputError as e:
            raise ctx.keyed(e, path, params) from None
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
    if m.file is not None:
        m = values["motion"] = _components_of_file(m, ctx)
    analysis = values.get("analysis")
    spectrum = analysis is not None and analysis.method == "spectrum"
    if spectrum and m.target is None:
        raise ctx.error(("motion", "target"), "nothing (the key is missing)",
                        'a design spectrum (required by [analysis] method = "spectrum")')
    if not m.components() and m.target is None:
        raise ctx.error(("motion",), "a [motion] table without components",
                        "at least one of x, y, z (or leave [motion] out for modes only; "
                        'only a target for method = "spectrum")')
    if m.match_target and m.target is None:
        raise ctx.bad(("motion", "match_target"), True, "true only with a target")
    if m.target_z is not None and m.target is None:
        raise ctx.bad(("motion", "target_z"), m.target_z, "a vertical target only beside a "
                      "horizontal target")


def _check_suite(values, ctx):
    st = values.get("suite")
    if st is None:
        return
    r = st.scale_range
    if len(r) != 2 or not r[0] < r[1]:
        raise ctx.bad(("suite", "scale_range"), list(r), "two numbers [low, high], 0 < low < high")
    if st.scale_to is not None:
        _check_target(st.scale_to, ("suite", "scale_to"), ctx)


def _components_of_file(m: MotionSettings, ctx) -> MotionSettings:
    """``[motion] file = ...`` written out as x, y, z by the channels' orientation."""
    from ..records import read_record
    from ..records._components import components_by_orientation

    path = ("motion", "file")
    given = [k for k in m.components()]
    if given:
        raise ctx.error(path, f"a file together with {', '.join(given)}",
                        "either file (its channels picked by orientation) or x, y, z")
    with _keyed(path, ctx):
        records = read_record(m.file, inventory=m.inventory)
        picked = components_by_orientation(records, where="motion.file")
    comps = {}
    for axis, rec in picked.items():
        same = sum(str(r.component) == str(rec.component) for r in records)
        code = str(rec.component) if rec.component and same == 1 else rec.name
        comps[axis] = MotionComponent(file=m.file, channel=code)
    ctx.notes.append(f"{ctx.where(path)}: motion.file: "
                     + ", ".join(f"{a} = channel {c.channel!r}" for a, c in comps.items())
                     + " (by orientation: vertical to z, horizontals to x, y in file order)")
    return dataclasses.replace(m, file=None, **comps)


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
