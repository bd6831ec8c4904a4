"""One scenario through the whole pipeline: motion → model → modes → response → results."""
from __future__ import annotations

import datetime as _dt
import hashlib
import math
import time as _time
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np
import scipy.sparse as sp

from .._cautions import CAUTIONS
from .._constants import STANDARD_GRAVITY
from .._errors import GroundshakeWarning, InputError
from ..processing import intensity_measures
from ..spectra import parse_target
from .._progress import Progress
from ..dynamics._coupled import coupled_response
from ..dynamics._damping import damping_matrix, modal_damping_matrix, rayleigh_coefficients
from ..dynamics._direct import direct_response, substeps_for
from ..dynamics._modes import compute_modes
from ..dynamics._modal import (coupled_modal_response, modal_response, pruned_peak,
                               residual_vectors)
from ..dynamics._motion import DIRECTIONS, Motion
from ._common import RunResults, _modes_dict, _sha256
from ._spectrum_run import spectrum_analyse
from ._anchorage import (INTERACTION_FORMS, SCREENING_WORDING, bolt_forces, bolt_interaction,
                         fp_comparison, worst_entries)
from ._stability import base_stability
from ._floor import floor_spectra
from ._stress import RECOVERY_NOTE, StressPeaks, element_peaks, modal_stress_peaks, stress_summary

__all__ = ["RunResults", "analyse", "respond", "base_resultants"]

RESULTANTS = ("Fx", "Fy", "Fz", "Mx", "My", "Mz")
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
def _dense(a) -> np.ndarray:
    return np.asarray(a.toarray() if sp.issparse(a) else a, dtype=float)


def _peak(x: np.ndarray, time: np.ndarray) -> dict:
    """Peak |x| of a history (n_t,) with its time [s] (from ``time`` (n_t,), the
    as-read axis) and signed value."""
    if x.size == 0:
        return {"value": 0.0, "time": 0.0, "signed": 0.0}
    i = int(np.argmax(np.abs(x)))
    return {"value": float(abs(x[i])), "time": float(time[i]), "signed": float(x[i])}


def _mount_operator(model, position) -> sp.csr_matrix:
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


