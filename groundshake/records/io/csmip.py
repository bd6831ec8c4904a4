"""CSMIP/CDMG strong-motion volumes (California Strong Motion Instrumentation Program).

Volume 1 (uncorrected acceleration), Volume 2 (corrected acceleration, velocity and
displacement) and Volume 3 (response spectra), in the mixed-case layout of recent
files and the upper-case layout of older CDMG files. Each channel is a block: text
header lines, an integer header, a real header, then data blocks each announced by a
line such as ``12000 points of accel data equally spaced at .005 sec, in cm/sec2.
(8f10.6)``; a line starting with ``/&`` ends the channel.

:func:`read` returns the acceleration of every channel; :func:`read_csmip_v2_series`
gives a Volume 2's velocity and displacement too; :func:`read_csmip_spectra` reads a
Volume 3's published spectra.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .._record import STANDARD_GRAVITY, Record
from ._common import (check_dt, check_samples, detector, file_stem, fixed_width, FormatError,
                      free_numbers, head_lines, header_units, iso_time, orientation_metadata,
                      peak_factor, PEAK_NAMES, read_lines, resolve_units, si_record, unique_names,
                      user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "is_volume3", "read", "read_csmip_v2_series",
           "read_csmip_spectra", "CsmipSeries", "PublishedSpectrum"]

FORMAT = "CSMIP/CDMG Volume 1/2 (and Volume 3 spectra)"
EXTENSIONS = (".v1", ".v2", ".v3")

_FIRST = re.compile(r"^\s*(uncorrected accelerogram|corrected accelerogram|"
                    r"response and fourier amplitude spectra)", re.I)
_DATA = re.compile(r"^\s*(\d+)\s+(?:points of\s+(accel|veloc|displ)\w*\s+data|"
                   r"(accelerogram) points)\b", re.I)
_FORTRAN = re.compile(r"\(\s*(\d+)\s*[FEGD](\d+)\.(\d+)\s*\)", re.I)
_SPACED = re.compile(r"spaced at\s+([0-9.]+)\s*sec", re.I)
_RATE = re.compile(r"at\s+([0-9.]+)\s*(?:pts|samples)/sec", re.I)
_UNITS = re.compile(r"(?:\(units:\s*|in units of\s+|,\s*in\s+)([a-z][a-z/0-9]*)", re.I)
_CHAN = re.compile(r"^\s*chan\s+(\d+)\s*:\s*(.*?)\s*$", re.I)
_STATION = re.compile(r"station\s+no\.\s*(\d+)", re.I)
_START = re.compile(r"(start|trigger) time:\s*(\d+)/(\d+)/(\d+),\s*(\d+):(\d+):([0-9.]+)\s*"
                    r"(UTC|GMT|PST|PDT)?", re.I)
_PEAK = re.compile(r"peak\s+(acceleration|velocity|displacement)\s*=\s*([-0-9.]+)\s*"
                   r"([a-z/]+)\s+at\s+([-0-9.]+)\s*sec", re.I)
_V1MAX = re.compile(r"\bmax\s*=\s*([-0-9.]+)\s*g\s*,?\s*at\s+([-0-9.]+)\s*sec", re.I)
_HYPO = re.compile(r"hypocenter(?:\([^)]*\))?:\s*(.*?)(?:\s{2,}|$)", re.I)
_MAG = re.compile(r"\b(M[LWS])\s*[:=]\s*(.*?)\s*$", re.I)
_END = "/&"
_OFFSET = {"UTC": 0.0, "GMT": 0.0, "PST": -8.0, "PDT": -7.0}


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if the first line names a CSMIP volume and an integer header follows (never raises)."""
    lines = head_lines(head)
    if not lines or not _FIRST.match(lines[0]):
        return False
    # a CSMIP channel names its channel ("Chan  1: 360 Deg"), has an integer header of
    # 16 fields of 5 characters, and announces its data ("12000 points of accel data
    # ...", "13200 Accelerogram points ...") or, in Volume 3, its spectra
    if is_volume3(head):
        return True
    if not any(_CHAN.match(ln) for ln in lines[1:30]):
        return False
    if any(_announces_data(ln) for ln in lines[1:100]):
        return True
    # a file cut short before its first data block still names itself by its first line
    # and channel line; a longer one without the announcement is another format
    return len(head) < 8192 and len(lines) < 46


def is_volume3(head: bytes) -> bool:
    """True if ``head`` (a file's first bytes) starts like a CSMIP Volume 3 file (never raises)."""
    try:
        first = head_lines(head, 1)
    except Exception:  # noqa: BLE001 - a detector never raises
        return False
    return bool(first) and first[0].lower().lstrip().startswith(
        "response and fourier amplitude spectra")


