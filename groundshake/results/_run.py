"""One scenario through the whole pipeline: motion → model → modes → response → results."""
from __future__ import annotations

import math
import time as _time
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Literal, Mapping

import numpy as np
import scipy.sparse as sp

from .._errors import GroundshakeWarning, InputError
from ..processing import intensity_measures
from ..scenario import Scenario
from ..spectra import parse_target
from .._progress import Progress
from ..dynamics._coupled import coupled_response
from ..dynamics._damping import damping_matrix, modal_damping_matrix, rayleigh_coefficients
from ..dynamics._direct import direct_response, substeps_for
from ..dynamics._modes import Modes, compute_modes
from ..dynamics._modal import (coupled_modal_response, modal_response, pruned_peak,
                               residual_vectors)
from ..dynamics._motion import DIRECTIONS, Motion
from ._common import RunResults, _sha256
from ._spectrum_run import spectrum_analyse
from ._anchorage import SCREENING_WORDING, bolt_forces
from ._floor import floor_spectra
from ._stress import RECOVERY_NOTE, StressPeaks, element_peaks, modal_stress_peaks, stress_summary
from ._summary import (BASE_RESULTANTS, RESULTANTS, Clock, WorstBolts, anchorage_entries,
                       assemble, base_entry, base_geometry, base_peak_entries, contact_entry,
                       dense, displacement_peak, equipment_entry, floor_grid, fp_entry,
                       free_mass_ratio, input_hashes, low_mass_text, provenance, retained_mass,
                       sensor_entry, stability_entry, stress_peak_entries, summary_head)

if TYPE_CHECKING:  # pragma: no cover
    from ..model import BlockModel

__all__ = ["RunResults", "analyse", "respond", "base_resultants"]

#: Frequency [Hz] above which ground motion drives a structure quasi-statically in design
#: practice (the zero-period end of USNRC RG 1.60 spectra, from memory).
RIGID_HZ = 33.0




def base_resultants(results: RunResults) -> dict[str, np.ndarray]:
    """Base resultant histories of a run, the structure acting on its support.

    Parameters
    ----------
    results : RunResults

    Returns
    -------
    dict
        ``"Fx", "Fy", "Fz"`` [N] and ``"Mx", "My", "Mz"`` [N·m], each an ndarray (n_t,)
        on ``results.time``; moments about the centre of the base face
        (``results.model.base["centre"]``). Taken by d'Alembert, −Σ m·ü_abs over every
        mass of the model (block, base nodes, equipment), for both methods. The weight is
        not included: Fz is the dynamic part, −m·a_z for a rigid body.
    """
    b = results.base
    if b is None:
        b = np.vstack([results.histories[f"base {c} [{'N' if c.startswith('F') else 'N*m'}]"]
                       for c in RESULTANTS])
    return {c: np.asarray(b[j]) for j, c in enumerate(RESULTANTS)}


# --------------------------------------------------------------------------- helpers
def _peak(x: np.ndarray, time: np.ndarray) -> dict:
    """Peak |x| of a history (n_t,) with its time [s] (from ``time`` (n_t,), the
    as-read axis) and signed value."""
    if x.size == 0:
        return {"value": 0.0, "time": 0.0, "signed": 0.0}
    i = int(np.argmax(np.abs(x)))
    return {"value": float(abs(x[i])), "time": float(time[i]), "signed": float(x[i])}


def _mount_operator(model: BlockModel, position) -> sp.csr_matrix:
    """(3, n) relative displacement of the block node nearest to ``position`` (3,)."""
    i = int(np.argmin(np.sum((np.asarray(model.nodes) - np.asarray(position)) ** 2, axis=1)))
    return sp.csr_matrix(model.node_map[3 * i:3 * i + 3])


@dataclass
class _Response:
    """Histories of the requested rows, whichever method produced them."""

    method: str
    disp: np.ndarray          # (k, n_t) relative
    vel: np.ndarray
    acc: np.ndarray
    node_peak: dict           # direction -> {value, node, time}
    stress: StressPeaks | None
    assumptions: list
    info: dict


def _modal_node_peak(A, Z, motion: Motion) -> dict:
    """Peak relative node displacement per direction from the modal coefficients ``A`` of
    every node DOF and the coordinates ``Z`` (pruned exact peaks)."""
    out = {}
    for j, d in enumerate(DIRECTIONS):
        row, val, col = pruned_peak(A[j::3], Z)
        out[d] = {"value": val, "node": int(row), "time": float(motion.time_of_step(col))}
    return out


def _direct_node_peak(res, motion: Motion) -> dict:
    """Peak relative node displacement per direction from a direct run's DOF peaks."""
    out = {}
    for j, d in enumerate(DIRECTIONS):
        vals = res.dof_peak[j::3]
        i = int(np.argmax(vals)) if vals.size else -1
        out[d] = {"value": float(vals[i]) if i >= 0 else 0.0, "node": i,
                  "time": float(motion.time_of_step(res.dof_peak_step[j::3][i]))
                  if i >= 0 else 0.0}
    return out


