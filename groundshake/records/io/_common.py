"""Checks, conversions and parsing pieces shared by the readers of ``groundshake.records.io``.

Every reader uses these for what all formats have in common: a detector that never
raises (:func:`detector`), the file's content (:func:`read_bytes`, :func:`read_lines`,
:func:`read_head`, :func:`head_lines`; a gzip-compressed file decompressed),
numbers in fixed or free layout (:func:`fixed_width`, :func:`free_numbers`), a time
column's step (:func:`even_step`), units (:func:`header_units`, :func:`to_si`,
:func:`resolve_units`), the checks of ``dt`` and samples, and the Record in m/s²
(:func:`si_record`).
"""
from __future__ import annotations

import contextlib
import contextvars
import functools
import gzip
import math
import os
import zlib
from pathlib import Path
from typing import Any, Callable, Iterator

import numpy as np

from ..._errors import RecordError
from .._record import Record
from .._units import UNIT_NAMES, UNITS, canonical_units

__all__ = ["MIN_SAMPLES", "TIME_TOLERANCE", "PEAK_NAMES", "LENGTH_TO_M", "to_si",
           "resolve_units", "check_samples", "check_dt", "FormatError", "user_units",
           "looks_binary", "fixed_width", "free_numbers", "iso_time", "azimuth_from_code",
           "orientation_metadata", "unique_names", "detector", "read_lines", "head_lines",
           "is_number", "header_units", "peak_factor", "even_step", "si_record", "GZIP_MAGIC",
           "is_gzip", "unpacked", "read_bytes", "read_head", "file_stem", "inner_name"]

#: Fewest samples a record may have.
MIN_SAMPLES = 16

#: Largest relative spread of the steps of a time column read as even (:func:`even_step`).
TIME_TOLERANCE = 0.01

#: The words headers use for their peaks → the short names of the metadata keys
#: ``header_pga``, ``header_pgv``, ``header_pgd``.
PEAK_NAMES = {"acceleration": "pga", "velocity": "pgv", "displacement": "pgd"}

#: Length units of headers' velocity and displacement peaks (lower case) → m.
LENGTH_TO_M = {"mm": 0.001, "cm": 0.01, "m": 1.0, "in": 0.0254, "ft": 0.3048}


def to_si(values: np.ndarray, units: str, where: str) -> np.ndarray:
    """Values in ``units`` → m/s², shape kept; an overflow is the file's fault, said in one line."""
    with np.errstate(over="ignore", invalid="ignore"):
        out = np.asarray(values, dtype=float) * UNITS[units]
    if not np.all(np.isfinite(out)):
        raise RecordError(f"{where}: values too large to be accelerations in {units} "
                          "(they overflow when converted to m/s2)")
    return out


def resolve_units(file_units: str | None, user_units: str | None, label: str) -> str:
    """The units of a trace: the file's, checked against the user's; one of them is needed."""
    if file_units is not None and user_units is not None and file_units != user_units:
        raise RecordError(f"{label}: the file states units {file_units} but {user_units} was "
                          f"given; drop the units option or fix the file", param="units")
    found = file_units or user_units
    if found is None:
        raise RecordError(f"{label}: the file does not state its units; give them: "
                          f"{UNIT_NAMES}", param="units")
    return found


def user_units(units: str | None, where: str) -> str | None:
    """The canonical name of a units option (None stays None)."""
    return None if units is None else canonical_units(units, where=str(where), param="units")


def check_samples(data: np.ndarray, label: str) -> None:
    """Refuse fewer than :data:`MIN_SAMPLES` samples or a NaN/inf among them."""
    if data.size < MIN_SAMPLES:
        raise RecordError(f"{label}: {data.size} samples; at least {MIN_SAMPLES} are needed")
    bad = np.flatnonzero(~np.isfinite(data))
    if bad.size:
        raise RecordError(f"{label}: sample {bad[0]} is {data[bad[0]]} (NaN or inf)")


