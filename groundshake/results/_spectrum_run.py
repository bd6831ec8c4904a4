"""A scenario by response-spectrum analysis: the design spectrum in, peak results out.

The same summary keys as a time-history run wherever a peak is meaningful (see
docs/INTERNALS.md); every value is a peak magnitude whose sign and time are unknown.
"""
from __future__ import annotations

import itertools
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
import scipy.sparse as sp

from .._errors import InputError
from .._progress import Progress
from ..dynamics._modal import residual_vectors
from ..dynamics._modes import Modes
from ..dynamics._motion import DIRECTIONS, Motion
from ..dynamics._spectrum_analysis import (VON_MISES_FORM, ellipsoid_quadratic_max,
                                           modal_spectrum, spectral_accelerations)
from ..scenario import Scenario, located_at
from ._anchorage import SCREENING_WORDING, bolt_forces
from ._common import RunResults
from ._stress import StressPeaks, element_peaks, stress_summary
from ._summary import (BASE_RESULTANTS, RESULTANTS, Clock, WorstBolts, anchorage_entries,
                       assemble, base_entry, base_geometry, base_peak_entries, contact_entry,
                       dense, displacement_peak, equipment_entry, floor_grid, fp_entry,
                       free_mass_ratio, input_hashes, low_mass_text, provenance, retained_mass,
                       sensor_entry, stability_entry, stress_peak_entries, summary_head)

if TYPE_CHECKING:  # pragma: no cover
    from ..model import BlockModel

__all__ = ["spectrum_analyse", "stress_bounds", "stress_envelope", "SIGNS_LOST", "STRESS_RULE"]

#: The note every spectrum run carries.
SIGNS_LOST = ("Response-spectrum results are peak magnitudes: the signs and the simultaneity "
              "of peaks are lost (each quantity's peak is estimated on its own; two peaks need "
              "not occur together), and no time of peak exists.")

#: All sign combinations of six peak accelerations, (6, 64).
_SIGNS = np.array(list(itertools.product((1.0, -1.0), repeat=6))).T
#: All sign combinations of five peak base resultants Fx, Fy, Fz, Mx, My, (5, 32).
_SIGNS5 = np.array(list(itertools.product((1.0, -1.0), repeat=5))).T