def respond(model: BlockModel, modes: Modes | None, motion: Motion, output: sp.spmatrix, *,
            method: Literal["modal", "coupled", "direct"] = "modal",
            cutoff_hz: float | None = None,
            hht_alpha: float = 0.0, missing_mass: bool = True, stresses: bool = True,
            progress: bool = False, residual: np.ndarray | None = None) -> _Response:
    """Response of the model to the motion, for the rows of ``output`` (k, n).

    Also gives the peak relative node displacement per direction anywhere in the
    block and the stress peaks at each stress point of the model, without ever
    holding the whole displacement history. ``residual`` (n, 3), the missing-mass shapes of
    :func:`residual_vectors` for these modes, saves the static solve when given
    (a suite computes it once for all its records).
    """
    dt = motion.dt
    ag = np.asarray(motion.acc, dtype=float)
    node_map = sp.csr_matrix(model.node_map)
    S = sp.csr_matrix(model.stress)
    n_el = S.shape[0] // 6          # stress points (rows of six components)
    info: dict = {}
    if method in ("modal", "coupled"):
        shapes = np.asarray(modes.shapes)
        gam = np.asarray(modes.participation)
        if not missing_mass:
            residual = None
        elif residual is None:
            residual = residual_vectors(model.M, model.influence, shapes, gam,
                                        model.factor().solve, load=model.ground_load)
        t0 = _time.perf_counter()
        if method == "coupled":   # the whole damping matrix on modes + missing-mass vectors
            rayleigh = rayleigh_coefficients(model, modes=modes)
            r = coupled_response(model.K, model.M, damping_matrix(model, rayleigh=rayleigh),
                                 shapes, residual, model.ground_load, ag, dt,
                                 damping_update=model.damping_update())
            info["modal_damping"] = "whole damping matrix on the reduced basis"
            info["reduced_basis"] = {"modes": int(shapes.shape[1]),
                                     "missing_mass_vectors": int(r.shapes.shape[1]
                                                                 - shapes.shape[1])}
            info["rayleigh_hz"] = rayleigh.frequencies_hz
        elif model.is_classically_damped:
            r = modal_response(shapes, modes.omega, modes.damping, gam, ag, dt,
                               residual=residual)
        else:   # discrete dashpots couple the modes: keep ΦᵀCΦ whole
            r = coupled_modal_response(shapes, modes.omega, modal_damping_matrix(model, shapes),
                                       gam, ag, dt, residual=residual)
            info["modal_damping"] = "coupled"
            info["modal_damping_diagonal_ratios"] = [float(v) for v in r.damping]
        u, v, a = r.recover(output)
        Z = r.coordinates
        node_peak = _modal_node_peak(r.coefficients(node_map), Z, motion)
        t1 = _time.perf_counter()
        peaks = None
        if stresses and n_el:
            with Progress("stress peaks", total=n_el, enabled=progress) as bar:
                peaks = modal_stress_peaks(r.coefficients(S), Z, n_el, progress=bar)
        info.update(n_modes=int(shapes.shape[1]), missing_mass=residual is not None,
                    timings={"time_history": t1 - t0, "stress_peaks": _time.perf_counter() - t1})
        return _Response(method, u, v, a, node_peak, peaks, r.assumptions, info)
    if method != "direct":
        raise InputError(f"given {method!r}; allowed 'modal', 'coupled', 'direct'",
                         param="analysis.method", value=method)
    n_sub = substeps_for(dt, cutoff_hz)
    peaks = StressPeaks.empty(n_el) if (stresses and n_el) else None

    def on_block(ub, steps):
        peaks.update(0, (S @ ub).reshape(n_el, 6, -1), steps)

    if modes is None and model.rayleigh_hz is None:   # the Rayleigh anchors need the modes
        modes = compute_modes(model, n_modes=min(12, model.n_dof - 1), warn=False)
    rayleigh = rayleigh_coefficients(model, modes=modes)
    C = damping_matrix(model, rayleigh=rayleigh)
    update = model.damping_update()
    K, M, iota, load = model.K, model.M, model.influence, model.ground_load
    block_fn, rows, peak_rows = (on_block if peaks is not None else None), output, node_map
    if model.cones is not None:   # the soil's rotational cones (model/_cone.py)
        from ..model._cone import cone_run
        K, M, C, iota, load, rows, peak_rows, block_fn, update = cone_run(
            model, C, output, node_map, block_fn, update)
    t0 = _time.perf_counter()
    res = direct_response(K, M, C, iota, ag, dt, output=rows,
                          hht_alpha=hht_alpha, substeps=n_sub, on_block=block_fn,
                          peak_operator=peak_rows, solver=model.solver,
                          progress=progress, load=load, damping_update=update)
    node_peak = _direct_node_peak(res, motion)
    info.update(timings={"time_history": _time.perf_counter() - t0,
                         "factorization": res.factor_time},
                substeps=res.substeps, step=dt / res.substeps, hht_alpha=res.alpha,
                solver=res.solver, rayleigh_hz=rayleigh.frequencies_hz)
    assumptions = list(res.assumptions)
    if n_sub > 1:
        assumptions.append(f"The record step {dt:g} s was subdivided into {n_sub} steps so that "
                           f"the step is at most 1/10 of the period at {cutoff_hz:g} Hz.")
    fr, why = rayleigh.frequencies_hz, rayleigh.why
    fr_txt = f"{fr[0]:.3g} and {fr[1]:.3g} Hz"
    assumptions.append(
        f"Damping matrix: Rayleigh a·M + b·K of the block alone, {100 * model.damping_ratio:g} % "
        f"at {fr_txt}" + (f" ({why})" if why else "") + "; the soil springs sit in the "
        "stiffness term (their material damping is the block ratio at those frequencies); "
        "each flexible equipment support carries only its own dashpot at its own ratio; "
        "soil radiation dashpots as modelled. Non-classical damping is kept whole (no modal "
        "uncoupling); the Rayleigh ratio differs from the target between and beyond the two "
        "frequencies.")
    if model.cones is not None:
        assumptions.append(
            "Soil rocking and torsion frequency-dependent in time: rotational cones (Wolf "
            "1994, from memory) fitted to the static springs, each an extra rotation of "
            "inertia rho*I*z0 tied to the base by the dashpot rho*c*I (stiffness K at rest, "
            "2/3 K and full radiation at high frequency).")
        info["soil_cones"] = model.cones.to_dict()
    return _Response("direct", res.disp, res.vel, res.acc, node_peak, peaks, assumptions, info)


