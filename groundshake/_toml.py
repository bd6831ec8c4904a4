"""TOML values written as text (the standard library reads TOML but does not write it).

One writer for the scenario echo in the report and for anything else that shows TOML:
``toml_value(v)`` gives a value's text, ``toml_key(k)`` a key's. Floats are written
either exactly (``repr``: reads back to the same float) or for people to read
(:func:`short_float`: 12 significant digits, engineering powers of ten). Strings use
JSON's escapes, which are valid TOML basic-string escapes, with DEL escaped as TOML
requires (TOML 1.0, "String").
"""
from __future__ import annotations

import datetime as _dt
import json
import math
import re
from typing import Any, Callable, Mapping

__all__ = ["toml_key", "toml_value", "toml_string", "short_float"]

_BARE = re.compile(r"^[A-Za-z0-9_-]+$")


def toml_string(s: str) -> str:
    """A TOML basic string (quoted, escaped)."""
    return json.dumps(s, ensure_ascii=False).replace("\x7f", "\\u007f")


def toml_key(k: str, *, bare: bool = True) -> str:
    """A key: bare when it may be (``[A-Za-z0-9_-]+``) and ``bare`` is true, else quoted."""
    return k if bare and _BARE.match(k) else toml_string(k)


def short_float(v: float) -> str:
    """A finite float as TOML text a person reads: 12 significant digits at most, and
    powers of ten for large or small magnitudes (``30e9`` rather than ``30000000000.0``)."""
    r = float(f"{v:.12g}")
    if r == 0:
        return "0.0"
    if 1e-4 <= abs(r) < 1e6:
        return repr(r)
    mant, exp = f"{r:.12e}".split("e")
    e = int(exp)
    # engineering style: an exponent that is a multiple of 3 (30e9, 118.75e6)
    shift = e % 3
    m = float(mant.rstrip("0").rstrip(".")) * 10 ** shift
    return f"{m:.12g}e{e - shift}"


def toml_value(v: Any, *, exact: bool = False, bare_keys: bool = True) -> str:
    """The TOML text of ``v``: bool, int, float (``nan``, ``inf``), str, date/time,
    list or tuple (arrays), mapping (inline tables).

    ``exact`` writes floats with ``repr`` (reads back bit for bit) instead of
    :func:`short_float`; ``None`` items are left out of arrays and tables; other
    objects are written as their ``str`` in quotes.
    """
    text: Callable[[float], str] = repr if exact else short_float

    def value(x: Any) -> str:
        if isinstance(x, bool):
            return "true" if x else "false"
        if isinstance(x, int):
            return str(x)
        if isinstance(x, float):
            if math.isnan(x):
                return "nan"
            if math.isinf(x):
                return "inf" if x > 0 else "-inf"
            return text(x)
        if isinstance(x, str):
            return toml_string(x)
        if isinstance(x, (_dt.datetime, _dt.date, _dt.time)):
            return x.isoformat()
        if isinstance(x, Mapping):
            items = [f"{toml_key(str(k), bare=bare_keys)} = {value(y)}"
                     for k, y in x.items() if y is not None]
            return "{ " + ", ".join(items) + " }" if items else "{}"
        if isinstance(x, (list, tuple)):
            return "[" + ", ".join(value(y) for y in x if y is not None) + "]"
        return toml_string(str(x))

    return value(v)