def check_dt(given: float | None, header: float, label: str, what: str = "the header", *,
             fmt: str | None = None, path: Path | str | None = None) -> float:
    """The file's own time step [s], checked against a ``dt`` option.

    Parameters
    ----------
    given : float or None
        The ``dt`` option [s] (None: not given).
    header : float
        The step the file states [s].
    label : str
        Where, for the message (file, or file and channel).
    what : str
        What states the step, e.g. ``"its DT= header"``.
    fmt, path : str, optional
        With both given, a step that is not finite and > 0 is refused as a
        :class:`FormatError` of that format (callers that check it themselves omit them).

    Returns
    -------
    float
        ``header`` [s].

    Raises
    ------
    RecordError
        ``given`` differs from ``header`` by more than 1e-6 relative.
    """
    if fmt is not None and path is not None and not (math.isfinite(header) and header > 0):
        raise FormatError(fmt, path, f"time step {header!r} s in the header must be > 0")
    if given is not None and not math.isclose(float(given), header, rel_tol=1e-6):
        raise RecordError(f"{label}: dt={float(given):g} s was given but {what} says "
                          f"{header:g} s; drop the dt option or fix the file")
    return float(header)


class FormatError(RecordError):
    """A file that looks like a known format but does not parse.

    The message reads ``"<fmt> file <path>: <what> (<part> <line>: '<text>')"``;
    ``line`` is 1-based, ``part`` e.g. ``"header line"`` or ``"line"``. The fields
    are kept on the error (``fmt``, ``path``, ``what``, ``line``, ``text``, ``part``)
    and survive pickling (a worker process of a suite sends errors back).
    """

    def __init__(self, fmt: str, path: Path | str, what: str, line: int | None = None,
                 text: str | None = None, *, part: str = "line", param: str | None = None):
        self.fmt, self.path, self.what = fmt, str(path), what
        self.line, self.text, self.part = line, text, part
        where = f" ({part} {line}: {text.strip()[:60]!r})" if line is not None and text is not None \
            else (f" ({part} {line})" if line is not None else "")
        super().__init__(f"{fmt} file {path}: {what}{where}", param=param)

    def __reduce__(self):
        return (_rebuild_format_error, (self.fmt, self.path, self.what, self.line, self.text,
                                        self.part, self.param, self.where))


def _rebuild_format_error(fmt, path, what, line, text, part, param=None, where=None):
    err = FormatError(fmt, path, what, line, text, part=part, param=param)
    err.where = where
    return err


def looks_binary(head: bytes) -> bool:
    """True if ``head`` holds NUL bytes or more than 1 % other control characters."""
    controls = sum(head.count(bytes([c])) for c in range(32) if c not in (9, 10, 12, 13))
    return b"\x00" in head or controls > 0.01 * max(len(head), 1)