# --------------------------------------------------------------------------- the run
def analyse(scenario: Scenario | Mapping, *, progress: bool = True,
            method: Literal["auto", "modal", "coupled", "direct", "spectrum"] | None = None,
            motion: Motion | None = None, model: BlockModel | None = None,
            modes: Modes | None = None, stresses: bool = True,
            residual: np.ndarray | None = None) -> RunResults:
    """Run a scenario on a given motion: model, modes, response and every result.

    Parameters
    ----------
    scenario : Scenario or dict
        From :func:`groundshake.load_scenario`; a dict is validated once by
        :meth:`Scenario.from_dict`.
    progress : bool
        Progress bars on stderr (only drawn on a terminal).
    method : {"auto", "modal", "coupled", "direct", "spectrum"}, optional
        Overrides ``analysis.method``. ``"spectrum"`` is response-spectrum analysis of
        ``[motion] target`` (records are not read; ``time`` and ``histories`` stay empty).
    motion : Motion
        The base motion (:func:`groundshake.dynamics.motion_from_arrays`, or from the
        scenario's files by :func:`groundshake.pipeline.build_motion`;
        :func:`groundshake.analyse` does that for you); none for ``"spectrum"``.
    model, modes : optional
        Precomputed pieces (e.g. a suite reuses the model and modes).
    stresses : bool
        Compute stress peaks (at the surface stress points).
    residual : ndarray (n, 3), optional
        Missing-mass shapes for ``modes`` (see
        :func:`groundshake.dynamics.residual_vectors`), computed once by a caller
        that runs many motions through one model.

    Returns
    -------
    RunResults
        ``summary`` holds the keys of docs/INTERNALS.md; SI units.

    Notes
    -----
    Relative to the moving base the load is p(t) = −M ι a_g(t); absolute
    acceleration = relative + ground. Each method's assumptions are listed in
    ``summary["analysis"]["assumptions"]``.
    """
    from ._cases import analyse_cases, needs_soil_cases
    if isinstance(scenario, Mapping):
        scenario = Scenario.from_dict(scenario)
    if model is None and modes is None and needs_soil_cases(scenario):
        # lower/best/upper soil cases, one model each, envelope governs (results/_cases.py)
        return analyse_cases(scenario, analyse=analyse, progress=progress, method=method,
                             motion=motion, stresses=stresses)
    collected: list[str] = []
    if scenario.support.variation is not None:
        collected.append("support.variation: the soil cases run only when the run builds its "
                         "own model; this run (model given, e.g. a suite) is the best estimate")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", GroundshakeWarning)
        out = _analyse(scenario, progress=progress, method=method, motion=motion, model=model,
                       modes=modes, stresses=stresses, collected=collected, residual=residual)
    for w in caught:
        if issubclass(w.category, GroundshakeWarning):
            msg = str(w.message)
            if msg not in collected:
                collected.append(msg)
        else:
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    out.summary["warnings"] = list(collected)
    for msg in collected:
        warnings.warn(msg, GroundshakeWarning, stacklevel=2)
    return out


