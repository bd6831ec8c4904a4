"""The Record type: one component of an acceleration record, in SI units."""
from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any, Mapping

import numpy as np

from .._constants import STANDARD_GRAVITY
from .._errors import RecordError

__all__ = ["Record", "STANDARD_GRAVITY"]



def _frozen_array(a) -> np.ndarray:
    arr = np.array(a, dtype=float, copy=True)
    arr.setflags(write=False)
    return arr


@dataclass(frozen=True, eq=False)
class Record:
    """One component of a ground-acceleration record.

    Immutable: processing returns a new ``Record`` (see :meth:`replace`) and
    appends to ``history``; the array is read-only.

    Attributes
    ----------
    acc : ndarray, shape (n,)
        Acceleration [m/s²], uniformly sampled.
    dt : float
        Time step [s].
    name : str
        A short name (station/file stem and component), used in reports.
    component : str
        Component code as read (e.g. ``"HNE"``, ``"x"``, ``"UP"``); ``""`` if unknown.
    source : str
        Path of the file it was read from (``""`` if built in memory).
    units : str
        Units of the file it was read from (``"g"``, ``"m/s2"``, ``"cm/s2"``, ...).
    start_time : str
        ISO 8601 start time if the file gives one, else ``""``.
    metadata : mapping
        Header fields as read (plain str/float/int values only).
    history : tuple of str
        Processing steps applied since reading, in order.
    """

    acc: np.ndarray
    dt: float
    name: str = "record"
    component: str = ""
    source: str = ""
    units: str = "m/s2"
    start_time: str = ""
    metadata: Mapping[str, Any] = field(default_factory=dict)
    history: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        acc = _frozen_array(self.acc)
        if acc.ndim != 1:
            raise RecordError(f"{self.name}: acceleration must be 1-D, got shape {acc.shape}")
        if not np.all(np.isfinite(acc)):
            raise RecordError(f"{self.name}: acceleration holds NaN or inf")
        dt = float(self.dt)
        if not (np.isfinite(dt) and dt > 0):
            raise RecordError(f"{self.name}: dt={self.dt!r} must be a finite number > 0")
        object.__setattr__(self, "acc", acc)
        object.__setattr__(self, "dt", dt)
        object.__setattr__(self, "metadata", dict(self.metadata))
        object.__setattr__(self, "history", tuple(self.history))

    # -- derived --------------------------------------------------------------
    @property
    def n(self) -> int:
        """Number of samples."""
        return int(self.acc.size)

    @property
    def duration(self) -> float:
        """Duration [s] = (n - 1)·dt."""
        return (self.n - 1) * self.dt

    @property
    def time(self) -> np.ndarray:
        """Sample times [s] from 0, shape (n,)."""
        return np.arange(self.n) * self.dt

    # -- new records ----------------------------------------------------------
    def replace(self, *, step: str | None = None, **changes) -> "Record":
        """A new Record with ``changes``; ``step`` (if given) is appended to ``history``."""
        if step is not None:
            changes["history"] = (*self.history, step)
        return dataclasses.replace(self, **changes)

    def __repr__(self) -> str:
        return (f"Record(name={self.name!r}, component={self.component!r}, n={self.n}, "
                f"dt={self.dt:g}, pga={np.max(np.abs(self.acc)) if self.n else 0:.4g} m/s2)")