def stress_bounds(peaks: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Bounds of von Mises and principal stresses from peak stress components.

    Parameters
    ----------
    peaks : ndarray (6, k)
        Peak magnitudes of [σxx, σyy, σzz, τyz, τxz, τxy] [Pa] at k points.

    Returns
    -------
    von_mises, tension, compression : ndarray (k,)
        [Pa]. von Mises √(½[(Sx+Sy)² + (Sy+Sz)² + (Sz+Sx)²] + 3(Tyz² + Txz² + Txy²)),
        the largest von Mises over every sign of the components (each normal difference
        at its worst); tension max_i (S_ii + Σ_{j≠i} T_ij) ≥ σ₁ and compression its
        negative ≤ σ₃ (Gershgorin's circle theorem for the stress tensor). Conservative
        for any stress state whose components lie within their peaks.
    """
    S = np.abs(np.asarray(peaks, dtype=float))
    sx, sy, sz, tyz, txz, txy = S
    vm = np.sqrt(0.5 * ((sx + sy) ** 2 + (sy + sz) ** 2 + (sz + sx) ** 2)
                 + 3.0 * (tyz ** 2 + txz ** 2 + txy ** 2))
    t = np.max(np.stack([sx + txy + txz, sy + txy + tyz, sz + txz + tyz]), axis=0)
    return vm, t, -t


STRESS_RULE = (
    "the six stress components of each point form a response vector whose CQC covariance "
    "(modes, rigid part and missing mass, directions by SRSS) defines a response ellipsoid; "
    "von Mises is its largest value over that ellipsoid (Menun & Der Kiureghian 2000, from "
    "memory), with the ellipsoid widened by the 100-40-40 rule's excess over SRSS where "
    "that rule is chosen; principal tension is the smaller of mean stress peak + 2/3 × that "
    "von Mises and the Gershgorin bound over every sign of the component peaks, principal "
    "compression its negative: upper estimates of stress states that need not occur; von "
    "Mises of the combined components would not be one")


def stress_envelope(peaks: np.ndarray, cov: np.ndarray) -> tuple[np.ndarray, np.ndarray,
                                                                   np.ndarray]:
    """Envelope von Mises and principal stresses of stress points from the spectrum method.

    Parameters
    ----------
    peaks : ndarray (6, k)
        Peak magnitudes of [σxx, σyy, σzz, τyz, τxz, τxy] [Pa] by the run's direction rule.
    cov : ndarray (k, 6, 6)
        Their covariance (SRSS over directions), :meth:`ModalSpectrum.covariance` [Pa²].

    Returns
    -------
    von_mises, tension, compression : ndarray (k,)
        [Pa]; see :data:`STRESS_RULE`. The ellipsoid is scaled at each point by the
        largest ratio² of ``peaks`` to the ellipsoid's own component extents √Σᵢᵢ (1 for
        SRSS), so that it reaches every component peak.
    """
    P = np.abs(np.asarray(peaks, dtype=float))
    C = np.asarray(cov, dtype=float)
    ext = np.sqrt(np.maximum(np.einsum("kii->ki", C), 0.0))                 # (k, 6)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(ext > 0, P.T / np.where(ext > 0, ext, 1.0), 1.0)
    f = np.maximum(np.max(ratio, axis=1), 1.0) ** 2
    C = C * f[:, None, None]
    vm = np.sqrt(ellipsoid_quadratic_max(C, VON_MISES_FORM))
    c = np.array([1.0, 1.0, 1.0, 0.0, 0.0, 0.0]) / 3.0
    p_peak = np.sqrt(np.maximum(np.einsum("i,kij,j->k", c, C, c), 0.0))
    _, t_box, _ = stress_bounds(P)
    t1 = np.minimum(t_box, p_peak + 2.0 / 3.0 * vm)
    return vm, t1, -t1


def _drop_times(d) -> None:
    """Remove every ``time`` and ``time_of_…`` key of a nested summary dict (a spectrum run
    has no times)."""
    if isinstance(d, dict):
        for k in [k for k in d if k == "time" or str(k).startswith("time_of_")]:
            del d[k]
        for v in d.values():
            _drop_times(v)


def _targets(scenario: Scenario):
    """(horizontal target, vertical target or None, vertical scale, description)."""
    from ..spectra import parse_target

    m = scenario.motion
    base_dir = scenario.base_dir
    spec_h = m.target if m is not None else None
    if not spec_h:
        raise located_at(scenario, ("motion", "target"), InputError(
            'missing; allowed a design spectrum (asce7:..., en1998:..., or a CSV table) '
            'for [analysis] method = "spectrum"', param="target"))
    th = parse_target(str(spec_h), base_dir=base_dir)
    frac = float(m.vertical_fraction)
    if m.target_z:
        tz = parse_target(str(m.target_z), base_dir=base_dir)
        vert = {"target": tz.to_dict(), "source": "motion.target_z"}
        return th, tz, 1.0, vert
    vert = {"target": th.to_dict(), "fraction": frac,
            "source": "motion.vertical_fraction × motion.target (2/3 by default: USNRC RG 1.60 "
                      "and ASCE 4 long-period ratio, from memory)"}
    return th, (th if frac > 0 else None), frac, vert


@dataclass
class _Spectrum:
    """What the steps of one response-spectrum run share."""

    scenario: Scenario
    model: BlockModel
    modes: Modes
    ms: Any                  # ModalSpectrum
    targets: tuple           # horizontal, horizontal, vertical target (or None)
    scales: tuple
    vertical: dict           # how the vertical target is made
    collected: list
    timings: dict
    clock: Clock
    residual: np.ndarray

    @property
    def th(self):
        return self.targets[0]

    @property
    def tz(self):
        return self.targets[2]

    @property
    def components(self) -> tuple[str, ...]:
        return tuple(d for d, t in zip(DIRECTIONS, self.targets) if t is not None)

    def disp(self, op) -> np.ndarray:
        """Peak relative displacements of the rows of ``op``."""
        return self.ms.peak(op, kind="displacement")

    def acc(self, op) -> np.ndarray:
        """Peak absolute accelerations of the rows of ``op``."""
        op = sp.csr_matrix(op)
        iota = np.asarray(self.model.influence, dtype=float)
        return self.ms.peak(op, kind="acceleration", ground=dense(op @ iota))


def spectrum_analyse(scenario: Scenario, *, progress: bool, model: BlockModel | None,
                     modes: Modes | None, stresses: bool,
                     collected: list, residual: np.ndarray | None = None,
                     timings: dict | None = None, analyse=None):
    """Run a scenario by response-spectrum analysis (``[analysis] method = "spectrum"``).

    Parameters
    ----------
    scenario : Scenario
        Needs ``[motion] target`` (records are not used).
    progress : bool
        Progress indicators on stderr.
    model, modes : optional
        Precomputed model and modes.
    stresses : bool
        Element stress peaks.
    collected : list of str
        Automatic warnings are appended here.
    residual : ndarray (n, 3), optional
        Missing-mass shapes for ``modes``.
    timings : dict, optional
        Filled with the stage times [s].
    analyse : callable
        :func:`groundshake.results.analyse`, for the time-history runs of the invented
        matched motions (passed in so that this module does not import the run's).

    Returns
    -------
    RunResults
        ``time`` and ``histories`` empty; ``summary`` with the keys of a time-history run
        where a peak is meaningful, SI units.
    """
    run = _setup(scenario, model=model, modes=modes, residual=residual, progress=progress,
                 collected=collected, timings={} if timings is None else timings)
    summary = summary_head(scenario)
    sensors_out = {s.name: sensor_entry(s.position, run.acc(s.operator), run.disp(s.operator))
                   for s in run.model.sensors}
    worst = WorstBolts()
    equip_out = _equipment_entries(run, worst)
    base_out, base_pk = _base_entries(run)
    stability_out = _stability_entry(run, base_pk)
    peaks = base_peak_entries([float(v) for v in base_pk[:6]])
    un = run.disp(sp.csr_matrix(run.model.node_map))
    nodes = np.asarray(run.model.nodes)
    for j, d in enumerate(DIRECTIONS):
        vals = un[j::3]
        i = int(np.argmax(vals)) if vals.size else -1
        peaks["relative_displacement"][d] = displacement_peak(
            float(vals[i]) if i >= 0 else 0.0, nodes[i] if i >= 0 else None)
    run.timings["response"] = run.clock.tick()
    stress_out, speaks = _stress_entries(run, peaks, stresses=stresses, progress=progress)
    run.timings["stress_peaks"] = run.clock.tick()
    spectra = _spectra(run, progress=progress, analyse=analyse)
    analysis_out = _analysis_entry(run)
    if spectra["side"] is not None:
        _compare_side_by_side(spectra["side"], sensors_out, equip_out, peaks)
        analysis_out["spectrum_motions"] = spectra["side"]
    an = scenario.analysis
    assemble(summary, analysis=analysis_out, peaks=peaks, sensors=sensors_out,
             equipment=equip_out, worst=worst, stresses=stress_out, base=base_out,
             stability=stability_out, floor=spectra["floor_out"], modes=run.modes,
             model=run.model, records=[],
             motion={"components": list(run.components), "dt": None, "n_steps": 0,
                     "notes": ["no records: response-spectrum analysis of the design spectrum"],
                     "matching": {}},
             scenario=scenario)
    inputs = input_hashes([scenario.source, run.th.parameters.get("path"),
                           run.tz.parameters.get("path") if run.tz is not None else None])
    summary["provenance"] = provenance(
        inputs=inputs,
        solver={"method": "spectrum", "factor": run.model.solver},
        settings={"cutoff_hz": an.cutoff_hz, "modes": an.modes,
                  "direction_combination": an.direction_combination},
        timings=run.timings)
    motion = Motion(acc=np.zeros((3, 0)), dt=float("nan"), components=run.components)
    return RunResults(summary=summary, motion=motion, model=run.model, modes=run.modes,
                      time=np.zeros(0), histories={}, ground_spectra=spectra["ground"],
                      floor=spectra["floor"], stress=speaks, target_psa=spectra["target_psa"],
                      target_damping=spectra["target_damping"], inputs=inputs, base=None)


def _setup(scenario: Scenario, *, model: BlockModel | None, modes: Modes | None, residual,
           progress, collected, timings) -> _Spectrum:
    """Step 1: the design spectra, the model, the modes and their modal spectrum."""
    from ..dynamics import compute_modes
    from ..model import build_model

    clock = Clock()
    an = scenario.analysis
    th, tz, fz, vert = _targets(scenario)
    targets = (th, th, tz)
    scales = (1.0, 1.0, fz if tz is th else 1.0)
    excited = (True, True, tz is not None)
    timings["motion"] = clock.tick()
    if model is None:
        model = build_model(scenario)
    timings["model"] = clock.tick()
    if modes is None:
        with Progress("modes", total=None, enabled=progress):
            modes = compute_modes(model, cutoff_hz=None if an.modes else an.cutoff_hz,
                                  n_modes=an.modes, excited=excited, warn=False)
    timings["modes"] = clock.tick()
    collected.extend(m for m in modes.warnings if not str(m).startswith("modes capture"))
    shapes = np.asarray(modes.shapes)
    gam = np.asarray(modes.participation)
    if residual is None:
        residual = residual_vectors(model.M, model.influence, shapes, gam, model.factor().solve,
                                    load=model.ground_load)
    ms = modal_spectrum(shapes, modes.omega, modes.damping, gam, targets, scales=scales,
                        residual=residual, rule=an.direction_combination)
    collected.extend(n for n in ms.notes if n.startswith("target") and "held" in n)
    return _Spectrum(scenario=scenario, model=model, modes=modes, ms=ms, targets=targets,
                     scales=scales, vertical=vert, collected=collected, timings=timings,
                     clock=clock, residual=residual)


#: How the bolt forces of a spectrum run are found (before the screening wording).
_ANCHORAGE_METHOD = (
    "rigid base plate, elastic bolt group (common practice); the six peak CG accelerations "
    "(translations and rotations) of the spectrum method applied together with every sign "
    "(64 combinations), the largest bolt force kept: an envelope, conservative because the "
    "peaks do not occur together; weight × dead_load_factor {f:g} resists uplift; "
    "{screening}")


def _equipment_entries(run: _Spectrum, worst: WorstBolts) -> dict:
    """Step 2: peaks of the equipment and the envelope of its bolt forces."""
    out: dict[str, Any] = {}
    for e in run.model.equipment:
        a6, u6 = run.acc(e.operator), run.disp(e.operator)
        d_ = equipment_entry(e, a6[:3], u6[:3], a6[3:6])
        anchors = np.asarray(e.anchors, dtype=float).reshape(-1, 2)
        if anchors.shape[0]:
            # the six peak accelerations applied together, with every sign: an envelope
            bf = bolt_forces(a6[:, None] * _SIGNS, anchors, mass=e.mass, inertia=e.inertia,
                             cg_height=float(e.cg[2] - e.mount[2]),
                             dead_load_factor=float(e.dead_load_factor))
            anchorage_entries(d_, e, anchors, bf, worst=worst,
                              method=_ANCHORAGE_METHOD.format(f=float(e.dead_load_factor),
                                                              screening=SCREENING_WORDING))
        if e.fp is not None and anchors.shape[0]:
            # the keys of a time-history run; here the peaks of the spectrum method
            d_["fp"] = fp_entry(e, anchors, d_["anchors"])
            d_["fp"]["analysis_peaks_from"] = "response-spectrum analysis"
        out[e.name] = d_
    return out


def _base_entries(run: _Spectrum) -> tuple[dict, np.ndarray]:
    """Step 3: peak base resultants (d'Alembert: −Σ m ü_abs, acceleration type) and, on
    soil, the envelope of the linear contact pressure."""
    model = run.model
    R = model.inertia_reaction
    if R is None:       # pragma: no cover - every model built here has it
        raise InputError("spectrum method: the model has no inertia reaction operators")
    base_pk = run.ms.peak(np.asarray(R.M), kind="acceleration", ground=np.asarray(R.G))
    out = base_entry(model, "resultants the structure exerts on its support (magnitudes)",
                     {c: {"value": float(base_pk[j])} for j, c in enumerate(RESULTANTS)})
    if model.support_kind == "soil":
        A, lx, ly, Ix, Iy, W = base_geometry(model)
        swing = base_pk[2] / A + base_pk[3] * (ly / 2) / Ix + base_pk[4] * (lx / 2) / Iy
        pmax, pmin = W / A + swing, W / A - swing
        out["contact"] = contact_entry(
            W / A, pmax, pmin,
            "rigid base, linear pressure from the weight of block and equipment and the peak "
            "base resultants Fz, Mx, My taken together with their worst signs (an envelope)")
        if pmin < 0:
            run.collected.append(f"Possible uplift / loss of contact: the linear contact "
                                 f"pressure envelope falls to {pmin:.3g} Pa; the linear model "
                                 "(bonded soil springs) no longer holds there.")
    return out, base_pk


def _stability_entry(run: _Spectrum, base_pk: np.ndarray) -> dict:
    """Step 4: stability under the five peak resultants together at every sign: an
    envelope (32 combinations)."""
    combos = np.vstack([base_pk[:5, None] * _SIGNS5, np.zeros((1, _SIGNS5.shape[1]))])
    out = stability_entry(combos, run.model, run.scenario, 1.0)
    _drop_times(out)
    out["spectrum_method"] = (
        "the peak base resultants Fx, Fy, Fz, Mx, My taken together at every sign "
        "(32 combinations) and the least safety factor / largest pressure kept: an "
        "envelope, conservative because the peaks do not occur together")
    return out


def _stress_entries(run: _Spectrum, peaks: dict, *, stresses: bool, progress: bool):
    """Step 5: envelope stresses at the stress points (or element centres) and the
    per-element peaks; ``({}, None)`` without stresses."""
    model = run.model
    n_el = int(np.asarray(model.elements).shape[0])
    S = sp.csr_matrix(model.stress)
    if not (stresses and n_el and S.shape[0]):
        return {}, None
    n_pts = S.shape[0] // 6
    with Progress("stress peaks", total=None, enabled=progress):
        comp = run.ms.peak(S, kind="displacement").reshape(n_pts, 6)     # component peaks
        cov = run.ms.covariance(S, kind="displacement")                   # (n_pts, 6, 6)
    vm, t1, t3 = stress_envelope(comp.T, cov)
    zero = np.zeros(n_pts, dtype=np.int64)
    point_peaks = StressPeaks(vm, zero, t1, zero.copy(), t3, zero.copy())
    pts = model.stress_points
    if pts is not None:            # stress points on the surface (nodal recovery)
        out, notes = stress_summary(point_peaks, pts, 0.0, part_names=list(model.part_names))
        run.collected.extend(notes)
        _drop_times(out)
        speaks = element_peaks(point_peaks, pts.element_points)
    else:                          # one point per element (its centre)
        speaks = point_peaks
        out = {}
        centres = np.asarray(model.element_centres)
        for key, arr, pick in (("von_mises", vm, np.argmax),
                               ("principal_tension", t1, np.argmax),
                               ("principal_compression", t3, np.argmin)):
            e = int(pick(arr))
            out[key] = {"value": float(arr[e]), "element": e,
                        "at": [float(v) for v in centres[e]]}
        out["points"] = "element centres"
        out["units"] = "Pa"
    out["combination"] = STRESS_RULE
    stress_peak_entries(peaks, out)
    return out, speaks


def _spectra(run: _Spectrum, *, progress: bool, analyse) -> dict:
    """Step 6: the design spectra at the floor-spectrum damping values; floor spectra from
    matched motions when ``[analysis] spectrum_motions`` asks for them."""
    periods, damp, _ = floor_grid(run.scenario)
    gpsa = np.zeros((3, damp.size, periods.size))
    for j in range(3):
        if run.targets[j] is None:
            continue
        for i, z in enumerate(damp):
            gpsa[j, i], _ = spectral_accelerations(run.targets[j], periods,
                                                   np.full(periods.size, z),
                                                   scale=run.scales[j])
    out = {"ground": {"periods": periods, "damping": damp, "psa": gpsa, "sa": gpsa},
           "target_psa": np.asarray(run.th.psa(periods), dtype=float),
           "target_damping": run.th.damping,
           "floor": {"periods": periods, "damping": damp, "points": []},
           "floor_out": {"damping_percent": [float(v) for v in damp * 100],
                         "points": {},
                         "note": "not computed: floor spectra need time histories; set "
                                 "[analysis] spectrum_motions = N (invented motions matched to "
                                 "the design spectra) or run records with match_target = true "
                                 "by the modal method"},
           "side": None}
    n_mot = int(run.scenario.analysis.spectrum_motions)
    if n_mot > 0:
        with Progress("spectrum-compatible motions", total=None, enabled=progress):
            if analyse is None:
                raise InputError("the matched motions of analysis.spectrum_motions need the "
                                 "time-history run (pass analyse=groundshake.results.analyse)",
                                 param="analyse")
            out["floor"], out["floor_out"], out["side"] = _matched_floor(
                run.scenario, n_mot, run.targets, run.scales, model=run.model,
                modes=run.modes, residual=run.residual, analyse=analyse)
        run.timings["spectrum_motions"] = run.clock.tick()
    return out


def _assumptions(run: _Spectrum) -> list[str]:
    """What a spectrum run assumes, in words."""
    ms, tz, th = run.ms, run.tz, run.th
    rule = run.scenario.analysis.direction_combination
    out = [
        SIGNS_LOST,
        f"Response-spectrum analysis of {ms.omega.size} mode(s): modal peaks from the design "
        "spectrum at each mode's period and damping; modes combined by CQC (Der Kiureghian "
        "1981); the modes left out by the missing-mass method, a rigid response at the "
        "zero-period acceleration. Modes stiffer than the spectrum's peak are split into a "
        "rigid share α = ZPA/Sa (Lindley & Yow 1980) and a periodic share √(1 − α²); the rigid "
        "shares and the missing mass are summed algebraically, the periodic shares by CQC, "
        "and the two parts by SRSS (USNRC RG 1.92 Rev. 3, from memory).",
        f"Directions combined by {'SRSS' if rule == 'srss' else 'the 100-40-40 rule'} "
        "(USNRC RG 1.92 Rev. 3; ASCE 4).",
        "Both horizontal directions take the horizontal target in full; the vertical takes "
        + ("motion.target_z." if tz is not None and tz is not th else
           (f"{run.scales[2]:g} × the horizontal target (motion.vertical_fraction; 2/3 by "
            "default, the USNRC RG 1.60 / ASCE 4 long-period ratio, from memory)."
            if tz is not None else "nothing (vertical_fraction = 0).")),
        "Absolute accelerations: each mode at its pseudo-spectral acceleration; the rigid part "
        "of the modes left out at the ZPA.",
        "Modal damping: " + ("the composite ratio of each mode" if
                             run.model.is_classically_damped else
                             "the diagonal ratios of ΦᵀCΦ; the coupling of the modes by discrete "
                             "dashpots (soil radiation, equipment supports) is neglected")
        + " (capped as the modal method does).",
        *[n for n in ms.notes if n not in run.collected],
    ]
    motion = run.scenario.motion
    if motion is not None and motion.components():
        out.append("The record components of [motion] are not used by the spectrum "
                   "method (only its target); run method = \"modal\" for them.")
    return out


def _analysis_entry(run: _Spectrum) -> dict:
    """Step 7: the ``analysis`` entry, and the warning on the mass the modes leave out."""
    assumptions = _assumptions(run)
    low = low_mass_text(free_mass_ratio(run.modes), [t is not None for t in run.targets])
    if low:
        run.collected.append("Retained modal mass below 90 % of the mass free to move ("
                             + ", ".join(low) + "): the missing-mass correction carries the "
                             "rest at the ZPA; check that the modes left out are rigid (above "
                             "the spectrum's zero-period frequency), or raise cutoff_hz (ASCE "
                             "7-16 §12.9.1.1 asks for 90 %).")
    ms, an = run.ms, run.scenario.analysis
    return {"method": "spectrum", "assumptions": assumptions,
            "cutoff_hz": an.cutoff_hz, "n_modes": int(np.asarray(run.modes.omega).size),
            "retained_mass_ratio": retained_mass(run.modes),
            "n_steps": 0, "direction_combination": an.direction_combination,
            "missing_mass": True,
            "targets": {"horizontal": run.th.to_dict(), "vertical": run.vertical},
            "zero_period_acceleration": {d: float(ms.zpa[j]) for j, d in enumerate(DIRECTIONS)},
            "modal_spectral_acceleration": {
                d: [float(v) for v in ms.sa[j]] for j, d in enumerate(DIRECTIONS)},
            "modal_damping": [float(v) for v in ms.damping],
            "base_resultants": BASE_RESULTANTS + "; each resultant's peak on its own"}


def _compare_side_by_side(side: dict, sensors: dict, equipment: dict, peaks: dict) -> None:
    """Put this run's peaks beside the matched motions' mean peaks (``side["comparison"]``)."""
    rsa = _with_bolt_maxima({"sensors": sensors,
                             "equipment": {k: dict(v) for k, v in equipment.items()},
                             "peaks": peaks})
    for row in side["comparison"]:
        v = _pick(rsa, row["key"])
        row["spectrum"] = v
        row["ratio"] = (v / row["time_history_mean"]
                        if v is not None and row["time_history_mean"] else None)


#: The peaks set side by side (summary key path, label).
_SIDE_BY_SIDE = (
    (("peaks", "base_shear", "x"), "base shear x [N]"),
    (("peaks", "base_shear", "y"), "base shear y [N]"),
    (("peaks", "base_axial"), "base axial [N]"),
    (("peaks", "overturning_moment", "x"), "overturning moment x [N*m]"),
    (("peaks", "overturning_moment", "y"), "overturning moment y [N*m]"),
    (("peaks", "von_mises"), "von Mises [Pa]"),
)


def _pick(d, key):
    for k in key:
        if not isinstance(d, dict) or k not in d:
            return None
        d = d[k]
    return float(d) if isinstance(d, (int, float)) else None


def _side_keys(summary) -> list[tuple[tuple, str]]:
    keys = list(_SIDE_BY_SIDE)
    for group in ("sensors", "equipment"):
        for nm, e in (summary.get(group) or {}).items():
            for d in DIRECTIONS:
                keys.append(((group, nm, "peak_absolute_acceleration", d),
                             f"{nm} acceleration {d} [m/s2]"))
            if group == "equipment" and e.get("anchors"):
                keys.append(((group, nm, "max_bolt_tension"), f"{nm} max bolt tension [N]"))
                keys.append(((group, nm, "max_bolt_shear"), f"{nm} max bolt shear [N]"))
    return keys


def _with_bolt_maxima(summary) -> dict:
    for e in (summary.get("equipment") or {}).values():
        if e.get("anchors"):
            e["max_bolt_tension"] = max(b["peak_tension"] for b in e["anchors"])
            e["max_bolt_shear"] = max(b["peak_shear"] for b in e["anchors"])
    return summary


def _matched_floor(scenario: Scenario, n, targets, scales, *, model: BlockModel, modes: Modes,
                   residual, analyse, dt: float = 0.002, duration: float = 30.0):
    """Floor spectra (mean over ``n`` spectrum-compatible motions) and the side-by-side rows.

    Each motion is invented: three components of stochastic ground acceleration
    (groundshake.records.synthetic, Boore 2003, seeds 1000 + 10·k + j), the horizontals
    matched to the horizontal design spectrum and the vertical to the vertical one
    (groundshake.matching, 0.02–4 s), run by the modal method through the same model.
    """
    import dataclasses
    import warnings as _w

    from .._errors import GroundshakeWarning
    from ..dynamics._motion import motion_from_arrays
    from ..matching import match_spectrum_report
    from ..records import Record
    from ..records.synthetic import stochastic_acceleration

    band = (max(0.02, 10 * dt), 4.0)
    th_scen = dataclasses.replace(
        scenario, analysis=dataclasses.replace(scenario.analysis, method="modal"))
    runs, misfits = [], []
    for k in range(n):
        comps = {}
        for j, d in enumerate(DIRECTIONS):
            tgt = targets[j]
            if tgt is None:
                continue
            rng = np.random.default_rng(1000 + 10 * k + j)
            acc = stochastic_acceleration(rng, dt=dt, duration=duration)
            rec = Record(acc=acc, dt=dt, name=f"invented-{k + 1}-{d}", component=d,
                         units="m/s2", metadata={"synthetic": "invented, matched to the "
                                                              "design spectrum"})
            fn = tgt if scales[j] == 1.0 else _scaled_target(tgt, scales[j])
            with _w.catch_warnings():
                _w.simplefilter("ignore", GroundshakeWarning)
                res = match_spectrum_report(rec, fn, tgt.damping, band=band)
            misfits.append(float(np.nanmax(np.abs(res.psa_after / res.target_psa - 1.0))))
            comps[d] = np.asarray(res.record.acc, dtype=float)
        n_max = max(a.size for a in comps.values())
        motion = motion_from_arrays({d: np.pad(a, (0, n_max - a.size)) for d, a in comps.items()},
                                    dt)
        with _w.catch_warnings(record=True):
            _w.simplefilter("always", GroundshakeWarning)
            runs.append(analyse(th_scen, progress=False, motion=motion, model=model,
                                modes=modes, stresses=True, residual=residual))
    floor = dict(runs[0].floor)
    for key, v in floor.items():
        if isinstance(v, np.ndarray) and key not in ("periods", "damping"):
            floor[key] = np.mean([np.asarray(r.floor[key]) for r in runs], axis=0)
    floor_out = dict(runs[0].summary["floor_spectra"])
    floor_out["points"] = _mean_leaves([r.summary["floor_spectra"]["points"] for r in runs])
    per = np.asarray(floor["periods"])
    for p, nm in enumerate(floor.get("points", [])):       # peaks of the mean spectra
        for j, d in enumerate(DIRECTIONS):
            for i, dp in enumerate(np.asarray(floor["damping"]) * 100):
                e = floor_out["points"].get(nm, {}).get(d, {}).get(f"{dp:g}%")
                if e is not None:
                    curve = np.asarray(floor["psa"][p, j, i])
                    e["peak_psa"] = float(curve.max())
                    e["period_of_peak"] = float(per[int(np.argmax(curve))])
                    e["zpa_is"] = "mean of the motions' peak absolute accelerations"
    floor_out["method"] = (
        f"mean of the floor spectra of {n} invented motions (stochastic method, Boore 2003), "
        "each component matched to its design spectrum (horizontal target, vertical target or "
        "fraction) over 0.02-4 s and run by the modal method through the same model; a "
        "matched motion is a modified record, so these spectra are an estimate")
    floor_out["largest_match_misfit"] = float(max(misfits))
    keys = _side_keys(runs[0].summary)
    sums = [_with_bolt_maxima(r.summary) for r in runs]
    rows = []
    for key, label in keys:
        vals = [_pick(sm, key) for sm in sums]
        vals = [v for v in vals if v is not None]
        if not vals:
            continue
        rows.append({"quantity": label, "key": list(key),
                     "time_history_mean": float(np.mean(vals)),
                     "time_history_sd": float(np.std(vals, ddof=1)) if len(vals) > 1 else 0.0})
    side = {"n": n, "dt": dt, "duration": duration, "largest_match_misfit": float(max(misfits)),
            "pga_mean": {d: float(np.mean([np.max(np.abs(r.motion.acc[j])) for r in runs]))
                         for j, d in enumerate(DIRECTIONS)},
            "comparison": rows,
            "note": "the spectrum method beside the mean peaks of the same motions that give "
                    "the floor spectra (modal time history); matched motions reach the design "
                    "spectrum only over the matched band and their peak ground acceleration "
                    "may exceed the spectrum's ZPA"}
    return floor, floor_out, side


def _scaled_target(target, scale: float):
    from ..spectra._targets import TargetSpectrum
    return TargetSpectrum(label=f"{scale:g} x {target.label}", damping=target.damping,
                          kind="scaled", parameters={"scale": scale},
                          _fn=lambda t: scale * target._fn(t))


def _mean_leaves(items: list):
    """Leaf-wise mean of nested dicts of numbers (the first one's structure)."""
    first = items[0]
    if isinstance(first, dict):
        return {k: _mean_leaves([it[k] for it in items if isinstance(it, dict) and k in it])
                for k in first}
    if isinstance(first, (int, float)) and not isinstance(first, bool):
        return float(np.mean([float(v) for v in items]))
    return first