@dataclass
class _Run:
    """What the steps of one time-history run share."""

    scenario: Scenario
    motion: Motion
    model: BlockModel
    modes: Modes
    method: str
    collected: list
    timings: dict
    clock: Clock
    resp: _Response | None = None
    output: sp.csr_matrix | None = None
    rows: dict = field(default_factory=dict)     # (kind, name) -> slice of output's rows
    base: np.ndarray | None = None               # (6, n_t) base resultants
    hist: dict = field(default_factory=dict)     # histories.csv columns
    peak_times: list = field(default_factory=list)   # (what, time of its peak)
    point_acc: list = field(default_factory=list)    # floor spectrum points, (3, n_t) each
    point_names: list = field(default_factory=list)

    @property
    def dt(self) -> float:
        return self.motion.dt

    @property
    def time(self) -> np.ndarray:
        return self.motion.time                  # counted from the first sample as read

    @property
    def ag(self) -> np.ndarray:
        return np.asarray(self.motion.acc, dtype=float)

    def relative(self, key) -> np.ndarray:
        """Relative displacement histories of the output rows of ``key``."""
        return self.resp.disp[self.rows[key]]

    def absolute(self, key) -> np.ndarray:
        """Absolute acceleration histories (relative + ground) of the rows of ``key``."""
        sl = self.rows[key]
        iota = np.asarray(self.model.influence, dtype=float)
        return self.resp.acc[sl] + dense(self.output[sl] @ iota) @ self.ag


def _analyse(scenario: Scenario, *, progress, method, motion, model, modes, stresses,
             collected, residual=None) -> RunResults:
    an = scenario.analysis
    timings: dict[str, float] = {}
    clock = Clock()
    method = method or an.method
    if method == "spectrum":            # the design spectrum, no records
        if motion is not None:
            raise InputError("'spectrum' takes the design spectrum of [motion] target, not "
                             "records; allowed 'auto', 'modal', 'coupled' or 'direct' with a "
                             "given motion", param="analysis.method", value=method)
        return spectrum_analyse(scenario, progress=progress, model=model, modes=modes,
                                stresses=stresses, collected=collected, residual=residual,
                                timings=timings, analyse=analyse)
    if method not in ("auto", "modal", "coupled", "direct"):
        raise InputError(f"given {method!r}; allowed 'auto', 'modal', 'coupled', 'direct', "
                         "'spectrum'", param="analysis.method", value=method)
    if motion is None:
        raise InputError("none given; groundshake.analyse (the application layer) reads it "
                         "from the scenario's [motion] files", param="motion")
    timings["motion"] = clock.tick()
    collected.extend(motion.notes)
    run = _model_and_modes(scenario, motion, model, modes, method, progress=progress,
                           collected=collected, timings=timings, clock=clock)
    _respond(run, stresses=stresses, progress=progress, residual=residual)
    summary = summary_head(scenario)
    sensors_out = _sensor_entries(run)
    worst = WorstBolts()
    equip_out = _equipment_entries(run, worst)
    base_out = _base_entries(run)
    stability_out = stability_entry(run.base, run.model, scenario, run.dt,
                                    t0=float(run.time[0]))         # on the as-read axis
    peaks = base_peak_entries([base_out["peaks"][c]["value"] for c in RESULTANTS])
    for d in DIRECTIONS:
        npk = run.resp.node_peak[d]
        peaks["relative_displacement"][d] = displacement_peak(
            npk["value"], run.model.nodes[npk["node"]] if npk["node"] >= 0 else None,
            time=npk["time"])
    stress_out = _stress_entries(run, peaks)
    spectra = _spectra(run, progress=progress)
    _auto_warnings(collected, scenario=scenario, model=run.model, modes=run.modes,
                   motion=motion, method=run.method, cutoff=an.cutoff_hz,
                   peak_times=run.peak_times, n_modes=int(np.asarray(run.modes.omega).size))
    assemble(summary, analysis=_analysis_entry(run), peaks=peaks, sensors=sensors_out,
             equipment=equip_out, worst=worst, stresses=stress_out, base=base_out,
             stability=stability_out, floor=spectra["floor_out"], modes=run.modes,
             model=run.model, records=_records_summary(motion),
             motion={"components": list(motion.components), "dt": run.dt,
                     "n_steps": run.ag.shape[1], "notes": list(motion.notes),
                     "matching": dict(motion.matching)},
             scenario=scenario)
    inputs = input_hashes([scenario.source])
    inputs.update({str(rec.source): _sha256(Path(rec.source)) for rec in motion.raw.values()
                   if rec.source})
    summary["provenance"] = provenance(
        inputs=inputs,
        solver={"method": run.method, **{k: v for k, v in run.resp.info.items()
                                         if k in ("solver", "substeps", "hht_alpha")},
                "factor": run.model.solver},
        settings={"cutoff_hz": an.cutoff_hz, "modes": an.modes,
                  "hht_alpha": float(an.hht_alpha)},
        timings=timings)
    stress = None if run.resp.stress is None else \
        element_peaks(run.resp.stress, run.model.stress_points.element_points)
    return RunResults(summary=summary, motion=motion, model=run.model, modes=run.modes,
                      time=run.time, histories=run.hist, ground_spectra=spectra["ground"],
                      floor=spectra["floor"], stress=stress, target_psa=spectra["target_psa"],
                      target_damping=spectra["target_damping"], inputs=inputs, base=run.base)


