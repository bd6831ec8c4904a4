"""The base motion: up to three corrected components on one time step and one length."""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Mapping

import numpy as np

from .._constants import DIRECTIONS
from .._errors import InputError

__all__ = ["Motion", "motion_from_arrays", "DIRECTIONS"]



@dataclass(frozen=True, eq=False)
class Motion:
    """Ground acceleration in x, y (horizontal) and z (vertical).

    Attributes
    ----------
    acc : ndarray (3, n_t)
        Ground acceleration [m/s²]; zeros where a component is absent.
    dt : float
        Time step [s].
    components : tuple of str
        The components given (subset of ``("x", "y", "z")``).
    raw : dict str -> Record
        Records as read (scaled), by component.
    corrected : dict str -> Record
        Records as used (corrected, resampled, padded), by component.
    notes : list of str
        What was done to bring the components together (also issued as warnings).
    matching : dict str -> dict
        Spectral-matching reports by component, when ``match_target`` was asked for.
    pad_before : float
        Leading zero pad [s] shared by every component: the first sample is at
        t = −pad_before on the as-read axis (t = 0 at the first sample as read).
    """

    acc: np.ndarray
    dt: float
    components: tuple[str, ...]
    raw: Mapping[str, Any] = field(default_factory=dict)
    corrected: Mapping[str, Any] = field(default_factory=dict)
    notes: tuple[str, ...] = ()
    matching: Mapping[str, Any] = field(default_factory=dict)
    pad_before: float = 0.0

    @property
    def n(self) -> int:
        """Number of steps."""
        return int(self.acc.shape[1])

    @property
    def time(self) -> np.ndarray:
        """Times [s] counted from the first sample as read (the pad at negative
        times), shape (n_t,)."""
        return self.time_of_step(np.arange(self.n))

    def time_of_step(self, step):
        """Time [s] on the as-read axis of a step index (int or int array), rounded to
        1 ns (no round-off tails such as 5.585000000000001 in the outputs)."""
        return np.round(np.asarray(step) * self.dt - self.pad_before, 9)

    @property
    def duration(self) -> float:
        """(n_t − 1)·dt [s]."""
        return (self.n - 1) * self.dt

    def scaled(self, factor: float) -> "Motion":
        """The same motion times ``factor`` (for linearity checks)."""
        return Motion(acc=self.acc * factor, dt=self.dt, components=self.components,
                      raw=self.raw, corrected=self.corrected, notes=self.notes,
                      matching=self.matching, pad_before=self.pad_before)


def motion_from_arrays(acc: Mapping[str, np.ndarray] | np.ndarray, dt: float) -> Motion:
    """A :class:`Motion` from plain arrays.

    Parameters
    ----------
    acc : mapping {"x"|"y"|"z": ndarray (n_t,)} or ndarray (3, n_t)
        Ground acceleration [m/s²]; components of one length.
    dt : float
        Time step [s].
    """
    if isinstance(acc, Mapping):
        bad = set(acc) - set(DIRECTIONS)
        if bad:
            raise InputError(f"motion: components {sorted(bad)} given; allowed x, y, z")
        lengths = {np.asarray(v).size for v in acc.values()}
        if len(lengths) != 1:
            raise InputError(f"motion: components of different lengths {sorted(lengths)}")
        n_t = lengths.pop()
        a = np.zeros((3, n_t))
        for d, v in acc.items():
            a[DIRECTIONS.index(d)] = np.asarray(v, dtype=float)
        comps = tuple(d for d in DIRECTIONS if d in acc)
    else:
        a = np.array(acc, dtype=float)
        if a.ndim != 2 or a.shape[0] != 3:
            raise InputError(f"motion: acceleration must be shaped (3, n_t), got {a.shape}")
        comps = tuple(d for i, d in enumerate(DIRECTIONS) if np.any(a[i]))
    if not (np.isfinite(dt) and dt > 0):
        raise InputError(f"motion: dt={dt!r} must be > 0")
    a.setflags(write=False)
    return Motion(acc=a, dt=float(dt), components=comps)
