"""Reading acceleration records: the front door to the readers in ``records/io``.

Each reader module there claims a file from its content (``is_format``) and reads it;
they are asked in the order of ``records.io.READERS``: strong-motion text formats
first, ObsPy's formats (MiniSEED, SAC, K-NET, Kinemetrics EVT, GSE2, ...) next,
delimited text last. Files named ``*.csv`` or ``*.tsv`` skip ObsPy's formats.
"""
from __future__ import annotations

import math
import warnings
from pathlib import Path

import numpy as np

from .._constants import STANDARD_GRAVITY
from .._errors import GroundshakeWarning, RecordError
from ._record import Record
from ._units import canonical_units
from ._write import restore_written_pad
from .io import read as _read_with_registry
from .io._common import MIN_SAMPLES, read_head
from .io.text import STEP_TOLERANCE

__all__ = ["read_record", "MIN_SAMPLES", "STEP_TOLERANCE", "PLAUSIBLE_PEAK"]

#: Peak ground acceleration above which the units are probably wrong [m/s²] (5 g).
PLAUSIBLE_PEAK = 5 * STANDARD_GRAVITY


def read_record(path, *, units: str | None = None, dt: float | None = None,
                resample: bool = False, inventory=None) -> list[Record]:
    """Read every trace of an acceleration record file.

    Parameters
    ----------
    path : str or path-like
        A file in one of the formats of ``groundshake.records.io.READERS``
        (auto-detected from the content): the strong-motion databases' text
        formats, any format ObsPy reads, or delimited text: one column of
        acceleration (``dt`` given, or a ``# dt: ...`` line) or a time column [s]
        followed by one or more acceleration columns. Comma, semicolon or
        whitespace separators; header lines are skipped. Any of them may be
        gzip-compressed (``record.AT2.gz``).
    units : str, optional
        Units of the file's values (``"g"``, ``"m/s2"``, ``"cm/s2"``/``"gal"``,
        ``"mm/s2"``, ``"ft/s2"``, ``"in/s2"``). Needed when the file does not
        state them; an error if it states different ones.
    dt : float, optional
        Time step [s] for a one-column text file; elsewhere a check against the
        file's own step.
    resample : bool
        For text with uneven time steps (more than 1 % spread): interpolate
        linearly onto a uniform step equal to the median step, instead of
        refusing the file.
    inventory : str or path-like, optional
        Station inventory (StationXML) of a file in raw counts (MiniSEED, SAC,
        ...): the instrument sensitivity is removed (accelerometers), or the
        full response with output acceleration (other sensors). Without one,
        integer samples that look like counts are an error.

    Returns
    -------
    list of Record
        One per trace, channel or acceleration column; ``acc`` in m/s², shape (n,).

    Raises
    ------
    RecordError
        Missing, empty or unreadable file, or a format none of the readers knows
        (the message lists the formats read); a file that looks like a known
        format but does not parse (the message names the format and the line);
        a non-numeric, NaN or infinite value; fewer than 16 samples; time that
        repeats, runs backwards or is uneven; missing, unknown or conflicting
        units; a ``dt`` that contradicts the file.

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
    try:  # the content: a gzip-compressed file's decompressed
        head = read_head(path, (1 << 16) + 1)
    except OSError as e:
        raise RecordError(f"{where}: cannot be read ({e.strerror or e})") from e
    if len(head) <= 1 << 16 and not head.strip():
        raise RecordError(f"{where}: the file is empty")
    user_units = None if units is None else canonical_units(units, where=where, param="units")
    if dt is not None:
        dt = float(dt)
        if not (math.isfinite(dt) and dt > 0):
            raise RecordError(f"{where}: given {dt!r}; allowed a finite time step > 0 [s]",
                              param="dt", value=dt)
    if inventory is not None:
        _check_inventory_applies(path)
    records = _read_with_registry(path, units=user_units, dt=dt, resample=resample,
                                  inventory=inventory)
    records = [restore_written_pad(rec) for rec in records]   # our own pads, as written
    for rec in records:
        _warn_if_implausible(rec)
    return records


def _check_inventory_applies(path: Path) -> None:
    """An inventory only goes with a format whose reader takes one (ObsPy's, in counts)."""
    import inspect

    from .io import detect

    module = detect(path)
    if module is not None and "inventory" not in inspect.signature(module.read).parameters:
        raise RecordError(f"{path}: an inventory was given but this {module.FORMAT} file holds "
                          f"accelerations already; an inventory goes with raw counts (MiniSEED, "
                          f"SAC, ...)", param="inventory")


def _warn_if_implausible(rec: Record) -> None:
    peak = float(np.max(np.abs(rec.acc - np.mean(rec.acc))))
    if peak > PLAUSIBLE_PEAK:
        warnings.warn(f"{rec.source}: {rec.name}: peak {peak:.4g} m/s2 ({peak / STANDARD_GRAVITY:.3g} g) "
                      f"is beyond any recorded ground motion; check the units (read as "
                      f"{rec.units}) or whether the file holds raw counts",
                      GroundshakeWarning, stacklevel=3)