def _model_and_modes(scenario: Scenario, motion: Motion, model: BlockModel | None,
                     modes: Modes | None, method: str, *,
                     progress, collected, timings, clock) -> _Run:
    """Step 1: the model (built unless given), the method (``"auto"`` resolved) and the
    modes (computed unless given), with the modes' own notes."""
    from ..dynamics import compute_modes
    from ..model import build_model

    an = scenario.analysis
    if model is None:
        model = build_model(scenario)
    timings["model"] = clock.tick()
    if method == "auto":    # non-classical damping: the whole damping matrix, modal cost
        method = "modal" if model.is_classically_damped else "coupled"
    if modes is None:
        with Progress("modes", total=None, enabled=progress):
            modes = compute_modes(model, cutoff_hz=None if an.modes else an.cutoff_hz,
                                  n_modes=an.modes,
                                  excited=tuple(d in motion.components for d in DIRECTIONS),
                                  warn=False)
    timings["modes"] = clock.tick()
    # the modes' own notes, except the mass one (ours below also names the correction)
    # and the cap of composite modal damping ratios, which only classically damped modal
    # runs use (non-classical damping keeps the modal damping matrix whole, uncapped)
    uses_cap = method == "modal" and model.is_classically_damped
    collected.extend(m for m in modes.warnings
                     if not str(m).startswith("modes capture")
                     and not (not uses_cap and str(m).startswith("modal damping of mode")))
    return _Run(scenario=scenario, motion=motion, model=model, modes=modes, method=method,
                collected=collected, timings=timings, clock=clock)


def _respond(run: _Run, *, stresses, progress, residual) -> None:
    """Step 2: the histories of the rows to recover (sensors, equipment, mounts, base
    reactions), the base resultants and the ground and base columns of histories.csv."""
    model, an = run.model, run.scenario.analysis
    blocks, names = [], []
    for s in model.sensors:
        blocks.append(sp.csr_matrix(s.operator)); names.append(("sensor", s.name, 3))
    for e in model.equipment:
        blocks.append(sp.csr_matrix(e.operator)); names.append(("equipment", e.name, 6))
    for e in model.equipment:
        blocks.append(_mount_operator(model, e.mount)); names.append(("mount", e.name, 3))
    R = model.reaction if model.inertia_reaction is None else model.inertia_reaction
    blocks += [sp.csr_matrix(R.K), sp.csr_matrix(R.C), sp.csr_matrix(R.M)]
    run.output = sp.vstack(blocks, format="csr") if blocks else sp.csr_matrix((0, model.n_dof))
    run.clock.tick()
    run.resp = resp = respond(model, run.modes, run.motion, run.output, method=run.method,
                              cutoff_hz=an.cutoff_hz, hht_alpha=float(an.hht_alpha),
                              stresses=stresses, progress=progress, residual=residual)
    run.timings["response"] = run.clock.tick()
    run.timings.update(resp.info.pop("timings", {}))
    k = 0
    for kind, nm, size in names:                 # split the rows back
        run.rows[(kind, nm)] = slice(k, k + size)
        k += size
    nK, nC, nM = slice(k, k + 6), slice(k + 6, k + 12), slice(k + 12, k + 18)
    ag = run.ag
    run.base = resp.disp[nK] + resp.vel[nC] + resp.acc[nM] + np.asarray(R.G) @ ag   # (6, n_t)
    run.hist["time [s]"] = run.time
    for j, d in enumerate(DIRECTIONS):
        run.hist[f"ground {d} acc [m/s2]"] = ag[j]
    for j, c in enumerate(RESULTANTS):
        run.hist[f"base {c} [{'N' if c.startswith('F') else 'N*m'}]"] = run.base[j]


def _peaks3(x: np.ndarray, time: np.ndarray) -> tuple[list, list]:
    """Peak values and their times of the three rows of ``x`` (3, n_t)."""
    pk = [_peak(x[j], time) for j in range(3)]
    return [p["value"] for p in pk], [p["time"] for p in pk]


def _sensor_entries(run: _Run) -> dict:
    """Step 3: peaks at the sensors, their histories, and the sensors as floor points."""
    out: dict[str, Any] = {}
    for s in run.model.sensors:
        rel, absacc = run.relative(("sensor", s.name)), run.absolute(("sensor", s.name))
        (pa, ta), (pd, td) = _peaks3(absacc, run.time), _peaks3(rel, run.time)
        out[s.name] = sensor_entry(s.position, pa, pd, acc_time=ta, disp_time=td)
        for j, dn in enumerate(DIRECTIONS):
            run.hist[f"{s.name} abs acc {dn} [m/s2]"] = absacc[j]
            run.hist[f"{s.name} rel disp {dn} [m]"] = rel[j]
            if dn in run.motion.components:
                run.peak_times.append((f"sensor {s.name} acceleration {dn}", ta[j]))
        run.point_acc.append(absacc)
        run.point_names.append(s.name)
    return out


#: How the bolt forces of a time-history run are found (before the screening wording).
_ANCHORAGE_METHOD = ("rigid base plate, elastic bolt group (common practice); weight × "
                     "dead_load_factor {f:g} resists uplift (default 0.9: 0.9D with E, ASCE "
                     "7-16 §2.3.6, from memory); vertical motion included; {screening}")


