"""ESM / ITACA ASCII acceleration files (Engineering Strong-Motion database, Italian
Accelerometric Archive).

A header of ``KEY: value`` lines (``EVENT_*``, ``NETWORK``, ``STATION_CODE``,
``DATE_TIME_FIRST_SAMPLE_YYYYMMDD_HHMMSS``, ``SAMPLING_INTERVAL_S``, ``NDATA``,
``STREAM``, ``UNITS``, ``PGA_CM/S^2``, ``TIME_PGA_S``, ``DATA_TYPE``, ...) ends at the
first line that is a number; then one sample a line.
"""
from __future__ import annotations

import math
import re
from pathlib import Path

from .._record import Record
from ._common import (check_dt, check_samples, detector, file_stem, FormatError, free_numbers,
                      header_units, iso_time, orientation_metadata, read_lines, resolve_units,
                      si_record, user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "ESM/ITACA ASCII"
EXTENSIONS = (".asc", ".txt")

_KEY = re.compile(r"^([A-Z][A-Z0-9_/^.()-]*):\s?(.*)$")
_NEEDED = ("SAMPLING_INTERVAL_S", "NDATA", "UNITS")
# event keys -> metadata names
_EVENT = {"EVENT_NAME": "event_name", "EVENT_ID": "event_id",
          "EVENT_LATITUDE_DEGREE": "event_latitude_deg",
          "EVENT_LONGITUDE_DEGREE": "event_longitude_deg", "EVENT_DEPTH_KM": "event_depth_km",
          "MAGNITUDE_W": "event_magnitude_mw", "MAGNITUDE_L": "event_magnitude_ml",
          "EPICENTRAL_DISTANCE_KM": "event_epicentral_distance_km"}


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if the header has the ESM keys that define the format (never raises)."""
    text = head.decode("latin-1")
    if text.startswith("EVENT_NAME:") and "\nEVENT_ID:" in text[:400]:
        return True  # the ESM header's first two keys
    return "\nSTATION_CODE:" in text and "\nSAMPLING_INTERVAL_S:" in text and \
        "\nNDATA:" in text


def _header(lines: list[str], path: Path) -> tuple[dict, dict, int]:
    """(values, 1-based line of each key, index of the first data line)."""
    values: dict[str, str] = {}
    where: dict[str, int] = {}
    for i, line in enumerate(lines):
        m = _KEY.match(line.strip())
        if m:
            values[m.group(1)] = m.group(2).strip()
            where[m.group(1)] = i + 1
            continue
        s = line.strip()
        if not s:
            continue
        try:
            float(s.split()[0])
        except ValueError:
            raise FormatError(FORMAT, path, "neither a 'KEY: value' line nor a number", i + 1,
                              line, part="header line") from None
        return values, where, i
    raise FormatError(FORMAT, path, "the header is not followed by any data")


def _number(values, where, key, path, *, positive=True) -> float | None:
    text = values.get(key, "")
    if not text:
        return None
    try:
        v = float(text)
    except ValueError:
        raise FormatError(FORMAT, path, f"{key} {text!r} is not a number", where[key],
                          f"{key}: {text}", part="header line") from None
    if not math.isfinite(v) or (positive and v <= 0):
        raise FormatError(FORMAT, path, f"{key} must be a number > 0", where[key],
                          f"{key}: {text}", part="header line")
    return v


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list[Record]:
    """Read an ESM/ITACA ASCII acceleration file (arguments: :mod:`groundshake.records.io`).

    ``units`` is checked against ``UNITS``, ``dt`` [s] against ``SAMPLING_INTERVAL_S``.

    Returns
    -------
    list of Record
        One Record, ``acc`` in m/s², shape (NDATA,); ``component`` = ``STREAM``
        (e.g. ``"HNE"``); metadata ``station``, ``network``, ``channel``,
        ``azimuth_deg``/``orientation``, ``event_*``, ``header_pga`` [m/s²] and
        ``header_pga_time`` [s] from ``PGA_CM/S^2`` and ``TIME_PGA_S``.

    Raises
    ------
    RecordError
        A missing ``SAMPLING_INTERVAL_S``/``NDATA``/``UNITS``, a ``DATA_TYPE`` other
        than acceleration, fewer or more samples than ``NDATA``, a ``dt`` or ``units``
        that contradicts the header.
    """
    path = Path(path)
    label = str(path)
    lines = read_lines(path, encoding="latin-1")
    values, where, first = _header(lines, path)
    for key in _NEEDED:
        if not values.get(key):
            raise FormatError(FORMAT, path, f"the header has no {key} value")
    kind = values.get("DATA_TYPE", "ACCELERATION").upper()
    if kind and "ACCELERATION" not in kind:
        raise FormatError(FORMAT, path, f"DATA_TYPE {kind}: only acceleration files are "
                          "records", where["DATA_TYPE"], f"DATA_TYPE: {kind}", part="header line")
    step = _number(values, where, "SAMPLING_INTERVAL_S", path)
    check_dt(dt, step, label, "its SAMPLING_INTERVAL_S header")
    npts = _number(values, where, "NDATA", path)
    if npts != int(npts):
        raise FormatError(FORMAT, path, "NDATA must be a whole number", where["NDATA"],
                          f"NDATA: {values['NDATA']}", part="header line")
    npts = int(npts)
    file_units = header_units(values["UNITS"], fmt=FORMAT, path=path, line=where["UNITS"],
                              line_text=f"UNITS: {values['UNITS']}", part="header line",
                              name="UNITS")
    rec_units = resolve_units(file_units, user_units(units, label), label)
    body = [ln for ln in lines[first:]]
    data = free_numbers(body, npts, fmt=FORMAT, path=path, first_line=first + 1)
    extra = len(" ".join(body).split()) - npts
    if extra:
        raise FormatError(FORMAT, path, f"NDATA={npts} but the file holds {npts + extra} "
                          "samples", where["NDATA"], f"NDATA: {values['NDATA']}",
                          part="header line")
    check_samples(data, label)

    stream = values.get("STREAM", "")
    station = values.get("STATION_CODE", "") or file_stem(path)
    meta: dict = {"format": FORMAT, "station": station, "network": values.get("NETWORK", ""),
                  "location": values.get("LOCATION", ""), "channel": stream,
                  "station_name": values.get("STATION_NAME", "")}
    meta.update(orientation_metadata(stream))
    for key, name in _EVENT.items():
        text = values.get(key, "")
        if text:
            try:
                meta[name] = float(text)
            except ValueError:
                meta[name] = text
    if values.get("EVENT_DATE_YYYYMMDD") and values.get("EVENT_TIME_HHMMSS"):
        d, t = values["EVENT_DATE_YYYYMMDD"], values["EVENT_TIME_HHMMSS"]
        if re.fullmatch(r"\d{8}", d) and re.fullmatch(r"\d{6}", t):
            meta["event_time"] = iso_time(int(d[:4]), int(d[4:6]), int(d[6:]), int(t[:2]),
                                          int(t[2:4]), float(t[4:]))
    pga = _number(values, where, "PGA_CM/S^2", path, positive=False)
    if pga is not None:
        meta["header_pga"] = abs(pga) * 0.01  # cm/s² -> m/s²
    tpga = _number(values, where, "TIME_PGA_S", path, positive=False)
    if tpga is not None:
        meta["header_pga_time"] = tpga
    start = ""
    m = re.fullmatch(r"(\d{4})(\d\d)(\d\d)_(\d\d)(\d\d)(\d\d(?:\.\d*)?)",
                     values.get("DATE_TIME_FIRST_SAMPLE_YYYYMMDD_HHMMSS", ""))
    if m:
        start = iso_time(*(int(g) for g in m.groups()[:5]), float(m.group(6)))  # UTC
    return [si_record(data, units=rec_units, dt=step, station=station, component=stream,
                      source=label, label=label, start_time=start, metadata=meta)]
