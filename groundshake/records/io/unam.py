"""Mexican standard acceleration files (``ARCHIVO ESTANDAR DE ACELERACION``; UNAM and others).

Layout, as the files state it: ``KEY : value`` lines in Spanish, grouped in
sections, per-channel values written ``/a/b/c`` for channels C1–C6 and C7–C12
(``ORIENTACION``, ``INTERVALO DE MUESTREO``, ``NUM. TOTAL DE MUESTRAS``,
``ACEL. MAX.(Gal)``), ``UNIDADES DE LOS DATOS``, ``FORMATO DATOS`` (a Fortran
format such as ``3F10.3``), then after ``DATOS DE ACELERACION:`` a ruler, the
channel names, a ruler and one row per sample.
"""
from __future__ import annotations

import datetime as _dt
import re
from pathlib import Path

import numpy as np

from ._agency import check_units, make_record, numbers, units_factor, warn
from ._common import check_dt, detector, file_stem, FormatError, head_lines, read_lines

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "Mexican standard acceleration (UNAM)"
EXTENSIONS = tuple(f".{k:03d}" for k in range(1, 13)) + (".txt",)

_KEY = re.compile(r"^([^:]*?)\s*:\s?(.*)$")
_FORTRAN = re.compile(r"(\d*)\s*[FEGD]\s*(\d+)\s*\.\s*(\d+)", re.I)


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True when the header says ``ARCHIVO ESTANDAR DE ACELERACION``. Never raises."""
    return "ARCHIVO ESTANDAR DE ACELERACION" in "\n".join(head_lines(head, 40)).upper()


def _slashed(text: str) -> list[str]:
    """``"/V/N90E/N00E"`` → ``["V", "N90E", "N00E"]``."""
    parts = [p.strip() for p in text.strip().split("/")]
    if parts and parts[0] == "":
        parts = parts[1:]
    return [p for p in parts if p != ""] if any(parts) else []


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list:
    """Read every channel of a Mexican standard acceleration file (arguments:
    :mod:`groundshake.records.io`).

    ``units`` is checked against ``UNIDADES DE LOS DATOS`` (and needed where it
    is missing); ``dt`` [s] against ``INTERVALO DE MUESTREO``.

    Returns
    -------
    list of Record
        One per channel, ``acc`` in m/s²; component = the orientation as written
        (``V``, ``N90E``, ``N00E``); metadata ``header_pga`` [m/s²] and
        ``header_pga_sample`` from ``ACEL. MAX.``.

    Raises
    ------
    RecordError
        Missing keys or data, a short data block, ``units``/``dt`` contradicting
        the header.
    """
    path = Path(path)
    lines = read_lines(path)
    keys: dict[str, tuple[str, int]] = {}
    last = None
    data_at = None
    for i, ln in enumerate(lines):
        if ln.strip().upper().startswith("DATOS DE ACELERACION"):
            data_at = i
            break
        m = _KEY.match(ln)
        if not m or ln.lstrip().startswith(("*", "=", "-")):
            continue
        key = m.group(1).strip().upper()
        if key:
            keys[key] = (m.group(2).strip(), i + 1)
            last = key
        elif last is not None and m.group(2).strip():  # continuation line ": more text"
            text, line = keys[last]
            keys[last] = (f"{text} {m.group(2).strip()}", line)
    if data_at is None:
        raise FormatError(FORMAT, path, "no 'DATOS DE ACELERACION:' line before the data")

    def find(*words: str) -> list[tuple[str, int]]:
        return [v for k, v in keys.items() if all(w in k for w in words)]

    def per_channel(*words: str) -> tuple[list[str], int]:
        found = find(*words)
        if not found:
            raise FormatError(FORMAT, path, f"header has no {' '.join(words)!r} line")
        values: list[str] = []
        for text, _ in found:  # C1-C6 first, then C7-C12 (file order)
            values += _slashed(text)
        return values, found[0][1]

    comps, comp_line = per_channel("ORIENTACION")
    steps, step_line = per_channel("INTERVALO DE MUESTREO")
    counts, count_line = per_channel("NUM. TOTAL DE MUESTRAS")
    nch = len(comps)
    if nch == 0 or len(steps) < nch or len(counts) < nch:
        raise FormatError(FORMAT, path, f"{nch} orientations, {len(steps)} sampling intervals "
                          f"and {len(counts)} sample counts do not match", line=comp_line)
    try:
        step_values = [float(s) for s in steps[:nch]]
        n_values = [int(float(c)) for c in counts[:nch]]
    except ValueError:
        raise FormatError(FORMAT, path, "a sampling interval or sample count is not a number",
                          line=step_line) from None
    unit_text = find("UNIDADES")
    if unit_text:
        file_units, factor = units_factor(unit_text[0][0], fmt=FORMAT, path=path,
                                          line=unit_text[0][1])
    elif units is not None:
        file_units, factor = units_factor(units, fmt=FORMAT, path=path)
    else:
        raise FormatError(FORMAT, path, "no 'UNIDADES DE LOS DATOS' line; give the units",
                          param="units")
    check_units(file_units, units, path, FORMAT)
    for step in step_values:
        check_dt(dt, step, path, f"the {FORMAT} header", fmt=FORMAT, path=path)
    width = 10
    fmt_line = find("FORMATO")
    if fmt_line:
        fm = _FORTRAN.search(fmt_line[0][0])
        if fm:
            width = int(fm.group(2))

    # data: after the title, a ruler, channel names (and orientations), a ruler
    rulers = [k for k in range(data_at + 1, min(data_at + 8, len(lines)))
              if lines[k].strip().startswith("---")]
    if len(rulers) < 2:
        raise FormatError(FORMAT, path, "the data block lacks its two ruler lines ('----+----')",
                          line=data_at + 1)
    first = rulers[1] + 1
    body = [ln for ln in lines[first:] if ln.strip()]
    table = _table(body, nch, width, path, first + 1)
    need = max(n_values)
    if table.shape[0] < need:
        raise FormatError(FORMAT, path, f"{table.shape[0]} data rows; NUM. TOTAL DE MUESTRAS "
                          f"says {need}", line=count_line)
    if table.shape[0] > need:
        warn(f"{path}: {table.shape[0]} data rows but NUM. TOTAL DE MUESTRAS says {need}; "
             f"the first {need} are read")

    station = (find("CLAVE DE LA ESTACION") or [(file_stem(path), 0)])[0][0].split()[0]
    meta: dict = {}
    name = find("NOMBRE DE LA ESTACION")
    if name:
        meta["station_name"] = name[0][0]
    event_date = (find("FECHA DEL SISMO") or [("", 0)])[0][0]
    event_hour = (find("HORA EPICENTRO") or [("", 0)])[0][0]
    origin = _when(event_date, event_hour)
    if origin is not None:
        meta["event_time"] = origin.isoformat() + "Z"
    depth = find("PROFUNDIDAD FOCAL")
    if depth and numbers(depth[0][0]):
        meta["event_depth_km"] = numbers(depth[0][0])[0]
    mags = find("MAGNITUD")
    if mags:
        meta["event_magnitudes"] = mags[0][0]
    start = ""
    first_sample = find("HORA DE LA PRIMERA MUESTRA")
    if origin is not None and first_sample:
        t0 = _when(event_date, first_sample[0][0])
        if t0 is not None:
            if (origin - t0).total_seconds() > 12 * 3600:  # recorded just after midnight
                t0 += _dt.timedelta(days=1)
            start = t0.isoformat() + "Z"
    peaks, _ = per_channel("ACEL. MAX.(") if find("ACEL. MAX.(") else ([], 0)
    peak_at, _ = per_channel("EN LA MUESTRA") if find("EN LA MUESTRA") else ([], 0)

    records = []
    for k in range(nch):
        step = check_dt(dt, step_values[k], path, f"the {FORMAT} header",
                        fmt=FORMAT, path=path)
        md = dict(meta)
        try:
            if k < len(peaks):
                md["header_pga"] = abs(float(peaks[k])) * factor
            if k < len(peak_at):
                md["header_pga_sample"] = int(float(peak_at[k]))
        except ValueError:
            pass
        records.append(make_record(table[:n_values[k], k], factor=factor, file_units=file_units,
                                   dt=step, path=path, fmt=FORMAT, station=station,
                                   component=comps[k].upper(), user_units=units,
                                   start_time=start, metadata=md))
    return records


def _when(date: str, hour: str) -> _dt.datetime | None:
    m = re.search(r"(\d{4})/(\d{1,2})/(\d{1,2})", date)
    h = re.search(r"(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)", hour)
    if not (m and h):
        return None
    sec = float(h.group(3))
    try:
        return _dt.datetime(int(m.group(1)), int(m.group(2)), int(m.group(3)), int(h.group(1)),
                            int(h.group(2))) + _dt.timedelta(seconds=sec)
    except ValueError:
        return None


def _table(body: list[str], nch: int, width: int, path: Path, first_line: int) -> np.ndarray:
    """Rows of ``nch`` values; fields cut by ``width`` where values touch."""
    try:
        flat = np.array(" ".join(body).split(), dtype=float)
        if flat.size == len(body) * nch:
            return flat.reshape(-1, nch)
    except ValueError:
        pass
    rows = []
    for k, ln in enumerate(body):  # slow path: file lines, only for touching fields
        cells = [ln[j:j + width] for j in range(0, nch * width, width)]
        try:
            rows.append([float(c) for c in cells])
        except ValueError:
            raise FormatError(FORMAT, path, f"data row is not {nch} numbers of {width} "
                              f"characters", line=first_line + k, text=ln) from None
    return np.array(rows, dtype=float)