def _equipment_entries(run: _Run, worst: WorstBolts) -> dict:
    """Step 4: peaks of the equipment, its bolt forces and their histories; the mounts as
    floor points."""
    out: dict[str, Any] = {}
    time = run.time
    for e in run.model.equipment:
        rel = run.relative(("equipment", e.name))
        absacc = run.absolute(("equipment", e.name))                           # (6, n_t)
        pa, ta = _peaks3(absacc, time)
        d_ = equipment_entry(e, pa, _peaks3(rel, time)[0], _peaks3(absacc[3:], time)[0],
                             acc_time=ta)
        for j, dn in enumerate(DIRECTIONS):
            run.hist[f"{e.name} abs acc {dn} [m/s2]"] = absacc[j]
            run.hist[f"{e.name} rel disp {dn} [m]"] = rel[j]
            if dn in run.motion.components:
                run.peak_times.append((f"equipment {e.name} acceleration {dn}", ta[j]))
        anchors = np.asarray(e.anchors, dtype=float).reshape(-1, 2)
        if anchors.shape[0]:
            bf = bolt_forces(absacc, anchors, mass=e.mass, inertia=e.inertia,
                             cg_height=float(e.cg[2] - e.mount[2]),
                             dead_load_factor=float(e.dead_load_factor))
            anchorage_entries(d_, e, anchors, bf, worst=worst, time=time,
                              method=_ANCHORAGE_METHOD.format(f=float(e.dead_load_factor),
                                                              screening=SCREENING_WORDING))
            for i, b in enumerate(d_["anchors"]):
                run.hist[f"{e.name} bolt {i + 1} tension [N]"] = bf.tension[i]
                run.hist[f"{e.name} bolt {i + 1} shear [N]"] = bf.shear[i]
                run.peak_times.append((f"{e.name} bolt {i + 1} tension",
                                       b["time_of_peak_tension"]))
        if e.fp is not None and anchors.shape[0]:
            d_["fp"] = fp_entry(e, anchors, d_["anchors"])
        out[e.name] = d_
        run.point_acc.append(run.absolute(("mount", e.name)))
        run.point_names.append(f"{e.name} mount")
    return out


def _base_entries(run: _Run) -> dict:
    """Step 5: peaks of the base resultants and, on soil, the linear contact pressure."""
    base, time = run.base, run.time
    out = base_entry(run.model, "resultants the structure exerts on its support",
                     {c: _peak(base[j], time) for j, c in enumerate(RESULTANTS)})
    for j, c in enumerate(("Fx", "Fy")):
        if DIRECTIONS[j] in run.motion.components:
            run.peak_times.append((f"base shear {DIRECTIONS[j]}", out["peaks"][c]["time"]))
    if run.model.support_kind != "soil":
        return out
    A, lx, ly, Ix, Iy, W = base_geometry(run.model)
    mean = (W - base[2]) / A
    swing = np.abs(base[3]) * (ly / 2) / Ix + np.abs(base[4]) * (lx / 2) / Iy
    pmax, pmin = mean + swing, mean - swing
    run.hist["contact pressure max [Pa]"] = pmax
    run.hist["contact pressure min [Pa]"] = pmin
    i_min = int(np.argmin(pmin))
    out["contact"] = contact_entry(
        W / A, pmax.max(), pmin[i_min],
        "rigid base, linear pressure from the weight of block and equipment and the base "
        "resultants Fz, Mx, My",
        time_of_peak=float(time[np.argmax(pmax)]), time_of_least=float(time[i_min]))
    if out["contact"]["uplift"]:
        run.collected.append(f"Possible uplift / loss of contact: the linear contact pressure "
                             f"falls to {pmin[i_min]:.3g} Pa at t = {time[i_min]:.3f} s; the "
                             "linear model (bonded soil springs) no longer holds there.")
    return out


def _stress_entries(run: _Run, peaks: dict) -> dict:
    """Step 6: the stress peaks (times on the as-read axis) and their notes."""
    resp, dt = run.resp, run.dt
    if resp.stress is None:
        return {}
    out, notes = stress_summary(resp.stress, run.model.stress_points, dt,
                                part_names=list(run.model.part_names))
    for g in list(out.values()):    # step times → the as-read axis
        for h in ((g, g.get("away_from_features")) if isinstance(g, dict) else ()):
            if isinstance(h, dict) and "time" in h:
                h["time"] = float(run.motion.time_of_step(round(h["time"] / dt)))
    run.collected.extend(notes)
    resp.assumptions = list(resp.assumptions) + [RECOVERY_NOTE]
    stress_peak_entries(peaks, out)
    return out