def respond(model, modes, motion: Motion, output: sp.spmatrix, *,
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
                                        model.factor().solve,
                                        load=getattr(model, "ground_load", None))
        t0 = _time.perf_counter()
        if method == "coupled":   # the whole damping matrix on modes + missing-mass vectors
            load = getattr(model, "ground_load", None)
            if load is None:
                load = model.M @ model.influence
            rayleigh = rayleigh_coefficients(model, modes=modes)
            r = coupled_response(model.K, model.M, damping_matrix(model, rayleigh=rayleigh),
                                 shapes, residual, load, ag, dt,
                                 damping_update=model.damping_update()
                                 if hasattr(model, "damping_update") else None)
            info["modal_damping"] = "whole damping matrix on the reduced basis"
            info["reduced_basis"] = {"modes": int(shapes.shape[1]),
                                     "missing_mass_vectors": int(r.shapes.shape[1]
                                                                 - shapes.shape[1])}
            info["rayleigh_hz"] = rayleigh.frequencies_hz
        elif getattr(model, "is_classically_damped", True):
            r = modal_response(shapes, modes.omega, modes.damping, gam, ag, dt,
                               residual=residual)
        else:   # discrete dashpots couple the modes: keep ΦᵀCΦ whole
            r = coupled_modal_response(shapes, modes.omega, modal_damping_matrix(model, shapes),
                                       gam, ag, dt, residual=residual)
            info["modal_damping"] = "coupled"
            info["modal_damping_diagonal_ratios"] = [float(v) for v in r.damping]
        u, v, a = r.recover(output)
        Z = r.coordinates
        node_peak = {}
        A = r.coefficients(node_map)
        for j, d in enumerate(DIRECTIONS):
            row, val, col = pruned_peak(A[j::3], Z)
            node_peak[d] = {"value": val, "node": int(row), "time": float(motion.time_of_step(col))}
        t1 = _time.perf_counter()
        peaks = None
        if stresses and n_el:
            with Progress("stress peaks", total=n_el, enabled=progress) as bar:
                peaks = modal_stress_peaks(r.coefficients(S), Z, n_el, progress=bar)
        info.update(n_modes=int(shapes.shape[1]), missing_mass=residual is not None,
                    timings={"time_history": t1 - t0, "stress_peaks": _time.perf_counter() - t1})
        return _Response(method, u, v, a, node_peak, peaks, r.assumptions, info)
    if method != "direct":
        raise InputError(f"analysis.method: given {method!r}; allowed 'modal', 'coupled', "
                         "'direct'")
    n_sub = substeps_for(dt, cutoff_hz)
    peaks = StressPeaks.empty(n_el) if (stresses and n_el) else None

    def on_block(ub, steps):
        peaks.update(0, (S @ ub).reshape(n_el, 6, -1), steps)

    if modes is None and model.rayleigh_hz is None:   # the Rayleigh anchors need the modes
        modes = compute_modes(model, n_modes=min(12, model.n_dof - 1), warn=False)
    rayleigh = rayleigh_coefficients(model, modes=modes)
    C = damping_matrix(model, rayleigh=rayleigh)
    update = model.damping_update() if hasattr(model, "damping_update") else None
    K, M, iota, load = model.K, model.M, model.influence, getattr(model, "ground_load", None)
    block_fn, rows, peak_rows = (on_block if peaks is not None else None), output, node_map
    if getattr(model, "cones", None) is not None:   # the soil's rotational cones (model/_cone.py)
        from ..model._cone import cone_run
        K, M, C, iota, load, rows, peak_rows, block_fn, update = cone_run(
            model, C, output, node_map, block_fn, update)
    t0 = _time.perf_counter()
    res = direct_response(K, M, C, iota, ag, dt, output=rows,
                          hht_alpha=hht_alpha, substeps=n_sub, on_block=block_fn,
                          peak_operator=peak_rows, solver=getattr(model, "solver", "auto"),
                          progress=progress, load=load, damping_update=update)
    node_peak = {}
    for j, d in enumerate(DIRECTIONS):
        vals = res.dof_peak[j::3]
        i = int(np.argmax(vals)) if vals.size else -1
        node_peak[d] = {"value": float(vals[i]) if i >= 0 else 0.0, "node": i,
                        "time": float(motion.time_of_step(res.dof_peak_step[j::3][i]))
                        if i >= 0 else 0.0}
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
    if getattr(model, "cones", None) is not None:
        assumptions.append(
            "Soil rocking and torsion frequency-dependent in time: rotational cones (Wolf "
            "1994, from memory) fitted to the static springs, each an extra rotation of "
            "inertia rho*I*z0 tied to the base by the dashpot rho*c*I (stiffness K at rest, "
            "2/3 K and full radiation at high frequency).")
        info["soil_cones"] = model.cones.to_dict()
    return _Response("direct", res.disp, res.vel, res.acc, node_peak, peaks, assumptions, info)


def _get(obj, key, default=None):
    if obj is None:
        return default
    if isinstance(obj, dict):
        return obj.get(key, default)
    return getattr(obj, key, default)


