"""Writing records: MiniSEED and SAC through ObsPy, and CSV. Always in m/s²."""
from __future__ import annotations

import re
from pathlib import Path
from typing import Iterable

import numpy as np

from .._atomic import atomic_path, atomic_write_text
from .._errors import InputError
from ._components import Orientation, describe
from ._record import Record

__all__ = ["write_record", "write_records", "output_paths", "WRITE_FORMATS", "restore_written_pad"]

#: SAC header ``kuser1`` of a file whose ``b`` < 0 is a leading pad (written here).
SAC_PAD_MARK = "padded"

#: A MiniSEED/SAC start this close before 1970-01-01 (no clock; as-read origin at the
#: epoch) is read as a leading pad [s].
_EPOCH_PAD_LIMIT = 86_400.0

#: File extension -> format written.
WRITE_FORMATS = {".mseed": "MSEED", ".miniseed": "MSEED", ".sac": "SAC", ".csv": "CSV"}


def write_record(records: Record | Iterable[Record], path) -> Path:
    """Write one or more records, in m/s², choosing the format by extension.

    Parameters
    ----------
    records : Record or iterable of Record
        What to write. SAC holds one record; CSV holds several only if they share
        ``dt`` and length (one time column, one column per record).
    path : str or path-like
        ``.mseed`` (MiniSEED, 64-bit floats), ``.sac`` (SAC, 32-bit floats as the
        format stores them; units in header ``kuser0``) or ``.csv`` (header
        comments ``# units: m/s2``, ``# dt: ...``; columns ``time [s]``,
        ``NAME [m/s2]``; ``# pad_before_s: ...`` for a corrected, padded record).
        Written atomically. Times keep the as-read axis of a padded record
        (``metadata["pad_before_s"]``): the CSV time column starts at −pad; the
        MiniSEED/SAC start time is the as-read origin minus the pad (the origin is
        the file's clock, or 1970-01-01 when the record had none); SAC also puts
        its reference time at the origin with ``b`` = −pad (``kuser1`` "padded"; the
        reference time to SAC's 1 ms, the origin's remaining microseconds in ``b``).
        The channel keeps the record's component where it fits (SAC 8 characters,
        MiniSEED 3); a component that would read back pointing elsewhere once cut
        short (``"N90E"`` → ``"N90"``) is written as ``"UP"`` (vertical) or its
        azimuth in whole degrees (``"90"``). SAC also states ``cmpaz``/``cmpinc``.

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    InputError
        Unknown extension, or records that the format cannot hold together.

    Notes
    -----
    MiniSEED has no field for units; reading a MiniSEED file back needs
    ``units="m/s2"``. SAC and CSV files written here state their units. Read back
    (:func:`restore_written_pad`), CSV, SAC and clock-less MiniSEED files give the
    pad again, so times stay on the as-read axis; a MiniSEED file of a record with
    a clock keeps the right clock time of every sample, but has no field for the
    pad: read back, it counts from its own first sample.
    """
    recs = [records] if isinstance(records, Record) else list(records)
    path = Path(path)
    fmt = WRITE_FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise InputError(f"{path}: unknown output format {path.suffix or '(no extension)'!r}; "
                         f"allowed: {', '.join(WRITE_FORMATS)}")
    if not recs:
        raise InputError(f"{path}: nothing to write")
    if fmt == "CSV":
        atomic_write_text(path, _csv_text(recs, path))
        return path
    if fmt == "SAC" and len(recs) > 1:
        raise InputError(f"{path}: a SAC file holds one record, {len(recs)} were given; "
                         f"write one file per record")
    from obspy import Stream

    stream = Stream([_trace(r, sac=(fmt == "SAC")) for r in recs])
    with atomic_path(path) as tmp:
        if fmt == "MSEED":
            stream.write(str(tmp), format="MSEED", encoding="FLOAT64")
        else:
            stream.write(str(tmp), format="SAC")
    return path


def _csv_mismatch(recs: list[Record]) -> str | None:
    """Why the records cannot share one CSV time column (length, time step or leading
    pad), or None when they can."""
    n, dt = recs[0].n, recs[0].dt
    for r in recs[1:]:
        if r.n != n or not np.isclose(r.dt, dt, rtol=1e-9, atol=0):
            return (f"records of different length or time step cannot share one CSV file "
                    f"({recs[0].name}: {n} x {dt:g} s, {r.name}: {r.n} x {r.dt:g} s)")
    pads = {_pad_before(r) for r in recs}
    if len(pads) > 1:
        return (f"records with different leading pads "
                f"({', '.join(f'{p:g} s' for p in sorted(pads))}) cannot share one "
                "time column; write one file per record")
    return None


