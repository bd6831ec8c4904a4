"""USGS SMC strong-motion files (U.S. Geological Survey National Strong-Motion Project).

One component a file: 11 text lines (line 1 the kind of data, e.g. ``2 CORRECTED
ACCELEROGRAM``; line 3 the station code; line 4 the event date and name; line 6
``station = ... component= 360``), 48 integers (``8I10``), 50 reals (``5E15.7``),
comment lines starting with ``|``, then the samples (``8E10.4``) in cm/s².

Header values used (1-based): integer 16 (comment lines), 17 (samples), 15 (orientation
[degrees from north]); real 2 (samples a second), 29-32 (times and values of the maximum
and minimum). Missing values are -32768 and 1.7e38.
"""
from __future__ import annotations

import re
from pathlib import Path

from .._record import Record
from ._common import (check_dt, check_samples, detector, file_stem, fixed_width, FormatError,
                      head_lines, orientation_metadata, read_lines, resolve_units, si_record,
                      user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "USGS SMC"
EXTENSIONS = (".smc",)

_TEXT, _INTS, _REALS = 11, 48, 50
_FIRST = re.compile(r"^\s*([0-9])\s+(UNCORRECTED|CORRECTED)?\s*(ACCELEROGRAM|VELOCITY|"
                    r"DISPLACEMENT|RESPONSE SPECTRA|FOURIER)", re.I)
_COMP = re.compile(r"component\s*=\s*(\S+)", re.I)
_STATION = re.compile(r"station\s*=\s*(.*?)\s*component", re.I)
_NO_INT, _NO_REAL = -32768, 1.7e38
_UNITS = "cm/s2"  # SMC stores acceleration in cm/s² (the format's definition)


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if line 1 is an SMC data kind and the integer header sits at line 12 (never raises)."""
    lines = head_lines(head)
    if not lines or not _FIRST.match(lines[0]):
        return False
    if len(lines) <= _TEXT:  # a file cut short: its first line is enough to name it
        return True
    row = lines[_TEXT]
    return len(row.rstrip()) >= 70 and all(
        re.fullmatch(r"\s*-?\d+", row[k:k + 10]) for k in range(0, 80, 10))


def _int(ints, k):
    v = int(ints[k - 1])
    return None if v == _NO_INT else v


def _real(reals, k):
    v = float(reals[k - 1])
    return None if v >= 1e38 else v


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list[Record]:
    """Read a USGS SMC acceleration file (arguments: :mod:`groundshake.records.io`).

    ``units`` is checked against cm/s² (the format's unit), ``dt`` [s] against
    1 / (real header 2).

    Returns
    -------
    list of Record
        One Record, ``acc`` in m/s², shape (n,); ``component`` as on text line 6
        (e.g. ``"360"``, ``"UP"``); metadata ``station``, ``station_name``,
        ``event_*``, ``header_pga`` [m/s²] and ``header_pga_time`` [s].

    Raises
    ------
    RecordError
        Not an acceleration file, a header or data block that does not parse (names the
        line), no sample rate.
    """
    path = Path(path)
    where = str(path)
    lines = read_lines(path, encoding="latin-1")
    m = _FIRST.match(lines[0]) if lines else None
    if not m or m.group(3).upper() != "ACCELEROGRAM":
        raise FormatError(FORMAT, path, "only acceleration files (line 1 '... ACCELEROGRAM') "
                          "are records", 1, lines[0] if lines else "", part="header line")
    ints = fixed_width(lines[_TEXT:], _INTS, 10, 8, fmt=FORMAT, path=path, first_line=_TEXT + 1)
    r0 = _TEXT + 6
    reals = fixed_width(lines[r0:], _REALS, 15, 5, fmt=FORMAT, path=path, first_line=r0 + 1)
    rate = _real(reals, 2)
    if not rate or rate <= 0:
        raise FormatError(FORMAT, path, "no sample rate (real header value 2)", r0 + 1,
                          lines[r0], part="header line")
    step = 1.0 / rate
    check_dt(dt, step, where, "its sample rate (real header value 2)")
    rec_units = resolve_units(_UNITS, user_units(units, where), where)
    npts = _int(ints, 17)
    if not npts or npts <= 0:
        raise FormatError(FORMAT, path, "no number of samples (integer header value 17)",
                          _TEXT + 3, lines[_TEXT + 2], part="header line")
    k = r0 + 10
    n_comments = _int(ints, 16) or 0
    k += n_comments
    while k < len(lines) and lines[k].startswith("|"):  # tolerate a wrong comment count
        k += 1
    data = fixed_width(lines[k:], npts, 10, 8, fmt=FORMAT, path=path, first_line=k + 1)
    check_samples(data, where)

    meta: dict = {"format": FORMAT, "data_kind": lines[0].strip()}
    station = lines[2].strip() or file_stem(path)
    meta["station"] = station
    ms = _STATION.search(lines[5])
    if ms:
        meta["station_name"] = ms.group(1).rstrip(", ")
    mc = _COMP.search(lines[5])
    component = mc.group(1) if mc else ""
    if not component and _int(ints, 15) is not None:
        component = str(_int(ints, 15))
    meta["channel"] = component
    meta.update(orientation_metadata(component))
    md = re.match(r"\s*(\d{4})\s+(\d{1,2})\s+(\d{1,2})\s+(\d{4})\s*(.*?)\s*$", lines[3])
    if md:
        meta["event_name"] = md.group(5)
        meta["event_time"] = (f"{int(md.group(1)):04d}-{int(md.group(2)):02d}-"
                              f"{int(md.group(3)):02d}T{md.group(4)[:2]}:{md.group(4)[2:]}Z")
    meta["event_magnitudes"] = lines[4].strip()
    peaks = [(abs(v), t) for t, v in ((_real(reals, 29), _real(reals, 30)),
                                      (_real(reals, 31), _real(reals, 32))) if v is not None]
    if peaks:
        value, t = max(peaks, key=lambda p: p[0])
        meta["header_pga"] = value * 0.01  # cm/s² -> m/s²
        if t is not None:
            meta["header_pga_time"] = t
    return [si_record(data, units=rec_units, dt=step, station=station, component=component,
                      source=where, label=where, metadata=meta)]
