"""Processing settings: the scenario's ``[processing]`` keys, with published defaults.

Each field is declared once, here: its default, and in its ``metadata`` a one-line
description (``doc``), its unit and its limits (``ge``, ``gt``, ``le``, ``choices``) as
plain data. The checks below read them, and so does the scenario's ``[processing]`` table,
which is built from these fields (``groundshake.scenario``).
"""
from __future__ import annotations

import functools
import math
import types
import typing
from dataclasses import asdict, dataclass, field, fields
from typing import Any, Literal

from .._errors import InputError

__all__ = ["ProcessingSettings", "DEFAULT_PROCESSING", "setting"]

#: The name these settings go by (the scenario's ``[processing]`` table has the same keys);
#: an error of a field is shown at ``processing.FIELD`` until a caller locates it.
SECTION = "processing"


def setting(default: Any, *, doc: str, unit: str = "", zero_means_none: bool = False,
            **limits: Any):
    """A dataclass field with its description, unit and limits as plain metadata.

    ``limits`` holds ``ge``, ``gt``, ``le`` (inclusive or strict bounds of a number) or
    ``choices`` (the allowed strings). ``zero_means_none``: 0 is accepted and stored as
    ``None`` (no such step), so the field's bounds apply to values other than 0.
    """
    meta = {"doc": doc, "unit": unit, **limits}
    if zero_means_none:
        meta["zero_means_none"] = True
    return field(default=default, metadata=meta)


@dataclass(frozen=True)
class ProcessingSettings:
    """How a record is corrected (Boore & Bommer 2005; Boore 2005).

    The limits of each field are in its metadata (``dataclasses.fields``).

    Attributes
    ----------
    enabled : bool
        ``False`` uses the record exactly as read.
    mean_removal : {"whole", "pre-event"}
        Remove the mean of the whole record, or of its first ``pre_event_s`` seconds.
    pre_event_s : float
        Length [s] of the pre-event part (for ``mean_removal="pre-event"``).
    baseline_order : int or None
        Order k of the polynomial fitted to velocity by least squares; its
        derivative (order k-1) is removed from acceleration. 0 or ``None``: no fit.
    highpass_hz, lowpass_hz : float or None
        Corners [Hz] of the acausal Butterworth low-cut / high-cut filter; ``None``
        or 0 for none (0 is stored as ``None``, as the CLI and the scenario spell it).
    filter_order : int
        Order n of each Butterworth pass; applied forward and backward, so
        the gain is |H|² with -6 dB (one half) at the corner.
    taper_percent : float
        Length of the half-cosine taper at each end, percent of the record.
    pad : bool
        Zero pads of 1.5·n/fc in total (half at each end) before a low-cut filter;
        the padded record is kept (Boore 2005).
    """

    enabled: bool = setting(True, doc="false uses the records exactly as read")
    mean_removal: Literal["whole", "pre-event"] = setting(
        "whole", choices=("whole", "pre-event"),
        doc="remove the mean of the whole record or of its pre-event part")
    pre_event_s: float = setting(0.0, ge=0.0, unit="s", doc="length of the pre-event part")
    baseline_order: int | None = setting(1, ge=0, le=6,
                                         doc="order of the polynomial baseline removed")
    highpass_hz: float | None = setting(0.1, ge=0.0, unit="Hz", zero_means_none=True,
                                        doc="high-pass corner; 0 = no high-pass")
    lowpass_hz: float | None = setting(None, ge=0.0, unit="Hz", zero_means_none=True,
                                       doc="low-pass corner; none or 0 = no low-pass")
    filter_order: int = setting(4, ge=1, le=12, doc="Butterworth filter order")
    taper_percent: float = setting(5.0, ge=0.0, le=25.0, unit="%",
                                   doc="cosine taper at each end, percent of the length")
    pad: bool = setting(True, doc="pad with zeros before filtering (kept in the result)")

    def __post_init__(self) -> None:
        for f in fields(self):                           # one spelling of "none": None
            value = getattr(self, f.name)
            if (f.metadata.get("zero_means_none") and _is_number(value) and value == 0):
                object.__setattr__(self, f.name, None)
        for f in fields(self):
            _check(f, getattr(self, f.name))
        if self.mean_removal == "pre-event" and self.pre_event_s <= 0:
            raise _bad("pre_event_s", self.pre_event_s, "a pre-event length > 0 s "
                       "(a 'pre-event' mean needs one)")
        if (self.highpass_hz is not None and self.lowpass_hz is not None
                and self.lowpass_hz <= self.highpass_hz):
            raise _bad("lowpass_hz", self.lowpass_hz,
                       f"a corner above the high-pass corner {self.highpass_hz!r} Hz")

    @classmethod
    def from_dict(cls, values: dict[str, Any], *, where: str = SECTION) -> "ProcessingSettings":
        """Settings from a mapping of the field names; unknown keys are errors."""
        names = {f.name for f in fields(cls)}
        unknown = sorted(set(values) - names)
        if unknown:
            raise InputError(f"unknown key {unknown[0]!r}; allowed: {', '.join(sorted(names))}",
                             param=unknown[0], value=values[unknown[0]], where=where)
        return cls(**values)

    def to_dict(self) -> dict[str, Any]:
        """Every field with its value (for echoing into outputs)."""
        return asdict(self)

    def describe(self) -> str:
        """One line saying what the correction does, for printing with results."""
        if not self.enabled:
            return "processing off: the record is used exactly as read"
        parts = ["mean of the whole record removed" if self.mean_removal == "whole"
                 else f"mean of the first {self.pre_event_s:g} s removed"]
        if self.baseline_order:
            parts.append(f"velocity baseline of order {self.baseline_order} removed")
        if self.taper_percent:
            parts.append(f"{self.taper_percent:g} % cosine tapers")
        band = []
        if self.highpass_hz is not None:
            band.append(f"high-pass {self.highpass_hz:g} Hz")
        if self.lowpass_hz is not None:
            band.append(f"low-pass {self.lowpass_hz:g} Hz")
        if band:
            if self.highpass_hz is not None and self.pad:
                parts.append("zero pads 1.5·n/fc")
            parts.append(f"acausal Butterworth order {self.filter_order} " + ", ".join(band))
        return "; ".join(parts) + " (Boore & Bommer 2005; Boore 2005)"


