"""TOML fragments shared by the tests: a concrete block of the tests' own invention.

The numbers are typical of reinforced concrete (E = 30 GPa, ν = 0.2, ρ = 2400 kg/m³;
common practice) and describe no real foundation.
"""
from __future__ import annotations


def concrete_block(size=(2.0, 2.0, 1.0), *, element_size: float = 1.0, support: str = "fixed",
                   name: str = "pad") -> str:
    """``[materials.c]``, one ``[[parts]]`` box at the origin, ``[mesh]`` and ``[support]``.

    ``support`` is ``"fixed"`` or ``"soil"`` (Vs 300 m/s, ν 0.3, ρ 1900 kg/m³).
    """
    lx, ly, lz = size
    soil = ("shear_wave_velocity = 300.0\npoisson_ratio = 0.3\ndensity = 1900.0\n"
            if support == "soil" else "")
    return (f"[materials.c]\nyoungs_modulus = 30e9\npoisson_ratio = 0.2\ndensity = 2400\n"
            f'[[parts]]\nname = "{name}"\nmaterial = "c"\norigin = [0, 0, 0]\n'
            f"size = [{lx}, {ly}, {lz}]\n"
            f"[mesh]\nelement_size = {element_size}\n"
            f'[support]\nkind = "{support}"\n{soil}')
