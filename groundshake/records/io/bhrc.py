"""BHRC files (Iran strong-motion network, Road, Housing and Urban Development Research Center).

Layout, as the files state it: for each channel a text header opened by
``* VOL1DS FILE:  nnnn/nn`` (``Origin Time : yyyy/mm/dd hh:mm:ss``, ``COMP L1``,
a station line ``<name> Station <lat> N <lon> E Altitude ...  Azimuth L 324 T 54``,
an epicentre line with magnitudes, ``NO. OF POINTS = n  DURATION = s``,
``UNITS ARE SECONDS AND G/10``), an integer and a real header, then ``n``
accelerations ten a line (E13.6), closed by a line ``/&``.
"""
from __future__ import annotations

import math
import re
from pathlib import Path

from ._agency import channel_spans, make_record, points_pattern, units_factor, volume1_data
from ._common import check_dt, detector, file_stem, FormatError, head_lines, read_lines

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "BHRC (Iran) Volume 1"
EXTENSIONS = (".v1", ".v2")

_TITLE = re.compile(r"^\*\s*VOL\s*\d\w*\s+FILE", re.I)
_POINTS = points_pattern("DURATION")
_UNITS = re.compile(r"UNITS\s+ARE\s+SEC\w*\s+AND\s+(\S+)", re.I)
_COMP = re.compile(r"^\s*COMP\s+(\S+)", re.I)
_AZIMUTH = re.compile(r"Azimuth\s+((?:[A-Z]+\s+[-+\d.]+\s*)+)", re.I)


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True for a BHRC file: first line ``* VOLn... FILE`` and a ``COMP`` line. Never raises."""
    lines = head_lines(head, 20)
    return (bool(lines) and bool(_TITLE.match(lines[0]))
            and any(_COMP.match(ln) for ln in lines[:12]))


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list:
    """Read every channel of a BHRC file (arguments: :mod:`groundshake.records.io`).

    ``units`` is checked against the header's units: g/10 in Volume 1, which no
    option names, so giving any units for such a file is an error. ``dt`` [s] is
    checked against DURATION / NO. OF POINTS.

    Returns
    -------
    list of Record
        One per channel (``L1``, ``V2``, ``T3``), ``acc`` in m/s²; metadata
        ``azimuth_deg`` from the station line's ``Azimuth L a T b``.

    Raises
    ------
    RecordError
        A header that does not parse, a data block of the wrong size,
        ``units``/``dt`` contradicting the header.
    """
    path = Path(path)
    lines = read_lines(path)
    starts = [i for i, ln in enumerate(lines) if _TITLE.match(ln)]
    if not starts:
        raise FormatError(FORMAT, path, "no channel header ('* VOL1DS FILE: ...')", line=1)
    return [_channel(lines, s, end, path, units, dt) for s, end in channel_spans(lines, starts)]


def _find(lines, s, e, pattern):
    for k in range(s, min(e, s + 20)):
        m = pattern.search(lines[k])
        if m:
            return m, k
    return None, None


def _channel(lines, s, end, path, units, dt):
    cm, _ = _find(lines, s, end, _COMP)
    if cm is None:
        raise FormatError(FORMAT, path, "channel header has no 'COMP ...' line", line=s + 1)
    component = cm.group(1).upper()
    pm, pline = _find(lines, s, end, _POINTS)
    if pm is None:
        raise FormatError(FORMAT, path, "channel header has no 'NO. OF POINTS = n' line",
                          line=s + 1)
    n = int(pm.group(1))
    um, uline = _find(lines, s, end, _UNITS)
    if um is None:
        raise FormatError(FORMAT, path, "channel header has no 'UNITS ARE SECONDS AND ...' line",
                          line=s + 1)
    file_units, factor = units_factor(um.group(1), fmt=FORMAT, path=path, line=uline + 1)
    if not pm.group(2):
        raise FormatError(FORMAT, path, "no 'DURATION = s' beside NO. OF POINTS (the time step "
                          "comes from it)", line=pline + 1, text=lines[pline])
    duration = float(pm.group(2))
    # DURATION = n·dt (9984 points, 49.920 s at 200 per second); its printed
    # digits limit the step to six significant figures
    step = check_dt(dt, float(f"{duration / n:.6g}"), path, f"the {FORMAT} header",
                    fmt=FORMAT, path=path)
    values, _ = volume1_data(lines, uline + 1, end, n, fmt=FORMAT, path=path, width=13)

    meta: dict = {}
    station = file_stem(path)
    for k in range(s, min(end, s + 14)):
        ln = lines[k]
        if re.search(r"\bStation\b", ln, re.I) and not ln.upper().lstrip().startswith("STATION NO"):
            name = re.split(r"\s+Station\b", ln, flags=re.I)[0].strip()
            if name:
                station = name
            am = _AZIMUTH.search(ln)
            if am:
                words = am.group(1).split()
                azimuths = {words[j].upper(): float(words[j + 1]) for j in range(0, len(words) - 1, 2)}
                letter = re.sub(r"\d+$", "", component)
                if letter in azimuths:
                    meta["azimuth_deg"] = azimuths[letter] % 360.0
        elif ln.lower().lstrip().startswith("origin time"):
            t = re.search(r"(\d{4})/(\d{1,2})/(\d{1,2})\s+(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)", ln)
            if t:
                y, mo, d, h, mi, sec = t.groups()
                meta["event_time"] = f"{y}-{int(mo):02d}-{int(d):02d}T{int(h):02d}:{mi}:{sec}"
        elif ln.lower().lstrip().startswith("epicenter"):
            meta["event_line"] = ln.strip()
            mw = re.search(r"Mw\s*([\d.]+)", ln)
            if mw:
                meta["event_magnitude"] = float(mw.group(1))
            fd = re.search(r"FD\s*([\d.]+)\s*Km", ln, re.I)
            if fd:
                meta["event_depth_km"] = float(fd.group(1))
        elif ln.upper().lstrip().startswith("* VOL"):
            meta["file_id"] = ln.split(":", 1)[-1].strip()
    if not math.isfinite(step):
        raise FormatError(FORMAT, path, "time step is not finite", line=pline + 1)
    return make_record(values, factor=factor, file_units=file_units, dt=step, path=path,
                       fmt=FORMAT, station=station, component=component, user_units=units,
                       metadata=meta)
