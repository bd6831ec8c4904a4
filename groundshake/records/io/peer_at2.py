"""PEER NGA strong-motion database acceleration files (``.AT2``).

Four header lines, then the samples, several a line::

    PEER NGA STRONG MOTION DATABASE RECORD
    <event>, <date>, <station>, <component>
    ACCELERATION TIME SERIES IN UNITS OF G
    NPTS=   7999, DT=   .0050 SEC,

The older PEER strong-motion database writes line 4 as ``7999   .0050   NPTS, DT``;
both are read. The header states no peak.
"""
from __future__ import annotations

import re
from pathlib import Path

from .._record import Record
from ._common import (check_dt, check_samples, detector, file_stem, FormatError, free_numbers,
                      head_lines, header_units, orientation_metadata, read_lines, resolve_units,
                      si_record, user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "PEER NGA (.AT2)"
EXTENSIONS = (".at2",)

_NPTS = re.compile(r"NPTS\s*=\s*(\d+)", re.I)
_DT = re.compile(r"\bDT\s*=\s*([0-9.Ee+-]+)", re.I)
_OLD_NPTS_DT = re.compile(r"^\s*(\d+)\s+([0-9.Ee+-]+)\s+NPTS\s*,\s*DT", re.I)
_UNITS = re.compile(r"TIME SERIES IN UNITS OF\s+(.+?)\s*$", re.I)
_KIND = re.compile(r"^\s*(ACCELERATION|VELOCITY|DISPLACEMENT)\b", re.I)


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if the file begins like a PEER database time series (never raises)."""
    lines = head_lines(head, 4)
    if not lines or not lines[0].lstrip().upper().startswith("PEER"):
        return False
    if len(lines) < 4:  # a file cut short: its first line is enough to name it
        return "STRONG MOTION" in lines[0].upper() or "DATABASE" in lines[0].upper()
    return ("TIME SERIES" in lines[2].upper()
            and bool(_NPTS.search(lines[3]) and _DT.search(lines[3])
                     or _OLD_NPTS_DT.search(lines[3])))


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list[Record]:
    """Read a PEER ``.AT2`` acceleration file (arguments: :mod:`groundshake.records.io`).

    ``units`` is checked against the header's units (g), ``dt`` [s] against its ``DT``.

    Returns
    -------
    list of Record
        One Record, ``acc`` in m/s², shape (NPTS,); ``component`` as written at the end
        of header line 2; metadata ``station``, ``event_name``, ``event_date``,
        ``azimuth_deg``/``orientation`` where the component says.

    Raises
    ------
    RecordError
        A velocity or displacement file, units other than acceleration, a count of
        samples other than ``NPTS``, a value that is not a number.
    """
    path = Path(path)
    where = str(path)
    lines = read_lines(path, encoding="latin-1")
    if len(lines) < 5:
        raise FormatError(FORMAT, path, "the four header lines and data are needed; the file "
                          f"has {len(lines)} lines")
    kind = _KIND.match(lines[2])
    if not kind or kind.group(1).upper() != "ACCELERATION":
        raise FormatError(FORMAT, path, "not an acceleration time series (a .VT2 or .DT2 file?)",
                          3, lines[2], part="header line")
    m = _UNITS.search(lines[2])
    if not m:
        raise FormatError(FORMAT, path, "no 'IN UNITS OF ...'", 3, lines[2], part="header line")
    file_units = header_units(m.group(1).rstrip(". "), fmt=FORMAT, path=path, line=3,
                              line_text=lines[2], part="header line")
    rec_units = resolve_units(file_units, user_units(units, where), where)
    mn, md = _NPTS.search(lines[3]), _DT.search(lines[3])
    old = _OLD_NPTS_DT.search(lines[3])
    if mn and md:
        npts_text, dt_text = mn.group(1), md.group(1)
    elif old:
        npts_text, dt_text = old.group(1), old.group(2)
    else:
        raise FormatError(FORMAT, path, "no NPTS= and DT=", 4, lines[3], part="header line")
    npts = int(npts_text)
    try:
        step = float(dt_text)
    except ValueError:
        raise FormatError(FORMAT, path, f"DT {dt_text!r} is not a number", 4, lines[3],
                          part="header line") from None
    if not step > 0:
        raise FormatError(FORMAT, path, f"DT={step:g} s must be > 0", 4, lines[3],
                          part="header line")
    check_dt(dt, step, where, "its DT= header")
    data = free_numbers(lines[4:], npts, fmt=FORMAT, path=path, first_line=5)
    extra = " ".join(lines[4:]).split()[npts:]
    if extra:
        raise FormatError(FORMAT, path, f"NPTS={npts} but the file holds {npts + len(extra)} "
                          "values", 4, lines[3], part="header line")
    check_samples(data, where)

    parts = [p.strip() for p in lines[1].split(",")]
    meta: dict = {"format": FORMAT, "title": lines[0].strip()}
    component = parts[-1] if len(parts) >= 2 else ""
    if len(parts) >= 4:
        meta["event_name"] = parts[0]
        meta["event_date"] = parts[1]
        meta["station"] = ", ".join(parts[2:-1])
    elif parts and parts[0]:
        meta["station"] = parts[0]
    meta["channel"] = component
    meta.update(orientation_metadata(component))
    return [si_record(data, units=rec_units, dt=step, station=meta.get("station", file_stem(path)),
                      component=component, source=where, label=where, metadata=meta)]