_INT_FIELD = re.compile(r"\s*-?\d+")


def _announces_data(line: str) -> bool:
    m = _DATA.match(line)
    return bool(m) and "instrument-" not in line.lower()


def _is_int_line(line: str) -> bool:
    """A line of the integer header: 16 fields of 5 characters (``16I5``), all integers."""
    body = line.rstrip()
    if not 75 <= len(body) <= 80:
        return False
    return all(_INT_FIELD.fullmatch(body[k:k + 5]) for k in range(0, len(body), 5))


@dataclass
class _Block:
    kind: str                 # "accel", "veloc", "displ"
    values: np.ndarray        # as written
    dt: float                 # [s]
    unit_text: str
    line: int                 # 1-based line of the announcing line


@dataclass
class _Channel:
    volume: int               # 1, 2 or 3
    first_line: int
    header: list[str]         # text header lines (up to the integer header)
    blocks: list[_Block]
    lines: list[str]          # every line of the channel
    reals: list[float]        # the real header, as written (may be empty)


def _split_channels(lines: list[str], path: Path) -> list[_Channel]:
    out: list[_Channel] = []
    start = 0
    for i, line in enumerate(lines + [_END]):
        if line.startswith(_END) or i == len(lines):
            chunk = lines[start:i]
            if any(s.strip(" \t\x1a") for s in chunk):  # \x1a: old DOS end-of-file marks
                out.append(_channel(chunk, start + 1, path))
            start = i + 1
    if not out:
        raise FormatError(FORMAT, path, "no channel found")
    return out


def _channel(chunk: list[str], first: int, path: Path) -> _Channel:
    m = _FIRST.match(chunk[0]) if chunk else None
    if not m:
        raise FormatError(FORMAT, path, "a channel must start with 'Corrected accelerogram', "
                          "'Uncorrected Accelerogram' or 'Response and Fourier ...'", first,
                          chunk[0] if chunk else "", part="line")
    word = m.group(1).lower()
    volume = 1 if word.startswith("uncorrected") else 2 if word.startswith("corrected") else 3
    # the text header ends where the first line of 16 integers begins
    end = next((k for k, ln in enumerate(chunk) if _is_int_line(ln)), len(chunk))
    blocks = [] if volume == 3 else _blocks(chunk, first, path)
    return _Channel(volume, first, chunk[:end], blocks, chunk, _reals(chunk, end))


def _reals(chunk: list[str], end: int) -> list[float]:
    """The real header: 10-character fields after the 100 integers (7 lines of 16)."""
    out: list[float] = []
    for line in chunk[end + 7:end + 7 + 13]:
        if _DATA.match(line) or re.match(r"\s*[a-z]", line, re.I):
            break
        for k in range(0, len(line.rstrip()), 10):
            field = line[k:k + 10].strip()
            if field:
                try:
                    out.append(float(field))
                except ValueError:
                    return []
    return out


