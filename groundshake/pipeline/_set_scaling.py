"""Scaling a suite's record sets to a target spectrum before they run.

Each set is read and corrected here, as a run reads it (the scenario's processing), its
horizontal spectrum is taken over the rule's period band, and
:func:`groundshake.spectra._scaling.scale_to_target` gives one amplitude factor per set.
The factor multiplies every component of the set (the vertical too) and travels with the
set description (:attr:`RecordSet.factor`), so every engine runs the scaled records
through the normal run. Correction is linear (mean and baseline removal, filtering,
taper), so scaling the corrected record equals correcting the scaled one.

The horizontal spectrum of a set depends on the rule (from memory of the standards;
verify against the edition that governs):

- ``asce7-16``: the maximum-direction spectrum (RotD100) of the pair (ASCE 7-16 §16.2.3);
- ``asce7-10``: the SRSS of the two components' spectra (ASCE 7-10 §16.1.3.2);
- ``en1998``: the mean of the two components' spectra, so the set mean equals the mean over
  every horizontal component (EN 1998-1 §3.2.3.1.2).

A set with one horizontal component uses that component's spectrum under every rule.
"""
from __future__ import annotations

import math
import warnings
from dataclasses import dataclass
from typing import Any, Literal, Mapping, Sequence

import numpy as np

from .._errors import GroundshakeError, GroundshakeWarning, InputError
from ..scenario import Scenario, SuiteSettings
from ..spectra import parse_target, response_spectrum, rotd
from ..spectra._scaling import SCALING_RULES, scale_to_target, set_statistic
from ._motion import build_motion
from ._sets import RecordSet, set_failure, set_scenario

__all__ = ["SuiteScaling", "scale_record_sets", "set_spectrum", "SPECTRUM_OF_RULE",
           "BAND_PERIODS", "fundamental_period", "combine_by_rule"]

#: what each rule compares with the target
SPECTRUM_OF_RULE = {
    "asce7-16": "maximum direction (RotD100) of the horizontal pair",
    "asce7-10": "SRSS of the two horizontal components",
    "en1998": "mean of the horizontal components",
}

#: periods (log-spaced) at which the band is checked
BAND_PERIODS = 40

_MODES = {"record": "each", "set": "set"}

#: Each scaling setting's name (a key of a scenario's ``[suite]`` table and the ``dest`` of
#: its command-line option) → the option, shown in front of an error no caller has located.
SCALING_OPTIONS = {"scale_to": "--scale-to", "scale_rule": "--scale-rule",
                   "scale_mode": "--scale-mode", "scale_range": "--scale-range",
                   "scale_period": "--scale-period"}


def _scaling_error(message: str, setting: str, value: Any = None) -> InputError:
    """An error about one scaling setting: ``param`` is the setting (the scenario loader and
    the command line put their own location in front); shown at its option otherwise."""
    return InputError(message, param=setting, value=value, where=SCALING_OPTIONS[setting])


@dataclass(frozen=True)
class SuiteScaling:
    """How a suite's record sets are scaled to a target.

    Attributes
    ----------
    target : str
        Target spectrum spec (see :func:`groundshake.spectra.parse_target`); the PSA it
        gives is in m/s².
    rule : {"asce7-16", "asce7-10", "en1998"}
        Period band, share of the target and horizontal spectrum (see the module notes).
    mode : {"record", "set"}
        ``"record"``: each set first gets its own factor (a least-squares fit in log
        PSA over the band), then a common factor on top; ``"set"``: one common factor.
    limits : (float, float)
        Factors outside this range are warned about (0.25–4, common practice).
    period : float or None
        Fundamental period T [s] that sets the band; None: the model's first mode
        (the longest period among its modes).
    """

    target: str
    rule: Literal["asce7-16", "asce7-10", "en1998"] = "asce7-16"
    mode: Literal["record", "set"] = "record"
    limits: tuple[float, float] = (0.25, 4.0)
    period: float | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.target, str) or not self.target.strip():
            raise _scaling_error(f"given {self.target!r}; allowed a target spec (asce7:..., "
                                 "en1998:...) or a CSV of period [s], PSA [g]", "scale_to",
                                 self.target)
        if self.rule not in SCALING_RULES:
            raise _scaling_error(f"given {self.rule!r}; allowed " + ", ".join(SCALING_RULES),
                                 "scale_rule", self.rule)
        if self.mode not in _MODES:
            raise _scaling_error(f"given {self.mode!r}; allowed record, set", "scale_mode",
                                 self.mode)
        try:
            lo, hi = (float(v) for v in self.limits)
        except (TypeError, ValueError):
            raise _scaling_error(f"given {self.limits!r}; allowed two numbers LOW,HIGH with "
                                 "0 < LOW < HIGH", "scale_range", self.limits) from None
        if not (math.isfinite(lo) and math.isfinite(hi) and 0 < lo < hi):
            raise _scaling_error(f"given {lo:g},{hi:g}; allowed two numbers LOW,HIGH with "
                                 "0 < LOW < HIGH", "scale_range", self.limits)
        object.__setattr__(self, "limits", (lo, hi))
        if self.period is not None and not (math.isfinite(self.period) and self.period > 0):
            raise _scaling_error(f"given {self.period!r}; allowed a period > 0 [s]",
                                 "scale_period", self.period)

    def to_dict(self) -> dict:
        return {"target": self.target, "rule": self.rule, "mode": self.mode,
                "limits": list(self.limits), "period": self.period}

    @classmethod
    def from_settings(cls, settings: SuiteSettings | None) -> "SuiteScaling | None":
        """From a scenario's ``[suite]`` table (None when it asks for no scaling)."""
        if settings is None or settings.scale_to is None:
            return None
        return cls(target=settings.scale_to, rule=settings.scale_rule, mode=settings.scale_mode,
                   limits=tuple(settings.scale_range), period=settings.scale_period)


