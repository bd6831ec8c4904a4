"""Delimited text: one column of acceleration, or a time column and acceleration columns.

Comma, semicolon or whitespace separators; header lines, ``# key: value`` metadata
(``units``, ``dt``, ``station``, ...) and column names with units in brackets
(``acc [g]``) are read. The last reader asked: it claims any file that is text.
"""
from __future__ import annotations

import io
import math
import re
import warnings
from pathlib import Path
from typing import Any

import numpy as np

from ..._errors import RecordError
from .._record import Record
from .._units import canonical_units
from ._common import check_samples as _check_samples
from ._common import detector, file_stem, is_number as _is_float, looks_binary, read_bytes
from ._common import resolve_units as _resolve_units, to_si as _to_si, user_units

__all__ = ["FORMAT", "EXTENSIONS", "STEP_TOLERANCE", "is_format", "read"]

FORMAT = "delimited text (time and acceleration columns, or one column with a dt line)"
EXTENSIONS = (".csv", ".tsv", ".txt", ".dat", ".asc")

#: Largest relative spread of the time steps of a text file accepted as uniform.
STEP_TOLERANCE = 0.01

_COMMENT_CHARS = "#%!"
_META_RE = re.compile(r"^\s*([A-Za-z][A-Za-z _-]*?)\s*[:=]\s*(.+?)\s*$")
_BRACKET_RE = re.compile(r"[\[(]\s*([^\])]+?)\s*[\])]")


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True for any file whose beginning is text (never raises)."""
    return bool(head.strip()) and not looks_binary(head[:8192])


def read(path: Path, *, units: str | None = None, dt: float | None = None,
         resample: bool = False) -> list[Record]:
    """Read the acceleration columns of a delimited text file.

    Parameters
    ----------
    path : path-like
        The file.
    units : str, optional
        Units of the values where the file states none; an error if it states others.
    dt : float, optional
        Time step [s] of a one-column file; elsewhere a check against the file's.
    resample : bool
        Interpolate uneven time steps (more than 1 % spread) onto the median step
        instead of refusing the file.

    Returns
    -------
    list of Record
        One per acceleration column, ``acc`` in m/s², shape (n,).
    """
    path = Path(path)
    where = str(path)
    try:
        raw = read_bytes(path)
    except OSError as e:
        raise RecordError(f"{where}: cannot be read ({e.strerror or e})") from e
    return _read_text(_decode_text(raw, where), path, user_units(units, where),
                      None if dt is None else float(dt), resample)



def _decode_text(raw: bytes, where: str) -> str:
    head = raw[:65536]
    controls = sum(head.count(bytes([c])) for c in range(32) if c not in (9, 10, 12, 13))
    if b"\x00" in head or controls > 0.01 * len(head):
        raise RecordError(f"{where}: not a record groundshake can read (no format ObsPy "
                          f"knows, and not delimited text)")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        return raw.decode("latin-1")


def _split(line: str) -> list[str]:
    if ";" in line:
        cells = [c.strip() for c in line.split(";")]
        if not any("." in c for c in cells):  # decimal commas go with semicolons
            cells = [c.replace(",", ".") for c in cells]
    elif "," in line:
        cells = [c.strip() for c in line.split(",")]
    else:
        cells = line.split()
    while cells and cells[-1] == "":
        cells.pop()
    return cells


def _meta_line(text: str, meta: dict[str, str]) -> bool:
    m = _META_RE.match(text)
    if not m:
        return False
    key = m.group(1).strip().lower().replace("-", " ").replace("_", " ")
    meta[key] = m.group(2)
    return True


def _parse_table(text: str, where: str):
    """(meta, header, table (rows, width), line numbers (rows,)) of a delimited text file."""
    meta: dict[str, str] = {}
    header: list[str] | None = None
    all_lines = text.splitlines()
    first = None
    for number, line in enumerate(all_lines, start=1):
        s = line.strip()
        if not s:
            continue
        if s[0] in _COMMENT_CHARS:
            _meta_line(s.lstrip(_COMMENT_CHARS), meta)
            continue
        cells = _split(s)
        if all(_is_float(c) for c in cells) and cells:
            first = number
            break
        if not _meta_line(s, meta):
            header = _merge_brackets(cells)
    if first is None:
        from . import formats_read

        raise RecordError(f"{where}: no rows of numbers: empty, only a header, or a format "
                          f"neither ObsPy nor the delimited-text reader knows; formats read: "
                          f"{formats_read()}")
    stripped = [ln.strip() for ln in all_lines[first - 1:]]
    keep = [i for i, s in enumerate(stripped) if s and s[0] not in _COMMENT_CHARS]
    if len(keep) < len(stripped):  # comments among the data rows still carry metadata
        for s in stripped:
            if s and s[0] in _COMMENT_CHARS:
                _meta_line(s.lstrip(_COMMENT_CHARS), meta)
    data = stripped if len(keep) == len(stripped) else [stripped[i] for i in keep]
    numbers = [first + i for i in keep]
    table = _fast_table(data)
    if table is None:
        table = _slow_table(data, numbers, where)
    return meta, header, table, np.array(numbers)


def _fast_table(data: list[str]) -> np.ndarray | None:
    """All rows converted at once in C; None if anything is irregular (then go slowly)."""
    first = data[0]
    joined = "\n".join(data)
    delimiter = None
    if ";" in first:
        if "." not in first:
            joined = joined.replace(",", ".")
        delimiter = ";"
    elif "," in first:
        delimiter = ","
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            table = np.loadtxt(io.StringIO(joined), dtype=float, ndmin=2, comments=None,
                               delimiter=delimiter)
    except ValueError:  # irregular rows or a bad cell: the slow path names the line
        return None
    return table if table.shape[0] == len(data) else None


def _slow_table(data: list[str], numbers: list[int], where: str) -> np.ndarray:
    """Row by row, to name the line and cell at fault."""
    rows: list[list[float]] = []
    width = None
    for number, s in zip(numbers, data):
        cells = _split(s)
        try:
            values = [float(c) for c in cells]
        except ValueError:
            bad = next(c for c in cells if not _is_float(c))
            raise RecordError(f"{where}:{number}: {bad!r} is not a number") from None
        if width is None:
            width = len(values)
        elif len(values) != width:
            raise RecordError(f"{where}:{number}: {len(values)} values; the first data row "
                              f"had {width}")
        rows.append(values)
    return np.array(rows, dtype=float)


def _read_text(text: str, path: Path, user_units: str | None, dt: float | None,
               resample: bool) -> list[Record]:
    where = str(path)
    meta, header, table, lines = _parse_table(text, where)
    width = table.shape[1]
    bad = np.argwhere(~np.isfinite(table))
    if bad.size:
        r, c = bad[0]
        raise RecordError(f"{where}:{lines[r]}: value {table[r, c]} is not finite (NaN or inf)")

    header_units = meta.get("units") or meta.get("unit")
    file_units = canonical_units(header_units, where=f"{where}: header") if header_units else None
    header_dt = _header_float(meta, ("dt", "time step", "delta"), where)
    if width == 1:
        acc_cols = [table[:, 0]]
        names = [header[0]] if header else [""]
        step = dt if dt is not None else header_dt
        if step is None:
            raise RecordError(f"{where}: one column of values needs a time step: give it, "
                              f"or write a '# dt: ...' header line", param="dt")
        if dt is not None and header_dt is not None and not math.isclose(dt, header_dt,
                                                                         rel_tol=1e-6):
            raise RecordError(f"{where}: dt={dt:g} s was given but the header says {header_dt:g} s")
        t0 = 0.0
    else:
        time = table[:, 0]
        if header and len(header) == width:
            tu = _bracket_units(header[0])
            if tu and tu.lower() not in ("s", "sec", "second", "seconds"):
                raise RecordError(f"{where}: time column {header[0]!r}: time must be in "
                                  f"seconds")
        acc_cols = [table[:, k] for k in range(1, width)]
        names = header[1:] if header and len(header) == width else [""] * (width - 1)
        if time.size >= 2:
            steps = np.diff(time)
            back = np.flatnonzero(steps <= 0)
            if back.size:
                i = back[0]
                raise RecordError(f"{where}:{lines[i + 1]}: time {time[i + 1]:g} s repeats or "
                                  f"runs backwards (previous {time[i]:g} s)")
            med = float(np.median(steps))
            spread = np.abs(steps - med) / med
            worst = int(np.argmax(spread))
            if spread[worst] > STEP_TOLERANCE:
                if not resample:
                    raise RecordError(
                        f"{where}:{lines[worst + 1]}: time step {steps[worst]:g} s differs from "
                        f"the median {med:g} s by {100 * spread[worst]:.1f} % (more than 1 %); "
                        f"ask for resampling to interpolate onto a uniform step",
                        param="resample")
                n_new = int(np.floor((time[-1] - time[0]) / med + 1e-9)) + 1
                grid = time[0] + med * np.arange(n_new)
                acc_cols = [np.interp(grid, time, a) for a in acc_cols]
                step = med
            else:
                step = (time[-1] - time[0]) / (time.size - 1)
                if header_dt is not None and math.isclose(step, header_dt, rel_tol=1e-6):
                    step = header_dt
        else:
            step = 1.0  # fewer than 16 samples: refused below
        if dt is not None and not math.isclose(dt, step, rel_tol=1e-6):
            raise RecordError(f"{where}: dt={dt:g} s was given but the time column gives "
                              f"{step:g} s")
        t0 = float(time[0])

    components = [c.strip() for c in (meta.get("components") or meta.get("component")
                                      or "").split(",")]
    records = []
    for k, (acc, col_name) in enumerate(zip(acc_cols, names)):
        _check_samples(acc, where)
        col_units = _bracket_units(col_name)
        col_canon = canonical_units(col_units, where=f"{where}: column {col_name!r}") \
            if col_units else None
        if col_canon and file_units and col_canon != file_units:
            raise RecordError(f"{where}: column {col_name!r} says {col_canon} but the header "
                              f"says units {file_units}")
        rec_units = _resolve_units(col_canon or file_units, user_units, where)
        bare = _BRACKET_RE.sub("", col_name).strip()
        if len(acc_cols) == 1:
            name = file_stem(path)
        else:
            name = bare or f"{file_stem(path)}.{k + 1}"
        component = components[k] if k < len(components) and components[k] else \
            (bare if len(acc_cols) > 1 else "")
        md: dict[str, Any] = {"format": "text", "column": k + 1 if width == 1 else k + 2}
        if col_name:
            md["column_name"] = col_name
        if t0:
            md["first_time_s"] = t0
        if "pad before s" in meta:  # written with a corrected, padded record
            md["pad_before_s"] = _header_float(meta, ("pad before s",), where)
        for key in ("station", "event", "title"):
            if key in meta:
                md[key] = meta[key]
        records.append(Record(acc=_to_si(acc, rec_units, where), dt=step, name=name,
                              component=component, source=where, units=rec_units,
                              start_time=meta.get("start", meta.get("start time", "")),
                              metadata=md))
    return records


def _merge_brackets(cells: list[str]) -> list[str]:
    """Re-join a unit like "[g]" or "(cm/s2)" split off its column name by whitespace."""
    out: list[str] = []
    for c in cells:
        if out and c[:1] in "[(":
            out[-1] = f"{out[-1]} {c}"
        else:
            out.append(c)
    return out


def _bracket_units(name: str) -> str | None:
    m = _BRACKET_RE.search(name or "")
    return m.group(1) if m else None


def _header_float(meta: dict[str, str], keys, where: str) -> float | None:
    for key in keys:
        if key in meta:
            text = meta[key].split()[0]
            try:
                value = float(text)
            except ValueError:
                raise RecordError(f"{where}: header {key}: {meta[key]!r} is not a number") from None
            if not (math.isfinite(value) and value > 0):
                raise RecordError(f"{where}: header {key}: {value!r} must be > 0")
            return value
    return None

