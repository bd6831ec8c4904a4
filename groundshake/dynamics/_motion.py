"""The base motion: up to three corrected components on one time step and one length."""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Mapping, Sequence

import numpy as np

from .._errors import InputError

__all__ = ["Motion", "build_motion", "motion_from_arrays", "DIRECTIONS"]

DIRECTIONS = ("x", "y", "z")


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
    """

    acc: np.ndarray
    dt: float
    components: tuple[str, ...]
    raw: Mapping[str, Any] = field(default_factory=dict)
    corrected: Mapping[str, Any] = field(default_factory=dict)
    notes: tuple[str, ...] = ()
    matching: Mapping[str, Any] = field(default_factory=dict)

    @property
    def n(self) -> int:
        """Number of steps."""
        return int(self.acc.shape[1])

    @property
    def time(self) -> np.ndarray:
        """Times [s], shape (n_t,)."""
        return np.arange(self.n) * self.dt

    @property
    def duration(self) -> float:
        """(n_t − 1)·dt [s]."""
        return (self.n - 1) * self.dt

    def scaled(self, factor: float) -> "Motion":
        """The same motion times ``factor`` (for linearity checks)."""
        return Motion(acc=self.acc * factor, dt=self.dt, components=self.components,
                      raw=self.raw, corrected=self.corrected, notes=self.notes,
                      matching=self.matching)


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


def _get(obj: Any, key: str, default: Any = None) -> Any:
    if obj is None:
        return default
    if isinstance(obj, Mapping):
        return obj.get(key, default)
    return getattr(obj, key, default)


def _pick_trace(records: Sequence[Any], trace: Any, where: str) -> Any:
    if trace is None:
        if len(records) != 1:
            names = ", ".join(f"{i}: {r.component or r.name}" for i, r in enumerate(records))
            raise InputError(f"{where}.trace: the file holds {len(records)} traces ({names}); "
                             "give trace = index or channel code")
        return records[0]
    if isinstance(trace, (int, np.integer)) and not isinstance(trace, bool):
        if not 0 <= int(trace) < len(records):
            raise InputError(f"{where}.trace: given {trace}; allowed 0..{len(records) - 1}")
        return records[int(trace)]
    for r in records:
        if str(trace).lower() in (str(r.component).lower(), str(r.name).lower()):
            return r
    codes = ", ".join(str(r.component or r.name) for r in records)
    raise InputError(f"{where}.trace: given {trace!r}; allowed {codes}")


def build_motion(scenario: Any) -> Motion:
    """Read, scale and correct the scenario's motion; bring components together.

    Each component is read (``file``, ``units``, ``dt``, ``trace``), scaled by
    ``scale``, corrected with the scenario's processing settings (or used as
    read when ``enabled = false``), matched to ``target`` when ``match_target``
    (horizontal components only), resampled to the finest time step among the
    components and zero-padded at the end to the longest one. Each adjustment
    is noted in :attr:`Motion.notes`.

    Parameters
    ----------
    scenario : Scenario
        Needs ``scenario.motion`` with any of ``x``, ``y``, ``z`` and
        ``scenario.processing_settings()``.

    Returns
    -------
    Motion
    """
    from ..processing import correct_record, resample
    from ..records import read_record

    motion = _get(scenario, "motion")
    settings = scenario.processing_settings() if hasattr(scenario, "processing_settings") else None
    enabled = bool(_get(settings, "enabled", True)) if settings is not None else True
    raw: dict[str, Any] = {}
    used: dict[str, Any] = {}
    for d in DIRECTIONS:
        spec = _get(motion, d)
        if spec is None:
            continue
        where = f"motion.{d}"
        path = _get(spec, "file")
        recs = read_record(path, units=_get(spec, "units"), dt=_get(spec, "dt"),
                           inventory=_get(motion, "inventory"))
        rec = _pick_trace(recs, _get(spec, "trace"), where)
        scale = float(_get(spec, "scale", 1.0) or 1.0)
        if scale != 1.0:
            rec = rec.replace(acc=rec.acc * scale, step=f"scaled by {scale:g}")
        raw[d] = rec
        used[d] = correct_record(rec, settings) if enabled else rec
    if not used:
        raise InputError("motion: no component given; allowed keys x, y, z (at least one)")
    notes: list[str] = []
    matching: dict[str, Any] = {}
    target = _get(motion, "target")
    if bool(_get(motion, "match_target", False)) and target:
        from ..matching import match_record_to_target
        for d in ("x", "y"):
            if d in used:
                used[d], matching[d] = match_record_to_target(
                    used[d], str(target), base_dir=_get(scenario, "base_dir"))
        if "z" in used:
            notes.append("motion.z: not matched (the target is a horizontal spectrum); used as corrected")
    dts = {d: r.dt for d, r in used.items()}
    dt = min(dts.values())
    if max(dts.values()) - dt > 1e-9 * dt:
        for d, r in list(used.items()):
            if abs(r.dt - dt) > 1e-9 * dt:
                notes.append(f"motion.{d}: resampled from dt = {r.dt:g} s to {dt:g} s "
                             "(the finest step among the components)")
                used[d] = resample(r, dt)
    n_t = max(r.n for r in used.values())
    acc = np.zeros((3, n_t))
    for d, r in used.items():
        if r.n < n_t:
            notes.append(f"motion.{d}: zero-padded at the end from {r.n} to {n_t} samples "
                         "to match the longest component")
        acc[DIRECTIONS.index(d), :r.n] = r.acc
    acc.setflags(write=False)
    return Motion(acc=acc, dt=float(dt), components=tuple(d for d in DIRECTIONS if d in used),
                  raw=raw, corrected=used, notes=tuple(notes), matching=matching)
