"""The parts of summary.json that time-history and response-spectrum runs share.

A time-history run (``_run.py``) gives each peak with its time; a response-spectrum run
(``_spectrum_run.py``) gives peak magnitudes only. Both build the same entries here, the
times added where they exist (``time=None`` leaves them out), so that the two summaries
keep one layout (the keys of ``_schema.py``).
"""
from __future__ import annotations

import datetime as _dt
import time as _time
from pathlib import Path
from typing import TYPE_CHECKING, Any, Iterable, Sequence

import numpy as np
import scipy.sparse as sp

from .._cautions import CAUTIONS
from .._constants import DIRECTIONS, STANDARD_GRAVITY
from ..scenario import AnchorCapacity, FpParameters, Scenario
from ._anchorage import INTERACTION_FORMS, SCREENING_WORDING, bolt_interaction, fp_comparison, \
    worst_entries
from ._common import _sha256
from ._stability import base_stability

if TYPE_CHECKING:  # pragma: no cover
    from ..dynamics import Modes
    from ..model import BlockModel

__all__ = ["RESULTANTS", "Clock", "WorstBolts", "summary_head", "floor_grid", "sensor_entry",
           "equipment_entry", "anchorage_entries", "fp_entry", "base_entry", "base_geometry",
           "contact_entry", "stability_entry", "base_peak_entries", "displacement_peak",
           "stress_peak_entries", "retained_mass", "free_mass_ratio", "assemble",
           "input_hashes", "provenance", "dense", "low_mass_text", "BASE_RESULTANTS"]

#: The six base resultants, in the order of every (6, …) array of them.
RESULTANTS = ("Fx", "Fy", "Fz", "Mx", "My", "Mz")

#: How the base resultants are taken (both methods).
BASE_RESULTANTS = ("d'Alembert: -sum m * absolute acceleration over every mass (block, base "
                   "nodes, equipment), moments about the centre of the base face")


def dense(a) -> np.ndarray:
    """A dense float array of a sparse or dense matrix."""
    return np.asarray(a.toarray() if sp.issparse(a) else a, dtype=float)


class Clock:
    """Stage times of a run [s]: :meth:`tick` gives the time since the last tick."""

    def __init__(self) -> None:
        self._last = _time.perf_counter()

    def tick(self) -> float:
        now = _time.perf_counter()
        dt, self._last = now - self._last, now
        return dt


class WorstBolts:
    """The largest bolt demand/capacity and interaction ratios of a run, with where they are
    (screening comparisons with user capacities, never a code check)."""

    def __init__(self) -> None:
        self.dc: tuple | None = None     # (ratio, equipment name, bolt number)
        self.ir: tuple | None = None     # (ratio, equipment name, bolt number, form)

    def add(self, bolt: dict, name: str, number: int, form: str) -> None:
        """Take one bolt entry (with ``dc_tension``, ``dc_shear``, ``interaction_ratio``)."""
        if self.ir is None or bolt["interaction_ratio"] > self.ir[0]:
            self.ir = (bolt["interaction_ratio"], name, number, form)
        dc = max(bolt["dc_tension"], bolt["dc_shear"])
        if self.dc is None or dc > self.dc[0]:
            self.dc = (dc, name, number)

    def entries(self) -> dict:
        """The summary's ``worst_dc`` and ``worst_interaction``."""
        return worst_entries(self.dc, self.ir)


def summary_head(scenario: Scenario) -> dict[str, Any]:
    """The first keys of a summary: title, cautions and an empty warning list."""
    return {"title": scenario.title, "cautions": list(CAUTIONS), "warnings": []}


def floor_grid(scenario: Scenario) -> tuple[np.ndarray, np.ndarray, float]:
    """Periods [s] (n_p,), damping ratios (n_d,) and the broadening fraction of the
    scenario's ``[floor_spectra]``."""
    fs = scenario.floor_spectra
    periods = np.geomspace(float(fs.periods.min), float(fs.periods.max), int(fs.periods.count))
    return periods, np.asarray(fs.damping_ratios, dtype=float), float(fs.broadening_ratio)


def _by_direction(values) -> dict[str, float]:
    return {d: float(values[j]) for j, d in enumerate(DIRECTIONS)}


def sensor_entry(position, acc, disp, *, acc_time=None, disp_time=None) -> dict:
    """A ``sensors.NAME`` entry: position [m], peak absolute acceleration [m/s²] and relative
    displacement [m] in x, y, z (each (3,)), with their times [s] when given."""
    out = {"position": [float(v) for v in position],
           "peak_absolute_acceleration": _by_direction(acc),
           "peak_relative_displacement": _by_direction(disp)}
    if acc_time is not None:
        out["time_of_peak_absolute_acceleration"] = _by_direction(acc_time)
        out["time_of_peak_relative_displacement"] = _by_direction(disp_time)
    return out


