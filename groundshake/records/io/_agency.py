"""Pieces shared by the readers of agency text formats (USC, AFAD, UNAM, RENADIC, BHRC, CWB).

The check of ``units`` given by the user against the header, Volume-1 style
channels and data blocks, and the building of a :class:`Record`
with the metadata keys every reader fills (station, channel, azimuth_deg,
orientation, event_*, header_pga ...).
"""
from __future__ import annotations

import re
import warnings
from pathlib import Path
from typing import Any, Mapping, Sequence

import numpy as np

from ..._errors import GroundshakeWarning, RecordError
from .._components import describe
from .._record import STANDARD_GRAVITY, Record
from .._units import UNITS, canonical_units
from ._common import file_stem, FormatError, head_lines, is_number, MIN_SAMPLES, read_lines

__all__ = ["read_lines", "head_lines", "numbers", "make_record", "units_factor", "warn",
           "volume1_data", "channel_spans", "points_pattern", "check_units", "G10"]

#: A tenth of standard gravity [m/s²]: the unit "G/10" of older Volume-1 formats.
G10 = 0.1 * STANDARD_GRAVITY

_FLOAT = re.compile(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[EeDd][-+]?\d+)?")


def numbers(text: str) -> list[float]:
    """Every number written in ``text``, in order (Fortran ``D`` exponents accepted)."""
    return [float(s.replace("D", "E").replace("d", "e")) for s in _FLOAT.findall(text)]


def check_units(file_units: str, user_units: str | None, path: Path, fmt: str) -> None:
    """Refuse ``user_units`` (any spelling; None: not given) other than ``file_units``."""
    if user_units is None:
        return
    given = canonical_units(user_units, where=str(path), param="units")
    if given != file_units:
        raise RecordError(f"{path}: units {given} were given but the {fmt} header says "
                          f"{file_units}; drop them or fix the file", param="units")


def make_record(values: np.ndarray, *, factor: float, file_units: str, dt: float, path: Path,
                fmt: str, station: str, component: str, user_units: str | None = None,
                start_time: str = "", metadata: Mapping[str, Any] | None = None) -> Record:
    """One :class:`Record` in m/s², with the interface's metadata keys filled.

    Parameters
    ----------
    values : ndarray, shape (n,)
        Samples as written in the file.
    factor : float
        Factor from the file's values to m/s² (e.g. 0.01 for gal, ``G10`` for g/10).
    file_units : str
        The units the header states, as the user would write them (``"cm/s2"``,
        ``"g/10"``, ``"g"``); compared with ``user_units``.
    dt : float
        Time step [s] (already checked with :func:`._common.check_dt`).
    station, component : str
        Station code and the channel code as written; the name is
        ``"<station> <component>"``.
    metadata : mapping, optional
        Further header fields; ``azimuth_deg``/``orientation`` here override what
        the component code says.
    """
    check_units(file_units, user_units, path, fmt)
    meta: dict[str, Any] = {"format": fmt, "station": station, "channel": component}
    meta.update(metadata or {})
    kind, az = describe(component, meta)
    meta["orientation"] = kind if kind != "unknown" else meta.get("orientation")
    if meta["orientation"] is None:
        del meta["orientation"]
    if kind == "horizontal" and az is not None:
        meta["azimuth_deg"] = az
    elif kind == "vertical":
        meta.pop("azimuth_deg", None)
    values = np.asarray(values, dtype=float)
    if values.size < MIN_SAMPLES:
        raise FormatError(fmt, path, f"channel {component!r} holds {values.size} samples; at "
                          f"least {MIN_SAMPLES} are needed")
    bad = np.flatnonzero(~np.isfinite(values))
    if bad.size:
        raise FormatError(fmt, path, f"channel {component!r}: sample {bad[0]} is not finite")
    with np.errstate(over="ignore", invalid="ignore"):
        acc = values * float(factor)
    if not np.all(np.isfinite(acc)):
        raise FormatError(fmt, path, f"channel {component!r}: values overflow in m/s2")
    canon = file_units if file_units in UNITS else ("g" if file_units == "g/10" else "m/s2")
    if file_units not in UNITS:
        meta["file_units"] = file_units
    name = f"{station} {component}".strip() or file_stem(path)
    return Record(acc=acc, dt=dt, name=name, component=component, source=str(path),
                  units=canon, start_time=start_time, metadata=meta)


def warn(message: str) -> None:
    """A :class:`GroundshakeWarning` from a reader (doubtful but readable header)."""
    warnings.warn(message, GroundshakeWarning, stacklevel=3)


