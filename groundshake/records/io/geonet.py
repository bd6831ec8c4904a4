"""GeoNet (New Zealand) strong-motion volumes V1A (uncorrected) and V2A (corrected).

Three components in one file, one after another. Each: 16 text lines (``Site WTMC ...``,
``Number of points ...``, ``... in units of 1.00 mm/s/s at intervals of 0.005 s``,
``Component N28W``, ``Acceleration:  Peak -11026.2 mm/s/s at  44.87 s`` ...), an integer
header of 40 values (4 lines of ``10I8``), a real header of 60 values (6 lines of
``10F8``), then the data, ten values a line in fields of 8. A V2A has velocity and
displacement after the acceleration; integer header values 31-33 (1-based) count the
points of each.
"""
from __future__ import annotations

import re
from pathlib import Path

from .._record import Record
from ._common import (check_dt, check_samples, detector, file_stem, fixed_width, FormatError,
                      head_lines, header_units, orientation_metadata, peak_factor, PEAK_NAMES,
                      read_lines, resolve_units, si_record, unique_names, user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "GeoNet V1A/V2A"
EXTENSIONS = (".v1a", ".v2a")

_TEXT_LINES = 16
_INT_LINES, _REAL_LINES, _PER, _WIDTH = 4, 6, 10, 8
_FIRST = re.compile(r"^\s*(Uncorrected|Corrected)\s+accelerogram\b", re.I)
_SITE = re.compile(r"^\s*Site\s+(\S+)", re.I)
_UNITS = re.compile(r"in units of\s+(?:([0-9.]+)\s+)?(\S+)\s+at intervals of\s+([0-9.]+)\s*s",
                    re.I)
_NPTS = re.compile(r"Number of points\s+(\d+)", re.I)
_COMP = re.compile(r"^\s*Component\s+(\S+)", re.I)
_PEAK = re.compile(r"^\s*(Acceleration|Velocity|Displacement)\s*:\s*Peak\s+([-0-9.]+)\s+(\S+)"
                   r"\s+at\s+([-0-9.]+)\s*s", re.I)
_INTS = re.compile(r"^(\s*-?\d+){10}\s*$")
_MAG = re.compile(r"\b(M[LWSlws]?)\s+([0-9.]+)\s*$")


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if the file begins like a GeoNet volume (never raises)."""
    lines = head_lines(head)
    return len(lines) > 1 and bool(_FIRST.match(lines[0])) and bool(_SITE.match(lines[1]))


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list[Record]:
    """Read the three components of a GeoNet V1A or V2A file (arguments:
    :mod:`groundshake.records.io`).

    ``units`` and ``dt`` [s] are checked against the header's units and interval.

    Returns
    -------
    list of Record
        One per component, ``acc`` in m/s², shape (n,); ``component`` as written
        (``"N28W"``, ``"S62W"``, ``"Up"``), azimuth from north in ``azimuth_deg``;
        metadata ``station``, ``station_name``, ``event_*`` and the header's peaks
        (``header_pga`` [m/s²], ``header_pgv`` [m/s], ``header_pgd`` [m], times [s]).

    Raises
    ------
    RecordError
        A header or data block that does not parse (names the line); units or interval
        missing; a ``units``/``dt`` that contradicts the header.
    """
    path = Path(path)
    where = str(path)
    lines = read_lines(path, encoding="latin-1")
    given = user_units(units, where)
    # a component starts with "... accelerogram ..." followed by "Site ..."
    starts = [i for i in range(len(lines) - 1)
              if _FIRST.match(lines[i]) and _SITE.match(lines[i + 1])]
    if not starts or any(s.strip() for s in lines[:starts[0]]):
        k = next((n for n, s in enumerate(lines) if s.strip()), 0)
        raise FormatError(FORMAT, path, "expected 'Uncorrected accelerogram' or 'Corrected "
                          "accelerogram' and a 'Site' line to start a component", k + 1,
                          lines[k] if lines else "")
    records = []
    for i, j in zip(starts, starts[1:] + [len(lines)]):
        rec, end = _component(lines[:j], i, path, given, dt)
        records.append(rec)
    return unique_names(records)


def _component(lines, i, path, given, dt):
    where = str(path)
    first = i + 1
    text = lines[i:i + _TEXT_LINES]
    joined = "\n".join(text)
    label = f"{where} (component starting at line {first})"
    if len(text) < _TEXT_LINES:
        raise FormatError(FORMAT, path, f"the component ends inside its {_TEXT_LINES} text lines",
                          first)
    ints = fixed_width(lines[i + _TEXT_LINES:], _INT_LINES * _PER, _WIDTH, _PER, fmt=FORMAT,
                       path=path, first_line=i + _TEXT_LINES + 1)
    start_reals = i + _TEXT_LINES + _INT_LINES
    fixed_width(lines[start_reals:], _REAL_LINES * _PER, _WIDTH, _PER, fmt=FORMAT, path=path,
                first_line=start_reals + 1)  # checked, not used
    mu = _UNITS.search(joined)
    if not mu:
        k = next((n for n, t in enumerate(text) if "units" in t.lower()), 0)
        raise FormatError(FORMAT, path, "no '... in units of ... at intervals of ... s' line",
                          first + k, text[k], part="header line")
    scale = float(mu.group(1)) if mu.group(1) else 1.0
    file_units = header_units(mu.group(2), fmt=FORMAT, path=path, line=first, line_text=text[0],
                              part="header line")
    rec_units = resolve_units(file_units, given, label)
    step = float(mu.group(3))
    if not step > 0:
        raise FormatError(FORMAT, path, f"interval {step:g} s must be > 0", first,
                          part="header line")
    check_dt(dt, step, label, "its header")
    counts = [int(v) for v in ints[30:33]]  # points of acceleration, velocity, displacement
    if any(v != int(v) or v < 0 for v in ints[30:33]):
        raise FormatError(FORMAT, path, "integer header values 31-33 (points of acceleration, "
                          "velocity, displacement) are not counts", i + _TEXT_LINES + 4,
                          lines[i + _TEXT_LINES + 3])
    mn = _NPTS.search(joined)
    n_acc = counts[0] or (int(mn.group(1)) if mn else 0)
    if n_acc <= 0:
        raise FormatError(FORMAT, path, "no number of points", first, part="header line")
    if mn and counts[0] and int(mn.group(1)) != counts[0]:
        k = next(n for n, t in enumerate(text) if _NPTS.search(t))
        raise FormatError(FORMAT, path, f"'Number of points' says {mn.group(1)} but integer "
                          f"header value 31 says {counts[0]}", first + k, text[k],
                          part="header line")
    data_start = start_reals + _REAL_LINES
    acc = fixed_width(lines[data_start:], n_acc, _WIDTH, _PER, fmt=FORMAT, path=path,
                      first_line=data_start + 1) * scale
    check_samples(acc, label)
    end = data_start + -(-n_acc // _PER)
    for n in counts[1:]:  # a V2A's velocity and displacement follow
        if n > 0:
            end += -(-n // _PER)
    extra = [k for k in range(end, len(lines)) if lines[k].strip()]
    if extra:
        raise FormatError(FORMAT, path, f"more data lines than the header's counts "
                          f"({', '.join(str(c) for c in counts)} points) announce",
                          extra[0] + 1, lines[extra[0]])
    meta: dict = {"format": FORMAT}
    ms = _SITE.match(text[1])
    station = ms.group(1) if ms else file_stem(path)
    meta["station"] = station
    meta["station_name"] = text[2].strip()
    mc = next((_COMP.match(t) for t in text if _COMP.match(t)), None)
    component = mc.group(1) if mc else ""
    meta["channel"] = component
    meta.update(orientation_metadata(component))
    meta["event_name"] = text[6].strip()
    meta["event_time_text"] = text[7].strip()
    epi = next((t for t in text if t.strip().lower().startswith("epicentre")), "")
    if epi:
        meta["event_epicentre"] = epi.strip()
        mm = _MAG.search(epi.strip())
        if mm:
            meta["event_magnitude"] = f"{mm.group(1)} {mm.group(2)}"
    for t in text:
        mp = _PEAK.match(t)
        if not mp:
            continue
        what = PEAK_NAMES[mp.group(1).lower()]
        factor = peak_factor(mp.group(3), what)
        if factor is None:
            continue
        meta[f"header_{what}"] = abs(float(mp.group(2))) * factor
        meta[f"header_{what}_time"] = float(mp.group(4))
    rec = si_record(acc, units=rec_units, dt=step, station=station, component=component,
                    source=where, label=label, metadata=meta)
    return rec, end
