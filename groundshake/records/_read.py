"""Reading acceleration records: every format ObsPy reads, and delimited text.

A reader is tried in order: ObsPy's own detection first (MiniSEED, SAC, K-NET,
Kinemetrics EVT, GSE2, ...), then delimited text. Files named ``*.csv`` or
``*.tsv`` go straight to the text reader.
"""
from __future__ import annotations

import io
import math
import re
import warnings
from pathlib import Path
from typing import Any

import numpy as np

from .._errors import GroundshakeWarning, RecordError
from ._record import Record
from ._write import restore_written_pad
from ._units import UNIT_NAMES, UNITS, canonical_units

__all__ = ["read_record", "MIN_SAMPLES", "STEP_TOLERANCE"]

#: Fewest samples a record may have.
MIN_SAMPLES = 16
#: Largest relative spread of the time steps of a text file accepted as uniform.
STEP_TOLERANCE = 0.01

_TEXT_ONLY_SUFFIXES = {".csv", ".tsv"}
_COMMENT_CHARS = "#%!"
_META_RE = re.compile(r"^\s*([A-Za-z][A-Za-z _-]*?)\s*[:=]\s*(.+?)\s*$")
_BRACKET_RE = re.compile(r"[\[(]\s*([^\])]+?)\s*[\])]")


def read_record(path, *, units: str | None = None, dt: float | None = None,
                resample: bool = False) -> list[Record]:
    """Read every trace of an acceleration record file.

    Parameters
    ----------
    path : str or path-like
        A file in any format ObsPy reads (auto-detected), or delimited text:
        one column of acceleration (``dt`` given, or a ``# dt: ...`` line) or
        a time column [s] followed by one or more acceleration columns.
        Comma, semicolon or whitespace separators; header lines are skipped.
    units : str, optional
        Units of the file's values (``"g"``, ``"m/s2"``, ``"cm/s2"``/``"gal"``,
        ``"mm/s2"``, ``"ft/s2"``, ``"in/s2"``). Needed when the file does not
        state them; an error if it states different ones.
    dt : float, optional
        Time step [s] for a one-column text file; elsewhere a check.
    resample : bool
        For text with uneven time steps (more than 1 % spread): interpolate
        linearly onto a uniform step equal to the median step, instead of
        refusing the file.

    Returns
    -------
    list of Record
        One per trace (ObsPy) or acceleration column (text); ``acc`` in m/s².

    Raises
    ------
    RecordError
        Missing, empty or unreadable file; a non-numeric, NaN or infinite
        value; fewer than 16 samples; time that repeats, runs backwards or is
        uneven; missing, unknown or conflicting units. The message names the
        file and, for text, the line.

    Warns
    -----
    GroundshakeWarning
        A peak beyond 5 g (wrong units or raw counts, most likely).

    Examples
    --------
    >>> recs = read_record("records/demo-h1.mseed", units="m/s2")   # doctest: +SKIP
    >>> recs[0].dt, recs[0].acc.shape                                # doctest: +SKIP
    (0.005, (8001,))
    """
    path = Path(path)
    where = str(path)
    if not path.exists():
        raise RecordError(f"{where}: no such file")
    if path.is_dir():
        raise RecordError(f"{where}: is a folder, not a record file")
    try:
        raw = path.read_bytes()
    except OSError as e:
        raise RecordError(f"{where}: cannot be read ({e.strerror or e})") from e
    if not raw.strip():
        raise RecordError(f"{where}: the file is empty")
    user_units = None if units is None else canonical_units(units, where=f"{where}: units")
    if dt is not None:
        dt = float(dt)
        if not (math.isfinite(dt) and dt > 0):
            raise RecordError(f"{where}: dt={dt!r} must be a finite number > 0")

    records = None
    if path.suffix.lower() not in _TEXT_ONLY_SUFFIXES:
        stream = _try_obspy(path)
        if stream is not None:
            records = _records_from_stream(stream, path, user_units, dt)
    if records is None:
        records = _read_text(_decode_text(raw, where), path, user_units, dt, resample)
    records = [restore_written_pad(rec) for rec in records]   # our own pads, as written
    for rec in records:
        _warn_if_implausible(rec)
    return records


