"""Every waveform format ObsPy reads (MiniSEED, SAC, K-NET/KiK-net, Kinemetrics EVT, GSE2, ...).

Detection asks each of ObsPy's own format checks in ObsPy's order; reading goes through
``obspy.read``. A gzip-compressed file is handed to ObsPy decompressed (a temporary copy
of its content); bzip2, zip and tar files ObsPy unpacks itself. Units come from the header where the format states them (K-NET scale
factor in gal, EVT full scale and sensitivity, the ASCII formats' unit, SAC ``kuser0``).
"""
from __future__ import annotations

import contextlib
import math
import tempfile
import warnings
from pathlib import Path
from typing import Any

import numpy as np

from ..._errors import RecordError
from .._components import describe
from .._inventory import check_not_counts
from .._record import Record
from .._units import UNITS, canonical_units
from ._common import (check_samples, detector, file_stem, inner_name, is_gzip, read_bytes,
                      resolve_units,
                      to_si, user_units)

__all__ = ["FORMAT", "EXTENSIONS", "is_format", "read"]

FORMAT = "ObsPy's waveform formats (MiniSEED, SAC, K-NET/KiK-net, Kinemetrics EVT, GSE2, ...)"
EXTENSIONS = (".mseed", ".miniseed", ".sac", ".evt", ".gse2", ".ew1", ".ns1", ".ud1",
              ".ew", ".ns", ".ud")

_TEXT_ONLY_SUFFIXES = {".csv", ".tsv"}
# bzip2, zip: ObsPy unpacks these before detecting the format inside (gzip: see _plain_copy)
_PACKED_MAGIC = (b"BZh", b"PK\x03\x04")


@contextlib.contextmanager
def _plain_copy(path: Path):
    """The file to give ObsPy: ``path``, or for a gzip file a temporary copy of its content."""
    if not is_gzip(path):
        yield path
        return
    with tempfile.TemporaryDirectory(prefix="groundshake-") as folder:
        copy = Path(folder) / _inner_name(path)
        copy.write_bytes(read_bytes(path))
        yield copy


def _obspy_format_of(path: Path) -> str | None:
    from obspy.core.util.base import ENTRY_POINTS, buffered_load_entry_point

    for name, ep in ENTRY_POINTS["waveform"].items():
        try:
            check = buffered_load_entry_point(ep.dist.name, f"obspy.plugin.waveform.{name}",
                                              "isFormat")
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                if check(str(path)):
                    return name
        except Exception:
            continue
    return None


@detector
def is_format(path: Path, head: bytes) -> bool:
    """True if one of ObsPy's waveform formats claims the file (never raises)."""
    path = Path(path)
    if Path(_inner_name(path)).suffix.lower() in _TEXT_ONLY_SUFFIXES:
        return False
    if head.startswith(_PACKED_MAGIC) or head[257:262] == b"ustar":
        return True
    with _plain_copy(path) as plain:
        return _obspy_format_of(plain) is not None


def _inner_name(path: Path) -> str:
    """The file's name, without ``.gz`` (``a.mseed.gz`` → ``a.mseed``)."""
    return inner_name(path) or "record"


def read(path: Path, *, units: str | None = None, dt: float | None = None,
         inventory=None) -> list[Record]:
    """Read every trace of a file in one of ObsPy's formats.

    Parameters
    ----------
    path : path-like
        The file.
    units : str, optional
        Units of the stored values where the format does not state them; an error if
        the file states others.
    dt : float, optional
        Time step [s], a check only: an error if it differs from the file's.
    inventory : str or path-like or obspy.Inventory, optional
        The station inventory (StationXML) of a file in raw counts: its
        sensitivity (accelerometers) or full response (other sensors) is
        removed, giving m/s² (see ``records/_inventory.py``).

    Returns
    -------
    list of Record
        One per trace, ``acc`` in m/s², shape (n,); ``name`` is
        ``"<station> <channel>"``.

    Raises
    ------
    RecordError
        Besides unreadable files: integer samples that look like raw counts
        (peak beyond 5 g in the units given, or no units at all) when no
        inventory is given.
    """
    path = Path(path)
    where = str(path)
    units = user_units(units, where)
    stream = _read_stream(path)
    if inventory is not None:
        from .._inventory import apply_inventory, load_inventory

        label = str(inventory) if isinstance(inventory, (str, Path)) else "the inventory given"
        stream = apply_inventory(stream, load_inventory(inventory), where=where,
                                 inventory_name=label)
    return _records_from_stream(stream, path, units, None if dt is None else float(dt))


