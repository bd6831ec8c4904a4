"""TOML tables shared by the scenario tests, put together by :func:`block_scenario`, and
the checks of a slipped value in a scenario's text.

A concrete block of the tests' own invention: E = 30 GPa, ν = 0.2, ρ = 2400 kg/m³
(typical of reinforced concrete; common practice), on a fixed base or on soil
(Vs 200-250 m/s, ν 0.3-0.33, ρ 1900 kg/m³: a stiff soil, site class D of ASCE 7-16
Table 20.3-1). The numbers describe no real foundation.
"""
from __future__ import annotations

import re
import warnings
from pathlib import Path

import pytest

from groundshake._errors import GroundshakeWarning, ScenarioError
from groundshake.scenario import parse_scenario_text

CONCRETE = '[materials.concrete]\nyoungs_modulus = 30e9\npoisson_ratio = 0.2\ndensity = 2400\n'
FIXED = '[support]\nkind = "fixed"\n'


def _floats(values) -> str:
    return "[" + ", ".join(repr(float(v)) for v in values) + "]"


def part(name: str, size, origin=(0.0, 0.0, 0.0), material: str = "concrete") -> str:
    """One ``[[parts]]`` box [m]."""
    return (f'[[parts]]\nname = "{name}"\nmaterial = "{material}"\n'
            f"origin = {_floats(origin)}\nsize = {_floats(size)}\n")


def mesh(element_size: float) -> str:
    """``[mesh]`` with the element size [m]."""
    return f"[mesh]\nelement_size = {float(element_size)!r}\n"


def soil(vs: float = 250.0, nu: float = 0.33, rho: float = 1900.0, extra: str = "") -> str:
    """``[support]`` on soil: shear-wave velocity [m/s], Poisson's ratio, density
    [kg/m³], then ``extra`` lines as given."""
    return (f'[support]\nkind = "soil"\nshear_wave_velocity = {float(vs)!r}\n'
            f"poisson_ratio = {float(nu)!r}\ndensity = {float(rho)!r}\n{extra}")


def equipment(name: str, mass: float, mount, footprint, cg_height: float,
              extra: str = "") -> str:
    """One ``[[equipment]]``: mass [kg], mount and footprint [m], CG height [m], then
    ``extra`` lines as given."""
    return (f'[[equipment]]\nname = "{name}"\nmass = {float(mass)!r}\n'
            f"mount = {_floats(mount)}\nfootprint = {_floats(footprint)}\n"
            f"cg_height = {float(cg_height)!r}\n{extra}")


def sensor(name: str, at) -> str:
    """One ``[[sensors]]`` at a point [m]."""
    return f'[[sensors]]\nname = "{name}"\nat = {_floats(at)}\n'


def suite_head(title: str, first_set: str) -> str:
    """The head of a suite test's scenario as a ``str.format`` template: the title, the
    x and y records of the set ``first_set`` in the folder ``{rec}`` (m/s², dt 0.01 s),
    processing off, then the field ``{block}`` for the block's tables."""
    motion = "".join(f'{d} = {{{{ file = "{{rec}}/{first_set}-{d}.csv", units = "m/s2", '
                     f"dt = 0.01 }}}}\n" for d in "xy")
    return f'\ntitle = "{title}"\n[motion]\n{motion}[processing]\nenabled = false\n{{block}}\n'


def one_box(title: str, material: str, properties: dict, part_name: str, size, support: dict,
            *, mesh: dict | None = None, **sections) -> dict:
    """A scenario as a mapping: one box ``size`` [m] at the origin of one ``material``
    (its ``properties`` in SI), ``mesh`` (default 0.5 m incompatible-mode hexahedra),
    ``support``, then the other ``sections`` as given."""
    return {"title": title, "materials": {material: properties},
            "parts": [{"name": part_name, "material": material, "origin": [0, 0, 0],
                       "size": list(size)}],
            "mesh": mesh or {"element_size": 0.5, "element": "hex8-incompatible"},
            "support": support, **sections}


def block_scenario(title: str, parts, *, element_size: float, support: str = FIXED,
                   before=(), after=(), sep: str = "\n") -> str:
    """A scenario's text: the title, ``before`` sections, the concrete, ``parts`` (texts
    of :func:`part`), the mesh, ``support`` and the ``after`` sections, each section
    separated by ``sep`` (a blank line by default)."""
    sections = [f'title = "{title}"\n', *before, CONCRETE, *parts, mesh(element_size),
                support, *after]
    return sep.join(sections)


# -- checks of a slipped value in a scenario's text ------------------------------------------

def parse_case(text: str, folder: Path):
    """The scenario of ``text``, read as ``case.toml`` in ``folder``."""
    return parse_scenario_text(text, source="case.toml", base_dir=folder)


def line_of(text: str, marker: str) -> int:
    """1-based line of ``marker`` (found by hand, not by the loader)."""
    return next(i for i, line in enumerate(text.splitlines(), 1) if marker in line)


def error_of(text: str, folder: Path) -> str:
    """The message of the ScenarioError that reading ``text`` must raise (warnings
    silenced)."""
    with pytest.raises(ScenarioError) as info:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            parse_case(text, folder)
    return str(info.value)


def assert_slip_is_an_error(base: str, old: str, new: str, key: str, hint: str,
                            folder: Path) -> None:
    """``old`` replaced by ``new`` in ``base`` is one ScenarioError line naming the file,
    the line, ``key`` and the likely slip (``hint``)."""
    assert old in base
    text = base.replace(old, new, 1)
    msg = error_of(text, folder)
    assert msg.startswith(f"case.toml:{line_of(text, new)}: {key} = ")   # file:line: key
    assert hint in msg                                                   # the likely slip
    assert "\n" not in msg                                               # one line


def assert_unusual_value_warns(base: str, old: str, new: str, key: str, folder: Path) -> None:
    """``old`` replaced by ``new`` in ``base`` warns naming the file, line and ``key``, and
    the warning is kept in the scenario's notes."""
    text = base.replace(old, new, 1)
    with pytest.warns(GroundshakeWarning, match=rf"case\.toml:{line_of(text, new)}: "
                                                rf"{re.escape(key)} = "):
        s = parse_case(text, folder)
    assert any(key in note for note in s.notes)             # recorded with the run, too
