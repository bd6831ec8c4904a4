"""Which way a component points: vertical or horizontal, and its azimuth.

Agencies name components in many ways. One function reads them all, so that
RotD pairing, scenario components and record names agree:

=====================================  ==========  ===============
written as                             kind        azimuth [deg]
=====================================  ==========  ===============
UD, UP, U, V, Z, VERT, U-D, DOWN, UD1  vertical    —
HNZ, HLZ, BHZ, EHZ (SEED, 3rd letter)  vertical    —
HNE / HNN, HN1 / HN2 (SEED)            horizontal  90 / 0, — / —
E, EW, E-W, EAST, EW1                  horizontal  90
N, NS, N-S, NORTH, NS2                 horizontal  0
360, 90, 0, 270 (numbers 0–360)        horizontal  the number mod 360
N08W, S45E, N90E (compass bearings)    horizontal  352, 135, 90
L, T, H1, H2, X, Y, L1, T3, FN, FP     horizontal  from the header, else —
=====================================  ==========  ===============

A header's own statement wins over the code: ``metadata["orientation"]``
(``"vertical"``/``"horizontal"``), ``metadata["azimuth_deg"]`` and
``metadata["dip_deg"]`` (±90 is vertical), as the readers store them.
"""
from __future__ import annotations

import math
import numbers
import re
from typing import Any, Literal, Mapping, NamedTuple, Sequence

from .._errors import InputError
from ._record import Record

__all__ = ["Orientation", "describe", "orientation", "azimuth_deg", "bearing_deg",
           "pick_component", "components_by_orientation", "AZIMUTH_TOLERANCE_DEG"]

Kind = Literal["vertical", "horizontal", "unknown"]

_VERTICAL_WORDS = {"UD", "UP", "U", "V", "Z", "VERT", "VERTICAL", "DOWN", "DN", "UPDOWN",
                   "UPDN", "VER", "VRT"}
_NORTH_WORDS = {"N", "NS", "NORTH", "SN", "NORTHSOUTH"}
_EAST_WORDS = {"E", "EW", "EAST", "WE", "EASTWEST"}
_HORIZONTAL_WORDS = {"L", "T", "H", "H1", "H2", "X", "Y", "R", "TRAN", "TRANS", "TRANSVERSE",
                     "LONGITUDINAL", "LONG", "RADIAL", "HORIZONTAL", "HOR",
                     "FN", "FP"}  # fault normal / fault parallel (rotated records)
_BEARING = re.compile(r"^([NS])\s*(\d{1,2}(?:\.\d+)?)\s*([EW])$")
_NUMBER = re.compile(r"^[+-]?\d{1,3}(?:\.\d+)?$")
_SEED = re.compile(r"^[A-Z][A-Z]([ZNE123UVW])$")
_TRAILING_DIGITS = re.compile(r"^([A-Z]+?)[-_ ]?\d{1,2}$")


class Orientation(NamedTuple):
    """What a component code says about its direction.

    Attributes
    ----------
    kind : {"vertical", "horizontal", "unknown"}
    azimuth_deg : float or None
        Clockwise from north [deg] in [0, 360), for a horizontal component whose
        direction is known; None otherwise.
    """

    kind: Kind
    azimuth_deg: float | None


def bearing_deg(text: str) -> float | None:
    """A compass bearing such as ``"N08W"`` or ``"S45E"`` as an azimuth [deg], else None.

    ``N a E`` is a, ``N a W`` is 360 − a, ``S a E`` is 180 − a, ``S a W`` is 180 + a
    (surveyors' quadrant bearings).
    """
    m = _BEARING.match(str(text).strip().upper())
    if not m:
        return None
    ns, angle, ew = m.group(1), float(m.group(2)), m.group(3)
    if angle > 90:
        return None
    az = {("N", "E"): angle, ("N", "W"): 360.0 - angle,
          ("S", "E"): 180.0 - angle, ("S", "W"): 180.0 + angle}[(ns, ew)]
    return az % 360.0