def _bad(param: str, value, allowed: str) -> InputError:
    """The error of one field: ``given VALUE; allowed WHAT``, at ``processing.FIELD`` until
    a caller locates it elsewhere (the command line names its option)."""
    return InputError(f"given {value!r}; allowed {allowed}", param=param, value=value,
                      where=f"{SECTION}.{param}")


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


@functools.lru_cache(maxsize=None)
def value_type(cls: type, name: str) -> tuple[type, bool]:
    """The type of a settings field's values and whether ``None`` is allowed:
    ``(bool | int | float | str, optional)``, read from the class's annotations (a
    ``Literal`` of strings is ``str``)."""
    hint = typing.get_type_hints(cls)[name]
    args = typing.get_args(hint)
    if typing.get_origin(hint) in (typing.Union, types.UnionType):
        rest = [a for a in args if a is not type(None)]
        base, optional = rest[0], len(rest) < len(args)
    else:
        base, optional = hint, False
    if typing.get_origin(base) is Literal:
        base = str
    return base, optional


def _check(f, value) -> None:
    """One field's value against its type and the limits in its metadata."""
    base, optional = value_type(ProcessingSettings, f.name)
    meta = f.metadata
    if value is None and optional:
        return
    if base is bool:
        if not isinstance(value, bool):
            raise _bad(f.name, value, "true or false")
    elif meta.get("choices"):
        if value not in meta["choices"]:
            raise _bad(f.name, value, " or ".join(repr(c) for c in meta["choices"]))
    elif base is int:
        lo, hi = meta.get("ge"), meta.get("le")
        if isinstance(value, bool) or not isinstance(value, int) or not lo <= value <= hi:
            raise _bad(f.name, value, f"an integer {lo}-{hi}")
    else:
        # 0 is stored as None where it means "none": the other values lie strictly above
        strict = meta.get("gt") is not None or bool(meta.get("zero_means_none"))
        lowest = meta["gt"] if meta.get("gt") is not None else meta.get("ge")
        _number(f.name, value, minimum=lowest, maximum=meta.get("le"), strict=strict)


def _number(param: str, value, *, minimum=None, maximum=None, strict=False) -> None:
    ok = _is_number(value) and math.isfinite(value)
    if ok and minimum is not None:
        ok = value > minimum if strict else value >= minimum
    if ok and maximum is not None:
        ok = value <= maximum
    if not ok:
        rng = []
        if minimum is not None:
            rng.append(f"{'>' if strict else '>='} {minimum:g}")
        if maximum is not None:
            rng.append(f"<= {maximum:g}")
        raise _bad(param, value, f"a number {' and '.join(rng)}")


#: The defaults (published practice).
DEFAULT_PROCESSING = ProcessingSettings()