def output_paths(records: Record | Iterable[Record], path) -> list[Path]:
    """Where :func:`write_records` puts ``records`` for the output ``path``.

    ``[path]`` when the format holds them together (MiniSEED always; CSV when they share
    length, time step and pad; SAC for one record); otherwise one file per record,
    ``STEM-CODE.EXT``, CODE the record's component (or channel, or its position) in
    letters and digits, made unique with ``-2``, ``-3`` …
    """
    recs = [records] if isinstance(records, Record) else list(records)
    path = Path(path)
    fmt = WRITE_FORMATS.get(path.suffix.lower())
    if len(recs) < 2 or fmt == "MSEED" or (fmt == "CSV" and _csv_mismatch(recs) is None):
        return [path]
    out: list[Path] = []
    for k, r in enumerate(recs):
        code = _code(r.component or r.metadata.get("channel", ""), 12) or f"{k + 1}"
        name, extra = f"{path.stem}-{code}{path.suffix}", 2
        while path.with_name(name) in out:
            name, extra = f"{path.stem}-{code}-{extra}{path.suffix}", extra + 1
        out.append(path.with_name(name))
    return out


def write_records(records: Record | Iterable[Record], path) -> list[Path]:
    """Write ``records`` in m/s² to ``path``, or one file per record where the format
    holds them only one at a time (:func:`output_paths`); return the paths written."""
    recs = [records] if isinstance(records, Record) else list(records)
    paths = output_paths(recs, path)
    if len(paths) == 1:
        return [write_record(recs, paths[0])]
    return [write_record(r, p) for r, p in zip(recs, paths)]


def _code(text: str, size: int) -> str:
    return re.sub(r"[^A-Za-z0-9]", "", str(text or ""))[:size].upper()


def _pad_before(rec: Record) -> float:
    return float(rec.metadata.get("pad_before_s", 0.0) or 0.0)


def _same_orientation(a: Orientation, b: Orientation) -> bool:
    if a.kind != b.kind:
        return False
    if a.azimuth_deg is None or b.azimuth_deg is None:
        return a.azimuth_deg is None and b.azimuth_deg is None
    return abs((a.azimuth_deg - b.azimuth_deg + 180.0) % 360.0 - 180.0) < 1e-6


def _channel_code(rec: Record, where: Orientation, size: int) -> str:
    """A channel code of at most ``size`` characters that reads back as ``where``.

    The record's own component is kept when it fits the format; a code cut short to fit
    (``"N90E"`` → ``"N90"``, which reads as north) is replaced by one that keeps the
    orientation: ``"UP"`` for a vertical, the azimuth in whole degrees (``"90"``,
    ``"332"``) for a horizontal, ``"H"`` for a horizontal of unknown azimuth.
    """
    comp = rec.component or ""
    code = comp if re.fullmatch(rf"[A-Za-z0-9]{{1,{size}}}", comp) \
        else _code(rec.metadata.get("channel", "") or comp, size)
    if where.kind == "unknown":
        return code
    back = describe(code)
    if _same_orientation(back, where):
        return code
    if back.kind == where.kind and back.azimuth_deg is None:
        return code      # less said than known, nothing wrong (SAC adds cmpaz)
    if where.kind == "vertical":
        return "UP"
    if where.azimuth_deg is None:
        return "H"
    return f"{round(where.azimuth_deg) % 360:d}"


def _trace(rec: Record, *, sac: bool):
    from obspy import Trace, UTCDateTime

    md = rec.metadata
    pad = _pad_before(rec)
    where = describe(rec.component or "", md)
    # the record's start_time is its first sample (the pad's start) when it has a
    # clock; without one the as-read origin is put at the epoch
    start = UTCDateTime(rec.start_time) if rec.start_time else UTCDateTime(0) - pad
    size = 8 if sac else 5          # SAC kstnm/kcmpnm hold 8 characters, SEED 5 and 3
    header = {
        "network": _code(md.get("network", ""), 2),
        "station": _code(md.get("station", "") or rec.name, size),
        "location": _code(md.get("location", ""), 2),
        "channel": _channel_code(rec, where, 8 if sac else 3),
        "sampling_rate": 1.0 / rec.dt,
        "starttime": start,
    }
    tr = Trace(data=np.ascontiguousarray(rec.acc, dtype=np.float64 if not sac else np.float32),
               header=header)
    if sac:
        from obspy.io.sac.util import utcdatetime_to_sac_nztimes

        head = {"kuser0": "m/s2"}
        if where.kind == "vertical":        # SAC: cmpinc from up (0 up, 90 horizontal)
            head.update(cmpinc=0.0, cmpaz=0.0)
        elif where.kind == "horizontal":
            head["cmpinc"] = 90.0
            if where.azimuth_deg is not None:
                head["cmpaz"] = float(where.azimuth_deg)
        if pad:      # reference time at the as-read origin, the pad before it (b < 0)
            # SAC's reference time resolves 1 ms; the origin's remaining microseconds
            # go into b, so the first sample keeps its clock time
            nz, micro = utcdatetime_to_sac_nztimes(start + pad)
            head.update(nz, b=micro * 1e-6 - pad, kuser1=SAC_PAD_MARK)
        tr.stats.sac = head
    return tr


