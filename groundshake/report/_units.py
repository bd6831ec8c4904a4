"""Display units: SI values of the output contract shown in engineering units.

Files stay SI (results/_schema.py gives each value's quantity kind); only what a person
reads is converted, here, once. Two systems: ``"si"`` (kN, kN·m, mm, kPa/MPa, g, Hz, s,
damping in percent) and ``"us"`` (kip, kip·ft, in, psi/ksf, g).

Conversion factors are exact by definition (NIST SP 811, Appendix B): 1 in = 0.0254 m,
1 ft = 0.3048 m, 1 lbf = 4.4482216152605 N, 1 lb = 0.45359237 kg, and standard gravity
g = 9.80665 m/s² (CGPM 1901).
"""
from __future__ import annotations

import math
from typing import Literal

from .._constants import STANDARD_GRAVITY
from ..results._schema import UNITS

__all__ = ["SYSTEMS", "display_unit", "to_display", "fmt", "STANDARD_GRAVITY", "check_system"]

_IN = 0.0254                         # m
_FT = 0.3048                         # m
_LBF = 4.4482216152605               # N
_KIP = 1000.0 * _LBF                 # N
_LB = 0.45359237                     # kg
_PSI = _LBF / _IN ** 2               # Pa
_KSF = _KIP / _FT ** 2               # Pa

#: Display unit and factor (display value = SI value × factor) for each kind.
SYSTEMS: dict[str, dict[str, tuple[str, float]]] = {
    "si": {
        "force": ("kN", 1e-3), "weight": ("kN", 1e-3), "moment": ("kN·m", 1e-3),
        "length": ("m", 1.0), "displacement": ("mm", 1e3), "stress": ("MPa", 1e-6),
        "pressure": ("kPa", 1e-3), "modulus": ("MPa", 1e-6),
        "acceleration": ("g", 1.0 / STANDARD_GRAVITY), "velocity": ("m/s", 1.0),
        "arias": ("m/s", 1.0), "angular_acceleration": ("rad/s²", 1.0), "time": ("s", 1.0),
        "frequency": ("Hz", 1.0), "damping": ("%", 100.0), "ratio": ("", 1.0),
        "percent": ("%", 1.0), "mass": ("t", 1e-3), "density": ("kg/m³", 1.0),
        "area": ("m²", 1.0), "stiffness": ("kN/mm", 1e-6),
        "rotational_stiffness": ("kN·m/rad", 1e-3), "dashpot": ("kN·s/m", 1e-3),
        "rotational_dashpot": ("kN·m·s/rad", 1e-3), "count": ("", 1.0), "number": ("", 1.0),
        "participation": ("kg^0.5", 1.0),
    },
    "us": {
        "force": ("kip", 1 / _KIP), "weight": ("kip", 1 / _KIP), "moment": ("kip·ft", 1 / (_KIP * _FT)),
        "length": ("ft", 1 / _FT), "displacement": ("in", 1 / _IN), "stress": ("psi", 1 / _PSI),
        "pressure": ("ksf", 1 / _KSF), "modulus": ("ksi", 1 / (1000 * _PSI)),
        "acceleration": ("g", 1.0 / STANDARD_GRAVITY), "velocity": ("in/s", 1 / _IN),
        "arias": ("in/s", 1 / _IN), "angular_acceleration": ("rad/s²", 1.0), "time": ("s", 1.0),
        "frequency": ("Hz", 1.0), "damping": ("%", 100.0), "ratio": ("", 1.0),
        "percent": ("%", 1.0), "mass": ("lb", 1 / _LB), "density": ("lb/ft³", _FT ** 3 / _LB),
        "area": ("ft²", 1 / _FT ** 2), "stiffness": ("kip/in", _IN / _KIP),
        "rotational_stiffness": ("kip·ft/rad", 1 / (_KIP * _FT)),
        "dashpot": ("kip·s/in", _IN / _KIP), "rotational_dashpot": ("kip·ft·s/rad", 1 / (_KIP * _FT)),
        "count": ("", 1.0), "number": ("", 1.0), "participation": ("lb^0.5", (1 / _LB) ** 0.5),
    },
}

System = Literal["si", "us"]


def check_system(system: str) -> str:
    """``system`` if it is ``"si"`` or ``"us"``; else ValueError naming both."""
    if system not in SYSTEMS:
        raise ValueError(f"units={system!r}; allowed: 'si' or 'us'")
    return system


def display_unit(kind: str, system: str = "si") -> str:
    """The unit a person reads for a quantity kind (``""`` for plain numbers)."""
    if kind not in SYSTEMS[system]:
        return UNITS.get(kind, "")
    return SYSTEMS[system][kind][0]


def to_display(value: float, kind: str, system: str = "si") -> float:
    """An SI value (the output contract's unit for ``kind``) in display units."""
    factor = SYSTEMS[system].get(kind, ("", 1.0))[1]
    return float(value) * factor


def fmt(value, kind: str | None = None, system: str = "si", *, ref: float | None = None,
        digits: int = 3, unit: bool = False) -> str:
    """A value as a person reads it: converted, rounded to ``digits`` significant digits
    (whole numbers kept whole), and ``"0"`` when it is round-off.

    Parameters
    ----------
    value : float or None
        SI value; None or NaN gives a dash.
    kind : str, optional
        Quantity kind (results/_schema.py); None: a plain number.
    ref : float, optional
        The largest |value| of this kind in the run (SI); values below 1e-9 × ref are
        round-off of the arithmetic and shown as 0.
    unit : bool
        Append the display unit.
    """
    if value is None or isinstance(value, str):
        return "—" if value is None else str(value)
    if isinstance(value, bool):
        return "yes" if value else "no"
    try:
        v = float(value)
    except (TypeError, ValueError):
        return str(value)
    if not math.isfinite(v):
        return "—"
    if ref is not None and ref > 0 and abs(v) < 1e-9 * ref:
        v = 0.0
    if kind is not None:
        v = to_display(v, kind, system)
    text = _round(v, digits)
    if unit and kind is not None:
        u = display_unit(kind, system)
        if u:
            text += ("" if u == "%" else "\u202f") + u
    return text


_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _round(v: float, digits: int) -> str:
    if v == 0:
        return "0"
    a = abs(v)
    if a >= 10 ** digits:                      # whole numbers: keep every integer digit
        return f"{v:,.0f}".replace(",", "\u202f")
    if a < 1e-6:
        mant, exp = f"{v:.{digits - 1}e}".split("e")
        mant = mant.rstrip("0").rstrip(".") if "." in mant else mant
        return f"{mant}×10{str(int(exp)).translate(_SUPERSCRIPT)}"
    decimals = max(0, digits - 1 - int(math.floor(math.log10(a))))
    text = f"{v:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text
