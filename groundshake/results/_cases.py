"""Soil property cases: lower, best and upper estimates of the soil's shear modulus.

Practice followed (ASCE 4-16 §5.1.7, from memory — verify): the best estimate G is the
strain-compatible modulus; the lower and upper estimates are G/(1 + Cv) and G·(1 + Cv),
with a coefficient of variation Cv of at least 0.5 where the soil is not well
investigated. Each case builds its own model once and runs the same motion; the
governing result is the envelope over the cases (largest peak, least safety factor).
Floor spectra are enveloped across the cases before peak broadening (the unbroadened
spectra of the cases are enveloped, then that envelope is broadened ±15 %), which is
the common practice for spectra from several soil cases (ASCE 4; USNRC RG 1.122).

Strain-compatible modulus: G = (G/G0)·ρVs², with G/G0 as entered (``modulus_ratio``) or
from the level of shaking (``strain_compatible``, ASCE 7-16 Table 19.2-1, from memory).
"""
from __future__ import annotations

import copy
import dataclasses
import math
import warnings
from typing import Mapping

import numpy as np

from .._errors import GroundshakeWarning, InputError
from ..model._impedance import modulus_ratio_of
from ..scenario import Scenario, StrainCompatible, SupportSettings

__all__ = ["soil_cases", "needs_soil_cases", "analyse_cases", "consistent_soil_model",
           "spring_frequencies", "CASE_PRACTICE"]

CASE_PRACTICE = ("lower, best and upper estimates G/(1+Cv), G, G(1+Cv) of the strain-"
                 "compatible shear modulus (ASCE 4-16 §5.1.7, from memory); the envelope "
                 "over the cases governs; floor spectra enveloped across cases before "
                 "broadening")


def needs_soil_cases(scenario: Scenario) -> bool:
    """True when the scenario asks for soil cases (``variation``) or a modulus reduction."""
    s = scenario.support
    if s.kind != "soil":
        return False
    return (s.variation is not None or s.modulus_ratio is not None
            or s.strain_compatible is not None or bool(s.frequency_dependent))


def spring_frequencies(model, modes, *, least_share: float = 0.05) -> np.ndarray:
    """Frequency at which each base spring works, from the modes that load it.

    Parameters
    ----------
    model : BlockModel
        On soil (``model.reaction.K`` gives the six base resultants of a displacement).
    modes : Modes
        Mass-normalised shapes (n, m), so that mode n's strain energy is ω_n²/2.
    least_share : float
        Modes with a smaller share of their strain energy in a spring are left out of
        its average; a spring no mode works that much keeps 0 Hz (static stiffness).

    Returns
    -------
    ndarray (6,)
        [Hz] for the springs x, y, z, rx, ry, t: the average of the mode frequencies
        weighted by the share s_jn = E_jn/ω_n² of each mode's strain energy in spring j,
        E_jn = F_jn²/k_j (F_jn the spring's resultant in mode n, k_j its stiffness; exact
        for a rigid base on six springs). Coupled sway-rocking modes share a spring
        almost equally, so a weighted average (not the single largest share) keeps the
        iteration from jumping between them.
    """
    phi = np.asarray(modes.shapes, dtype=float)
    om2 = np.asarray(modes.omega, dtype=float) ** 2
    if phi.shape[1] == 0:
        return np.zeros(6)
    k = np.asarray(model.impedance.stiffness, dtype=float)
    F = np.asarray(model.reaction.K, dtype=float) @ phi                 # (6, m)
    share = (F ** 2 / k[:, None]) / np.where(om2 > 0, om2, np.inf)[None, :]   # (6, m)
    w = np.where(share >= least_share, share, 0.0)
    f = np.asarray(modes.frequency, dtype=float)
    tot = w.sum(axis=1)
    return np.where(tot > 0, (w @ f) / np.where(tot > 0, tot, 1.0), 0.0)