def fundamental_period(periods: np.ndarray) -> float:
    """The fundamental period [s]: the longest of the model's mode periods (m,)."""
    p = np.asarray(periods, dtype=float)
    p = p[np.isfinite(p) & (p > 0)]
    if p.size == 0:
        raise _scaling_error("the model has no mode to take the fundamental period from; "
                             "give the period", "scale_period")
    return float(np.max(p))


def set_spectrum(acc: Mapping[str, np.ndarray], dt: float, periods: np.ndarray, *,
                 rule: str, damping: float = 0.05) -> np.ndarray:
    """The horizontal spectrum of one set that the rule compares with the target.

    Parameters
    ----------
    acc : mapping {"x"|"y": ndarray (n_t,)}
        Horizontal ground accelerations [m/s²] of the set (one or two, same sampling).
    dt : float
        Time step [s].
    periods : ndarray (n_periods,)
        [s].
    rule : {"asce7-16", "asce7-10", "en1998"}
    damping : float
        Damping ratio of the spectra (the target's).

    Returns
    -------
    ndarray (n_periods,)
        PSA [m/s²]: RotD100 (asce7-16), SRSS (asce7-10) or the mean (en1998) of the two
        components; with one component, its own PSA.
    """
    comps = [np.asarray(acc[c], dtype=float) for c in ("x", "y") if c in acc]
    if not comps:
        raise InputError("scaling: the set has no horizontal component (x or y)")
    if len(comps) == 1:
        return np.asarray(response_spectrum(comps[0], dt, periods, damping).psa)[0]
    if rule == "asce7-16":
        pair = rotd(comps[0], comps[1], dt, periods, damping, percentiles=(100,))
        return np.asarray(pair.psa)[0, 0]
    psa = np.asarray(response_spectrum(np.stack(comps), dt, periods, damping).psa)[:, 0, :]
    if rule == "asce7-10":
        return np.sqrt(np.sum(psa ** 2, axis=0))
    return np.mean(psa, axis=0)