#: Peak ground acceleration above which the units are probably wrong [m/s²] (5 g).
PLAUSIBLE_PEAK = 5 * 9.80665


def _warn_if_implausible(rec: Record) -> None:
    peak = float(np.max(np.abs(rec.acc - np.mean(rec.acc))))
    if peak > PLAUSIBLE_PEAK:
        warnings.warn(f"{rec.source}: {rec.name}: peak {peak:.4g} m/s2 ({peak / 9.80665:.3g} g) "
                      f"is beyond any recorded ground motion; check the units (read as "
                      f"{rec.units}) or whether the file holds raw counts",
                      GroundshakeWarning, stacklevel=3)


# -- ObsPy formats -----------------------------------------------------------------

def _try_obspy(path: Path):
    import obspy

    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return obspy.read(str(path))
    except TypeError as e:
        if "Unknown format" in str(e):
            return None
        raise RecordError(f"{path}: not a record groundshake can read: ObsPy took it for one "
                          f"of its formats but failed ({e})") from e
    except Exception as e:  # a reader that claimed the file and then failed
        raise RecordError(f"{path}: not a record groundshake can read: ObsPy took it for one "
                          f"of its formats but failed ({type(e).__name__}: {e})") from e


def _plain(value: Any) -> Any:
    """Header values as plain str/int/float (UTCDateTime -> ISO text)."""
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        f = float(value)
        return f if math.isfinite(f) else None
    if isinstance(value, str):
        return value.strip()
    if hasattr(value, "isoformat"):
        return value.isoformat()
    return None


def _file_units_and_scale(tr) -> tuple[str | None, float, str]:
    """(units the file states or None, factor from stored values to those units, note)."""
    fmt = getattr(tr.stats, "_format", "") or ""
    if fmt == "KNET":
        # obspy turns the header's "Scale Factor N(gal)/D" into calib in m/s² per count;
        # the file's own unit is the gal
        return "cm/s2", 100.0 * float(tr.stats.calib), "scale factor from the K-NET header (gal)"
    if fmt == "KINEMETRICS_EVT":
        h = tr.stats.kinemetrics_evt
        full = float(h.get("chan_fullscale", 0) or 0)
        sens = float(h.get("chan_sensitivity", 0) or 0)
        bits = int(h.get("a2dbits", 24) or 24)
        if full > 0 and sens > 0:
            # counts -> volts (full scale over 2^(bits-1)) -> g (sensitivity in V/g)
            return "g", full / 2.0 ** (bits - 1) / sens, "full scale and sensitivity from the EVT header"
        return None, 1.0, ""
    if fmt in ("SLIST", "TSPAIR"):  # ObsPy's ASCII formats carry a unit in their header
        unit = str(getattr(tr.stats.get("ascii", {}), "get", lambda k, d=None: d)("unit", "")
                   or "").strip()
        if unit:
            try:
                return canonical_units(unit), 1.0, f"{fmt} header"
            except RecordError:
                pass
    if fmt == "SAC":
        kuser0 = str(getattr(tr.stats.sac, "kuser0", "") or "").strip()
        if kuser0:
            try:
                return canonical_units(kuser0), 1.0, "SAC header kuser0"
            except RecordError:
                pass
    return None, 1.0, ""