def consistent_soil_model(scenario: Scenario, *, cutoff_hz=None, n_modes=None, tol: float = 0.01,
                          max_iter: int = 8):
    """A model whose springs are evaluated at the frequencies of their own modes.

    Starting from the static springs, each spring is re-evaluated with Gazetas' (1991)
    dynamic stiffness coefficient at the frequency of the modes that work it
    (:func:`spring_frequencies`), the model is rebuilt and its modes recomputed, until
    those frequencies change by less than ``tol`` (relative).

    Parameters
    ----------
    scenario : Scenario
        On soil.
    cutoff_hz, n_modes : optional
        Which modes to compute (as ``[analysis]``).
    tol : float
        Relative change of the spring frequencies that ends the iteration.
    max_iter : int
        At most this many rebuilds (a warning says when it did not settle).

    Returns
    -------
    (BlockModel, dict)
        The model and ``{"spring_frequencies_hz": [6], "iterations": int, "converged": bool}``.
    """
    from ..dynamics import compute_modes
    from ..model import build_model
    an = scenario.analysis
    cutoff_hz = cutoff_hz if cutoff_hz is not None else an.cutoff_hz
    n_modes = n_modes if n_modes is not None else an.modes
    model = build_model(scenario)
    f_old = None
    converged = False
    it = 0
    for it in range(1, max_iter + 1):
        modes = compute_modes(model, cutoff_hz=None if n_modes else cutoff_hz,
                              n_modes=n_modes, warn=False)
        f = spring_frequencies(model, modes)
        if f_old is not None and np.all(np.abs(f - f_old) <= tol * np.maximum(f_old, 1e-9)):
            converged = True
            break
        model = build_model(scenario, soil_frequency_hz=f)
        f_old = f
    if not converged:
        warnings.warn(f"frequency-dependent soil springs did not settle in {max_iter} "
                      "rebuilds; the last spring frequencies are used", GroundshakeWarning,
                      stacklevel=2)
    return model, {"spring_frequencies_hz": [float(v) for v in f_old],
                   "iterations": it, "converged": converged}


def _as_support(support: SupportSettings | Mapping) -> SupportSettings:
    """The ``[support]`` table as its scenario type (a dict of its keys converted once;
    keys given as None take the type's defaults)."""
    if isinstance(support, SupportSettings):
        return support
    given = {k: v for k, v in support.items() if v is not None}
    if isinstance(given.get("strain_compatible"), Mapping):
        given["strain_compatible"] = StrainCompatible(**given["strain_compatible"])
    return SupportSettings(**given)


def soil_cases(support: SupportSettings | Mapping) -> list[dict]:
    """The soil cases of a ``[support]`` table.

    Parameters
    ----------
    support : SupportSettings or dict
        Soil support with ``shear_wave_velocity`` [m/s], ``density`` [kg/m³] and
        optionally ``variation`` (Cv), ``modulus_ratio`` or ``strain_compatible``; a dict
        of these keys is converted to :class:`SupportSettings` first.

    Returns
    -------
    list of dict
        One per case, lower to upper: ``name`` ("lower", "best", "upper"), ``factor``
        on the best-estimate modulus, ``modulus_ratio`` G/G0, ``shear_modulus`` G [Pa],
        ``shear_wave_velocity`` √(G/ρ) [m/s] (the effective value the springs use),
        ``input_shear_wave_velocity`` [m/s] (what the case's model is given before the
        modulus ratio is applied) and ``modulus_source``.
    """
    support = _as_support(support)
    vs0 = float(support.shear_wave_velocity)
    rho = float(support.density)
    ratio, source = modulus_ratio_of(support)
    cv = support.variation
    factors = [("best", 1.0)] if cv is None else \
        [("lower", 1.0 / (1.0 + float(cv))), ("best", 1.0), ("upper", 1.0 + float(cv))]
    out = []
    for name, f in factors:
        g = f * ratio * rho * vs0 ** 2
        out.append({"name": name, "factor": f, "modulus_ratio": ratio, "shear_modulus": g,
                    "shear_wave_velocity": math.sqrt(g / rho),
                    "input_shear_wave_velocity": vs0 * math.sqrt(f),
                    "modulus_source": source})
    return out


