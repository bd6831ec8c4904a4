"""A scenario to and from plain dicts (JSON-able), and a copy with another motion."""
from __future__ import annotations

import dataclasses
import os
from pathlib import Path
from typing import Any

from .._errors import ScenarioError
from . import _types
from ._types import MotionComponent, MotionSettings, Scenario
from ._spec import _Context, _parse_obj, _schema_fields
from ._validate import _build, _check_motion


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
        return {f.name: _plain(_written(f, getattr(value, f.name)))
                for f in _schema_fields(type(value))}
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, Path):
        return str(value)
    return value


def _written(f: dataclasses.Field, value: Any) -> Any:
    """A field's value as the file writes it: a setting stored as None that the file spells
    0 (``highpass_hz = 0``, no high-pass) is written 0 where None is not its default, since
    an absent key means the default."""
    if value is None and f.metadata.get("zero_means_none") and f.default is not None:
        return 0.0
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
    if old is not None:               # the spectrum method's vertical stays as it was
        if old.target_z is not None:
            data["target_z"] = old.target_z
        data["vertical_fraction"] = old.vertical_fraction
    if old is not None and old.inventory is not None:  # the station inventory stays
        data["inventory"] = os.fspath(old.inventory)
    motion = _parse_obj(MotionSettings, data, ("motion",), ctx)
    values = {"motion": motion, "analysis": scenario.analysis}
    _check_motion(values, ctx)
    keep = [n for n in scenario.notes if "motion." not in n]
    lines = scenario.key_lines                  # the new motion has no lines in the file
    if lines:
        lines = {k: v for k, v in lines.items() if not (k and k[0] == "motion")}
    return dataclasses.replace(scenario, motion=motion, notes=tuple(keep + ctx.notes),
                               key_lines=lines)


class _Keep:
    def __repr__(self) -> str:
        return "<keep>"


_KEEP = _Keep()


_types._CODEC.update(from_dict=scenario_from_dict, to_dict=scenario_to_dict,
                     replace_motion=replace_motion)
