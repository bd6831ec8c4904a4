"""Units of acceleration accepted on the way in, and their factors to m/s²."""
from __future__ import annotations

import re

from .._errors import RecordError
from ._record import STANDARD_GRAVITY

__all__ = ["UNITS", "UNIT_NAMES", "canonical_units", "to_si_factor"]

#: Canonical unit name -> factor to m/s². g is the standard gravity (3rd CGPM, 1901);
#: the foot is 0.3048 m and the inch 0.0254 m exactly (international yard, 1959).
UNITS: dict[str, float] = {
    "g": STANDARD_GRAVITY,
    "m/s2": 1.0,
    "cm/s2": 0.01,
    "mm/s2": 0.001,
    "ft/s2": 0.3048,
    "in/s2": 0.0254,
}

# Spellings accepted for each canonical name (compared after lower-casing and
# removing spaces; "^2", "**2", "²" and "/s/s" are read as "/s2").
_ALIASES = {
    "g": "g", "gn": "g", "g0": "g",
    "m/s2": "m/s2", "mps2": "m/s2", "m/sec2": "m/s2",
    "cm/s2": "cm/s2", "gal": "cm/s2", "gals": "cm/s2", "cm/sec2": "cm/s2",
    "mm/s2": "mm/s2", "mm/sec2": "mm/s2",
    "ft/s2": "ft/s2", "ft/sec2": "ft/s2",
    "in/s2": "in/s2", "in/sec2": "in/s2",
}

#: Allowed spellings, for messages.
UNIT_NAMES = "g, m/s2, cm/s2 (gal), mm/s2, ft/s2, in/s2"


def _squash(text: str) -> str:
    t = text.strip().lower().replace(" ", "")
    t = t.replace("²", "2").replace("**2", "2").replace("^2", "2")
    t = re.sub(r"/s/s$", "/s2", t)
    t = re.sub(r"/sec/sec$", "/sec2", t)
    return t


def canonical_units(text: str, *, where: str = "units", param: str | None = None) -> str:
    """The canonical name of a unit of acceleration.

    Parameters
    ----------
    text : str
        A unit as written, e.g. ``"gal"``, ``"m/s^2"``, ``"G"``, ``"cm/s²"``.
    where : str
        What to name in the error message (file, header or column).
    param : str, optional
        The parameter that gave ``text`` (``"units"`` for a user's units), carried by the
        error so that callers name their option or key.

    Returns
    -------
    str
        One of ``"g"``, ``"m/s2"``, ``"cm/s2"``, ``"mm/s2"``, ``"ft/s2"``, ``"in/s2"``.

    Raises
    ------
    RecordError
        If the unit is not one of those.
    """
    key = _squash(str(text))
    try:
        return _ALIASES[key]
    except KeyError:
        raise RecordError(f"{where}: unknown units {text!r}; allowed: {UNIT_NAMES}",
                          param=param) from None


def to_si_factor(units: str) -> float:
    """Factor that turns a value in ``units`` (any accepted spelling) into m/s²."""
    return UNITS[canonical_units(units)]