def _case_scenario(scenario, case: dict):
    """A copy of the scenario for one case (no variation, the case's input Vs)."""
    sup = dataclasses.replace(scenario.support, variation=None,
                              shear_wave_velocity=case["input_shear_wave_velocity"])
    return dataclasses.replace(scenario, support=sup)


# ----------------------------------------------------------------------------- envelope
def _mag(v) -> float:
    return abs(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else -math.inf


def _govern_peaks(items: list, names: list[str]):
    """Envelope of like-shaped peak dicts: largest magnitude wins; {value, ...} as a whole."""
    first = items[0]
    if isinstance(first, dict):
        if "value" in first:
            k = int(np.argmax([_mag(x.get("value") if isinstance(x, dict) else None)
                               for x in items]))
            return {**items[k], "case": names[k]}
        return {key: _govern_peaks([x.get(key) for x in items], names) for key in first
                if all(isinstance(x, dict) and key in x for x in items)}
    if isinstance(first, (int, float)) and not isinstance(first, bool):
        return max(items, key=_mag)
    return first


def _envelope_sensor(items: list, names: list[str]) -> dict:
    out = copy.deepcopy(items[0])
    for qty in ("peak_absolute_acceleration", "peak_relative_displacement"):
        tkey = "time_of_" + qty
        gov = {}
        for d in items[0].get(qty, {}):
            k = int(np.argmax([x[qty][d] for x in items]))
            out[qty][d] = items[k][qty][d]
            if tkey in out and d in items[k].get(tkey, {}):
                out[tkey][d] = items[k][tkey][d]
            gov[d] = names[k]
        out.setdefault("governing_case", {})[qty] = gov
    return out


def _envelope_equipment(items: list, names: list[str]) -> dict:
    out = _envelope_sensor(items, names)
    for qty in ("peak_angular_acceleration",):
        for d in items[0].get(qty, {}):
            out[qty][d] = max(x[qty][d] for x in items)
    for i, _ in enumerate(items[0].get("anchors", [])):
        bolts = [x["anchors"][i] for x in items]
        b = out["anchors"][i]
        for key, tkey in (("peak_tension", "time_of_peak_tension"),
                          ("peak_shear", "time_of_peak_shear"),
                          ("interaction_ratio", "time_of_peak_interaction")):
            if key in b:
                k = int(np.argmax([x[key] for x in bolts]))
                b[key] = bolts[k][key]
                if tkey in bolts[k]:                     # a spectrum run has no times
                    b[tkey] = bolts[k][tkey]
                b.setdefault("governing_case", {})[key] = names[k]
        for key in ("dc_tension", "dc_shear"):
            if key in b:
                b[key] = max(x[key] for x in bolts)
        b["min_axial"] = min(x["min_axial"] for x in bolts)
    return out


def _envelope_stability(items: list, names: list[str]) -> dict:
    out = copy.deepcopy(items[0])

    def least(key):
        vals = [(x[key].get("min_safety_factor"), j) for j, x in enumerate(items)]
        vals = [(math.inf if v is None else v, j) for v, j in vals]
        v, j = min(vals)
        if items[j][key].get("min_safety_factor") is not None or all(
                x[key].get("min_safety_factor") is None for x in items):
            out[key] = {**items[j][key], "case": names[j]}
        out[key]["by_case"] = {names[i]: x[key].get("min_safety_factor")
                               for i, x in enumerate(items)}

    least("sliding")
    least("overturning")
    peaks = [(_or_inf(x["bearing"].get("peak_pressure")) if x["bearing"].get("edge") is not None
              else -math.inf) for x in items]
    j = int(np.argmax(peaks))
    out["bearing"] = {**items[j]["bearing"], "case": names[j],
                      "by_case": {names[i]: x["bearing"].get("peak_pressure")
                                  for i, x in enumerate(items)}}
    return out


def _or_inf(v) -> float:
    return math.inf if v is None else v


def _worst(items: list, names: list[str]):
    got = [(x["value"], j) for j, x in enumerate(items) if x]
    if not got:
        return None
    _, j = max(got)
    return {**items[j], "case": names[j]}


def _envelope_floor(results: list, names: list[str]):
    """Floor spectra: envelope of the cases' unbroadened spectra, then broadened."""
    from ._floor import broaden
    base = results[0].floor
    out = dict(results[-1].floor) if not base else dict(base)
    if "psa" not in base:
        return out
    periods = np.asarray(base["periods"])
    frac = float(results[0].summary["floor_spectra"]["broadening_percent"]) / 100.0
    for key in ("psa", "sa"):
        env = np.max(np.stack([np.asarray(r.floor[key]) for r in results]), axis=0)
        out[key] = env
        out[key + "_broadened"] = broaden(periods, env, fraction=frac)
    if np.asarray(out["psa"]).shape[0]:
        out["envelope_psa"] = out["psa"].max(axis=0)
        out["envelope_psa_broadened"] = out["psa_broadened"].max(axis=0)
    return out


def analyse_cases(scenario: Scenario, *, analyse, progress: bool = True, method=None,
                  motion=None, stresses: bool = True):
    """Run each soil case of the scenario and return the best-estimate results with the
    envelope as the governing peaks.

    Parameters
    ----------
    scenario : Scenario
        With ``[support] kind = "soil"`` and ``variation`` and/or a modulus reduction.
    analyse : callable
        :func:`groundshake.results.analyse` (passed in to keep the import order).
    progress, method, motion, stresses
        As for :func:`~groundshake.results.analyse`; the motion is built once and shared.

    Returns
    -------
    RunResults
        The best-estimate case's histories (``histories.csv``) with ``summary["soil_cases"]``
        (one entry per case: ``name``, ``shear_modulus`` [Pa], ``shear_wave_velocity``
        [m/s], ``modulus_ratio``, ``factor``, ``modes``, ``peaks``, ``stability``,
        ``worst_dc``, ``worst_interaction``) and the envelope in ``peaks``, ``sensors``,
        ``equipment``, ``stability``, ``worst_dc``, ``worst_interaction`` and the floor
        spectra.
    """
    cases = soil_cases(scenario.support)
    cv = scenario.support.variation
    notes = []
    if cv is not None and cv < 0.5:
        notes.append(f"Soil variation Cv = {cv:g} is below 0.5, the least ASCE 4-16 §5.1.7 asks "
                     "for where the soil is not well investigated (from memory)")
    run_method = method or scenario.analysis.method
    if motion is None and run_method != "spectrum":      # the spectrum method reads no records
        raise InputError("none given; groundshake.analyse (the application layer) reads it "
                         "from the scenario's [motion] files", param="motion")
    results = [_run_case(_case_scenario(scenario, c), c, analyse=analyse, progress=progress,
                         method=method, run_method=run_method, motion=motion,
                         stresses=stresses) for c in cases]
    names = [c["name"] for c in cases]
    ib = names.index("best")
    best = results[ib]
    s = best.summary
    entries = [_case_entry(c, r.summary) for c, r in zip(cases, results)]
    if len(results) > 1:
        _envelope_into(best, results, names)
    s["soil_cases"] = entries
    s["soil_case_practice"] = CASE_PRACTICE
    s["envelope"] = {"cases": names,
                     "histories": f"histories.csv holds the {names[ib]} case" if best.histories
                     else "no histories (response-spectrum analysis)",
                     "governing": "largest peak and least safety factor over the cases"}
    s["scenario"] = scenario.to_dict()
    s["warnings"].extend(n for n in notes if n not in s["warnings"])
    for w in s["warnings"]:
        warnings.warn(w, GroundshakeWarning, stacklevel=3)
    return best


def _run_case(sc: Scenario, case: dict, *, analyse, progress, method, run_method, motion,
              stresses):
    """One soil case: its model (springs at the modes' frequencies, or rotational cones in
    a direct run, when frequency dependent) and its run; its warnings are collected for
    the combined list, others re-emitted."""
    from ..model import build_model
    with warnings.catch_warnings(record=True) as caught:   # re-emitted once, combined
        warnings.simplefilter("always", GroundshakeWarning)
        if sc.support.frequency_dependent and run_method == "direct":
            # step by step: static springs and rotational cones (model/_cone.py)
            model = build_model(sc, cones=True)
            case["frequency_dependent"] = {
                "method": "rotational cones (Wolf 1994, from memory), direct run",
                **(model.cones.to_dict() if model.cones is not None else {})}
        elif sc.support.frequency_dependent:
            model, info = consistent_soil_model(sc)
            case["frequency_dependent"] = info
        else:
            model = build_model(sc)
        r = analyse(sc, progress=progress, method=method, motion=motion, model=model,
                    stresses=stresses)
    for w in caught:
        if not issubclass(w.category, GroundshakeWarning):
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    return r


def _case_entry(c: dict, rs: dict) -> dict:
    """The ``soil_cases`` entry of one case from its summary ``rs``."""
    return {"name": c["name"], "shear_modulus": c["shear_modulus"],
            "shear_wave_velocity": c["shear_wave_velocity"],
            "modulus_ratio": c["modulus_ratio"], "factor": c["factor"],
            "modulus_source": c["modulus_source"],
            "modes": [{"frequency": m["frequency"], "period": m["period"],
                       "effective_mass_ratio": m["effective_mass_ratio"]}
                      for m in rs["modes"].get("modes", [])],
            "peaks": rs["peaks"], "stability": rs["stability"],
            "worst_dc": rs.get("worst_dc"),
            "worst_interaction": rs.get("worst_interaction"),
            "springs": rs["model"].get("support", {}).get("springs"),
            "frequency_dependent": c.get("frequency_dependent")}


def _envelope_into(best, results: list, names: list[str]) -> None:
    """Put the envelope over the cases into the best estimate's summary and floor spectra."""
    s = best.summary
    sums = [r.summary for r in results]
    s["peaks"] = _govern_peaks([x["peaks"] for x in sums], names)
    s["sensors"] = {nm: _envelope_sensor([x["sensors"][nm] for x in sums], names)
                    for nm in s["sensors"]}
    s["equipment"] = {nm: _envelope_equipment([x["equipment"][nm] for x in sums], names)
                      for nm in s["equipment"]}
    s["stability"] = _envelope_stability([x["stability"] for x in sums], names)
    s["base"]["peaks"] = _govern_peaks([x["base"]["peaks"] for x in sums], names)
    contacts = [x["base"].get("contact") for x in sums]
    if all(contacts):
        kmin = int(np.argmin([c["min_pressure"] for c in contacts]))
        kmax = int(np.argmax([c["peak_pressure"] for c in contacts]))
        tp = contacts[kmax].get("time_of_peak_pressure")     # none in a spectrum run
        s["base"]["contact"] = {
            **contacts[kmin], "peak_pressure": contacts[kmax]["peak_pressure"],
            **({"time_of_peak_pressure": tp} if tp is not None else {}),
            "uplift": any(c["uplift"] for c in contacts),
            "governing_case": {"min_pressure": names[kmin], "peak_pressure": names[kmax]}}
    s["worst_dc"] = _worst([x.get("worst_dc") for x in sums], names)
    s["worst_interaction"] = _worst([x.get("worst_interaction") for x in sums], names)
    best.floor = _envelope_floor(results, names)
    fo = s["floor_spectra"]
    fo["soil_cases"] = "unbroadened spectra enveloped across the soil cases, then broadened"
    periods = np.asarray(best.floor["periods"])
    for p, nm in enumerate(best.floor.get("points", [])):
        for j, d in enumerate(("x", "y", "z")):
            for i, key in enumerate(list(fo["points"][nm][d])):
                row = best.floor["psa"][p, j, i]
                fo["points"][nm][d][key].update(
                    peak_psa=float(row.max()),
                    period_of_peak=float(periods[int(np.argmax(row))]),
                    zpa=max(x["floor_spectra"]["points"][nm][d][key]["zpa"] for x in sums))
    warns = []
    for nm, x in zip(names, sums):          # a warning of some cases only names them
        for w in x.get("warnings", []):
            where = [n for n, y in zip(names, sums) if w in y.get("warnings", [])]
            text = w if len(where) == len(names) else f"({' and '.join(where)} soil case) {w}"
            if text not in warns:
                warns.append(text)
    s["warnings"] = warns