# --------------------------------------------------------------------------- the run
def analyse(scenario, *, progress: bool = True,
            method: Literal["auto", "modal", "coupled", "direct", "spectrum"] | None = None,
            motion: Motion | None = None, model=None, modes=None,
            stresses: bool = True, residual: np.ndarray | None = None) -> RunResults:
    """Run a scenario on a given motion: model, modes, response and every result.

    Parameters
    ----------
    scenario : Scenario
        From :func:`groundshake.load_scenario`.
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
    if model is None and modes is None and needs_soil_cases(scenario):
        # lower/best/upper soil cases, one model each, envelope governs (results/_cases.py)
        return analyse_cases(scenario, analyse=analyse, progress=progress, method=method,
                             motion=motion, stresses=stresses)
    collected: list[str] = []
    if _get(_get(scenario, "support"), "variation", None) is not None:
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


def _analyse(scenario, *, progress, method, motion, model, modes, stresses, collected,
             residual=None) -> RunResults:
    from ..dynamics import compute_modes
    from ..model import build_model
    from ..spectra import response_spectrum

    timings: dict[str, float] = {}
    clock = [_time.perf_counter()]

    def _tick() -> float:
        now = _time.perf_counter()
        dt_, clock[0] = now - clock[0], now
        return dt_

    analysis = _get(scenario, "analysis")
    method = method or _get(analysis, "method", "auto") or "auto"
    if method == "spectrum":            # the design spectrum, no records
        if motion is not None:
            raise InputError("analysis.method: 'spectrum' takes the design spectrum of "
                             "[motion] target, not records; allowed 'auto', 'modal', "
                             "'coupled' or 'direct' with a given motion")
        return spectrum_analyse(scenario, progress=progress, model=model, modes=modes,
                                stresses=stresses, collected=collected, residual=residual,
                                timings=timings, analyse=analyse)
    if method not in ("auto", "modal", "coupled", "direct"):
        raise InputError(f"analysis.method: given {method!r}; allowed 'auto', 'modal', "
                         "'coupled', 'direct', 'spectrum'")
    cutoff = _get(analysis, "cutoff_hz", 50.0)
    n_modes_req = _get(analysis, "modes", None)
    hht_alpha = float(_get(analysis, "hht_alpha", 0.0) or 0.0)
    if motion is None:
        raise InputError("motion: none given; groundshake.analyse (the application layer) "
                         "reads it from the scenario's [motion] files")
    timings["motion"] = _tick()
    collected.extend(motion.notes)
    if model is None:
        model = build_model(scenario)
    timings["model"] = _tick()
    if method == "auto":    # non-classical damping: the whole damping matrix, modal cost
        method = "modal" if getattr(model, "is_classically_damped", True) else "coupled"
    if modes is None:
        with Progress("modes", total=None, enabled=progress):
            modes = compute_modes(model, cutoff_hz=None if n_modes_req else cutoff,
                                  n_modes=n_modes_req,
                                  excited=tuple(d in motion.components for d in DIRECTIONS),
                                  warn=False)
    timings["modes"] = _tick()
    # the modes' own notes, except the mass one (ours below also names the correction)
    # and the cap of composite modal damping ratios, which only classically damped modal
    # runs use (non-classical damping keeps the modal damping matrix whole, uncapped)
    uses_cap = method == "modal" and getattr(model, "is_classically_damped", True)
    collected.extend(m for m in getattr(modes, "warnings", []) or []
                     if not str(m).startswith("modes capture")
                     and not (not uses_cap and str(m).startswith("modal damping of mode")))
    dt = motion.dt
    ag = np.asarray(motion.acc, dtype=float)
    n_t = ag.shape[1]
    time = motion.time                       # counted from the first sample as read
    iota = np.asarray(model.influence, dtype=float)
    n = model.n_dof

    # ---- the rows to recover
    blocks, names = [], []
    for s in model.sensors:
        blocks.append(sp.csr_matrix(s.operator)); names.append(("sensor", s.name, 3))
    for e in model.equipment:
        blocks.append(sp.csr_matrix(e.operator)); names.append(("equipment", e.name, 6))
    for e in model.equipment:
        blocks.append(_mount_operator(model, e.mount)); names.append(("mount", e.name, 3))
    R = getattr(model, "inertia_reaction", None) or model.reaction
    blocks += [sp.csr_matrix(R.K), sp.csr_matrix(R.C), sp.csr_matrix(R.M)]
    output = sp.vstack(blocks, format="csr") if blocks else sp.csr_matrix((0, n))
    _tick()
    resp = respond(model, modes, motion, output, method=method, cutoff_hz=cutoff,
                   hht_alpha=hht_alpha, stresses=stresses, progress=progress,
                   residual=residual)
    timings["response"] = _tick()
    timings.update(resp.info.pop("timings", {}))
    # split rows back
    rows: dict[tuple[str, str], slice] = {}
    k = 0
    for kind, nm, size in names:
        rows[(kind, nm)] = slice(k, k + size)
        k += size
    nK = slice(k, k + 6); nC = slice(k + 6, k + 12); nM = slice(k + 12, k + 18)
    base = (resp.disp[nK] + resp.vel[nC] + resp.acc[nM] + np.asarray(R.G) @ ag)   # (6, n_t)
    ground_of = lambda sl: _dense(output[sl] @ iota) @ ag                        # noqa: E731

    hist: dict[str, np.ndarray] = {"time [s]": time}
    for j, d in enumerate(DIRECTIONS):
        hist[f"ground {d} acc [m/s2]"] = ag[j]
    for j, c in enumerate(RESULTANTS):
        hist[f"base {c} [{'N' if c.startswith('F') else 'N*m'}]"] = base[j]

    summary: dict[str, Any] = {"title": _get(scenario, "title", "scenario"),
                               "cautions": list(CAUTIONS), "warnings": []}
    peak_times: list[tuple[str, float]] = []

    # ---- sensors
    sensors_out: dict[str, Any] = {}
    point_acc, point_names = [], []
    for s in model.sensors:
        sl = rows[("sensor", s.name)]
        rel, absacc = resp.disp[sl], resp.acc[sl] + ground_of(sl)
        d_ = {"position": [float(v) for v in s.position],
              "peak_absolute_acceleration": {}, "peak_relative_displacement": {},
              "time_of_peak_absolute_acceleration": {}, "time_of_peak_relative_displacement": {}}
        for j, dn in enumerate(DIRECTIONS):
            pa, pd = _peak(absacc[j], time), _peak(rel[j], time)
            d_["peak_absolute_acceleration"][dn] = pa["value"]
            d_["time_of_peak_absolute_acceleration"][dn] = pa["time"]
            d_["peak_relative_displacement"][dn] = pd["value"]
            d_["time_of_peak_relative_displacement"][dn] = pd["time"]
            hist[f"{s.name} abs acc {dn} [m/s2]"] = absacc[j]
            hist[f"{s.name} rel disp {dn} [m]"] = rel[j]
            if dn in motion.components:
                peak_times.append((f"sensor {s.name} acceleration {dn}", pa["time"]))
        sensors_out[s.name] = d_
        point_acc.append(absacc); point_names.append(s.name)
    summary_sensors = sensors_out

    # ---- equipment and anchorage
    equip_out: dict[str, Any] = {}
    worst_dc = None
    worst_ir = None
    for e in model.equipment:
        sl = rows[("equipment", e.name)]
        rel = resp.disp[sl]
        absacc = resp.acc[sl] + ground_of(sl)                                     # (6, n_t)
        d_ = {"mass": float(e.mass), "cg": [float(v) for v in e.cg],
              "support": "rigid" if e.frequency_hz is None else "flexible",
              "frequency_hz": None if e.frequency_hz is None else [float(v) for v in e.frequency_hz],
              "damping": float(e.damping),
              "peak_absolute_acceleration": {}, "peak_relative_displacement": {},
              "time_of_peak_absolute_acceleration": {},
              "peak_angular_acceleration": {}}
        for j, dn in enumerate(DIRECTIONS):
            pa = _peak(absacc[j], time)
            d_["peak_absolute_acceleration"][dn] = pa["value"]
            d_["time_of_peak_absolute_acceleration"][dn] = pa["time"]
            d_["peak_relative_displacement"][dn] = _peak(rel[j], time)["value"]
            d_["peak_angular_acceleration"][dn] = _peak(absacc[3 + j], time)["value"]
            hist[f"{e.name} abs acc {dn} [m/s2]"] = absacc[j]
            hist[f"{e.name} rel disp {dn} [m]"] = rel[j]
            if dn in motion.components:
                peak_times.append((f"equipment {e.name} acceleration {dn}", pa["time"]))
        anchors = np.asarray(e.anchors, dtype=float).reshape(-1, 2)
        d_["anchors"] = []
        if anchors.shape[0]:
            bf = bolt_forces(absacc, anchors, mass=e.mass, inertia=e.inertia,
                             cg_height=float(e.cg[2] - e.mount[2]),
                             dead_load_factor=float(e.dead_load_factor))
            cap = e.capacity
            for i, (x, y) in enumerate(anchors):
                t, v = bf.tension[i], bf.shear[i]
                it, iv = int(np.argmax(t)), int(np.argmax(v))
                b = {"position": [float(x), float(y)],
                     "peak_tension": float(max(0.0, t[it])), "time_of_peak_tension": float(time[it]),
                     "peak_shear": float(v[iv]), "time_of_peak_shear": float(time[iv]),
                     "min_axial": float(t.min())}
                if cap is not None:
                    b["dc_tension"] = b["peak_tension"] / float(_get(cap, "tension"))
                    b["dc_shear"] = b["peak_shear"] / float(_get(cap, "shear"))
                    ir = bolt_interaction(t, v, tension_capacity=float(_get(cap, "tension")),
                                          shear_capacity=float(_get(cap, "shear")),
                                          form=_get(cap, "interaction", "5/3-power"))
                    ii = int(np.argmax(ir))
                    b["interaction_ratio"] = float(ir[ii])
                    b["time_of_peak_interaction"] = float(time[ii])
                    if worst_ir is None or b["interaction_ratio"] > worst_ir[0]:
                        worst_ir = (b["interaction_ratio"], e.name, i + 1,
                                    _get(cap, "interaction", "5/3-power"))
                    dc = max(b["dc_tension"], b["dc_shear"])
                    if worst_dc is None or dc > worst_dc[0]:
                        worst_dc = (dc, e.name, i + 1)
                d_["anchors"].append(b)
                hist[f"{e.name} bolt {i + 1} tension [N]"] = t
                hist[f"{e.name} bolt {i + 1} shear [N]"] = v
                peak_times.append((f"{e.name} bolt {i + 1} tension", float(time[it])))
            d_["dead_load_factor"] = float(e.dead_load_factor)
            d_["anchorage_method"] = ("rigid base plate, elastic bolt group (common practice); "
                                      f"weight × dead_load_factor {float(e.dead_load_factor):g} "
                                      "resists uplift (default 0.9: 0.9D with E, ASCE 7-16 "
                                      "§2.3.6, from memory); vertical motion included; "
                                      f"{SCREENING_WORDING}")
            if cap is not None:
                form = _get(cap, "interaction", "5/3-power")
                d_["capacity"] = {"tension": float(_get(cap, "tension")),
                                  "shear": float(_get(cap, "shear")),
                                  "interaction": form,
                                  "interaction_formula": INTERACTION_FORMS[form],
                                  "note": f"demand/capacity ratios: {SCREENING_WORDING}"}
        if e.fp is not None and anchors.shape[0]:
            fp = e.fp
            d_["fp"] = fp_comparison(weight=e.mass * STANDARD_GRAVITY, sds=float(_get(fp, "sds")),
                                     ap=float(_get(fp, "ap")), rp=float(_get(fp, "rp")),
                                     ip=float(_get(fp, "ip", 1.0)),
                                     z_over_h=float(_get(fp, "z_over_h", 0.0)),
                                     anchors=anchors, mass=e.mass,
                                     cg_height=float(e.cg[2] - e.mount[2]),
                                     dead_load_factor=float(e.dead_load_factor))
            d_["fp"]["time_history_peak_tension"] = max([b["peak_tension"] for b in d_["anchors"]] or [0])
            d_["fp"]["time_history_peak_shear"] = max([b["peak_shear"] for b in d_["anchors"]] or [0])
        equip_out[e.name] = d_
        msl = rows[("mount", e.name)]
        point_acc.append(resp.acc[msl] + ground_of(msl))
        point_names.append(f"{e.name} mount")

    # ---- base reactions and contact
    base_out: dict[str, Any] = {"about": [float(v) for v in np.asarray(model.base.get("centre", np.zeros(3)))],
                                "sign": "resultants the structure exerts on its support",
                                "peaks": {}}
    for j, c in enumerate(RESULTANTS):
        base_out["peaks"][c] = _peak(base[j], time)
    for j, c in enumerate(("Fx", "Fy")):
        if DIRECTIONS[j] in motion.components:
            peak_times.append((f"base shear {DIRECTIONS[j]}", base_out["peaks"][c]["time"]))
    if model.support_kind == "soil":
        A = float(model.base.get("area", 0.0)) or 1.0
        lx, ly = float(model.base.get("lx", 1.0)), float(model.base.get("ly", 1.0))
        Ix, Iy = lx * ly ** 3 / 12.0, ly * lx ** 3 / 12.0
        W = float(model.weight)
        mean = (W - base[2]) / A
        swing = np.abs(base[3]) * (ly / 2) / Ix + np.abs(base[4]) * (lx / 2) / Iy
        pmax, pmin = mean + swing, mean - swing
        hist["contact pressure max [Pa]"] = pmax
        hist["contact pressure min [Pa]"] = pmin
        i_min = int(np.argmin(pmin))
        uplift = bool(pmin[i_min] < 0)
        base_out["contact"] = {"static_pressure": W / A, "peak_pressure": float(pmax.max()),
                               "time_of_peak_pressure": float(time[np.argmax(pmax)]),
                               "min_pressure": float(pmin[i_min]),
                               "time_of_min_pressure": float(time[i_min]),
                               "uplift": uplift,
                               "method": "rigid base, linear pressure from the weight of block "
                                         "and equipment and the base resultants Fz, Mx, My"}
        if uplift:
            collected.append(f"Possible uplift / loss of contact: the linear contact pressure falls "
                             f"to {pmin[i_min]:.3g} Pa at t = {time[i_min]:.3f} s; the linear model "
                             "(bonded soil springs) no longer holds there.")

    # ---- stability of the base (results/_stability.py): screening with user values
    stab = base_stability(base, weight=float(model.weight),
                          lx=float(model.base.get("lx", 1.0)), ly=float(model.base.get("ly", 1.0)),
                          support=_get(scenario, "support"))
    stability_out = stab.summary(dt, t0=float(time[0]))     # on the as-read axis

    peaks: dict[str, Any] = {
        "base_shear": {"x": base_out["peaks"]["Fx"]["value"], "y": base_out["peaks"]["Fy"]["value"]},
        "base_axial": base_out["peaks"]["Fz"]["value"],
        "overturning_moment": {"x": base_out["peaks"]["Mx"]["value"],
                               "y": base_out["peaks"]["My"]["value"]},
        "torsion": base_out["peaks"]["Mz"]["value"],
        "relative_displacement": {},
    }
    for d in DIRECTIONS:
        npk = resp.node_peak[d]
        entry = {"value": npk["value"], "time": npk["time"]}
        if npk["node"] >= 0:
            entry["at"] = [float(v) for v in model.nodes[npk["node"]]]
        peaks["relative_displacement"][d] = entry
    stress_out = {}
    if resp.stress is not None:
        stress_out, stress_notes = stress_summary(resp.stress, model.stress_points, dt,
                                                  part_names=list(model.part_names))
        for g in list(stress_out.values()):    # step times → the as-read axis
            for h in ((g, g.get("away_from_features")) if isinstance(g, dict) else ()):
                if isinstance(h, dict) and "time" in h:
                    h["time"] = float(motion.time_of_step(round(h["time"] / dt)))
        collected.extend(stress_notes)
        resp.assumptions = list(resp.assumptions) + [RECOVERY_NOTE]
        peaks["von_mises"] = stress_out.get("von_mises", {}).get("value")
        peaks["principal_tension"] = stress_out.get("principal_tension", {}).get("value")
        peaks["principal_compression"] = stress_out.get("principal_compression", {}).get("value")

    # ---- spectra
    fs = _get(scenario, "floor_spectra")
    pr = _get(fs, "periods")
    periods = np.geomspace(float(_get(pr, "min", 0.02)), float(_get(pr, "max", 5.0)),
                           int(_get(pr, "count", 120)))
    damp, frac = np.asarray(fs.damping_ratios, dtype=float), fs.broadening_ratio
    with Progress("spectra", total=None, enabled=progress):
        gsp = response_spectrum(ag, dt, periods, damp)
        ground_spectra = {"periods": np.asarray(gsp.periods), "damping": damp,
                          "psa": np.asarray(gsp.psa), "sa": np.asarray(gsp.sa)}
        if point_acc:
            floor = floor_spectra(np.stack(point_acc), dt, periods, damp, fraction=frac)
        else:
            floor = {"periods": periods, "damping": damp}
    floor["points"] = point_names
    timings["spectra"] = _tick()
    floor_out = {"damping_percent": [float(v) for v in damp * 100],
                 "broadening_percent": frac * 100,
                 "broadening": "envelope of the spectrum shifted ±broadening in period "
                               "(a peak's full value held over 0.85 f .. 1.15 f for 15 %; "
                               "ASCE 4, USNRC RG 1.122)",
                 "quantity": "pseudo-spectral acceleration PSA [m/s2] of the absolute acceleration",
                 "points": {}}
    for p, nm in enumerate(point_names):
        floor_out["points"][nm] = {
            d: {f"{dp:g}%": {"peak_psa": float(floor["psa"][p, j, i].max()),
                             "period_of_peak": float(periods[int(np.argmax(floor["psa"][p, j, i]))]),
                             "zpa": float(np.max(np.abs(point_acc[p][j])))}
                for i, dp in enumerate(damp * 100)}
            for j, d in enumerate(DIRECTIONS)}
    target_psa = None
    target_spec = _get(_get(scenario, "motion"), "target")
    if target_spec:
        tgt = parse_target(target_spec, base_dir=_get(scenario, "base_dir"))
        target_psa = np.asarray(tgt.psa(periods), dtype=float)

    # ---- warnings
    _auto_warnings(collected, scenario=scenario, model=model, modes=modes, motion=motion,
                   method=method, cutoff=cutoff, peak_times=peak_times,
                   n_modes=int(np.asarray(modes.omega).size))

    # ---- summary
    cum = np.asarray(modes.cumulative_ratio) if np.asarray(modes.omega).size else np.zeros((1, 3))
    retained = {d: float(cum[-1, j]) for j, d in enumerate(DIRECTIONS)} \
        if np.asarray(modes.omega).size else {d: 0.0 for d in DIRECTIONS}
    analysis_out = {"method": method, "assumptions": resp.assumptions,
                    "cutoff_hz": cutoff, "n_modes": int(np.asarray(modes.omega).size),
                    "retained_mass_ratio": retained, "dt": dt, "n_steps": n_t,
                    "duration": float((n_t - 1) * dt), "pad_before_s": motion.pad_before,
                    **resp.info,
                    "effective_force": "p(t) = -L a_g(t), L = M iota (on a fixed base "
                                       "M_ff iota_f + M_fb iota_b), relative to the moving "
                                       "base; absolute = relative + ground",
                    "base_resultants": "d'Alembert: -sum m * absolute acceleration over every "
                                       "mass (block, base nodes, equipment), moments about "
                                       "the centre of the base face"}
    summary.update({
        "analysis": analysis_out,
        "peaks": peaks,
        "sensors": summary_sensors,
        "equipment": equip_out,
        **worst_entries(worst_dc, worst_ir),
        "stresses": stress_out,
        "base": base_out,
        "stability": stability_out,
        "floor_spectra": floor_out,
        "modes": _modes_dict(modes, model),
        "model": model.describe(),
        "records": _records_summary(motion),
        "motion": {"components": list(motion.components), "dt": dt, "n_steps": n_t,
                   "notes": list(motion.notes), "matching": dict(motion.matching)},
        "scenario": scenario.to_dict() if hasattr(scenario, "to_dict") else {},
    })
    inputs = {}
    src = _get(scenario, "source", None)
    if src and Path(str(src)).is_file():
        inputs[str(src)] = _sha256(Path(str(src)))
    for d, rec in motion.raw.items():
        if getattr(rec, "source", ""):
            inputs[str(rec.source)] = _sha256(Path(rec.source))
    from .. import __version__
    summary["provenance"] = {
        "version": __version__,
        "date": _dt.datetime.now(_dt.timezone.utc).isoformat(timespec="seconds"),
        "inputs": inputs,
        "solver": {"method": method, **{k: v for k, v in resp.info.items()
                                         if k in ("solver", "substeps", "hht_alpha")},
                   "factor": getattr(model, "solver", "auto")},
        "settings": {"cutoff_hz": cutoff, "modes": n_modes_req, "hht_alpha": hht_alpha},
        "timings_s": timings,
    }
    return RunResults(summary=summary, motion=motion, model=model, modes=modes, time=time,
                      histories=hist, ground_spectra=ground_spectra, floor=floor,
                      stress=None if resp.stress is None else
                      element_peaks(resp.stress, model.stress_points.element_points),
                      target_psa=target_psa, inputs=inputs, base=base)


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


def motion_band(scenario, motion: Motion) -> tuple[float, str]:
    """Upper edge [Hz] of the motion's usable band and what sets it: the low-pass corner of
    the processing when one is applied, else the Nyquist frequency 1/(2·dt)."""
    nyq = 0.5 / motion.dt
    lp = None
    try:
        settings = scenario.processing_settings() if hasattr(scenario, "processing_settings") \
            else None
        if settings is not None and bool(_get(settings, "enabled", True)):
            lp = _get(settings, "lowpass_hz", None)
    except (AttributeError, TypeError, ValueError, InputError):
        lp = None
    if lp is not None and float(lp) < nyq:
        return float(lp), f"the low-pass corner {float(lp):.3g} Hz"
    return nyq, f"the Nyquist frequency {nyq:.3g} Hz"


def _auto_warnings(collected, *, scenario, model, modes, motion, method, cutoff, peak_times,
                   n_modes) -> None:
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
        above = ((freq > f_band) & (freq <= RIGID_HZ)
                 & np.any((ratio >= 0.05) & excited[None, :], axis=1))
        if method in ("modal", "coupled") and np.any(above):
            share = float(np.max(np.sum(np.where(above[:, None], ratio, 0.0), axis=0)
                                 * excited))
            collected.append(
                f"Mode(s) at {', '.join(f'{f:.3g}' for f in freq[above][:4])} Hz holding "
                f"{100 * share:.0f} % of the mass lie above the motion's usable band (up to "
                f"{band_why}, dt = {dt:g} s) and below {RIGID_HZ:g} Hz: the record carries no "
                "motion there, so they respond quasi-statically where real ground motion may "
                "still drive them; use a record sampled more finely (or filtered less).")
        rigid = np.asarray(getattr(modes, "rigid_mass", None) if getattr(modes, "rigid_mass",
                                                                         None) is not None
                           else np.zeros(3), float)
        total = np.asarray(modes.total_mass, float)
        with np.errstate(divide="ignore", invalid="ignore"):
            cum = np.where(total - rigid > 0, np.asarray(modes.effective_mass).sum(axis=0)
                           / (total - rigid), 1.0)
        low = [f"{d} {100 * cum[j]:.1f} %" for j, d in enumerate(DIRECTIONS)
               if excited[j] and cum[j] < 0.9]
        if low and method in ("modal", "coupled") and f_hi < f_band:
            collected.append("Retained modal mass below 90 % of the mass free to move ("
                             + ", ".join(low) + ") while the modes left out start within the "
                             f"motion's band (the highest kept is {f_hi:.3g} Hz, the band reaches "
                             f"{f_band:.3g} Hz): the missing-mass correction treats them "
                             "statically; raise cutoff_hz or modes (ASCE 7-16 §12.9.1.1 asks "
                             "for 90 %).")
        f_model = f_hi if method in ("modal", "coupled") else max(f_hi, float(cutoff or 0.0))
        f_use = min(f_model, f_band)
    else:
        f_use = min(float(cutoff or 0.0), f_band)
        collected.append("No mode below the cutoff: the block responds quasi-statically "
                         "(missing mass only)." if method in ("modal", "coupled") else
                         "No mode below the cutoff.")
    # elements per shear wavelength at the highest frequency retained
    try:
        mats = _get(scenario, "materials", {}) or {}
        vs = min(math.sqrt(float(_get(m, "youngs_modulus")) /
                           (2 * (1 + float(_get(m, "poisson_ratio")))) / float(_get(m, "density")))
                 for m in mats.values())
        mesh = getattr(model, "mesh", None)
        sizes = getattr(mesh, "element_sizes", None)
        if callable(sizes):
            sizes = sizes()
        if sizes is not None and np.size(sizes):
            h = float(np.max(np.asarray(sizes)))
        else:
            h = float(_get(_get(scenario, "mesh"), "element_size"))
        if f_use > 0 and h > vs / (10.0 * f_use):
            collected.append(f"Elements up to {h:.3g} m are larger than 1/10 of the shear "
                             f"wavelength at {f_use:.3g} Hz ({vs / f_use:.3g} m), the highest "
                             "frequency both modelled and carried by the motion: fewer than "
                             "about 10 elements per wavelength; refine the mesh.")
    except (TypeError, ValueError, AttributeError):
        pass
    tail = max(5 * dt, 0.02 * dur)
    late = [nm for nm, t in peak_times if t >= float(motion.time[-1]) - tail]
    if late:
        collected.append("A peak occurs at the end of the record (" + ", ".join(late[:4])
                         + (", ..." if len(late) > 4 else "")
                         + "): the record may be too short or cut off.")