def equipment_entry(e, acc, disp, angular, *, acc_time=None) -> dict:
    """An ``equipment.NAME`` entry before its anchors: mass, support, peak absolute
    acceleration [m/s²], relative displacement [m] and angular acceleration [rad/s²] of
    the centre of mass (each (3,)), the acceleration's times [s] when given."""
    out = {"mass": float(e.mass), "cg": [float(v) for v in e.cg],
           "support": "rigid" if e.frequency_hz is None else "flexible",
           "frequency_hz": None if e.frequency_hz is None else [float(v) for v in e.frequency_hz],
           "damping": float(e.damping),
           "peak_absolute_acceleration": _by_direction(acc),
           "peak_relative_displacement": _by_direction(disp)}
    if acc_time is not None:
        out["time_of_peak_absolute_acceleration"] = _by_direction(acc_time)
    out["peak_angular_acceleration"] = _by_direction(angular)
    out["anchors"] = []
    return out


def _peak_at(x: np.ndarray) -> int:
    return int(np.argmax(x))


def anchorage_entries(entry: dict, e, anchors: np.ndarray, bf, *, method: str,
                      worst: WorstBolts, time: np.ndarray | None = None) -> None:
    """Fill ``entry["anchors"]``, the dead-load factor, the anchorage method and the
    capacity of one equipment.

    ``bf`` holds the bolt forces (``tension``, ``shear`` (n_bolts, k) [N]) over the k
    samples of a history (``time`` (k,) [s] gives each peak its time) or the k sign
    combinations of a spectrum run (``time`` None: no times). ``e`` is the model's
    equipment; its ``capacity`` is the scenario's :class:`AnchorCapacity` or None.
    """
    cap: AnchorCapacity | None = e.capacity
    for i, (x, y) in enumerate(anchors):
        t, v = bf.tension[i], bf.shear[i]
        it, iv = _peak_at(t), _peak_at(v)
        b = {"position": [float(x), float(y)], "peak_tension": float(max(0.0, t[it]))}
        if time is not None:
            b["time_of_peak_tension"] = float(time[it])
        b["peak_shear"] = float(v[iv])
        if time is not None:
            b["time_of_peak_shear"] = float(time[iv])
        b["min_axial"] = float(t.min())
        if cap is not None:
            b["dc_tension"] = b["peak_tension"] / float(cap.tension)
            b["dc_shear"] = b["peak_shear"] / float(cap.shear)
            ir = bolt_interaction(t, v, tension_capacity=float(cap.tension),
                                  shear_capacity=float(cap.shear), form=cap.interaction)
            ii = _peak_at(ir)
            b["interaction_ratio"] = float(ir[ii])
            if time is not None:
                b["time_of_peak_interaction"] = float(time[ii])
            worst.add(b, e.name, i + 1, cap.interaction)
        entry["anchors"].append(b)
    entry["dead_load_factor"] = float(e.dead_load_factor)
    entry["anchorage_method"] = method
    if cap is not None:
        entry["capacity"] = {"tension": float(cap.tension), "shear": float(cap.shear),
                             "interaction": cap.interaction,
                             "interaction_formula": INTERACTION_FORMS[cap.interaction],
                             "note": f"demand/capacity ratios: {SCREENING_WORDING}"}


def fp_entry(e, anchors: np.ndarray, bolts: Sequence[dict]) -> dict:
    """The ASCE 7-16 Fp comparison of one equipment of the model (``e.fp``, the scenario's
    :class:`FpParameters`, given; bolts present) beside the run's largest bolt tension and
    shear [N]."""
    fp: FpParameters = e.fp
    out = fp_comparison(weight=e.mass * STANDARD_GRAVITY, sds=float(fp.sds), ap=float(fp.ap),
                        rp=float(fp.rp), ip=float(fp.ip), z_over_h=float(fp.z_over_h),
                        anchors=anchors, mass=e.mass, cg_height=float(e.cg[2] - e.mount[2]),
                        dead_load_factor=float(e.dead_load_factor))
    out["time_history_peak_tension"] = max([b["peak_tension"] for b in bolts] or [0])
    out["time_history_peak_shear"] = max([b["peak_shear"] for b in bolts] or [0])
    return out


def base_entry(model: BlockModel, sign: str, peaks: dict) -> dict:
    """The ``base`` entry: the point the moments are taken about, the sign convention and
    the peaks of the six resultants."""
    return {"about": [float(v) for v in np.asarray(model.base.get("centre", np.zeros(3)))],
            "sign": sign, "peaks": peaks}


def base_geometry(model: BlockModel) -> tuple[float, float, float, float, float, float]:
    """Area [m²], lengths lx, ly [m], second moments Ix, Iy [m⁴] of the base face and the
    weight of block and equipment [N]."""
    A = float(model.base.get("area", 0.0)) or 1.0
    lx, ly = float(model.base.get("lx", 1.0)), float(model.base.get("ly", 1.0))
    return A, lx, ly, lx * ly ** 3 / 12.0, ly * lx ** 3 / 12.0, float(model.weight)


