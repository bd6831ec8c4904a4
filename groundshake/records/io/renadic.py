"""RENADIC files (Chilean national accelerograph network, Universidad de Chile), Volume 1.

Layout, as the files state it: for each channel a 13-line text header
(``UNCORRECTED ACCELEROGRAM DATA``, station line, ``CHAN  1: L``,
``UNIVERSIDAD DE CHILE - RENADIC``, ``HYPOCENTER``, ``NO. OF POINTS = n  RECORD
LENGTH = s SEC``, ``UNITS OF UNCOR ACCEL ARE SEC AND G/10.  MAX = a G, AT t SEC``),
an integer and a real header, then ``n`` pairs (time [s], acceleration), five
pairs a line, closed by a line starting ``/&``.
"""
from __future__ import annotations

import math
import re
from pathlib import Path

from .._record import STANDARD_GRAVITY
from ._agency import (channel_spans, make_record, numbers, points_pattern, units_factor,
                      volume1_data)
from ._common import check_dt, detector, even_step, file_stem, FormatError, head_lines, read_lines

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "RENADIC (Chile) Volume 1"
EXTENSIONS = (".v1", ".txt")

_POINTS = points_pattern("LENGTH")
_UNITS = re.compile(r"UNITS\s+OF\s+.*?ARE\s+SEC\w*\s+AND\s+(\S+?)\.?(?:\s|$)", re.I)
_MAX = re.compile(r"MAX\s*=\s*([-+\d.Ee]+)\s*(\S+?),?\s+AT\s+([-+\d.Ee]+)\s*SEC", re.I)
_CHAN = re.compile(r"^\s*CHAN\s*(\d+)\s*:\s*(\S+)", re.I)


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True for a RENADIC file: ``ACCELEROGRAM`` title and a ``RENADIC`` line. Never raises."""
    lines = head_lines(head, 20)
    return (bool(lines) and "ACCELEROGRAM" in lines[0].upper()
            and any("RENADIC" in ln.upper() for ln in lines[:14])
            and any(_CHAN.match(ln) for ln in lines[:14]))


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list:
    """Read every channel of a RENADIC Volume-1 file (arguments: :mod:`groundshake.records.io`).

    ``units`` is checked against the header's units: usually g/10, which no option
    names, so giving any units for such a file is an error. ``dt`` [s] is checked
    against the time column.

    Returns
    -------
    list of Record
        One per channel (``L``, ``V``, ``T``), ``acc`` in m/s²; metadata
        ``header_pga`` [m/s²] and ``header_pga_time`` [s] from ``MAX = ... AT``.

    Raises
    ------
    RecordError
        A header that does not parse, a data block of the wrong size, uneven
        time, ``units``/``dt`` contradicting the header.
    """
    path = Path(path)
    lines = read_lines(path)
    starts = [i for i, ln in enumerate(lines) if "ACCELEROGRAM" in ln.upper()
              and i + 12 < len(lines) and _CHAN.match(lines[i + 6])]
    if not starts:
        raise FormatError(FORMAT, path, "no channel header ('... ACCELEROGRAM ...' then "
                          "'CHAN  n: X' six lines below)")
    return [_channel(lines, s, end, path, units, dt) for s, end in channel_spans(lines, starts)]


def _channel(lines, s, end, path, units, dt):
    head = lines[s:s + 13]
    text = "\n".join(head)
    chan = _CHAN.match(lines[s + 6])
    component = chan.group(2).upper()
    pm = _POINTS.search(text)
    if not pm:
        raise FormatError(FORMAT, path, "no 'NO. OF POINTS = n' line", line=s + 11)
    n = int(pm.group(1))
    um = _UNITS.search(text)
    if not um:
        raise FormatError(FORMAT, path, "no 'UNITS OF ... ARE SEC AND ...' line", line=s + 12)
    file_units, factor = units_factor(um.group(1), fmt=FORMAT, path=path, line=s + 12)
    after_units = s + 1 + next(j for j, ln in enumerate(head) if _UNITS.search(ln))
    values, first = volume1_data(lines, after_units, end, 2 * n, fmt=FORMAT, path=path,
                                 width=7)
    pairs = values.reshape(n, 2)
    time, acc = pairs[:, 0], pairs[:, 1]
    # five (time, acceleration) pairs a line
    step = even_step(time, fmt=FORMAT, path=path, prefix=f"channel {component}: ",
                     line_of=lambda k: first + 1 + k // 5)
    if pm.group(2):  # RECORD LENGTH = n·dt: the step to the printed digits
        length_step = float(pm.group(2)) / n
        if math.isclose(length_step, step, rel_tol=1e-3):
            step = length_step
    step = float(f"{step:.6g}")
    step = check_dt(dt, step, path, f"the {FORMAT} header",
                    fmt=FORMAT, path=path)
    meta: dict = {"channel_number": int(_CHAN.match(lines[s + 6]).group(1))}
    station = lines[s + 5].split()[0] if lines[s + 5].split() else file_stem(path)
    meta["station_line"] = lines[s + 5].strip()
    mm = _MAX.search(text)
    if mm:
        peak_factor = STANDARD_GRAVITY if mm.group(2).upper().rstrip(",") == "G" else \
            units_factor(mm.group(2).rstrip(","), fmt=FORMAT, path=path, line=s + 12)[1]
        meta["header_pga"] = abs(float(mm.group(1))) * peak_factor
        meta["header_pga_time"] = float(mm.group(3))
    hyp = next((ln for ln in head if ln.upper().lstrip().startswith("HYPOCENTER")), "")
    vals = numbers(hyp)
    if len(vals) >= 4 and any(vals):
        meta["event_location"] = hyp.split(":", 1)[1].strip()
        meta["event_magnitude"] = vals[-1]
    trig = next((ln for ln in head if "TRIGGER TIME" in ln.upper()), "")
    start = _iso(trig)
    if time[0] != 0:
        meta["first_time_s"] = float(time[0])
    return make_record(acc, factor=factor, file_units=file_units, dt=step, path=path, fmt=FORMAT,
                       station=station, component=component, user_units=units, start_time=start,
                       metadata=meta)


def _iso(text: str) -> str:
    """``"TRIGGER TIME: 1/1/1980 0:00:00.000 GMT"`` → ISO 8601 ("" if none)."""
    m = re.search(r"(\d{1,2})/(\d{1,2})/(\d{4})\s+(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)", text)
    if not m:
        return ""
    mo, d, y, h, mi, sec = m.groups()  # month/day/year, as the PROCESSED date is written
    whole, _, frac = sec.partition(".")
    return (f"{y}-{int(mo):02d}-{int(d):02d}T{int(h):02d}:{mi}:{int(whole):02d}"
            + (f".{frac}" if frac else "") + ("Z" if "GMT" in text.upper() else ""))