def _read_stream(path: Path):
    import obspy

    try:
        with warnings.catch_warnings(), _plain_copy(path) as plain:
            warnings.simplefilter("ignore")
            return obspy.read(str(plain))
    except TypeError as e:
        if "Unknown format" in str(e):
            raise RecordError(f"{path}: not a record groundshake can read (no format ObsPy "
                              f"knows inside the packed file); formats read: {_formats()}") from e
        raise RecordError(f"{path}: not a record groundshake can read: ObsPy took it for one "
                          f"of its formats but failed ({e}); formats read: {_formats()}") from e
    except Exception as e:  # a reader that claimed the file and then failed
        raise RecordError(f"{path}: not a record groundshake can read: ObsPy took it for one "
                          f"of its formats but failed ({type(e).__name__}: {e}); formats read: "
                          f"{_formats()}") from e


def _formats() -> str:
    from . import formats_read

    return formats_read()


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
    fmt = getattr(tr.stats, "_format", "") or ""   # set by ObsPy's reader, absent otherwise
    if tr.stats.get("groundshake_units"):  # counts turned into m/s² with an inventory
        return str(tr.stats.groundshake_units), 1.0, str(tr.stats.get("groundshake_note", ""))
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
        raw_dtype = data.dtype
        data = np.asarray(data, dtype=float)
        check_samples(data, label)
        fmt = getattr(tr.stats, "_format", "") or ""
        file_units, scale, note = _file_units_and_scale(tr)
        if file_units is None and user_units is None and raw_dtype.kind in "iu":
            raise RecordError(f"{label}: integer samples and no units in the file: raw counts, "
                              f"most likely; give the station's inventory (StationXML) or, if "
                              f"they are accelerations, their units", param="inventory")
        rec_units = resolve_units(file_units, user_units, label)
        if file_units is None:
            check_not_counts(data, raw_dtype, UNITS[rec_units], label=label, units=rec_units)
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
        meta.update(_orientation(tr, fmt))
        station = str(tr.stats.station or "").strip()
        channel = str(tr.stats.channel or "").strip()
        if station:  # "<station> <channel>", as every reader names its records
            name = f"{station} {channel}".strip()
        else:
            name = file_stem(path) if len(stream) == 1 else f"{file_stem(path)}.{channel or index}"
        if name in names:
            name = f"{name}.{index}"
        names.add(name)
        records.append(Record(acc=to_si(data, rec_units, where), dt=step, name=name,
                              component=tr.stats.channel, source=where, units=rec_units,
                              start_time=start_text, metadata=meta))
    return records


def _orientation(tr, fmt: str) -> dict[str, Any]:
    """``orientation`` and ``azimuth_deg`` of a trace: inventory, SAC cmpaz/cmpinc, else code."""
    given: dict[str, Any] = {}
    if tr.stats.get("groundshake_dip") is not None:
        given["dip_deg"] = float(tr.stats.groundshake_dip)
    if tr.stats.get("groundshake_azimuth") is not None:
        given["azimuth_deg"] = float(tr.stats.groundshake_azimuth)
    if fmt == "SAC":
        # -12345 is SAC's "undefined"; some writers leave cmpinc/cmpaz at 0 for every
        # trace, so these headers only fill what the channel code leaves open
        sac = tr.stats.get("sac", {}) or {}
        inc, az = sac.get("cmpinc"), sac.get("cmpaz")
        code = describe(str(tr.stats.channel or ""))
        if inc is not None and -12345 != inc and code.kind == "unknown":
            given["dip_deg"] = float(inc) - 90.0  # incidence from up (0) → dip from horizontal
        if az is not None and -12345 != az and code.azimuth_deg is None:
            given["azimuth_deg"] = float(az)
    kind, azimuth = describe(str(tr.stats.channel or ""), given)
    out: dict[str, Any] = {}
    if kind != "unknown":
        out["orientation"] = kind
    if azimuth is not None:
        out["azimuth_deg"] = azimuth
    return out