def _blocks(chunk: list[str], first: int, path: Path) -> list[_Block]:
    out = []
    k = 0
    while k < len(chunk):
        line = chunk[k]
        m = _DATA.match(line)
        if not m or (m.group(3) is None and m.group(2) is None):
            k += 1
            continue
        if "instrument-" in line.lower() or "and displ" in line.lower().split("data")[0]:
            k += 1  # the summary line "... points of instrument- and baseline-corrected ..."
            continue
        n = int(m.group(1))
        kind = (m.group(2) or "accel").lower()
        number = first + k
        step = None
        ms = _SPACED.search(line)
        if ms:
            step = float(ms.group(1))
        else:
            mr = _RATE.search(line)
            if mr and float(mr.group(1)) > 0:
                step = 1.0 / float(mr.group(1))
        if not step or not step > 0:
            raise FormatError(FORMAT, path, "no time step ('spaced at ... sec' or "
                              "'at ... pts/sec')", number, line)
        mu = _UNITS.search(line)
        unit_text = mu.group(1).rstrip(".") if mu else ""
        mf = _FORTRAN.search(line)
        body = chunk[k + 1:]
        if mf:
            per, width = int(mf.group(1)), int(mf.group(2))
            values = fixed_width(body, n, width, per, fmt=FORMAT, path=path, first_line=number + 1)
            used = -(-n // per)
        else:
            per = len(body[0].split()) if body else 1
            used = -(-n // max(per, 1))
            values = free_numbers(body[:used], n, fmt=FORMAT, path=path, first_line=number + 1)
        out.append(_Block(kind, values, step, unit_text, number))
        k += 1 + used
    return out


def _text(ch: _Channel) -> str:
    return "\n".join(ch.header)


def _meta(ch: _Channel, path: Path) -> tuple[dict, str, str]:
    """(metadata, component, start time) of a channel from its text header."""
    meta: dict = {"format": FORMAT, "volume": ch.volume}
    component = ""
    for line in ch.header[1:]:
        m = _CHAN.match(line)
        if m:
            meta["channel_number"] = int(m.group(1))
            orient = m.group(2)
            deg = re.search(r"(\d+(?:\.\d*)?)\s*deg", orient, re.I)
            component = deg.group(1) if deg else orient.split()[0] if orient.split() else ""
            meta["channel"] = component
            meta["channel_description"] = orient
            meta.update(orientation_metadata(component))
            break
    text = _text(ch)
    m = _STATION.search(text)
    if m:
        meta["station"] = m.group(1)
        for k, line in enumerate(ch.header):
            if _STATION.search(line) and k + 1 < len(ch.header):
                name = ch.header[k + 1][:40].strip()
                if name and not _CHAN.match(ch.header[k + 1]):
                    meta["station_name"] = name
                break
    start = ""
    m = _START.search(text)
    if m:
        mo, d, y = int(m.group(2)), int(m.group(3)), int(m.group(4))
        y += 2000 if y < 50 else 1900 if y < 100 else 0
        zone = (m.group(8) or "").upper()
        try:
            start = iso_time(y, mo, d, int(m.group(5)), int(m.group(6)), float(m.group(7)),
                             _OFFSET.get(zone))
        except ValueError:
            start = ""
        meta["start_time_kind"] = m.group(1).lower()
    for line in ch.header:
        mh = _HYPO.search(line)
        if mh and "event_hypocenter" not in meta:
            meta["event_hypocenter"] = mh.group(1).strip()
        mm = _MAG.search(line)
        if mm and "event_magnitude" not in meta:
            meta["event_magnitude"] = f"{mm.group(1)} {mm.group(2)}".strip()
    if ch.volume == 2 and len(ch.header) > 2 and not re.search(
            r"processing|data|^\s*record of", ch.header[2], re.I):
        meta["event_name"] = ch.header[2].strip()
    for m in _PEAK.finditer(text):
        what = PEAK_NAMES[m.group(1).lower()]
        value, unit = abs(float(m.group(2))), m.group(3).lower()
        factor = peak_factor(unit, what)
        if factor is not None:
            meta[f"header_{what}"] = value * factor
            meta[f"header_{what}_time"] = float(m.group(4))
    r = ch.reals
    if ch.volume == 2 and "header_pga" in meta and len(r) >= 70:
        # the real header repeats the peaks with more digits: values 65-70 (1-based) are
        # time and value of the peak acceleration, velocity, displacement, in the units
        # of the text lines
        for what, k in (("pga", 64), ("pgv", 66), ("pgd", 68)):
            if f"header_{what}" in meta and r[k + 1] != -999 and math.isclose(
                    abs(r[k + 1]) * _peak_factor(text, what), meta[f"header_{what}"],
                    rel_tol=2e-3, abs_tol=1e-12):
                meta[f"header_{what}"] = abs(r[k + 1]) * _peak_factor(text, what)
    if ch.volume == 1:
        m = _V1MAX.search(text)
        if m:
            meta["header_pga"] = abs(float(m.group(1))) * STANDARD_GRAVITY
            meta["header_pga_time"] = float(m.group(2))
            # real header values 7-8 (1-based): the same maximum [g] with more digits
            if len(r) >= 8 and r[6] != -999 and math.isclose(abs(r[6]), abs(float(m.group(1))),
                                                             rel_tol=0.01, abs_tol=6e-4):
                meta["header_pga"] = abs(r[6]) * STANDARD_GRAVITY
    return meta, component, start


def _peak_factor(text: str, what: str) -> float:
    for m in _PEAK.finditer(text):
        if PEAK_NAMES[m.group(1).lower()] == what:
            return peak_factor(m.group(3), what) or 1.0
    return 1.0


def read(path: Path, *, units: str | None = None, dt: float | None = None) -> list[Record]:
    """Read the acceleration of every channel of a CSMIP/CDMG Volume 1 or 2 file
    (arguments: :mod:`groundshake.records.io`).

    ``units`` and ``dt`` [s] are checked against the data block's units and step.

    Returns
    -------
    list of Record
        One per channel, ``acc`` in m/s², shape (n,); ``component`` the orientation as
        written (``"360"``, ``"Up"``, ``"90"``); metadata ``station`` (station number),
        ``station_name``, ``channel``, ``azimuth_deg``/``orientation``, ``event_*``,
        and the header's peaks ``header_pga`` [m/s²], ``header_pgv`` [m/s],
        ``header_pgd`` [m] with their times [s].

    Raises
    ------
    RecordError
        A Volume 3 file (spectra: use :func:`read_csmip_spectra`), a channel without an
        acceleration block, a data block that does not parse (the message names the line).
    """
    path = Path(path)
    where = str(path)
    lines = read_lines(path, encoding="latin-1")
    channels = _split_channels(lines, path)
    if all(ch.volume == 3 for ch in channels):
        raise FormatError(FORMAT, path, "a Volume 3 file holds response spectra, not an "
                          "acceleration record; read it with read_csmip_spectra", 1, lines[0])
    given = user_units(units, where)
    records = []
    for ch in channels:
        acc = next((b for b in ch.blocks if b.kind == "accel"), None)
        if acc is None:
            raise FormatError(FORMAT, path, "the channel has no acceleration data block",
                              ch.first_line, ch.lines[0])
        label = f"{where} (channel starting at line {ch.first_line})"
        file_units = header_units(acc.unit_text, fmt=FORMAT, path=path, line=acc.line,
                                  line_text=ch.lines[acc.line - ch.first_line])
        rec_units = resolve_units(file_units, given, label)
        check_dt(dt, acc.dt, label, "its data block")
        check_samples(acc.values, label)
        meta, component, start = _meta(ch, path)
        records.append(si_record(acc.values, units=rec_units, dt=acc.dt,
                                 station=meta.get("station", file_stem(path)), component=component,
                                 source=where, label=label, start_time=start, metadata=meta))
    return unique_names(records)


@dataclass(frozen=True)
class CsmipSeries:
    """A Volume 2 channel's corrected series, in SI.

    Attributes
    ----------
    component : str
        Orientation as written (``"360"``, ``"Up"``).
    dt : float
        Time step [s].
    acc, vel, disp : ndarray, shape (n,)
        Acceleration [m/s²], velocity [m/s], displacement [m] as published
        (``vel``/``disp`` empty if the file has none).
    metadata : dict
        As in :func:`read`.
    """

    component: str
    dt: float
    acc: np.ndarray
    vel: np.ndarray
    disp: np.ndarray
    metadata: dict


def read_csmip_v2_series(path) -> list[CsmipSeries]:
    """The published acceleration, velocity and displacement of each Volume 2 channel.

    Parameters
    ----------
    path : str or path-like
        A CSMIP/CDMG Volume 2 file.

    Returns
    -------
    list of CsmipSeries
        One per channel, arrays in m/s², m/s, m.

    Raises
    ------
    RecordError
        Not a Volume 2 file, or a block that does not parse.
    """
    path = Path(path)
    lines = read_lines(path, encoding="latin-1")
    out = []
    for ch in _split_channels(lines, path):
        if ch.volume != 2:
            raise FormatError(FORMAT, path, "not a Volume 2 (corrected) channel", ch.first_line,
                              ch.lines[0])
        meta, component, _ = _meta(ch, path)
        series = {}
        for b in ch.blocks:
            if b.kind == "accel":
                series["acc"] = b.values * _si_factor(b.unit_text, "pga", path, b.line)
            else:
                series[{"veloc": "vel", "displ": "disp"}[b.kind]] = \
                    b.values * _si_factor(b.unit_text, b.kind, path, b.line)
        if "acc" not in series:
            raise FormatError(FORMAT, path, "the channel has no acceleration data block",
                              ch.first_line, ch.lines[0])
        dt = next(b.dt for b in ch.blocks if b.kind == "accel")
        out.append(CsmipSeries(component, dt, series["acc"], series.get("vel", np.empty(0)),
                               series.get("disp", np.empty(0)), meta))
    return out


def _si_factor(unit_text: str, what: str, path: Path, line: int) -> float:
    """Factor from a data block's units to SI (m/s², m/s or m)."""
    f = peak_factor(unit_text, {"pga": "pga", "veloc": "pgv", "displ": "pgd"}[what])
    if f is None:
        raise FormatError(FORMAT, path, f"unknown units {unit_text!r}", line)
    return f


@dataclass(frozen=True)
class PublishedSpectrum:
    """Response spectra as published in a CSMIP Volume 3 file, in SI.

    Attributes
    ----------
    component : str
        Orientation as written.
    periods : ndarray, shape (n_periods,)
        Oscillator periods [s].
    damping : ndarray, shape (n_damping,)
        Damping ratios (0.05 for 5 %).
    sd, sv, sa, psv : ndarray, shape (n_damping, n_periods)
        Relative displacement [m], relative velocity [m/s], absolute acceleration
        [m/s²] and pseudo-velocity [m/s], as published (3 significant digits).
    metadata : dict
        Station, channel and event fields as in :func:`read`.
    """

    component: str
    periods: np.ndarray
    damping: np.ndarray
    sd: np.ndarray
    sv: np.ndarray
    sa: np.ndarray
    psv: np.ndarray
    metadata: dict

    @property
    def psa(self) -> np.ndarray:
        """Pseudo-acceleration (2π/T)·PSV [m/s²], shape (n_damping, n_periods)."""
        return self.psv * (2.0 * np.pi / self.periods)


_SPEC_LINE = re.compile(r"^\s*damping\s*=\s*([0-9]*\.?[0-9]+)\s*\.?\s*data of\s*(.*?)\s*:?\s*$", re.I)
_NPER = re.compile(r"\((\d+)\s+periods", re.I)


def read_csmip_spectra(path) -> list[PublishedSpectrum]:
    """Read the response spectra of a CSMIP Volume 3 file.

    Parameters
    ----------
    path : str or path-like
        A Volume 3 file: per channel, the periods, then for each damping ratio the
        arrays Sd, Sv, Sa, PSSV (and times of their peaks), ``8E10.3`` with 100 values
        each; units inches and seconds, Sa in g (stated in the header).

    Returns
    -------
    list of PublishedSpectrum
        One per channel, in SI.

    Raises
    ------
    RecordError
        Not a Volume 3 file, or a block that does not parse (names the line).
    """
    path = Path(path)
    where = str(path)
    lines = read_lines(path, encoding="latin-1")
    out = []
    for ch in _split_channels(lines, path):
        if ch.volume != 3:
            raise FormatError(FORMAT, path, "not a Volume 3 (spectra) channel", ch.first_line,
                              ch.lines[0])
        m = _NPER.search(ch.lines[0])
        if not m:
            raise FormatError(FORMAT, path, "no '(N periods' in the first line", ch.first_line,
                              ch.lines[0])
        n = int(m.group(1))
        text = "\n".join(ch.lines).lower()
        inches = "inches" in text and "fraction of g" in text
        if not inches:
            raise FormatError(FORMAT, path, "the spectra's units are not stated as inches and "
                              "seconds, Sa in fraction of g", ch.first_line, ch.lines[0])
        four = next((k for k, ln in enumerate(ch.lines) if ln.lower().startswith("fourier")), None)
        if four is None:
            raise FormatError(FORMAT, path, "no 'Fourier amplitude spectra' line", ch.first_line)
        n_lines = -(-100 // 8)  # periods: 100 values, 8 a line, just before the Fourier block
        periods = fixed_width(ch.lines[four - n_lines:four], n, 10, 8, fmt=FORMAT, path=path,
                              first_line=ch.first_line + four - n_lines)
        if np.any(periods <= 0) or np.any(np.diff(periods) <= 0):
            raise FormatError(FORMAT, path, "periods must be > 0 and increasing",
                              ch.first_line + four - n_lines)
        damp, sd, sv, sa, psv = [], [], [], [], []
        for k, line in enumerate(ch.lines):
            ms = _SPEC_LINE.match(line)
            if not ms:
                continue
            # 100 values an array take 12.5 lines; each array starts on a new line (13 lines)
            per = [fixed_width(ch.lines[k + 1 + 13 * j:], n, 10, 8, fmt=FORMAT, path=path,
                              first_line=ch.first_line + k + 1 + 13 * j) for j in range(4)]
            damp.append(float(ms.group(1)))
            sd.append(per[0] * 0.0254)
            sv.append(per[1] * 0.0254)
            sa.append(per[2] * STANDARD_GRAVITY)
            psv.append(per[3] * 0.0254)
        if not damp:
            raise FormatError(FORMAT, path, "no 'Damping = ... Data of Sd,Sv,Sa,...' line",
                              ch.first_line)
        meta, component, _ = _meta(ch, path)
        meta["source"] = where
        out.append(PublishedSpectrum(component, periods, np.array(damp), np.array(sd),
                                     np.array(sv), np.array(sa), np.array(psv), meta))
    return out
