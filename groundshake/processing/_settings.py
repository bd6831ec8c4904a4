"""Processing settings: the scenario's ``[processing]`` keys, with published defaults."""
from __future__ import annotations

import math
from dataclasses import asdict, dataclass, fields
from typing import Any, Literal

from .._errors import InputError

__all__ = ["ProcessingSettings", "DEFAULT_PROCESSING"]

#: The name these settings go by (the scenario's ``[processing]`` table has the same keys);
#: an error of a field is shown at ``processing.FIELD`` until a caller locates it.
SECTION = "processing"


@dataclass(frozen=True)
class ProcessingSettings:
    """How a record is corrected (Boore & Bommer 2005; Boore 2005).

    Attributes
    ----------
    enabled : bool
        ``False`` uses the record exactly as read.
    mean_removal : {"whole", "pre-event"}
        Remove the mean of the whole record, or of its first ``pre_event_s`` seconds.
    pre_event_s : float
        Length [s] of the pre-event part (for ``mean_removal="pre-event"``).
    baseline_order : int or None
        Order k (0-6) of the polynomial fitted to velocity by least squares; its
        derivative (order k-1) is removed from acceleration. 0 or ``None``: no fit.
    highpass_hz, lowpass_hz : float or None
        Corners [Hz] of the acausal Butterworth low-cut / high-cut filter; ``None``
        or 0 for none (0 is stored as ``None``, as the CLI and the scenario spell it).
    filter_order : int
        Order n (1-12) of each Butterworth pass; applied forward and backward, so
        the gain is |H|² with -6 dB (one half) at the corner.
    taper_percent : float
        Length of the half-cosine taper at each end, percent of the record (0-25).
    pad : bool
        Zero pads of 1.5·n/fc in total (half at each end) before a low-cut filter;
        the padded record is kept (Boore 2005).
    """

    enabled: bool = True
    mean_removal: Literal["whole", "pre-event"] = "whole"
    pre_event_s: float = 0.0
    baseline_order: int | None = 1
    highpass_hz: float | None = 0.1
    lowpass_hz: float | None = None
    filter_order: int = 4
    taper_percent: float = 5.0
    pad: bool = True

    def __post_init__(self) -> None:
        for key in ("highpass_hz", "lowpass_hz"):      # one spelling of "no filter": None
            value = getattr(self, key)
            if isinstance(value, (int, float)) and not isinstance(value, bool) and value == 0:
                object.__setattr__(self, key, None)
        if not isinstance(self.enabled, bool):
            raise _bad("enabled", self.enabled, "true or false")
        if self.mean_removal not in ("whole", "pre-event"):
            raise _bad("mean_removal", self.mean_removal, "'whole' or 'pre-event'")
        _number("pre_event_s", self.pre_event_s, minimum=0.0)
        if self.mean_removal == "pre-event" and self.pre_event_s <= 0:
            raise _bad("pre_event_s", self.pre_event_s, "a pre-event length > 0 s "
                       "(a 'pre-event' mean needs one)")
        if self.baseline_order is not None and (
                isinstance(self.baseline_order, bool) or not isinstance(self.baseline_order, int)
                or not 0 <= self.baseline_order <= 6):
            raise _bad("baseline_order", self.baseline_order, "an integer 0-6")
        for key in ("highpass_hz", "lowpass_hz"):
            value = getattr(self, key)
            if value is not None:
                _number(key, value, minimum=0.0, strict=True)
        if (self.highpass_hz is not None and self.lowpass_hz is not None
                and self.lowpass_hz <= self.highpass_hz):
            raise _bad("lowpass_hz", self.lowpass_hz,
                       f"a corner above the high-pass corner {self.highpass_hz!r} Hz")
        if (isinstance(self.filter_order, bool) or not isinstance(self.filter_order, int)
                or not 1 <= self.filter_order <= 12):
            raise _bad("filter_order", self.filter_order, "an integer 1-12")
        _number("taper_percent", self.taper_percent, minimum=0.0, maximum=25.0)
        if not isinstance(self.pad, bool):
            raise _bad("pad", self.pad, "true or false")

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


def _number(param: str, value, *, minimum=None, maximum=None, strict=False) -> None:
    ok = isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)
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
