"""Motion from files: read, scale, correct, match and align the scenario's records.

The application layer's part of a run: it reads the files named in ``[motion]`` and hands
the numerics a :class:`~groundshake.dynamics.Motion` (plain arrays on one time grid).
"""
from __future__ import annotations

from typing import Any

import numpy as np

from .._errors import InputError
from ..dynamics._motion import DIRECTIONS, Motion
from ..matching import match_record_to_target
from ..matching._match import _shift_iso   # one helper for ISO times moved by a pad
from ..processing import correct_record, resample
from ..records import read_record
from ..records._components import pick_component
from ..scenario import Scenario, errors_at_key

__all__ = ["build_motion"]


def build_motion(scenario: Scenario | dict) -> Motion:
    """Read, scale and correct the scenario's motion; bring components together.

    Each component is read (``file``, ``units``, ``dt``; one channel of a file by
    ``trace``, ``channel`` or ``azimuth``, see
    :func:`groundshake.records._components.pick_component`), scaled by
    ``scale``, corrected with the scenario's processing settings (or used as
    read when ``enabled = false``), matched to ``target`` when ``match_target``
    (horizontal components only), resampled to the finest time step among the
    components, and placed on one time grid: every component's first sample as
    read at t = 0, the longest leading pad (correction and matching pads) shared by
    all (zeros added in front of the others) and zeros at the end to the longest.
    Each adjustment is noted in :attr:`Motion.notes`; the corrected records kept
    in :attr:`Motion.corrected` are the aligned ones.

    Parameters
    ----------
    scenario : Scenario or dict
        Needs ``scenario.motion`` with any of ``x``, ``y``, ``z``; its processing settings
        are used. A dict of the scenario's keys is validated into a Scenario first
        (:meth:`Scenario.from_dict`).

    Returns
    -------
    Motion
    """
    if isinstance(scenario, dict):
        scenario = Scenario.from_dict(scenario)
    motion = scenario.motion
    settings = scenario.processing_settings()
    raw: dict[str, Any] = {}
    used: dict[str, Any] = {}
    for d, spec in (motion.components() if motion is not None else {}).items():
        with errors_at_key(scenario, ("motion", d)):     # names the scenario file and key
            recs = read_record(spec.file, units=spec.units, dt=spec.dt, inventory=motion.inventory)
            rec = pick_component(recs, trace=spec.trace, channel=spec.channel,
                                 azimuth=spec.azimuth, where=f"motion.{d}")
        scale = float(spec.scale)
        if scale != 1.0:
            rec = rec.replace(acc=rec.acc * scale, step=f"scaled by {scale:g}")
        raw[d] = rec
        with errors_at_key(scenario, ("processing",)):
            used[d] = correct_record(rec, settings) if settings.enabled else rec
    if not used:
        raise InputError("motion: no component given; allowed keys x, y, z (at least one), "
                         'or method = "spectrum" for a [motion] with only a target')
    notes: list[str] = []
    matching: dict[str, Any] = {}
    if motion.match_target and motion.target:
        for d in ("x", "y"):
            if d in used:
                used[d], matching[d] = match_record_to_target(
                    used[d], str(motion.target), base_dir=scenario.base_dir)
        if "z" in used:
            notes.append("motion.z: not matched (the target is a horizontal spectrum); "
                         "used as corrected")
    dts = {d: r.dt for d, r in used.items()}
    dt = min(dts.values())
    if max(dts.values()) - dt > 1e-9 * dt:
        for d, r in list(used.items()):
            if abs(r.dt - dt) > 1e-9 * dt:
                notes.append(f"motion.{d}: resampled from dt = {r.dt:g} s to {dt:g} s "
                             "(the finest step among the components)")
                used[d] = resample(r, dt)
    # one grid: the first sample as read of every component at t = 0
    pads = {d: float(r.metadata.get("pad_before_s", 0.0) or 0.0) for d, r in used.items()}
    lead = max(pads.values())
    shift = {}
    for d, r in used.items():
        exact = (lead - pads[d]) / dt
        shift[d] = int(round(exact))
        if abs(exact - shift[d]) > 1e-6:
            notes.append(f"motion.{d}: aligned to the nearest sample of the common grid "
                         f"({abs(exact - shift[d]) * dt:.3g} s off)")
    n_t = max(shift[d] + r.n for d, r in used.items())
    acc = np.zeros((3, n_t))
    for d, r in list(used.items()):
        k = shift[d]
        acc[DIRECTIONS.index(d), k:k + r.n] = r.acc
        after = n_t - k - r.n
        if k or after:
            what = []
            if k:
                what.append(f"{k * dt:g} s in front (to the longest leading pad, {lead:g} s)")
            if after:
                what.append(f"{after * dt:g} s at the end (to the longest component)")
            notes.append(f"motion.{d}: zero-padded by " + " and ".join(what)
                         + "; every component's first sample as read is at t = 0")
            md = dict(r.metadata)
            md["pad_before_s"] = lead             # on the shared grid (to the nearest sample)
            md["pad_after_s"] = float(md.get("pad_after_s", 0.0) or 0.0) + after * dt
            used[d] = r.replace(acc=acc[DIRECTIONS.index(d)], metadata=md,
                                start_time=_shift_iso(r.start_time, -k * dt),
                                step="zero-padded onto the time grid shared by the components")
    acc.setflags(write=False)
    return Motion(acc=acc, dt=float(dt), components=tuple(d for d in DIRECTIONS if d in used),
                  raw=raw, corrected=used, notes=tuple(notes), matching=matching,
                  pad_before=float(lead))
