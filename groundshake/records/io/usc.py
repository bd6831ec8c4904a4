"""USC strong-motion files (University of Southern California network, ``*.s0a`` ...).

Layout, as the files state it: 25 lines of text header (event, ``STATION USC# nnnn``,
``COMP N08W``, ``NO. OF POINTS``, ``UNITS ARE ...``, ``PEAK ACCELERATION = ... AT ... SEC.``),
an integer and a real header, then blocks each opened by a line
``n POINTS OF ACC DATA EQUALLY SPACED AT dt SEC.  IN UNITS CM/SEC/SEC`` and
written 8 values a line (8F10.3). ``VEL`` and ``DIS`` blocks may follow; the
acceleration block is read. One component per file.
"""
from __future__ import annotations

import math
import re
from pathlib import Path

from ._agency import make_record, numbers, units_factor
from ._common import (check_dt, detector, fixed_width, FormatError, head_lines, LENGTH_TO_M,
                      PEAK_NAMES, read_lines)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "USC strong-motion"
EXTENSIONS = (".s0a", ".s0b", ".s0c", ".v2")

_STATION = re.compile(r"^\s*STATION\s+USC#\s*(\S+)", re.I)
_BLOCK = re.compile(r"^\s*(\d+)\s+POINTS\s+OF\s+(ACC|VEL|DIS)\w*\s+DATA\s+EQUALLY\s+SPACED\s+AT"
                    r"\s+([\d.Ee+-]+)\s+SEC\.?\s+IN\s+UNITS\s+(\S+)", re.I)
_PEAK = re.compile(r"^\s*PEAK\s+(ACCELERATION|VELOCITY|DISPLACEMENT)\s*=\s*([-+\d.Ee]+)\s+(\S+)"
                   r"\s+AT\s+([-+\d.Ee]+)\s*SEC", re.I)
_COMP = re.compile(r"^\s*COMP\s+(\S+)", re.I)
_PER_LINE = 8
_WIDTH = 10


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True for a USC file: an ``ACCELEROGRAM`` title and a ``STATION USC#`` line. Never raises."""
    lines = head_lines(head, 30)
    return (bool(lines) and "ACCELEROGRAM" in lines[0].upper()
            and any(_STATION.match(ln) for ln in lines[:12]))


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list:
    """Read the acceleration of a USC file (arguments: :mod:`groundshake.records.io`).

    ``units`` and ``dt`` [s] are checked against the acceleration block's units
    and time step.

    Returns
    -------
    list of Record
        One record, ``acc`` in m/s²; metadata ``header_pga`` [m/s²],
        ``header_pga_time`` [s], ``header_pgv`` [m/s], ``header_pgd`` [m] as
        the header states them.

    Raises
    ------
    RecordError
        A header that does not parse, a short data block, or ``units``/``dt``
        that contradict the header.
    """
    path = Path(path)
    lines = read_lines(path)
    station = component = ""
    meta: dict = {}
    peaks: dict = {}
    block = None
    for i, ln in enumerate(lines):
        if block is None:
            m = _BLOCK.match(ln)
            if m and m.group(2).upper() == "ACC":
                block = (i, m)
                break
        if i > 60:
            continue
        if (m := _STATION.match(ln)) and not station:
            station = f"USC{m.group(1)}"
            meta["station_number"] = m.group(1)
            if i + 1 < len(lines) and lines[i + 1].strip():
                meta["station_name"] = re.sub(r"\s{2,}\S+\s*$", "", lines[i + 1].strip())
        elif (m := _COMP.match(ln)) and not component:
            component = m.group(1).upper()
        elif (m := _PEAK.match(ln)):
            peaks[m.group(1).upper()] = (m, i + 1)
        elif ln.upper().lstrip().startswith("MAGNITUDE"):
            vals = numbers(ln)
            if vals:
                meta["event_magnitude"] = vals[0]
            if len(vals) > 1:
                meta["event_distance_km"] = vals[1]
        elif i == 2 and ln.strip():
            meta["event_name"] = re.sub(r"\s{2,}\S+\s*$", "", ln.strip())
        elif i == 3 and ln.strip():
            meta["event_time"] = re.sub(r"\s{2,}\S+\s*$", "", ln.strip())
    if not station:
        raise FormatError(FORMAT, path, "no 'STATION USC# nnnn' line in the header")
    if not component:
        raise FormatError(FORMAT, path, "no 'COMP ...' line (component) in the header")
    if block is None:
        raise FormatError(FORMAT, path, "no acceleration block ('n POINTS OF ACC DATA EQUALLY "
                          "SPACED AT dt SEC. IN UNITS ...'); only corrected files are read")
    start, m = block
    n = int(m.group(1))
    try:
        step = float(m.group(3))
    except ValueError:
        raise FormatError(FORMAT, path, f"time step {m.group(3)!r} is not a number",
                          line=start + 1, text=lines[start]) from None
    step = check_dt(dt, step, path, f"the {FORMAT} header",
                    fmt=FORMAT, path=path)
    file_units, factor = units_factor(m.group(4), fmt=FORMAT, path=path, line=start + 1)
    n_lines = math.ceil(n / _PER_LINE)
    body = lines[start + 1:start + 1 + n_lines]
    values = fixed_width(body, n, _WIDTH, _PER_LINE, fmt=FORMAT, path=path,
                         first_line=start + 2)
    for word, short in PEAK_NAMES.items():
        key = word.upper()
        if key in peaks:
            pm, line = peaks[key]
            scale = _peak_factor(pm.group(3), key, path, line)
            if scale is not None:
                meta[f"header_{short}"] = abs(float(pm.group(2))) * scale
                meta[f"header_{short}_time"] = float(pm.group(4))
    return [make_record(values, factor=factor, file_units=file_units, dt=step, path=path,
                        fmt=FORMAT, station=station, component=component, user_units=units,
                        metadata=meta)]


def _peak_factor(unit: str, key: str, path: Path, line: int) -> float | None:
    """Factor to SI of a peak's unit (acceleration → m/s², velocity → m/s, displacement → m)."""
    if key == "ACCELERATION":
        return units_factor(unit, fmt=FORMAT, path=path, line=line)[1]
    length = unit.upper().split("/")[0].rstrip("S") if unit else ""
    return LENGTH_TO_M.get(length.lower())