def _records_from_stream(stream, path: Path, user_units: str | None,
                         dt: float | None) -> list[Record]:
    where = str(path)
    ids = [tr.id for tr in stream]
    if len(set(ids)) < len(ids):
        stream = stream.copy()
        stream.merge()
    if len(stream) == 0:
        raise RecordError(f"{where}: the file holds no traces")
    records = []
    names: set[str] = set()
    for index, tr in enumerate(stream):
        label = f"{where} (trace {index}, {tr.id})" if len(stream) > 1 else where
        data = tr.data
        if np.ma.isMaskedArray(data):
            raise RecordError(f"{label}: the trace has gaps; fill or split it first")
        if data.dtype.kind not in "iuf":
            raise RecordError(f"{label}: samples are {data.dtype}, not numbers")
        data = np.asarray(data, dtype=float)
        _check_samples(data, label)
        fmt = getattr(tr.stats, "_format", "") or ""
        file_units, scale, note = _file_units_and_scale(tr)
        rec_units = _resolve_units(file_units, user_units, label)
        if file_units is not None:
            data = data * scale
        step = float(tr.stats.delta)
        if fmt == "SAC":  # SAC stores delta as float32: take its shortest decimal
            step = float(str(np.float32(step)))
        if dt is not None and not math.isclose(dt, step, rel_tol=1e-6):
            raise RecordError(f"{label}: dt={dt:g} s was given but the file says {step:g} s")
        start = tr.stats.starttime
        start_text = "" if float(start.timestamp) == 0.0 else start.isoformat()
        meta: dict[str, Any] = {"format": fmt, "network": tr.stats.network,
                                "station": tr.stats.station, "location": tr.stats.location,
                                "channel": tr.stats.channel, "trace_index": index}
        if note:
            meta["units_from"] = note
        for key, value in (tr.stats.get(fmt.lower(), {}) or {}).items():
            v = _plain(value)
            if v is not None:
                meta[f"{fmt.lower()}.{key}"] = v
        name = path.stem if len(stream) == 1 else f"{path.stem}.{tr.stats.channel or index}"
        if name in names:
            name = f"{name}.{index}"
        names.add(name)
        records.append(Record(acc=_to_si(data, rec_units, where), dt=step, name=name,
                              component=tr.stats.channel, source=where, units=rec_units,
                              start_time=start_text, metadata=meta))
    return records


# -- shared checks -----------------------------------------------------------------
def _to_si(values: np.ndarray, units: str, where: str) -> np.ndarray:
    """Values in ``units`` → m/s²; an overflow is the file's fault, said in one line."""
    with np.errstate(over="ignore", invalid="ignore"):
        out = np.asarray(values, dtype=float) * UNITS[units]
    if not np.all(np.isfinite(out)):
        raise RecordError(f"{where}: values too large to be accelerations in {units} "
                          "(they overflow when converted to m/s2)")
    return out


def _resolve_units(file_units: str | None, user_units: str | None, label: str) -> str:
    if file_units is not None and user_units is not None and file_units != user_units:
        raise RecordError(f"{label}: the file states units {file_units} but {user_units} was "
                          f"given; drop the units option or fix the file")
    found = file_units or user_units
    if found is None:
        raise RecordError(f"{label}: the file does not state its units; give them "
                          f"(--units, or 'units' in the scenario): {UNIT_NAMES}")
    return found


def _check_samples(data: np.ndarray, label: str) -> None:
    if data.size < MIN_SAMPLES:
        raise RecordError(f"{label}: {data.size} samples; at least {MIN_SAMPLES} are needed")
    bad = np.flatnonzero(~np.isfinite(data))
    if bad.size:
        raise RecordError(f"{label}: sample {bad[0]} is {data[bad[0]]} (NaN or inf)")


# -- delimited text ----------------------------------------------------------------

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
        raise RecordError(f"{where}: no rows of numbers: empty, only a header, or a format "
                          f"neither ObsPy nor the delimited-text reader knows")
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
            raise RecordError(f"{where}: one column of values needs a time step: give dt "
                              f"(--dt) or a '# dt: ...' header line")
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
                        f"use --resample (read_record(..., resample=True)) to interpolate "
                        f"onto a uniform step")
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
            name = path.stem
        else:
            name = bare or f"{path.stem}.{k + 1}"
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


def _is_float(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


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