def fixed_width(lines, count: int, width: int, per_line: int, *, fmt: str,
                path, first_line: int) -> np.ndarray:
    """Numbers written in a Fortran fixed-width format (``per_line`` fields of ``width``).

    Each line is cut into ``per_line`` fields of ``width`` characters (anything past
    them, such as card sequence numbers, is ignored), so values that touch
    (``-123.456-789.012``) are read. Fortran ``D`` exponents are accepted. A block
    whose fields are not aligned but whose values are separated by blanks is read by
    splitting on blanks instead.

    Parameters
    ----------
    lines : sequence of str
        The data lines, starting with the first one.
    count : int
        Number of values to read.
    width, per_line : int
        Field width [characters] and fields a line, as in ``(8F10.6)``.
    fmt, path, first_line
        Format name, file and 1-based number of ``lines[0]`` in the file, for messages.

    Returns
    -------
    ndarray, shape (count,)
        The values.

    Raises
    ------
    FormatError
        Too few values, or a field that is not a number (the message names the line).
    """
    n_lines = -(-count // per_line)
    block_lines = [ln.replace("D", "E").replace("d", "e") for ln in lines[:n_lines]]
    if len(block_lines) < n_lines:
        held = len(" ".join(block_lines).split())
        raise FormatError(fmt, path, f"the data block holds {held} values; the header "
                          f"announces {count}", first_line)
    span = width * per_line
    block = "".join(ln[:span].ljust(span) for ln in block_lines)
    fields = np.frombuffer(block.encode("latin-1", "replace"), dtype=f"S{width}")[:count]
    try:
        return fields.astype(float)
    except ValueError:
        pass
    try:  # not aligned in columns but separated by blanks
        loose = np.array(" ".join(block_lines).split(), dtype=float)
    except ValueError:
        loose = None
    if loose is not None and loose.size >= count:
        return loose[:count]
    for i, f in enumerate(fields):  # only on failure: find the field at fault
        try:
            float(f)
        except ValueError:
            k = i // per_line
            raise FormatError(fmt, path, f"value {i + 1} of {count} "
                              f"({f.decode('latin-1').strip()!r}) is not a number",
                              first_line + k, lines[k]) from None
    held = 0 if loose is None else loose.size
    raise FormatError(fmt, path, f"the data block holds {held} values; the header "
                      f"announces {count}", first_line)


def free_numbers(lines: list[str], count: int, *, fmt: str, path, first_line: int) -> np.ndarray:
    """``count`` numbers separated by blanks, from the start of ``lines``.

    Returns
    -------
    ndarray, shape (count,)

    Raises
    ------
    RecordError
        Fewer numbers than ``count`` or a word that is not a number (names the line).
    """
    tokens = " ".join(lines).split()
    if len(tokens) < count:
        raise FormatError(fmt, path, f"{count} values were announced but the file holds "
                          f"{len(tokens)}", first_line + len(lines) - 1)
    try:
        return np.array(tokens[:count], dtype=float)
    except ValueError:
        seen = 0
        for k, ln in enumerate(lines):
            for tok in ln.split():
                try:
                    float(tok)
                except ValueError:
                    raise FormatError(fmt, path, f"{tok!r} is not a number", first_line + k,
                                      ln) from None
                seen += 1
        raise


def iso_time(year: int, month: int, day: int, hour: int = 0, minute: int = 0,
             second: float = 0.0, offset_hours: float | None = 0.0) -> str:
    """ISO 8601 text of a date and time; ``offset_hours`` from UTC (None: local, unknown)."""
    sec = f"{second:06.3f}".rstrip("0").rstrip(".") if second % 1 else f"{int(second):02d}"
    if len(sec.split(".")[0]) < 2:
        sec = "0" + sec
    text = f"{year:04d}-{month:02d}-{day:02d}T{hour:02d}:{minute:02d}:{sec}"
    if offset_hours is None:
        return text
    if offset_hours == 0:
        return text + "Z"
    sign = "+" if offset_hours > 0 else "-"
    h = abs(offset_hours)
    return f"{text}{sign}{int(h):02d}:{int(round((h % 1) * 60)):02d}"


def azimuth_from_code(code: str) -> tuple[float | None, str | None]:
    """(azimuth_deg from north or None, "horizontal"/"vertical"/None) of a component code.

    Understands degrees ("360", "90 Deg"), compass bearings ("N28W", "S62W", "N", "E"),
    vertical words ("UP", "Up", "DOWN", "V", "Z") and SEED channel codes ("HNE", "HNZ");
    one rule for every reader: :func:`groundshake.records._components.describe`.
    """
    from .._components import describe

    kind, az = describe(code)
    return az, (None if kind == "unknown" else kind)


def orientation_metadata(code: str) -> dict:
    """Metadata keys ``azimuth_deg`` and ``orientation`` for a component code (absent if unknown)."""
    az, kind = azimuth_from_code(code)
    out: dict = {}
    if kind is not None:
        out["orientation"] = kind
    if az is not None:
        out["azimuth_deg"] = az
    return out


def unique_names(records: list) -> list:
    """Records whose ``name`` repeats get ``.2``, ``.3`` ... appended (first kept)."""
    seen: dict[str, int] = {}
    out = []
    for rec in records:
        k = seen.get(rec.name, 0) + 1
        seen[rec.name] = k
        out.append(rec if k == 1 else rec.replace(name=f"{rec.name}.{k}"))
    return out


def detector(check: Callable[[Path, bytes], Any]) -> Callable[[Path, bytes], bool]:
    """A reader's ``is_format(path, head)`` that never raises: any exception reads as False.

    Parameters
    ----------
    check : callable (path, head) -> bool
        The format's test of ``head``, the file's first bytes
        (:data:`groundshake.records.io.HEAD_BYTES`).

    Returns
    -------
    callable (path, head) -> bool
        ``bool(check(path, head))``, False where ``check`` raises.
    """
    @functools.wraps(check)
    def is_format(path: Path, head: bytes) -> bool:
        try:
            return bool(check(path, head))
        except Exception:  # noqa: BLE001 - a detector never raises
            return False

    return is_format


#: The first two bytes of a gzip stream (RFC 1952).
GZIP_MAGIC = b"\x1f\x8b"

# content of the gzip-compressed files being read, by absolute path (see unpacked)
_UNPACKED: contextvars.ContextVar[dict[str, bytes]] = contextvars.ContextVar("unpacked",
                                                                            default={})


def is_gzip(path) -> bool:
    """True if the file starts like a gzip stream (False also if it cannot be opened)."""
    try:
        with open(path, "rb") as fh:
            return fh.read(2) == GZIP_MAGIC
    except OSError:
        return False


def _gunzip(raw: bytes, path) -> bytes:
    try:
        return gzip.decompress(raw)
    except (OSError, EOFError, zlib.error) as e:
        raise RecordError(f"{path}: gzip-compressed, but it does not decompress ({e})") from None


@contextlib.contextmanager
def unpacked(path) -> Iterator[None]:
    """Within the block, a gzip-compressed ``path`` is read decompressed once, from memory.

    :func:`read_bytes`, :func:`read_lines` and :func:`read_head` of ``path`` give the
    decompressed content; a file that is not gzip-compressed is read as it is.

    Raises
    ------
    RecordError
        A gzip file that does not decompress.
    """
    key = os.path.abspath(path)
    if key in _UNPACKED.get() or not is_gzip(path):
        yield
        return
    content = _gunzip(Path(path).read_bytes(), path)
    token = _UNPACKED.set({**_UNPACKED.get(), key: content})
    try:
        yield
    finally:
        _UNPACKED.reset(token)


def read_bytes(path) -> bytes:
    """The file's content; a gzip-compressed file's decompressed.

    Raises
    ------
    OSError
        The file cannot be read.
    RecordError
        A gzip file that does not decompress.
    """
    content = _UNPACKED.get().get(os.path.abspath(path))
    if content is not None:
        return content
    raw = Path(path).read_bytes()
    return _gunzip(raw, path) if raw.startswith(GZIP_MAGIC) else raw


def read_head(path, size: int) -> bytes:
    """The first ``size`` bytes of the file's content, decompressed if gzip.

    Raises
    ------
    OSError
        The file cannot be opened.
    RecordError
        A gzip file whose beginning does not decompress.
    """
    content = _UNPACKED.get().get(os.path.abspath(path))
    if content is not None:
        return content[:size]
    with open(path, "rb") as fh:
        head = fh.read(size)
    if not head.startswith(GZIP_MAGIC):
        return head
    try:
        with gzip.open(path, "rb") as fh:
            return fh.read(size)
    except (OSError, EOFError, zlib.error) as e:
        raise RecordError(f"{path}: gzip-compressed, but it does not decompress ({e})") from None


def inner_name(path) -> str:
    """The file's name without a trailing ``.gz`` (``a.mseed.gz`` → ``a.mseed``)."""
    name = Path(path).name
    return name[:-3] if name.lower().endswith(".gz") else name


def file_stem(path) -> str:
    """The file's name without its extension, and without ``.gz`` before that."""
    return Path(inner_name(path)).stem


def read_lines(path, *, encoding: str | None = None, fallback: str = "latin-1") -> list[str]:
    """The file's lines, line ends removed.

    Parameters
    ----------
    path : str or path-like
        The file.
    encoding : str, optional
        The format's encoding (e.g. ``"latin-1"``). Without it: UTF-8 (a byte-order
        mark dropped), or ``fallback`` where the file is not UTF-8.
    fallback : str
        The encoding tried second, undecodable bytes replaced.

    Returns
    -------
    list of str
    """
    raw = read_bytes(path)
    if encoding is not None:
        return raw.decode(encoding).splitlines()
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = raw.decode(fallback, errors="replace")
    return text.splitlines()


def head_lines(head: bytes, n: int | None = None) -> list[str]:
    """The first ``n`` lines (all if None) of ``head``, a file's first bytes, as latin-1 text."""
    return head.decode("latin-1").splitlines()[:n]


def is_number(text: str) -> bool:
    """True if ``float(text)`` reads ``text``."""
    try:
        float(text)
    except ValueError:
        return False
    return True


def header_units(text: str, *, fmt: str, path, line: int | None = None,
                 line_text: str | None = None, part: str = "line", name: str = "units") -> str:
    """The canonical name of units of acceleration a header states (``"g"``, ``"cm/s2"`` ...).

    Parameters
    ----------
    text : str
        The units as written.
    fmt, path : str
        Format name and file, for the message.
    line, line_text, part
        Where the units stand (1-based line, its text, ``"line"``/``"header line"``).
    name : str
        What the message calls them (``"units"``, or the header key such as ``"UNITS"``).

    Raises
    ------
    FormatError
        ``text`` names no units of acceleration.
    """
    try:
        return canonical_units(text)
    except RecordError:
        raise FormatError(fmt, path, f"{name} {text!r} are not units of acceleration", line,
                          line_text, part=part) from None


def peak_factor(unit: str, what: str) -> float | None:
    """Factor from a header peak's unit to SI, None for a unit not known.

    Parameters
    ----------
    unit : str
        As written (``"cm/sec/sec"``, ``"mm/s/s"``, ``"cm/sec"``, ``"in"`` ...).
    what : str
        ``"pga"`` (the factor to m/s²), ``"pgv"`` (to m/s) or ``"pgd"`` (to m).
    """
    unit = unit.lower().strip(".")
    if what == "pga":
        try:
            return UNITS[canonical_units(unit)]
        except RecordError:
            return None
    return LENGTH_TO_M.get(unit.split("/")[0])


def even_step(time: np.ndarray, *, fmt: str, path, line_of: Callable[[int], int],
              prefix: str = "", tolerance: float = TIME_TOLERANCE) -> float:
    """The mean step [s] of a time column whose steps are even to ``tolerance``.

    Parameters
    ----------
    time : ndarray, shape (n,)
        Times [s] as the file writes them.
    fmt, path : str
        Format name and file, for messages.
    line_of : callable int -> int
        The 1-based line of the file that holds sample ``k``.
    prefix : str
        Put before each message (e.g. ``"channel L: "``).
    tolerance : float
        Largest relative spread of the steps about their mean.

    Returns
    -------
    float
        (time[-1] - time[0]) / (n - 1) [s].

    Raises
    ------
    FormatError
        Fewer than two times, a time that repeats or runs backwards (names its line),
        or steps that vary by more than ``tolerance``.
    """
    time = np.asarray(time, dtype=float)
    if time.size < 2:
        raise FormatError(fmt, path, f"{prefix}{time.size} time value(s); at least 2 are needed",
                          line=line_of(0))
    steps = np.diff(time)
    back = np.flatnonzero(steps <= 0)
    if back.size:
        k = int(back[0]) + 1
        raise FormatError(fmt, path, f"{prefix}time {time[k]:g} s repeats or runs backwards",
                          line=line_of(k))
    step = (time[-1] - time[0]) / (time.size - 1)
    spread = float(np.max(np.abs(steps - step)) / step)
    if spread > tolerance:
        raise FormatError(fmt, path, f"{prefix}time steps vary by {100 * spread:.1f} % (uneven "
                          "sampling is not read)", line=line_of(0))
    return step


def si_record(values: np.ndarray, *, units: str, dt: float, station: str, component: str,
              source: str, label: str, metadata: dict, start_time: str = "") -> Record:
    """The :class:`Record` of one channel, ``acc`` in m/s², named ``"<station> <component>"``.

    Parameters
    ----------
    values : ndarray, shape (n,)
        Samples in ``units`` (checked by :func:`check_samples` before).
    units : str
        Canonical units of ``values`` (kept as the record's ``units``).
    dt : float
        Time step [s].
    station, component : str
        Station code and component as written.
    source : str
        The file.
    label : str
        Where, for the message of an overflow.
    metadata : dict
        The record's metadata (kept as given).
    start_time : str
        ISO 8601 time of the first sample ("" if unknown).
    """
    return Record(acc=to_si(values, units, label), dt=dt, name=f"{station} {component}".strip(),
                  component=component, source=source, units=units, start_time=start_time,
                  metadata=metadata)