def _set_motion(scenario: Scenario, rs: RecordSet):
    """The set's motion read and corrected as a run reads it (no matching, unscaled by
    the target factor)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        return build_motion(set_scenario(scenario, rs, with_factor=False, match_target=False))


def scale_record_sets(scenario: Scenario, sets: Sequence[RecordSet], scaling: SuiteScaling, *,
                      mode_periods: np.ndarray | None = None
                      ) -> tuple[list[RecordSet], list[dict], dict]:
    """Scale factors of a suite's sets; the sets with their factors.

    Parameters
    ----------
    scenario : Scenario
        Gives the processing settings and the folder of a relative target table.
    sets : sequence of RecordSet
    scaling : SuiteScaling
    mode_periods : ndarray (m,), optional
        The model's mode periods [s]; the fundamental period is their longest when
        ``scaling.period`` is None.

    Returns
    -------
    scaled : list of RecordSet
        The sets that could be read, each with its ``factor``.
    failed : list of dict
        ``{"record", "status": "failed", "files", "error"}`` for sets that could not be
        read (they are not run, and take no part in the factors).
    doc : dict
        For ``suite.json`` ``scaling``: ``rule``, ``source``, ``target``,
        ``target_label``, ``period_s``, ``period_from``, ``band`` [s], ``share``,
        ``mode``, ``spectrum``, ``damping``, ``range``, ``set_factor``,
        ``least_ratio``, ``factors`` (a list of ``{record, factor, own, in_range}``)
        and ``warnings``.

    Raises
    ------
    InputError
        A bad target, a target undefined over the band, no horizontal component, or no
        set that can be read.

    Warns
    -----
    GroundshakeWarning
        A factor outside ``scaling.limits``.
    """
    if scenario.motion is not None and scenario.motion.match_target:
        raise _scaling_error("[motion] match_target = true would replace the scaled amplitudes "
                             "by matched ones; set it false or scale to no target", "scale_to",
                             scaling.target)
    try:
        target = parse_target(scaling.target, base_dir=scenario.base_dir)
    except GroundshakeError as e:
        raise _scaling_error(f"{scaling.target}: {e}", "scale_to", scaling.target) from None
    if scaling.period is not None:
        T, period_from = float(scaling.period), "given"
    else:
        if mode_periods is None:
            raise _scaling_error("no modes to take the fundamental period from; give the "
                                 "period", "scale_period")
        T, period_from = fundamental_period(mode_periods), "the model's first mode"
    a, b, share, source = SCALING_RULES[scaling.rule]
    periods = np.geomspace(a * T, b * T, BAND_PERIODS)
    tgt = np.asarray(target.psa(periods), dtype=float)
    if not np.all(np.isfinite(tgt) & (tgt > 0)):
        raise _scaling_error(f"{scaling.target}: the target is not defined (or is zero) over "
                             f"the band {periods[0]:.3g}–{periods[-1]:.3g} s ({a:g}T to {b:g}T, "
                             f"T = {T:.3g} s); give a target that covers it", "scale_to",
                             scaling.target)
    readable: list[RecordSet] = []
    failed: list[dict] = []
    spectra = []
    for rs in sets:
        if not any(c in rs.files for c in ("x", "y")):
            raise InputError(f"record set {rs.name!r}: scaling to a target needs a horizontal "
                             "component (x or y)")
        try:
            m = _set_motion(scenario, rs)
            acc = {c: m.acc[i] for i, c in enumerate(("x", "y")) if c in m.components}
            spectra.append(set_spectrum(acc, m.dt, periods, rule=scaling.rule,
                                        damping=target.damping))
        except (GroundshakeError, OSError, ValueError) as e:
            failed.append(set_failure(rs, e, " (while scaling to the target)"))
            continue
        readable.append(rs)
    if not readable:
        raise InputError("scaling: no record set could be read; "
                         + "; ".join(f"{f['record']}: {f['error']}" for f in failed[:3]))
    sf = scale_to_target(np.stack(spectra), periods, tgt, period=T, rule=scaling.rule,
                         mode=_MODES[scaling.mode], limits=scaling.limits)
    lo, hi = scaling.limits
    rows, warns = [], []
    scaled = []
    for rs, f, own in zip(readable, sf.factors, sf.own):
        inside = bool(lo <= f <= hi)
        rows.append({"record": rs.name, "factor": float(f), "own": float(own),
                     "in_range": inside})
        if not inside:
            warns.append(f"record set {rs.name}: scale factor {f:.3g} outside {lo:g}–{hi:g}")
        scaled.append(RecordSet(name=rs.name, files=dict(rs.files), scale=dict(rs.scale),
                                units=rs.units, dt=rs.dt, factor=float(f)))
    for w in warns:
        warnings.warn(w, GroundshakeWarning, stacklevel=2)
    doc = {"rule": scaling.rule, "source": source, "target": scaling.target,
           "target_label": target.label, "period_s": T, "period_from": period_from,
           "band": [float(periods[0]), float(periods[-1])], "share": share,
           "mode": scaling.mode, "spectrum": SPECTRUM_OF_RULE[scaling.rule]
           + " (a set with one horizontal component: its own spectrum)",
           "damping": float(target.damping), "range": [lo, hi],
           "set_factor": float(sf.set_factor), "least_ratio": float(sf.least_ratio),
           "factors": rows, "warnings": warns,
           "note": "Each set's factor multiplies all of its components (the vertical too); "
                   "factors are computed over the sets that could be read"}
    return scaled, failed, doc


def combine_by_rule(stats: Mapping[str, Mapping], n_failed: int, n_sets: int) -> dict:
    """How a scaled suite's peaks are combined, and the combined values.

    Parameters
    ----------
    stats : mapping
        :func:`groundshake.pipeline.peak_statistics` of the sets run (quantity → statistics).
    n_failed, n_sets : int
        Sets that failed, and all sets.

    Returns
    -------
    dict
        ``combination`` (``"mean"`` or ``"max"``), ``combination_note`` (why, with the
        source), ``count`` (sets that ran) and ``combined`` (quantity → the mean or the
        maximum over the sets that ran) [SI units of each quantity].
    """
    n_ok = n_sets - n_failed
    how, why = set_statistic(n_ok)
    if n_failed:
        why += f"; {n_failed} of {n_sets} set(s) failed and are not counted"
    combined = {k: v[how] for k, v in stats.items() if how in v}
    return {"combination": how, "combination_note": why, "count": n_ok, "combined": combined}