def _spectra(run: _Run, *, progress) -> dict:
    """Step 7: ground and floor response spectra, the floor spectra entry and the target."""
    from ..spectra import response_spectrum

    periods, damp, frac = floor_grid(run.scenario)
    with Progress("spectra", total=None, enabled=progress):
        gsp = response_spectrum(run.ag, run.dt, periods, damp)
        ground = {"periods": np.asarray(gsp.periods), "damping": damp,
                  "psa": np.asarray(gsp.psa), "sa": np.asarray(gsp.sa)}
        if run.point_acc:
            floor = floor_spectra(np.stack(run.point_acc), run.dt, periods, damp, fraction=frac)
        else:
            floor = {"periods": periods, "damping": damp}
    floor["points"] = run.point_names
    run.timings["spectra"] = run.clock.tick()
    floor_out = {"damping_percent": [float(v) for v in damp * 100],
                 "broadening_percent": frac * 100,
                 "broadening": "envelope of the spectrum shifted ±broadening in period "
                               "(a peak's full value held over 0.85 f .. 1.15 f for 15 %; "
                               "ASCE 4, USNRC RG 1.122)",
                 "quantity": "pseudo-spectral acceleration PSA [m/s2] of the absolute acceleration",
                 "points": {}}
    for p, nm in enumerate(run.point_names):
        floor_out["points"][nm] = {
            d: {f"{dp:g}%": {"peak_psa": float(floor["psa"][p, j, i].max()),
                             "period_of_peak": float(periods[int(np.argmax(floor["psa"][p, j, i]))]),
                             "zpa": float(np.max(np.abs(run.point_acc[p][j])))}
                for i, dp in enumerate(damp * 100)}
            for j, d in enumerate(DIRECTIONS)}
    target_psa = target_damping = None
    target_spec = run.scenario.motion.target if run.scenario.motion is not None else None
    if target_spec:
        tgt = parse_target(target_spec, base_dir=run.scenario.base_dir)
        target_psa = np.asarray(tgt.psa(periods), dtype=float)
        target_damping = tgt.damping
    return {"ground": ground, "floor": floor, "floor_out": floor_out, "target_psa": target_psa,
            "target_damping": target_damping}


def _analysis_entry(run: _Run) -> dict:
    """The ``analysis`` entry of a time-history run."""
    n_t = run.ag.shape[1]
    return {"method": run.method, "assumptions": run.resp.assumptions,
            "cutoff_hz": run.scenario.analysis.cutoff_hz,
            "n_modes": int(np.asarray(run.modes.omega).size),
            "retained_mass_ratio": retained_mass(run.modes), "dt": run.dt, "n_steps": n_t,
            "duration": float((n_t - 1) * run.dt), "pad_before_s": run.motion.pad_before,
            **run.resp.info,
            "effective_force": "p(t) = -L a_g(t), L = M iota (on a fixed base "
                               "M_ff iota_f + M_fb iota_b), relative to the moving "
                               "base; absolute = relative + ground",
            "base_resultants": BASE_RESULTANTS}


def _records_summary(motion: Motion) -> list:
    out = []
    for d in motion.components:
        rec = motion.corrected.get(d)
        if rec is None:
            out.append({"direction": d})
            continue
        entry = {"direction": d, "name": rec.name, "component": rec.component,
                 "source": rec.source, "units": rec.units, "dt": rec.dt, "n": rec.n,
                 "history": list(rec.history),
                 # leading zero pad of the corrected record [s], the same for every
                 # component (one grid); every output counts time from the first sample
                 # as read, so the pad lies at negative times
                 "pad_before_s": float(rec.metadata.get("pad_before_s", 0.0))}
        try:
            entry["measures"] = {k: v for k, v in intensity_measures(rec).items()
                                 if np.ndim(v) == 0}     # scalars; curves stay in the CSVs
        except Exception as exc:  # noqa: BLE001 - measures are informative only
            entry["measures_error"] = str(exc)
        out.append(entry)
    return out


def _applied_processing(scenario: Scenario):
    """The scenario's processing settings when they correct the records, else None."""
    try:
        settings = scenario.processing_settings()
    except (TypeError, ValueError, InputError):
        return None
    return settings if settings.enabled else None


def motion_band(scenario: Scenario, motion: Motion) -> tuple[float, str]:
    """Upper edge [Hz] of the motion's usable band and what sets it: the low-pass corner of
    the processing when one is applied, else the Nyquist frequency 1/(2·dt)."""
    nyq = 0.5 / motion.dt
    settings = _applied_processing(scenario)
    lp = None if settings is None else settings.lowpass_hz
    if lp is not None and float(lp) < nyq:
        return float(lp), f"the low-pass corner {float(lp):.3g} Hz"
    return nyq, f"the Nyquist frequency {nyq:.3g} Hz"


def motion_highpass(scenario: Scenario) -> float | None:
    """The high-pass (low-cut) corner [Hz] the scenario's processing applies, or None."""
    settings = _applied_processing(scenario)
    if settings is None or settings.highpass_hz is None:
        return None
    return float(settings.highpass_hz)


