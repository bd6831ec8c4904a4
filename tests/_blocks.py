"""TOML fragments shared by the tests: a concrete block of the tests' own invention,
built from the pieces of :mod:`_tables`.

The numbers are typical of reinforced concrete (E = 30 GPa, ν = 0.2, ρ = 2400 kg/m³;
common practice) and describe no real foundation.
"""
from __future__ import annotations

from _tables import FIXED, mesh, part, soil

CONCRETE_C = "[materials.c]\nyoungs_modulus = 30e9\npoisson_ratio = 0.2\ndensity = 2400\n"


def concrete_block(size=(2.0, 2.0, 1.0), *, element_size: float = 1.0, support: str = "fixed",
                   name: str = "pad") -> str:
    """``[materials.c]``, one ``[[parts]]`` box at the origin, ``[mesh]`` and ``[support]``.

    ``support`` is ``"fixed"`` or ``"soil"`` (Vs 300 m/s, ν 0.3, ρ 1900 kg/m³).
    """
    base = soil(300.0, 0.3, 1900.0) if support == "soil" else FIXED
    return CONCRETE_C + part(name, size, material="c") + mesh(element_size) + base