def restore_written_pad(rec: Record) -> Record:
    """The leading pad a file written by :func:`write_record` keeps, back in metadata.

    A SAC file marked ``kuser1 = "padded"`` with ``b`` < 0, or a MiniSEED/SAC file
    starting less than a day before 1970-01-01 (a record without clock, its as-read
    origin at the epoch), gets ``metadata["pad_before_s"]`` = that offset [s], so its
    times count from the first sample as read again. Other records are returned as
    they are.

    Parameters
    ----------
    rec : Record
        As read.

    Returns
    -------
    Record
    """
    md = rec.metadata
    if md.get("pad_before_s") or md.get("format") not in ("SAC", "MSEED"):
        return rec
    pad, start = 0.0, rec.start_time
    if md.get("format") == "SAC" and str(md.get("sac.kuser1", "")).strip() == SAC_PAD_MARK:
        b = float(md.get("sac.b", 0.0) or 0.0)
        pad = _whole_samples(-b, rec.dt) if b < 0 else 0.0
    if start:
        from obspy import UTCDateTime

        try:
            stamp = float(UTCDateTime(start).timestamp)
        except (TypeError, ValueError):
            stamp = 0.0
        if -_EPOCH_PAD_LIMIT < stamp < 0:
            pad, start = pad or -stamp, ""
        elif pad and abs(stamp + pad) < 1e-6:
            start = ""
    if not pad:
        return rec
    return rec.replace(metadata={**md, "pad_before_s": pad}, start_time=start)


def _whole_samples(pad: float, dt: float) -> float:
    """The pad [s] a SAC ``b`` stands for: a whole number of samples in [pad, pad + 1 ms].

    ``b`` holds the pad less the origin's sub-millisecond part (SAC's reference time
    resolves 1 ms) as a 32-bit float; the pads written here are whole samples, so the
    one multiple of ``dt`` in that window is the pad. With ``dt`` ≤ 1 ms the window
    may hold two: ``pad`` is kept as it is (within 1 ms).
    """
    if dt <= 1e-3:
        return pad
    whole = round((pad + 5e-4) / dt) * dt
    slack = 5e-4 + 1e-6 * max(1.0, pad)           # 1 ms window and float32 rounding
    return whole if abs(whole - (pad + 5e-4)) <= slack else pad


def _csv_text(recs: list[Record], path: Path) -> str:
    why = _csv_mismatch(recs)
    if why is not None:
        raise InputError(f"{path}: {why}")
    n, dt = recs[0].n, recs[0].dt
    names = [re.sub(r"[,;\[\]()\s]+", "_", r.name).strip("_") or f"acc{k + 1}"
             for k, r in enumerate(recs)]
    lines = ["# groundshake acceleration record (SI units)", "# units: m/s2", f"# dt: {dt!r}"]
    if any(r.component for r in recs):
        lines.append("# components: " + ",".join(r.component for r in recs))
    if recs[0].start_time:
        lines.append(f"# start: {recs[0].start_time}")
    pad = recs[0].metadata.get("pad_before_s")
    if pad:
        lines.append(f"# pad_before_s: {float(pad)!r}")
    lines.append(",".join(["time [s]", *[f"{nm} [m/s2]" for nm in names]]))
    # the as-read axis: t = 0 at the first sample as read, the leading pad at t < 0
    time = np.round(np.arange(n) * dt - (float(pad) if pad else 0.0), 12)
    cols = [time] + [r.acc for r in recs]
    body = "\n".join(",".join(repr(float(v)) for v in row) for row in zip(*cols))
    return "\n".join(lines) + "\n" + body + "\n"