def contact_entry(static: float, peak: float, least: float, method: str, *,
                  time_of_peak: float | None = None, time_of_least: float | None = None) -> dict:
    """The ``base.contact`` entry: linear contact pressures [Pa] (and their times [s])."""
    out: dict[str, Any] = {"static_pressure": static, "peak_pressure": float(peak)}
    if time_of_peak is not None:
        out["time_of_peak_pressure"] = time_of_peak
    out["min_pressure"] = float(least)
    if time_of_least is not None:
        out["time_of_min_pressure"] = time_of_least
    out.update(uplift=bool(least < 0), method=method)
    return out


def stability_entry(base: np.ndarray, model: BlockModel, scenario: Scenario, dt: float, *,
                    t0: float = 0.0) -> dict:
    """The ``stability`` entry of base resultants ``base`` (6, k) [N, N·m] (a history at
    step ``dt`` [s] from ``t0``, or k combinations of peaks)."""
    stab = base_stability(base, weight=float(model.weight),
                          lx=float(model.base.get("lx", 1.0)),
                          ly=float(model.base.get("ly", 1.0)), support=scenario.support)
    return stab.summary(dt, t0=t0)


def displacement_peak(value: float, at=None, *, time: float | None = None) -> dict:
    """A ``peaks.relative_displacement.D`` entry: value [m], time [s] and node position [m]."""
    out: dict[str, Any] = {"value": value}
    if time is not None:
        out["time"] = time
    if at is not None:
        out["at"] = [float(v) for v in at]
    return out


def base_peak_entries(values: Sequence[float]) -> dict[str, Any]:
    """The ``peaks`` entries of the six base resultant peaks ``values`` [N, N·m]."""
    return {"base_shear": {"x": values[0], "y": values[1]},
            "base_axial": values[2],
            "overturning_moment": {"x": values[3], "y": values[4]},
            "torsion": values[5],
            "relative_displacement": {}}


def stress_peak_entries(peaks: dict, stresses: dict) -> None:
    """Copy the stress peaks [Pa] of the ``stresses`` entry into ``peaks``."""
    for key in ("von_mises", "principal_tension", "principal_compression"):
        peaks[key] = stresses.get(key, {}).get("value")


def retained_mass(modes: Modes) -> dict[str, float]:
    """The modes' cumulative effective mass ratio in x, y, z (0 with no mode)."""
    if not np.asarray(modes.omega).size:
        return {d: 0.0 for d in DIRECTIONS}
    return _by_direction(np.asarray(modes.cumulative_ratio)[-1])


def free_mass_ratio(modes: Modes) -> np.ndarray:
    """The modes' effective mass over the mass free to move (total less the rigidly moving
    mass), (3,); 1 where nothing is free."""
    rigid = np.zeros(3) if modes.rigid_mass is None else np.asarray(modes.rigid_mass, float)
    total = np.asarray(modes.total_mass, float)
    held = (np.asarray(modes.effective_mass).sum(axis=0) if np.asarray(modes.omega).size
            else np.zeros(3))
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(total - rigid > 0, held / (total - rigid), 1.0)


def low_mass_text(free: np.ndarray, excited: Iterable[bool]) -> list[str]:
    """``"x 85.0 %"`` for each excited direction holding less than 90 % of its free mass."""
    return [f"{d} {100 * free[j]:.1f} %" for j, (d, e) in enumerate(zip(DIRECTIONS, excited))
            if e and free[j] < 0.9]


def assemble(summary: dict, *, analysis: dict, peaks: dict, sensors: dict, equipment: dict,
             worst: WorstBolts, stresses: dict, base: dict, stability: dict, floor: dict,
             modes: Modes, model: BlockModel, records: list, motion: dict,
             scenario: Scenario) -> None:
    """Put the run's entries into ``summary`` in the contract's order."""
    summary.update({
        "analysis": analysis,
        "peaks": peaks,
        "sensors": sensors,
        "equipment": equipment,
        **worst.entries(),
        "stresses": stresses,
        "base": base,
        "stability": stability,
        "floor_spectra": floor,
        "modes": modes.to_dict(),
        "model": model.describe(),
        "records": records,
        "motion": motion,
        "scenario": scenario.to_dict(),
    })


def input_hashes(paths: Iterable) -> dict[str, str | None]:
    """SHA-256 of each existing input file, by path."""
    out = {}
    for src in paths:
        if src and Path(str(src)).is_file():
            out[str(src)] = _sha256(Path(str(src)))
    return out


def provenance(*, inputs: dict, solver: dict, settings: dict, timings: dict) -> dict:
    """The ``provenance`` entry: version, date (UTC), input hashes, solver, settings and
    stage times [s]."""
    from .. import __version__
    return {"version": __version__,
            "date": _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds"),
            "inputs": inputs, "solver": solver, "settings": settings, "timings_s": timings}
