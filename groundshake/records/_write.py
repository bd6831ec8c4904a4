"""Writing records: MiniSEED and SAC through ObsPy, and CSV. Always in m/s²."""
from __future__ import annotations

import re
from pathlib import Path
from typing import Iterable

import numpy as np

from .._atomic import atomic_path, atomic_write_text
from .._errors import InputError
from ._record import Record

__all__ = ["write_record", "WRITE_FORMATS", "restore_written_pad"]

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
        its reference time at the origin with ``b`` = −pad (``kuser1`` "padded").

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


def _code(text: str, size: int) -> str:
    return re.sub(r"[^A-Za-z0-9]", "", str(text or ""))[:size].upper()


def _pad_before(rec: Record) -> float:
    return float(rec.metadata.get("pad_before_s", 0.0) or 0.0)


def _trace(rec: Record, *, sac: bool):
    from obspy import Trace, UTCDateTime

    md = rec.metadata
    pad = _pad_before(rec)
    # the record's start_time is its first sample (the pad's start) when it has a
    # clock; without one the as-read origin is put at the epoch
    start = UTCDateTime(rec.start_time) if rec.start_time else UTCDateTime(0) - pad
    header = {
        "network": _code(md.get("network", ""), 2),
        "station": _code(md.get("station", "") or rec.name, 5),
        "location": _code(md.get("location", ""), 2),
        "channel": rec.component if re.fullmatch(r"[A-Za-z0-9]{1,3}", rec.component or "")
        else _code(md.get("channel", ""), 3),
        "sampling_rate": 1.0 / rec.dt,
        "starttime": start,
    }
    tr = Trace(data=np.ascontiguousarray(rec.acc, dtype=np.float64 if not sac else np.float32),
               header=header)
    if sac:
        from obspy.io.sac.util import utcdatetime_to_sac_nztimes

        head = {"kuser0": "m/s2", "kcmpnm": (rec.component or "")[:8]}
        if pad:      # reference time at the as-read origin, the pad before it (b < 0)
            nz, micro = utcdatetime_to_sac_nztimes(start + pad)
            head.update(nz, nzmsec=micro // 1000, b=-pad, kuser1=SAC_PAD_MARK)
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
        pad = -b if b < 0 else 0.0
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


def _csv_text(recs: list[Record], path: Path) -> str:
    n, dt = recs[0].n, recs[0].dt
    for r in recs[1:]:
        if r.n != n or not np.isclose(r.dt, dt, rtol=1e-9, atol=0):
            raise InputError(f"{path}: records of different length or time step cannot share "
                             f"one CSV file ({recs[0].name}: {n} x {dt:g} s, "
                             f"{r.name}: {r.n} x {r.dt:g} s)")
    pads = {_pad_before(r) for r in recs}
    if len(pads) > 1:
        raise InputError(f"{path}: records with different leading pads "
                         f"({', '.join(f'{p:g} s' for p in sorted(pads))}) cannot share one "
                         "time column; write one file per record")
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