def _from_code(code: str) -> Orientation:
    raw = code.strip().upper()
    if not raw:
        return Orientation("unknown", None)
    squashed = re.sub(r"[\s\-_/.()+]", "", raw)
    number = re.sub(r"\s*(DEGREES|DEG|°)$", "", raw)
    if _NUMBER.match(number):
        value = float(number)
        if 0 <= value <= 360:
            return Orientation("horizontal", value % 360.0)
        return Orientation("unknown", None)
    az = bearing_deg(raw.replace(" ", ""))
    if az is not None:
        return Orientation("horizontal", az)
    for word in (squashed, _strip_number(squashed)):
        if word in _VERTICAL_WORDS:
            return Orientation("vertical", None)
        if word in _NORTH_WORDS:
            return Orientation("horizontal", 0.0)
        if word in _EAST_WORDS:
            return Orientation("horizontal", 90.0)
        if word in _HORIZONTAL_WORDS:
            return Orientation("horizontal", None)
    m = _SEED.match(squashed)
    if m:  # SEED band/instrument/orientation code (SEED manual, appendix A)
        last = m.group(1)
        if last == "Z":
            return Orientation("vertical", None)
        if last == "N":
            return Orientation("horizontal", 0.0)
        if last == "E":
            return Orientation("horizontal", 90.0)
        if last in "12":
            return Orientation("horizontal", None)
    return Orientation("unknown", None)


def _strip_number(word: str) -> str:
    """``"UD1"`` → ``"UD"``, ``"L1"`` → ``"L"`` (KiK-net and Volume-1 channel numbers)."""
    m = _TRAILING_DIGITS.match(word)
    return m.group(1) if m else word


def _finite(value: Any) -> float | None:
    try:
        f = float(value)
    except (TypeError, ValueError):
        return None
    return f if math.isfinite(f) else None


def describe(component: str, metadata: Mapping[str, Any] | None = None) -> Orientation:
    """Kind and azimuth of a component, from its header first, else from its code.

    Parameters
    ----------
    component : str
        The component or channel code as written (``"UD"``, ``"HNZ"``, ``"360"``,
        ``"N08W"``, ``"EW1"``, ...).
    metadata : mapping, optional
        A record's metadata; ``"orientation"``, ``"azimuth_deg"`` and ``"dip_deg"``
        [deg] are used when present.

    Returns
    -------
    Orientation
        ``kind`` and ``azimuth_deg`` (clockwise from north, [0, 360), or None).

    Examples
    --------
    >>> describe("UD").kind
    'vertical'
    >>> describe("N08W")
    Orientation(kind='horizontal', azimuth_deg=352.0)
    """
    meta = metadata or {}
    from_code = _from_code(str(component or ""))
    kind = str(meta.get("orientation") or "").strip().lower()
    dip = _finite(meta.get("dip_deg"))
    az = _finite(meta.get("azimuth_deg"))
    if kind not in ("vertical", "horizontal"):
        if dip is not None and abs(abs(dip) - 90.0) < 1e-6:
            kind = "vertical"
        elif dip is not None and abs(dip) < 1e-6:
            kind = "horizontal"
        else:
            kind = from_code.kind
    if kind == "vertical":
        return Orientation("vertical", None)
    if kind == "horizontal":
        if az is None and from_code.kind == "horizontal":
            az = from_code.azimuth_deg
        return Orientation("horizontal", None if az is None else az % 360.0)
    return Orientation("unknown", None)


def orientation(component: str, metadata: Mapping[str, Any] | None = None) -> Kind:
    """``"vertical"``, ``"horizontal"`` or ``"unknown"`` (see :func:`describe`)."""
    return describe(component, metadata).kind


def azimuth_deg(component: str, metadata: Mapping[str, Any] | None = None) -> float | None:
    """Azimuth [deg] clockwise from north of a horizontal component, or None (see :func:`describe`)."""
    return describe(component, metadata).azimuth_deg


#: Largest difference [deg] between an ``azimuth`` asked for and a channel's azimuth for
#: the channel to be picked (headers state whole degrees or bearings such as N28W).
AZIMUTH_TOLERANCE_DEG = 1.0


def _listing(records: Sequence[Record]) -> str:
    """``0: 360 (horizontal, 0°), 1: UP (vertical), ...`` for messages."""
    out = []
    for i, r in enumerate(records):
        o = describe(str(r.component or ""), r.metadata)
        what = o.kind if o.azimuth_deg is None else f"{o.kind}, {o.azimuth_deg:g}°"
        out.append(f"{i}: {r.component or r.name} ({what})")
    return ", ".join(out)


