"""Checks and conversions shared by the readers of ``groundshake.records.io``."""
from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from ..._errors import RecordError
from .._units import UNIT_NAMES, UNITS, canonical_units

__all__ = ["MIN_SAMPLES", "to_si", "resolve_units", "check_samples", "check_dt",
           "format_error", "user_units", "looks_binary"]

#: Fewest samples a record may have.
MIN_SAMPLES = 16


def to_si(values: np.ndarray, units: str, where: str) -> np.ndarray:
    """Values in ``units`` → m/s², shape kept; an overflow is the file's fault, said in one line."""
    with np.errstate(over="ignore", invalid="ignore"):
        out = np.asarray(values, dtype=float) * UNITS[units]
    if not np.all(np.isfinite(out)):
        raise RecordError(f"{where}: values too large to be accelerations in {units} "
                          "(they overflow when converted to m/s2)")
    return out


def resolve_units(file_units: str | None, user_units: str | None, label: str) -> str:
    """The units of a trace: the file's, checked against the user's; one of them is needed."""
    if file_units is not None and user_units is not None and file_units != user_units:
        raise RecordError(f"{label}: the file states units {file_units} but {user_units} was "
                          f"given; drop the units option or fix the file")
    found = file_units or user_units
    if found is None:
        raise RecordError(f"{label}: the file does not state its units; give them "
                          f"(--units, or 'units' in the scenario): {UNIT_NAMES}")
    return found


def user_units(units: str | None, where: str) -> str | None:
    """The canonical name of a units option (None stays None)."""
    return None if units is None else canonical_units(units, where=f"{where}: units")


def check_samples(data: np.ndarray, label: str) -> None:
    """Refuse fewer than :data:`MIN_SAMPLES` samples or a NaN/inf among them."""
    if data.size < MIN_SAMPLES:
        raise RecordError(f"{label}: {data.size} samples; at least {MIN_SAMPLES} are needed")
    bad = np.flatnonzero(~np.isfinite(data))
    if bad.size:
        raise RecordError(f"{label}: sample {bad[0]} is {data[bad[0]]} (NaN or inf)")


def check_dt(given: float | None, header: float, label: str, what: str = "the header") -> None:
    """A ``dt`` option [s] that contradicts the file's own step is an error (1e-6 relative)."""
    if given is not None and not math.isclose(float(given), header, rel_tol=1e-6):
        raise RecordError(f"{label}: dt={float(given):g} s was given but {what} says "
                          f"{header:g} s; drop the dt option or fix the file")


def format_error(fmt: str, path: Path | str, what: str, line: int | None = None,
                 text: str | None = None, part: str = "line") -> RecordError:
    """The error for a file that looks like ``fmt`` but does not parse.

    ``"<fmt> file <path>: <what> (<part> <line>: '<text>')"``; ``line`` is 1-based,
    ``part`` e.g. ``"header line"`` or ``"line"``.
    """
    where = f" ({part} {line}: {text.strip()[:60]!r})" if line is not None and text is not None \
        else (f" ({part} {line})" if line is not None else "")
    return RecordError(f"{fmt} file {path}: {what}{where}")


def looks_binary(head: bytes) -> bool:
    """True if ``head`` holds NUL bytes or more than 1 % other control characters."""
    controls = sum(head.count(bytes([c])) for c in range(32) if c not in (9, 10, 12, 13))
    return b"\x00" in head or controls > 0.01 * max(len(head), 1)
