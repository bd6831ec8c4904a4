"""AFAD / NSMN text files (Turkish national strong-motion network).

Layout, as the files state it: ``STRONG GROUND MOTION RECORDS OF TURKIYE`` (or
TURKEY), ``KEY : value`` lines (``STATION ID``, ``RECORD TIME``, ``NUMBER OF DATA``,
``SAMPLING INTERVAL (sec)``, ``RAW PGA VALUES (gal) : (N-S) a (E-W) b (U-D) c``,
event date, epicentre, depth and magnitude), a line of column names
(``N-S  E-W  U-D``) and one row per sample, in the unit of the PGA line (gal).
"""
from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from ._agency import make_record, numbers, units_factor, warn
from ._common import check_dt, detector, file_stem, FormatError, head_lines, is_number, read_lines

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "AFAD/NSMN text"
EXTENSIONS = (".txt", ".asc")

_KEY = re.compile(r"^\s*([A-Za-z][A-Za-z ()/.]*?)\s*:\s*(.*?)\s*$")
_PGA = re.compile(r"\(\s*([A-Z]-?[A-Z])\s*\)\s*([-+\d.Ee]+)", re.I)
_TIME = re.compile(r"(\d{1,2})/(\d{1,2})/(\d{4})\s+(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)")


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True for an AFAD/NSMN text file: its title line and one of its keys. Never raises."""
    lines = head_lines(head, 40)
    text = "\n".join(lines).upper()
    return (bool(lines) and lines[0].strip().upper().startswith("STRONG GROUND MOTION RECORDS OF TURK")
            and any(k in text for k in ("SAMPLING INTERVAL", "STATION ID", "EARTHQUAKE DATE",
                                        "NUMBER OF DATA")))


def _iso(text: str) -> str:
    """``"20/07/2017 22:30:58.000000 (GMT)"`` → ``"2017-07-20T22:30:58.000000Z"`` ("" if not)."""
    m = _TIME.search(text)
    if not m:
        return ""
    d, mo, y, h, mi, s = m.groups()
    sec, _, frac = s.partition(".")
    return f"{y}-{int(mo):02d}-{int(d):02d}T{int(h):02d}:{mi}:{int(sec):02d}" + \
        (f".{frac}" if frac else "") + ("Z" if "GMT" in text.upper() or "UTC" in text.upper() else "")


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list:
    """Read the three components of an AFAD/NSMN text file (arguments:
    :mod:`groundshake.records.io`).

    ``units`` is needed only if the header states no unit, else a check; ``dt``
    [s] is checked against ``SAMPLING INTERVAL``.

    Returns
    -------
    list of Record
        One per column (``N-S``, ``E-W``, ``U-D``), ``acc`` in m/s²; metadata
        ``header_pga`` [m/s²] from the PGA line.

    Raises
    ------
    RecordError
        Missing keys, a short data block, ``units``/``dt`` contradicting the header.
    """
    path = Path(path)
    lines = read_lines(path, fallback="cp1254")  # Turkish code page when not UTF-8
    header: dict[str, tuple[str, int]] = {}
    columns: list[str] | None = None
    first = None
    for i, ln in enumerate(lines):
        s = ln.strip()
        if not s:
            continue
        m = _KEY.match(s)
        if m and i > 0:
            header[m.group(1).strip().upper()] = (m.group(2), i + 1)
            continue
        cells = s.split()
        if columns is None and cells and all(re.fullmatch(r"[A-Z]-?[A-Z]", c, re.I) for c in cells):
            columns = [c.upper() for c in cells]
            continue
        if columns is not None:
            first = i
            break
    if columns is None or first is None:
        raise FormatError(FORMAT, path, "no column line (such as 'N-S  E-W  U-D') followed by "
                          "data rows")

    def get(key: str) -> tuple[str, int]:
        for k, v in header.items():
            if k.startswith(key):
                return v
        raise FormatError(FORMAT, path, f"header has no {key!r} line")

    dt_text, dt_line = get("SAMPLING INTERVAL")
    vals = numbers(dt_text)
    if not vals:
        raise FormatError(FORMAT, path, f"SAMPLING INTERVAL {dt_text!r} is not a number",
                          line=dt_line)
    step = check_dt(dt, vals[0], path, f"the {FORMAT} header",
                    fmt=FORMAT, path=path)
    n_text, n_line = get("NUMBER OF DATA")
    try:
        n = int(n_text.split()[0])
    except (ValueError, IndexError):
        raise FormatError(FORMAT, path, f"NUMBER OF DATA {n_text!r} is not a whole number",
                          line=n_line) from None
    pga_key = next((k for k in header if "PGA" in k), None)
    unit_word = None
    if pga_key is not None:
        um = re.search(r"\(([^)]+)\)", pga_key)
        unit_word = um.group(1) if um else None
    if unit_word is not None:
        file_units, factor = units_factor(unit_word, fmt=FORMAT, path=path,
                                          line=header[pga_key][1])
    elif units is not None:
        file_units, factor = units_factor(units, fmt=FORMAT, path=path)
    else:
        raise FormatError(FORMAT, path, "the header states no units (no 'PGA VALUES (unit)' "
                          "line); give them", param="units")
    rows = [ln for ln in lines[first:] if ln.strip()]
    try:
        table = np.array(" ".join(rows).split(), dtype=float)
    except ValueError:
        bad = next(k for k, ln in enumerate(lines[first:]) if ln.strip() and not
                   all(is_number(c) for c in ln.split()))
        raise FormatError(FORMAT, path, "a data row holds something that is not a number",
                          line=first + bad + 1, text=lines[first + bad]) from None
    width = len(columns)
    if table.size % width:
        raise FormatError(FORMAT, path, f"{table.size} values do not fill rows of {width} "
                          f"columns ({', '.join(columns)})", line=first + 1)
    table = table.reshape(-1, width)
    if table.shape[0] < n:
        raise FormatError(FORMAT, path, f"{table.shape[0]} data rows; NUMBER OF DATA says {n}",
                          line=n_line)
    if table.shape[0] > n:
        warn(f"{path}: {table.shape[0]} data rows but NUMBER OF DATA says {n}; the first {n} "
             "are read")
        table = table[:n]
    station = get("STATION ID")[0].split()[0] if any(k.startswith("STATION ID") for k in header) \
        else file_stem(path)
    start = _iso(header["RECORD TIME"][0]) if "RECORD TIME" in header else ""
    meta: dict = {}
    for key, out in (("PLACE", "station_name"), ("EARTHQUAKE DATE", "event_time"),
                     ("EPICENTER COORDINATES", "event_location"),
                     ("STATION COORDINATES", "station_location")):
        if key in header:
            meta[out] = header[key][0]
    if "EARTHQUAKE DATE" in header and _iso_date(header["EARTHQUAKE DATE"][0]):
        meta["event_time"] = _iso_date(header["EARTHQUAKE DATE"][0])
    for key, out in (("EARTHQUAKE DEPTH", "event_depth_km"), ("EARTHQUAKE MAGNITUDE",
                                                              "event_magnitude")):
        k = next((h for h in header if h.startswith(key)), None)
        if k and numbers(header[k][0]):
            meta[out] = numbers(header[k][0])[0]
    peaks = {c.upper(): float(v) for c, v in _PGA.findall(header[pga_key][0])} if pga_key else {}
    records = []
    for k, comp in enumerate(columns):
        md = dict(meta)
        if comp in peaks:
            md["header_pga"] = abs(peaks[comp]) * factor
        records.append(make_record(table[:, k], factor=factor, file_units=file_units, dt=step,
                                   path=path, fmt=FORMAT, station=station, component=comp,
                                   user_units=units, start_time=start, metadata=md))
    return records


def _iso_date(text: str) -> str:
    """``"2017/07/20 22:31:09 (GMT)"`` → ``"2017-07-20T22:31:09Z"`` ("" if not)."""
    m = re.search(r"(\d{4})/(\d{1,2})/(\d{1,2})\s+(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)", text)
    if not m:
        return ""
    y, mo, d, h, mi, s = m.groups()
    return f"{y}-{int(mo):02d}-{int(d):02d}T{int(h):02d}:{mi}:{s}" + (
        "Z" if "GMT" in text.upper() or "UTC" in text.upper() else "")
