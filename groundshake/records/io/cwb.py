"""CWB text files (Taiwan Central Weather Bureau/Administration strong-motion network).

Layout, as the files state it: ``#Key: value`` lines (``#StationCode``,
``#StartTime(GMT+08): yyyy/mm/dd-hh:mm:ss.sss``, ``#SampleRate(Hz)``,
``#AmplitudeUnit:  gal``, ``#AmplitudeMAX. U:  max~  min`` per column,
``#DataSequence: Time U(+); N(+); E(+)``, ``#Data: 4F10.3``), then rows of time
[s] and the U, N, E accelerations.
"""
from __future__ import annotations

import datetime as _dt
import math
import re
from pathlib import Path

import numpy as np

from ._agency import make_record, numbers, units_factor
from ._common import (check_dt, detector, even_step, file_stem, FormatError, head_lines, is_number,
                      read_lines)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "CWB (Taiwan) text"
EXTENSIONS = (".dat", ".txt")

_KEY = re.compile(r"^#\s*([^:]+?)\s*:\s*(.*?)\s*$")


_MARKS = ("#stationcode", "#amplitudeunit", "#datasequence", "#origin time(gmt",
          "#starttime(gmt", "#samplerate(hz)", "#epicenterlongitude", "#recordlength(sec)")


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True for CWB text: ``#Key:`` lines, at least three of CWB's own keys. Never raises."""
    lines = head_lines(head, 40)
    first = next((ln.strip() for ln in lines if ln.strip()), "")
    text = "\n".join(lines).lower().replace(" :", ":")
    return first.startswith("#") and sum(k in text for k in _MARKS) >= 3


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list:
    """Read the three components of a CWB text file (arguments: :mod:`groundshake.records.io`).

    ``units`` is checked against ``#AmplitudeUnit`` (and needed where it is
    missing); ``dt`` [s] against the time column and ``#SampleRate(Hz)``.

    Returns
    -------
    list of Record
        One per column of ``#DataSequence`` after the time (``U``, ``N``,
        ``E``), ``acc`` in m/s²; metadata ``header_pga`` [m/s²] from
        ``#AmplitudeMAX.`` (the larger of |max| and |min|).

    Raises
    ------
    RecordError
        Missing keys, rows of the wrong width, uneven time, ``units``/``dt``
        contradicting the header.
    """
    path = Path(path)
    lines = read_lines(path)
    keys: dict[str, tuple[str, int]] = {}
    first = None
    for i, ln in enumerate(lines):
        s = ln.strip()
        if not s:
            continue
        if s.startswith("#"):
            m = _KEY.match(s)
            if m:
                keys[m.group(1).strip().lower()] = (m.group(2), i + 1)
            continue
        first = i
        break
    if first is None:
        raise FormatError(FORMAT, path, "no data rows after the '#' header")

    def get(prefix: str) -> tuple[str, int] | None:
        return next((v for k, v in keys.items() if k.startswith(prefix)), None)

    seq = get("datasequence")
    if seq is None:
        raise FormatError(FORMAT, path, "no '#DataSequence:' line naming the columns")
    names = [re.sub(r"\(.*?\)", "", c).strip().upper() for c in re.split(r"[;\s]+", seq[0])
             if re.sub(r"\(.*?\)", "", c).strip()]
    if not names or names[0] != "TIME":
        raise FormatError(FORMAT, path, f"#DataSequence {seq[0]!r} should start with Time",
                          line=seq[1])
    comps = names[1:]
    unit = get("amplitudeunit")
    if unit is None:
        if units is None:
            raise FormatError(FORMAT, path, "no '#AmplitudeUnit:' line; give the units",
                              param="units")
        file_units, factor = units_factor(units, fmt=FORMAT, path=path)
    else:
        word = re.split(r"[\s.,;]+", unit[0].strip())[0]  # "gal. DCoffset(corr)"
        file_units, factor = units_factor(word, fmt=FORMAT, path=path, line=unit[1])
    rows = [ln for ln in lines[first:] if ln.strip() and not ln.lstrip().startswith("#")]
    width = 1 + len(comps)
    try:
        flat = np.array(" ".join(rows).split(), dtype=float)
    except ValueError:
        bad = next(k for k, ln in enumerate(rows) if not all(is_number(c) for c in ln.split()))
        raise FormatError(FORMAT, path, "a data row holds something that is not a number",
                          text=rows[bad]) from None
    if flat.size % width or flat.size // width != len(rows):
        raise FormatError(FORMAT, path, f"data rows do not all hold {width} values "
                          f"(time and {', '.join(comps)})", line=first + 1)
    table = flat.reshape(-1, width)
    time = table[:, 0]
    step = even_step(time, fmt=FORMAT, path=path, line_of=lambda k: first + 1 + k)
    rate = get("samplerate")
    if rate is not None and numbers(rate[0]):
        header_step = 1.0 / numbers(rate[0])[0]
        if not math.isclose(header_step, step, rel_tol=1e-3):
            raise FormatError(FORMAT, path, f"#SampleRate {rate[0]} Hz disagrees with the time "
                              f"column's step {step:g} s", line=rate[1])
        step = header_step
    step = check_dt(dt, step, path, f"the {FORMAT} header",
                    fmt=FORMAT, path=path)
    length = get("recordlength")
    if length is not None and numbers(length[0]):
        need = int(round(numbers(length[0])[0] / step))
        if table.shape[0] < need:
            raise FormatError(FORMAT, path, f"{table.shape[0]} data rows; #RecordLength "
                              f"{length[0]} s at {1 / step:g} Hz needs {need}", line=length[1])

    station = (get("stationcode") or (file_stem(path), 0))[0].split()[0]
    meta: dict = {}
    sname = get("stationname")
    if sname:
        meta["station_name"] = sname[0]
    start = ""
    for key, value in keys.items():
        if key.startswith("starttime") or key.startswith("origin time"):
            iso = _iso(key, value[0])
            if iso:
                if key.startswith("starttime"):
                    start = iso
                else:
                    meta["event_time"] = iso
    for prefix, out in (("depth", "event_depth_km"), ("magnitude", "event_magnitude"),
                        ("epicenterlongitude", "event_longitude"),
                        ("epicenterlatitude", "event_latitude")):
        v = get(prefix)
        if v and numbers(v[0]):
            meta[out] = numbers(v[0])[0]
    if time[0] != 0:
        meta["first_time_s"] = float(time[0])
    records = []
    for k, comp in enumerate(comps):
        md = dict(meta)
        peak = get(f"amplitudemax. {comp.lower()}")
        if peak and numbers(peak[0]):
            md["header_pga"] = max(abs(v) for v in numbers(peak[0])) * factor
        records.append(make_record(table[:, k + 1], factor=factor, file_units=file_units,
                                   dt=step, path=path, fmt=FORMAT, station=station,
                                   component=comp, user_units=units, start_time=start,
                                   metadata=md))
    return records


def _iso(key: str, value: str) -> str:
    """A local time ``yyyy/mm/dd-hh:mm:ss.sss`` with the key's ``(GMT+08)`` → ISO 8601 in UTC."""
    m = re.search(r"(\d{4})/(\d{1,2})/(\d{1,2})[-\sT]+(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)", value)
    if not m:
        return ""
    y, mo, d, h, mi, sec = m.groups()
    try:
        when = _dt.datetime(int(y), int(mo), int(d), int(h), int(mi)) + \
            _dt.timedelta(seconds=float(sec))
    except ValueError:
        return ""
    z = re.search(r"GMT\s*([+-])\s*(\d{1,2})(?::?(\d{2}))?", key, re.I)
    if z:
        offset = _dt.timedelta(hours=int(z.group(2)), minutes=int(z.group(3) or 0))
        when = when - offset if z.group(1) == "+" else when + offset
        return when.isoformat(timespec="milliseconds") + "Z"
    return when.isoformat(timespec="milliseconds")