def _highpass_warnings(collected: list, *, scenario: Scenario, motion: Motion,
                       freq: np.ndarray, holding: np.ndarray) -> None:
    """Warnings for modes and spectrum periods the high-pass filter took the motion from.

    The acausal Butterworth low-cut removes the motion below its corner f_c; response
    spectra are usable to periods of about 1/(1.25·f_c) (Boore & Bommer 2005, Soil Dyn.
    Earthq. Eng. 25; Akkar & Bommer 2006, from memory)."""
    f_hp = motion_highpass(scenario) if motion.corrected else None   # arrays given as they are
    if f_hp is None:
        return
    f_use = 1.25 * f_hp
    low = (freq < f_use) & holding
    if np.any(low):
        collected.append(
            f"Mode(s) at {', '.join(f'{f:.3g}' for f in freq[low][:4])} Hz holding mass lie "
            f"below 1.25 × the high-pass corner ({f_hp:.3g} Hz): the correction removed the "
            "ground motion that drives them, so their response is underestimated; lower "
            "processing.highpass_hz as far as the record's noise allows.")
    t_max = float(scenario.floor_spectra.periods.max)
    if t_max > 1.0 / f_use:
        collected.append(
            f"Spectra are computed to {t_max:.3g} s but the high-pass corner {f_hp:.3g} Hz "
            f"leaves them usable only to about {1.0 / f_use:.3g} s (1/(1.25·f_c)); read the "
            "longer periods with care or lower processing.highpass_hz.")


def _auto_warnings(collected: list, *, scenario: Scenario, model: BlockModel, modes: Modes,
                   motion: Motion, method: str, cutoff, peak_times, n_modes) -> None:
    """Append the automatic warnings of a run to ``collected`` (only those that apply)."""
    dt, dur = motion.dt, motion.duration
    f_band, band_why = motion_band(scenario, motion)
    freq = np.asarray(modes.frequency) if n_modes else np.zeros(0)
    excited = np.array([d in motion.components for d in DIRECTIONS])
    if n_modes:
        T1 = 1.0 / float(freq[0])
        if dur < 10 * T1:
            collected.append(f"The record ({dur:.3g} s) is shorter than 10 periods of the lowest "
                             f"mode (T1 = {T1:.3g} s): its response may not develop.")
        f_hi = float(freq[-1])
        ratio = np.asarray(modes.effective_mass_ratio)
        # modes holding mass that the record cannot drive: above its usable band but below
        # the frequency from which design practice treats a structure as rigid (33 Hz, the
        # zero-period end of USNRC RG 1.60 spectra, from memory); stiffer modes respond
        # quasi-statically to any real ground motion anyway
        # modes holding at least 5 % of the mass in an excited direction
        holding = np.any((ratio >= 0.05) & excited[None, :], axis=1)
        above = (freq > f_band) & (freq <= RIGID_HZ) & holding
        if method in ("modal", "coupled") and np.any(above):
            share = float(np.max(np.sum(np.where(above[:, None], ratio, 0.0), axis=0)
                                 * excited))
            collected.append(
                f"Mode(s) at {', '.join(f'{f:.3g}' for f in freq[above][:4])} Hz holding "
                f"{100 * share:.0f} % of the mass lie above the motion's usable band (up to "
                f"{band_why}, dt = {dt:g} s) and below {RIGID_HZ:g} Hz: the record carries no "
                "motion there, so they respond quasi-statically where real ground motion may "
                "still drive them; use a record sampled more finely (or filtered less).")
        low = low_mass_text(free_mass_ratio(modes), excited)
        if low and method in ("modal", "coupled") and f_hi < f_band:
            collected.append("Retained modal mass below 90 % of the mass free to move ("
                             + ", ".join(low) + ") while the modes left out start within the "
                             f"motion's band (the highest kept is {f_hi:.3g} Hz, the band reaches "
                             f"{f_band:.3g} Hz): the missing-mass correction treats them "
                             "statically; raise cutoff_hz or modes (ASCE 7-16 §12.9.1.1 asks "
                             "for 90 %).")
        _highpass_warnings(collected, scenario=scenario, motion=motion, freq=freq,
                           holding=holding)
        f_model = f_hi if method in ("modal", "coupled") else max(f_hi, float(cutoff or 0.0))
        f_use = min(f_model, f_band)
    else:
        f_use = min(float(cutoff or 0.0), f_band)
        collected.append("No mode below the cutoff: the block responds quasi-statically "
                         "(missing mass only)." if method in ("modal", "coupled") else
                         "No mode below the cutoff.")
    # elements per shear wavelength at the highest frequency retained
    try:
        vs = min(math.sqrt(m.youngs_modulus / (2 * (1 + m.poisson_ratio)) / m.density)
                 for m in scenario.materials.values())
        sizes = None if model.mesh is None else model.mesh.element_sizes
        if sizes is not None and sizes.size:
            h = float(np.max(sizes))
        else:
            h = float(scenario.mesh.element_size)
        if f_use > 0 and h > vs / (10.0 * f_use):
            collected.append(f"Elements up to {h:.3g} m are larger than 1/10 of the shear "
                             f"wavelength at {f_use:.3g} Hz ({vs / f_use:.3g} m), the highest "
                             "frequency both modelled and carried by the motion: fewer than "
                             "about 10 elements per wavelength; refine the mesh.")
    except (TypeError, ValueError):
        pass
    tail = max(5 * dt, 0.02 * dur)
    late = [nm for nm, t in peak_times if t >= float(motion.time[-1]) - tail]
    if late:
        collected.append("A peak occurs at the end of the record (" + ", ".join(late[:4])
                         + (", ..." if len(late) > 4 else "")
                         + "): the record may be too short or cut off.")
