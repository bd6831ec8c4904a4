"""Plausibility ranges: catching unit slips before they give a reassuring answer.

A value far outside anything real (``youngs_modulus = 30`` with GPa meant, ``density =
2.4`` with t/m³ meant, ``sds=9.81`` with m/s² meant, a damping of 0.05 % with the ratio
0.05 meant) is an error that names the key and the likely slip; a value that is unusual
but possible is a :class:`~groundshake.GroundshakeWarning`. The one table of ranges is
:data:`RANGES`; each row says where its bounds come from.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

from ._constants import STANDARD_GRAVITY

__all__ = ["Range", "RANGES", "judge", "verdict", "check_value"]


@dataclass(frozen=True)
class Range:
    """Bounds of one quantity, in the unit it is given in (SI, or g / % where stated).

    ``error_below`` / ``error_above``: beyond these no real value lies (an error).
    ``warn_below`` / ``warn_above``: beyond these a value is unusual (a warning).
    ``low`` / ``high``: what lies beyond the error bound, in words ("any structural
    material"). ``slips``: (factor, what was typed) pairs; the first whose product
    with the value lands inside the usual range is offered as "did you mean" (for
    errors; for warnings too with ``hint_when_unusual``).
    """

    unit: str
    error_below: float | None
    warn_below: float | None
    warn_above: float | None
    error_above: float | None
    low: str
    high: str
    slips: tuple[tuple[float, str], ...] = ()
    hint_when_unusual: bool = False


# Bounds: common practice for screening foundation blocks unless a source is named.
RANGES: dict[str, Range] = {
    # Concrete 20-45 GPa (EN 1992-1-1 Table 3.1), structural steel 210 GPa (EN 1993-1-1
    # 3.2.6), masonry and timber a few GPa (from memory). Below 1e8 Pa lie soils, not
    # block materials. No upper error: a modulus far above any material (diamond is about
    # 1.1e12 Pa, from memory) is the common idealisation of a rigid block, so only a warning.
    "youngs_modulus": Range("Pa", 1e8, 1e9, 4.5e11, None,
                            "any structural material", "",
                            ((1e9, "GPa typed as Pa"), (1e6, "MPa typed as Pa"),
                             (1e3, "kPa typed as Pa"))),
    # Concrete 2400 kg/m³, steel 7850 kg/m³ (EN 1991-1-1 Table A.1, A.4); the densest
    # element, osmium, is 22 590 kg/m³ (from memory). Below 100 kg/m³ only foams and gases.
    "density": Range("kg/m³", 100.0, 1000.0, 8000.0, 23000.0,
                     "any structural material", "any material (osmium, about 22 600 kg/m³)",
                     ((1e3, "t/m³ or g/cm³ typed as kg/m³"),)),
    # Poisson's ratio of block materials: concrete 0.2 (EN 1992-1-1 3.1.3), steel 0.3
    # (EN 1993-1-1 3.2.6); the schema already keeps every ν in [0, 0.5).
    "poisson_ratio": Range("", None, 0.1, 0.35, None, "", ""),
    # Soil shear-wave velocity: soft clay from about 50 m/s, hard rock above 1500 m/s
    # (ASCE 7-16 Table 20.3-1 site classes A-E); no ground exceeds about 3500 m/s (from
    # memory). Below 20 m/s no soil carries a block.
    "shear_wave_velocity": Range("m/s", 20.0, 50.0, 3500.0, 6000.0,
                                 "any soil that carries a foundation",
                                 "any rock (about 3500 m/s)",
                                 ((1e3, "km/s typed as m/s"), (1e-3, "mm/s typed as m/s"),
                                  (1e-2, "cm/s typed as m/s"))),
    # Soil density: peat about 1000 kg/m³, dense soils and rock 2000-2800 kg/m³
    # (common practice; e.g. Das, Principles of Geotechnical Engineering, tables of unit
    # weight, from memory).
    "soil_density": Range("kg/m³", 300.0, 1200.0, 2900.0, 5000.0,
                          "any soil", "any soil or rock",
                          ((1e3, "t/m³ or g/cm³ typed as kg/m³"),
                           (1.0 / STANDARD_GRAVITY, "a unit weight in N/m³ typed as density"))),
    # Soil Poisson's ratio: 0.1-0.5 (common practice); near 0.5 the springs stiffen sharply.
    "soil_poisson_ratio": Range("", None, 0.1, 0.49, None, "", ""),
    # Anchored equipment on a foundation block: a control panel tens of kg, a large power
    # transformer a few hundred tonnes (common practice). 1e8 kg is 100 000 t.
    "equipment_mass": Range("kg", 0.1, 50.0, 2e6, 1e8,
                            "any anchored equipment", "any anchored equipment",
                            ((1e3, "tonnes typed as kg"), (1e-3, "grams typed as kg"),
                             (1.0 / STANDARD_GRAVITY, "a weight in N typed as mass")),
                            hint_when_unusual=True),
    # A dimension of a foundation block or mat: pads of 0.1 m, mats of tens of metres;
    # a turbine-generator mat reaches about 100 m (common practice). 2000 is a block's
    # 2 m typed in mm.
    "part_size": Range("m", 0.01, 0.05, 150.0, 500.0,
                       "any foundation part", "any foundation block or mat (about 100 m)",
                       ((1e-3, "mm typed as m"), (1e-2, "cm typed as m"))),
    # Height of equipment's centre of gravity above its mount: tens of mm for a skid, a
    # few metres for a tall transformer or tank (common practice); 500 is 0.5 m in mm.
    "cg_height": Range("m", None, None, 15.0, 100.0,
                       "", "any anchored equipment (a few metres)",
                       ((1e-3, "mm typed as m"), (1e-2, "cm typed as m"))),
    # Anchor bolt capacities per bolt: an M10 bolt carries some tens of kN, large cast-in
    # anchors about 1 MN (from memory of ACI 318-19 Ch. 17 and EN 1992-4 worked examples;
    # verify). Below 100 N no anchor holds equipment: kN typed as N.
    "bolt_capacity": Range("N", 100.0, 2e3, 5e6, 1e8,
                           "any anchor bolt (tens of kN)", "any anchor bolt (about 1 MN)",
                           ((1e3, "kN typed as N"), (1e6, "MN typed as N"))),
    # Damping in percent. Measured damping of concrete and steel structures is rarely
    # below 0.5 % and screening spectra use 0.5-20 % (common practice; 5 % in ASCE 7-16
    # §11.4 and EN 1998-1 §3.2.2.2). A value below 0.25 % is a ratio typed for percent.
    # Zero is allowed: an undamped spectrum is a legitimate request.
    "damping_percent": Range("%", 0.25, 0.5, 30.0, None,
                             "any structure's damping", "",
                             ((100.0, "a ratio typed for percent"),)),
    # ASCE 7-16 §11.4.5 design spectral accelerations in g: mapped values stay below about
    # 3 g for SDS and 2 g for SD1 (from memory of the maps); 9.81 is m/s² typed for g.
    "sds": Range("g", None, 0.02, 2.5, 5.0, "", "any mapped design value (about 3 g)",
                 ((1 / STANDARD_GRAVITY, "m/s² typed for g"), (1 / (100 * STANDARD_GRAVITY), "cm/s² typed for g"))),
    "sd1": Range("g", None, 0.01, 2.0, 4.0, "", "any mapped design value (about 2 g)",
                 ((1 / STANDARD_GRAVITY, "m/s² typed for g"), (1 / (100 * STANDARD_GRAVITY), "cm/s² typed for g"))),
    # ASCE 7-16 Figures 22-14 to 22-17: TL maps hold 4 to 16 s.
    "tl": Range("s", 0.5, 4.0, 16.0, 100.0, "any mapped long-period transition",
                "any mapped long-period transition (16 s)", ()),
    # EN 1998-1 ag in g: national zonation maps stay below about 0.5 g (from memory).
    "ag": Range("g", None, 0.02, 0.7, 2.0, "", "any design ground acceleration (about 0.5 g)",
                ((1 / STANDARD_GRAVITY, "m/s² typed for g"), (1 / (100 * STANDARD_GRAVITY), "cm/s² typed for g"))),
    # --- foundation checks ([support]) ---
    # Base friction coefficient μ = tan δ of a block on soil or rock: about 0.25 (clay) to
    # 0.7 (clean gravel, rock) for mass concrete cast on the ground (NAVFAC DM-7.02 Table 1,
    # friction factors, from memory); ACI 318-19 §22.9.4.2 gives 1.4 for concrete cast
    # monolithically, the largest any code uses (from memory). Above 2 no interface holds:
    # an angle in degrees (tan 30° = 0.58) or a percent was typed.
    "friction_coefficient": Range("", None, 0.2, 1.0, 2.0, "",
                                  "any base interface (μ = tan δ ≤ 1.4, ACI 318-19 "
                                  "§22.9.4.2); an angle in degrees is not μ",
                                  ((0.01, "a percent typed for μ"),)),
    # Allowable bearing pressure: presumptive values run from 1500 psf (72 kPa, clay) to
    # 12 000 psf (575 kPa, crystalline bedrock) (IBC 2018 Table 1806.2, from memory);
    # soft clays carry 25-50 kPa and sound rock some MPa (common practice). Below 1 kPa
    # nothing is carried (kPa typed as Pa); 100 MPa is the crushing strength of concrete.
    "allowable_bearing_pressure": Range("Pa", 1e3, 2.5e4, 1e7, 1e8,
                                        "any soil that carries a foundation",
                                        "the strength of concrete itself (about 100 MPa)",
                                        ((1e3, "kPa typed as Pa"), (1e6, "MPa typed as Pa"))),
    # Cv of the soil's shear modulus: ASCE 4-16 §5.1.7 asks for at least 0.5, and 1.0 where
    # the site is not well investigated (from memory — verify). Zero (best estimate only)
    # is allowed; no hard bound, as a wider spread is not impossible, only unusual.
    "variation": Range("", None, 0.5, 1.0, None, "", ""),
    # Depth of a block's base below grade: foundation blocks are embedded 0-5 m, deep
    # machine foundations some 10 m (common practice). 100 m is no block: mm or cm typed.
    "embedment_depth": Range("m", None, None, 10.0, 100.0, "",
                             "any foundation block (deep foundations are piles)",
                             ((1e-3, "mm typed as m"), (1e-2, "cm typed as m"))),
    # Strain-compatible G/G0 as entered: ASCE 7-16 Table 19.2-1 spans 1.0 down to 0.05
    # (site class E at S_DS/2.5 = 0.4, from memory); below it the table asks for a
    # site-specific study. The schema keeps it in (0, 1].
    "modulus_ratio": Range("", None, 0.05, None, None, "", ""),
    # Level of shaking S_DS/2.5 (or PGA) in g for Table 19.2-1, whose columns end at 0.8 g
    # (ASCE 7-16, from memory); the largest recorded PGA is about 4 g (from memory), so
    # above 5 g it is m/s² or cm/s² typed for g.
    "shaking_g": Range("g", None, None, 1.5, 5.0, "",
                       "any recorded shaking (about 4 g)",
                       ((1 / STANDARD_GRAVITY, "m/s² typed for g"), (1 / (100 * STANDARD_GRAVITY), "cm/s² typed for g"))),
    # The magnitude of a record's scale factor: record selection keeps factors within about
    # 0.25-4 (common practice; NIST GCR 11-917-15, from memory), so beyond 0.1-10 the likely
    # cause is a unit conversion typed as a scale (9.81 for g, 100 for m) instead of the
    # record's units. Only a warning: a strong scaling may be meant.
    "record_scale": Range("", None, 0.1, 10.0, None, "", ""),
    # A target table's PSA in g: design spectra peak near 2.5 × PGA (ASCE 7-16 §11.4.6,
    # EN 1998-1 §3.2.2.2), so above about 10 g a table is in another unit.
    "target_psa": Range("g", None, None, 6.0, 15.0, "", "any design spectrum (in g)",
                        ((1 / STANDARD_GRAVITY, "m/s² typed for g"), (1 / (100 * STANDARD_GRAVITY), "cm/s² typed for g"))),
}

Level = Literal["ok", "warn", "error"]


def _number_text(x: float) -> str:
    """A short form of ``x`` the user could type (30e9, 2400, 0.05)."""
    if 1e3 <= abs(x) < 1e6 and x == round(x):
        return str(int(round(x)))
    if x == 0 or 1e-3 <= abs(x) < 1e6:
        return f"{x:.4g}"
    mant, exp = f"{x:.3e}".split("e")
    mant = mant.rstrip("0").rstrip(".")
    return f"{mant}e{int(exp)}"


def judge(quantity: str, value: float, *, key: str | None = None) -> tuple[Level, str]:
    """How plausible ``value`` of ``quantity`` (a key of :data:`RANGES`) is.

    Parameters
    ----------
    quantity : str
        Row of :data:`RANGES`.
    value : float
        The value in the row's unit (SI, or g / % / s as the row says).
    key : str, optional
        The name to show (default: ``quantity``).

    Returns
    -------
    level : {"ok", "warn", "error"}
    text : str
        Empty when ``"ok"``; otherwise ``"KEY = VALUE UNIT is ..."`` with the likely slip.
    """
    level, text = verdict(quantity, value)
    return level, (f"{key or quantity} = {text}" if text else "")


def verdict(quantity: str, value: float) -> tuple[Level, str]:
    """As :func:`judge`, with the text neutral: ``"VALUE UNIT is ..."`` (no name in front)."""
    r = RANGES[quantity]
    if not math.isfinite(value):
        return "ok", ""                     # finiteness is the caller's own check
    unit = f" {r.unit}" if r.unit and r.unit != "%" else (" %" if r.unit == "%" else "")
    shown = f"{_number_text(value)}{unit}"
    low_ok = r.warn_below if r.warn_below is not None else r.error_below
    high_ok = r.warn_above if r.warn_above is not None else r.error_above

    def usual(x: float) -> bool:
        return ((low_ok is None or x >= low_ok) and (high_ok is None or x <= high_ok))

    def hint() -> str:
        for factor, slip in r.slips:
            x = value * factor
            if usual(x):
                exp = math.log10(factor)
                if x >= 1e6 and exp == round(exp) and "e" not in _number_text(value):
                    text = f"{_number_text(value)}e{round(exp)}"      # 30 -> 30e9
                else:
                    text = _number_text(x)
                return f"; did you mean {text}{unit} ({slip})?"
        return ""

    check = "; check the unit" if r.unit else "; check the value"
    if value != 0 and r.error_below is not None and abs(value) < r.error_below:
        return "error", (f"{shown} is below {r.low} (allowed ≥ {_number_text(r.error_below)}{unit})"
                         + hint())
    if r.error_above is not None and value > r.error_above:
        return "error", (f"{shown} is above {r.high} (allowed ≤ {_number_text(r.error_above)}{unit})"
                         + hint())
    if value != 0 and r.warn_below is not None and value < r.warn_below:
        return "warn", (f"{shown} is unusually low (usually ≥ {_number_text(r.warn_below)}{unit})"
                        + (hint() if r.hint_when_unusual else "") + check)
    if r.warn_above is not None and value > r.warn_above:
        return "warn", (f"{shown} is unusually high (usually ≤ {_number_text(r.warn_above)}{unit})"
                        + (hint() if r.hint_when_unusual else "") + check)
    return "ok", ""


def check_value(quantity: str, value: float, *, key: str | None = None,
                where: str = "", error=None, stacklevel: int = 2) -> None:
    """Raise for an implausible value, warn for an unusual one, else do nothing.

    Parameters
    ----------
    quantity, value, key
        As for :func:`judge`.
    where : str
        Prefix of the location (``"target asce7: "``); the error's location is
        ``where + key`` and its message the neutral text (:func:`verdict`), joined by
        ``" = "``, so callers may locate it again (``error.located("--damping")``).
    error : type, optional
        The exception class to raise (default :class:`~groundshake.InputError`).
    stacklevel : int
        Passed to :func:`warnings.warn`.

    Raises
    ------
    InputError
        When the value is far outside any real value.
    """
    import warnings

    from ._errors import GroundshakeWarning, InputError

    level, text = verdict(quantity, value)
    if level == "error":
        raise (error or InputError)(text, param=quantity, value=value,
                                    where=where + (key or quantity), sep=" = ")
    if level == "warn":
        warnings.warn(f"{where}{key or quantity} = {text}", GroundshakeWarning,
                      stacklevel=stacklevel + 1)