def pick_component(records: Sequence[Record], *, trace: int | str | None = None,
                   channel: str | None = None, azimuth: float | None = None,
                   orientation: Literal["vertical", "horizontal"] | None = None,
                   where: str = "component") -> Record:
    """The one record of a file that a scenario component asks for.

    At most one of the choices may be given; with none, the file must hold one record.

    Parameters
    ----------
    records : sequence of Record
        The records of one file, in the file's order.
    trace : int or str, optional
        Index from 0, or a channel code (as ``channel``).
    channel : str, optional
        The component code as written (``"360"``, ``"HNZ"``, ``"UP"``; case ignored) or
        the record's name.
    azimuth : float, optional
        Azimuth [deg] clockwise from north of the horizontal channel wanted; matched
        within :data:`AZIMUTH_TOLERANCE_DEG` (mod 360, so 0 finds "360 Deg").
    orientation : {"vertical", "horizontal"}, optional
        The file's only channel of that kind (vertical → z).
    where : str
        The location of the component in messages (``"motion.x"``); an error about one
        choice is located at ``where.CHOICE`` and carries ``param`` = the choice's name.

    Returns
    -------
    Record

    Raises
    ------
    InputError
        Two choices at once, none matching, or several matching; the message lists the
        file's channels with what their headers say of their direction.
    """
    given = {k: v for k, v in (("trace", trace), ("channel", channel), ("azimuth", azimuth),
                               ("orientation", orientation)) if v is not None}
    if len(given) > 1:
        raise InputError(f"{' and '.join(given)} given together; allowed: one of "
                         "trace, channel, azimuth, orientation", where=where)
    if not given:
        if len(records) != 1:
            raise InputError(f"the file holds {len(records)} channels "
                             f"({_listing(records)}); give channel = code, azimuth = degrees "
                             "or trace = index", where=where)
        return records[0]
    key, value = next(iter(given.items()))
    if key == "trace" and isinstance(value, numbers.Integral) and not isinstance(value, bool):
        value = int(value)
        if not 0 <= value < len(records):
            raise InputError(f"given {value}; allowed 0..{len(records) - 1} "
                             f"({_listing(records)})", param="trace", value=value,
                             where=f"{where}.trace")
        return records[value]
    if key in ("trace", "channel"):
        text = str(value).strip().lower()
        found = [r for r in records if text in (str(r.component).strip().lower(),
                                                 str(r.name).strip().lower())]
    elif key == "azimuth":
        az = float(value)
        if not math.isfinite(az):
            raise InputError(f"given {value!r}; allowed: degrees from north", param="azimuth",
                             value=value, where=f"{where}.azimuth")
        found = []
        for r in records:
            o = describe(str(r.component or ""), r.metadata)
            if o.kind == "horizontal" and o.azimuth_deg is not None:
                gap = abs((o.azimuth_deg - az + 180.0) % 360.0 - 180.0)
                if gap <= AZIMUTH_TOLERANCE_DEG:
                    found.append(r)
    elif key == "orientation":
        if value not in ("vertical", "horizontal"):
            raise InputError(f"given {value!r}; allowed 'vertical', 'horizontal'",
                             param="orientation", value=value, where=f"{where}.orientation")
        found = [r for r in records
                 if describe(str(r.component or ""), r.metadata).kind == value]
    if len(found) == 1:
        return found[0]
    what = "no channel matches" if not found else f"{len(found)} channels match"
    raise InputError(f"given {value!r}; {what}; the file holds {_listing(records)}",
                     param=key, value=value, where=f"{where}.{key}")


def components_by_orientation(records: Sequence[Record], *, where: str = "motion.file"
                              ) -> dict[str, Record]:
    """x, y, z records of a station file given once: the vertical to z, the horizontals
    to x and y in the file's order.

    Parameters
    ----------
    records : sequence of Record
        The records of one file (one to three channels).
    where : str
        The scenario key, for messages.

    Returns
    -------
    dict
        ``{"x": Record, "y": Record, "z": Record}``, keys present for the channels found.

    Raises
    ------
    InputError
        More than one vertical or two horizontals, or a channel whose direction the
        file does not state (the message lists the channels; give x, y, z instead).
    """
    kinds = [describe(str(r.component or ""), r.metadata).kind
             for r in records]
    vertical = [r for r, k in zip(records, kinds) if k == "vertical"]
    horizontal = [r for r, k in zip(records, kinds) if k == "horizontal"]
    if "unknown" in kinds or len(vertical) > 1 or len(horizontal) > 2 or not records:
        raise InputError(f"cannot tell x, y and z apart by orientation: the file "
                         f"holds {_listing(records) or 'no channels'}; allowed: one vertical "
                         "and at most two horizontals, else give x, y, z with channel = code",
                         where=where)
    out = dict(zip(("x", "y"), horizontal))
    if vertical:
        out["z"] = vertical[0]
    return out
