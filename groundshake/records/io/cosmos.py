"""COSMOS strong-motion data format (Consortium of Organizations for Strong-Motion
Observation Systems, version 1.20): Volume 0 (raw counts), 1 (uncorrected) and 2
(corrected) acceleration.

Each channel: text lines (the first says ``(Format v01.20 with 13 text lines)``), an
integer header and a real header (each announced with its count, lines and Fortran
format), comment lines starting with ``|``, then a line announcing the data
(``7000 acceleration pts, approx 70 secs, units=cm/sec2(04),Format=(8F10.5)``) and the
data in that format; an ``End-of-data`` or ``/&`` line may close the channel.

Header values used (1-based positions as in the format's tables): integer 2 (kind of
data: 1 = acceleration), 3 (units code), 54 (orientation, degrees from north); real 22
(recorder LSB [µV/count]), 42 (sensor sensitivity [V/g]), 62 (sampling interval of the
series [ms]; the recorder's own interval [s], value 34, if 62 is missing), 64 and 65
(peak value and its time [s]).
"""
from __future__ import annotations

import re
import warnings
from pathlib import Path

import numpy as np

from ..._errors import GroundshakeWarning, RecordError
from .._record import Record
from .._units import canonical_units
from ._common import (check_dt, check_samples, detector, file_stem, fixed_width, FormatError,
                      head_lines, iso_time, orientation_metadata, read_lines, resolve_units,
                      si_record, unique_names, user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "COSMOS V0/V1/V2"
EXTENSIONS = (".v0", ".v0c", ".v1", ".v1c", ".v2", ".v2c")

_FIRST = re.compile(r"\(Format\s+v?(\d+\.\d+)\s+with\s+(\d+)\s+text lines\)", re.I)
_HEADER = re.compile(r"^\s*(\d+)\s+(Integer|Real)-header values follow on\s+(\d+)\s+lines,?"
                     r"\s*Format\s*=\s*\(\s*(?:\d*P\s*,?\s*)?(\d+)\s*[IFEG](\d+)(?:\.\d+)?\s*\)",
                     re.I)
_COMMENTS = re.compile(r"^\s*(\d+)\s+Comment line\(s\) follow", re.I)
_DATA = re.compile(r"^\s*(\d+)\s+(.*?)\s+pts,.*?units\s*=\s*([^(,]*?)\s*\((\d+)\)\s*,?\s*"
                   r"Format\s*=\s*\(\s*(?:\d*P\s*,?\s*)?(\d+)\s*[IFEG](\d+)(?:\.\d+)?\s*\)", re.I)
_START = re.compile(r"Rcrd start time:\s*(?:(\d{1,2})/(\d{1,2})/(\d{4})|(\d{4})/(\d{1,2})/(\d{1,2}))"
                    r",?\s+(\d+):(\d+):([0-9.]+)\s*(UTC|GMT)?", re.I)
_CHAN = re.compile(r"Sta\s+Cha\w*\s*:?\s*(?:\S+\s*)?:\s*(.*?)\s*\(", re.I)
_CODE = re.compile(r"Code:\s*(\S+)", re.I)
_SCNL = re.compile(r"<SCNL>\s*([^.\s]+)\.([^.\s]+)\.([^.\s]+)\.(\S+)")
_MISSING = (-999, -999.0)
#: Units codes of the format's table of physical units that are accelerations.
_UNIT_CODES = {2: "g", 4: "cm/s2"}
_COUNTS = 50


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if the first line states a COSMOS format version (never raises)."""
    lines = head_lines(head, 1)
    return bool(lines) and bool(_FIRST.search(lines[0]))


def _value(arr, k):
    """1-based header value ``k`` or None if missing."""
    if k > len(arr):
        return None
    v = arr[k - 1]
    return None if v in _MISSING else v


def _channels(lines: list[str], path: Path):
    i = 0
    n = len(lines)
    while i < n:
        if not lines[i].strip() or lines[i].startswith("/&") or \
                lines[i].lower().startswith("end-of-data"):
            i += 1
            continue
        m = _FIRST.search(lines[i])
        if not m:
            raise FormatError(FORMAT, path, "expected the first line of a channel, '... (Format "
                              "v01.20 with 13 text lines)'", i + 1, lines[i])
        first = i
        ntext = int(m.group(2))
        text = lines[i:i + ntext]
        i += ntext
        headers = {}
        for what in ("Integer", "Real"):
            if i >= n:
                raise FormatError(FORMAT, path, f"the file ends before the {what.lower()} header")
            mh = _HEADER.match(lines[i])
            if not mh or mh.group(2).lower() != what.lower():
                raise FormatError(FORMAT, path, f"expected '... {what}-header values follow on "
                                  "... lines, Format= (...)'", i + 1, lines[i])
            count, nl, per, width = (int(mh.group(1)), int(mh.group(3)), int(mh.group(4)),
                                     int(mh.group(5)))
            headers[what] = fixed_width(lines[i + 1:i + 1 + nl], count, width, per, fmt=FORMAT,
                                        path=path, first_line=i + 2) if count else np.empty(0)
            i += 1 + nl
        comments = []
        mc = _COMMENTS.match(lines[i]) if i < n else None
        if mc:
            k = int(mc.group(1))
            comments = lines[i + 1:i + 1 + k]
            i += 1 + k
        md = _DATA.match(lines[i]) if i < n else None
        if not md:
            raise FormatError(FORMAT, path, "expected the data line '<n> ... pts, approx ... "
                              "secs, units=...(code), Format=(...)'", i + 1,
                              lines[i] if i < n else "")
        npts, per, width = int(md.group(1)), int(md.group(5)), int(md.group(6))
        data = fixed_width(lines[i + 1:], npts, width, per, fmt=FORMAT, path=path,
                           first_line=i + 2)
        yield {"first": first + 1, "text": text, "ints": headers["Integer"],
               "reals": headers["Real"], "comments": comments, "data_line": lines[i],
               "data_line_no": i + 1, "kind": md.group(2), "unit_text": md.group(3),
               "unit_code": int(md.group(4)), "data": data}
        i += 1 + -(-npts // per)


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list[Record]:
    """Read every acceleration channel of a COSMOS V0, V1 or V2 file (arguments:
    :mod:`groundshake.records.io`).

    ``units`` is checked against the data line's units, ``dt`` [s] against the
    sampling interval (real header 62).

    Returns
    -------
    list of Record
        One per acceleration channel (velocity and displacement channels of a V2 are
        skipped), ``acc`` in m/s², shape (n,); ``component`` the orientation as written
        on the ``Sta Cha`` line (e.g. ``"340 deg"`` -> ``"340"``); metadata ``station``,
        ``channel`` (SEED code from a ``<SCNL>`` comment, if any), ``azimuth_deg``/
        ``orientation``, ``event_*``, ``header_pga`` [m/s²] and ``header_pga_time`` [s].
        Raw counts (V0) are turned into g with the recorder LSB and sensor sensitivity of
        the real header, and a warning says the record is uncorrected.

    Raises
    ------
    RecordError
        A header or data block that does not parse (names the line), no sampling
        interval, counts without LSB or sensitivity, no acceleration channel.
    """
    path = Path(path)
    where = str(path)
    lines = read_lines(path, encoding="latin-1")
    given = user_units(units, where)
    records = []
    kinds = []
    for ch in _channels(lines, path):
        ints, reals = ch["ints"], ch["reals"]
        kind = _value(ints, 2)
        kinds.append(ch["kind"])
        if kind is not None and int(kind) != 1:
            continue  # velocity, displacement or spectra
        label = f"{where} (channel starting at line {ch['first']})"
        ms = _value(reals, 62)
        step = ms / 1000.0 if ms is not None and ms > 0 else _value(reals, 34)
        if step is None or not step > 0:
            raise FormatError(FORMAT, path, "no sampling interval (real header value 62 [ms] "
                              "or 34 [s])", ch["first"], ch["text"][0])
        step = float(step)
        check_dt(dt, step, label, "its real header (value 62)")
        data = ch["data"]
        check_samples(data, label)
        meta: dict = {"format": FORMAT, "units_code": ch["unit_code"]}
        scale = 1.0
        code = ch["unit_code"]
        if code == _COUNTS or "count" in ch["unit_text"].lower():
            lsb, sens = _value(reals, 22), _value(reals, 42)
            if not lsb or not sens or lsb <= 0 or sens <= 0:
                raise FormatError(FORMAT, path, "raw counts, but the real header lacks the "
                                  "recorder LSB (value 22, µV/count) or the sensor sensitivity "
                                  "(value 42, V/g) needed to convert them",
                                  ch["data_line_no"], ch["data_line"])
            scale = lsb * 1e-6 / sens  # counts -> volts -> g
            file_units = "g"
            meta["units_from"] = ("counts x recorder LSB (real header 22, µV/count) / sensor "
                                  "sensitivity (real header 42, V/g)")
            meta["counts_to_g"] = scale
            warnings.warn(f"{label}: COSMOS V0 raw counts converted to g with the header's LSB "
                          f"and sensitivity; the record is uncorrected (offset and instrument "
                          f"response remain): correct it before use", GroundshakeWarning,
                          stacklevel=4)
        else:
            try:
                file_units = canonical_units(ch["unit_text"]) if ch["unit_text"] else \
                    _UNIT_CODES[code]
            except (RecordError, KeyError):
                raise FormatError(FORMAT, path, f"units {ch['unit_text']!r} (code {code}) are "
                                  "not units of acceleration", ch["data_line_no"],
                                  ch["data_line"]) from None
        rec_units = resolve_units(file_units, given, label)
        text = "\n".join(ch["text"])
        mc = _CHAN.search(text)
        orient = mc.group(1).strip() if mc else ""
        mdeg = re.match(r"(\d+(?:\.\d*)?)\s*deg", orient, re.I)
        component = mdeg.group(1) if mdeg else (orient.split()[0] if orient else "")
        az = _value(ints, 54)
        if not component and az is not None:
            component = f"{int(az)}"
        meta.update(orientation_metadata(component))
        mcode = _CODE.search(text)
        station = mcode.group(1) if mcode else ""
        for c in ch["comments"]:
            ms = _SCNL.search(c)
            if ms:
                station = station or ms.group(1)
                meta["channel"] = ms.group(2)
                meta["network"] = ms.group(3)
                meta.update(orientation_metadata(ms.group(2)) if not component else {})
        meta.setdefault("channel", component)
        meta["station"] = station or file_stem(path)
        if len(ch["text"]) > 4:
            meta["station_name"] = re.sub(r"^.*?Code:\s*\S+\s*", "", ch["text"][4]).strip()
        if len(ch["text"]) > 1:
            meta["event_name"] = ch["text"][1].strip()
        if len(ch["text"]) > 2:
            meta["event_hypocenter"] = re.sub(r"^\s*Hypocenter:\s*", "", ch["text"][2]).strip()
        if len(ch["text"]) > 3:
            meta["event_origin"] = re.sub(r"^\s*Origin:\s*", "", ch["text"][3]).strip()
        peak, tpeak = _value(reals, 64), _value(reals, 65)
        if peak is not None:
            from .._units import UNITS
            meta["header_pga"] = abs(float(peak)) * scale * UNITS[file_units]
            if tpeak is not None:
                meta["header_pga_time"] = float(tpeak)
        start = ""
        m = _START.search(text)
        if m:
            if m.group(1):
                mo, d, y = int(m.group(1)), int(m.group(2)), int(m.group(3))
            else:
                y, mo, d = int(m.group(4)), int(m.group(5)), int(m.group(6))
            try:
                start = iso_time(y, mo, d, int(m.group(7)), int(m.group(8)), float(m.group(9)))
            except ValueError:
                start = ""
        approx = re.search(r"approx\s+([0-9.]+)\s*secs", ch["data_line"], re.I)
        if approx and abs(data.size * step - float(approx.group(1))) > \
                0.1 * float(approx.group(1)) + 1.0:
            warnings.warn(f"{label}: {data.size} samples at {step:g} s last "
                          f"{data.size * step:g} s but the data line says about "
                          f"{approx.group(1)} s; check the sampling interval (real header 62)",
                          GroundshakeWarning, stacklevel=4)
        records.append(si_record(data * scale, units=rec_units, dt=step, station=meta["station"],
                                 component=component, source=where, label=label,
                                 start_time=start, metadata=meta))
    if not records:
        raise FormatError(FORMAT, path, f"no acceleration channel (found: {', '.join(kinds)})")
    return unique_names(records)