def units_factor(text: str, *, fmt: str, path: Path, line: int | None = None) -> tuple[str, float]:
    """(units as the header states them, factor to m/s²) for a header's unit word.

    Accepts every spelling of :func:`canonical_units` plus the older ones of
    agency headers: ``G/10``, ``CMS/SEC/SEC``, ``CM/S/S``, ``GAL``, ``Gal (cm/s/s)``.
    """
    word = str(text).strip()
    squashed = word.upper().replace(" ", "")
    if squashed in ("G/10", "G/10.", "0.1G", "G*0.1"):
        return "g/10", G10
    squashed = re.sub(r"\(.*\)$", "", squashed)  # "GAL(CM/S/S)"
    squashed = squashed.replace("CMS/", "CM/").rstrip(".")
    try:
        canon = canonical_units(squashed, where=f"{path}")
    except RecordError:
        raise FormatError(fmt, path, f"units {word!r} are not units of acceleration this "
                          f"reader knows", line=line) from None
    return canon, UNITS[canon]


def points_pattern(length_key: str) -> re.Pattern:
    """The Volume-1 header phrase ``NO. OF POINTS = n ... <length_key> = s``.

    Group 1 is the count, group 2 the record's length [s] (None where the line has none);
    ``length_key`` is the word before it (``"DURATION"``, ``"LENGTH"``), a regex.
    """
    return re.compile(rf"NO\.\s*OF\s+POINTS\s*=\s*(\d+)(?:.*?{length_key}\s*=\s*([\d.]+))?",
                      re.I)


#: Lines of the real-valued header of Volume-1 style files: 50 values, 8 a line (CDMG layout).
REAL_HEADER_LINES = 7
_INT_LINE = re.compile(r"^[\s\d-]+$")


def volume1_data(lines: Sequence[str], start: int, end: int, total: int, *, fmt: str,
                 path: Path, width: int | None = None) -> tuple[np.ndarray, int]:
    """The ``total`` numbers of a Volume-1 style channel between its headers and line ``end``.

    A channel is a text header, an integer header (lines of whole numbers), a
    real header of :data:`REAL_HEADER_LINES` lines, then the data up to the
    end marker (index ``end``, excluded). ``start`` is the first line after the
    text header. ``width``: the data's Fortran field width, used when values
    touch (``-1.0E-01-2.0E-01``).

    Returns
    -------
    values : ndarray, shape (total,)
    first : int
        Index (0-based) of the data's first line.

    Raises
    ------
    RecordError
        No integer header, or a data block that does not hold ``total`` values.
    """
    k = start
    while k < end and not (lines[k].strip() and _INT_LINE.match(lines[k])):
        k += 1
    if k >= end:
        raise FormatError(fmt, path, "the channel has no integer header (lines of whole numbers)",
                          line=start + 1)
    while k < end and lines[k].strip() and _INT_LINE.match(lines[k]):
        k += 1
    first = k + REAL_HEADER_LINES
    body = lines[first:end]
    try:
        values = np.array(" ".join(body).replace("D", "E").split(), dtype=float)
    except ValueError:
        values = None
    if values is None and width:
        cells = [ln[j:j + width] for ln in body for j in range(0, len(ln.rstrip()), width)]
        try:
            values = np.array([c.replace("D", "E") for c in cells if c.strip()], dtype=float)
        except ValueError:
            values = None
    if values is None:
        bad = next(j for j, ln in enumerate(body) if not all(is_number(c.replace("D", "E")) for c in ln.split()))
        raise FormatError(fmt, path, "a data line holds something that is not a number",
                          line=first + bad + 1, text=body[bad]) from None
    if values.size != total:
        raise FormatError(fmt, path, f"the data block holds {values.size} values; the header "
                          f"announces {total}", line=first + 1)
    return values, first


def channel_spans(lines: Sequence[str], starts: Sequence[int],
                  marker: str = "/&") -> list[tuple[int, int]]:
    """(first, end) line indices of each channel of a Volume-1 style file.

    Parameters
    ----------
    lines : sequence of str
        The file's lines.
    starts : sequence of int
        Index of each channel's first line, increasing.
    marker : str
        What the line that closes a channel starts with (after blanks).

    Returns
    -------
    list of (int, int)
        Per channel its first line and its end: the closing line's index (excluded),
        or, without one before the next channel, the index after its last line that
        is not blank.
    """
    ends = [i for i, ln in enumerate(lines) if ln.lstrip().startswith(marker)]
    spans = []
    for c, s in enumerate(starts):
        stop = starts[c + 1] if c + 1 < len(starts) else len(lines)
        end = next((e for e in ends if s < e < stop), None)
        if end is None:
            end = stop
            while end > s and not lines[end - 1].strip():
                end -= 1
        spans.append((s, end))
    return spans
