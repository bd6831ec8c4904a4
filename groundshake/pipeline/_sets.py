"""Record sets: the files of one run, grouped by component, and one set run through a model
built once.

A *record set* is what one run needs: one file per ground-motion component (x, y
horizontal; z vertical), each with a scale factor and units. The suite finds the files
(a folder, a pattern, a manifest) and runs many sets; this module knows what a set means
to the stages below: which component a file name gives (:func:`group_by_component`), the
scenario with the set as its ``[motion]`` (:func:`set_scenario`), how long its records are
(:func:`record_set_samples`) and one run of it as plain data (:func:`run_set`).
"""
from __future__ import annotations

import math
import os
import re
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Mapping, Sequence

import numpy as np

from .._errors import GroundshakeError, GroundshakeWarning, InputError
from ..records import read_record
from ..records._components import describe
from ..records.io import record_suffixes
from ..records.io._common import file_stem, inner_name
from ..scenario import Scenario
from ._run import analyse

if TYPE_CHECKING:  # pragma: no cover
    from ..dynamics import Modes
    from ..model import BlockModel

__all__ = ["RecordSet", "COMPONENT_WORDS", "component_of_file", "is_record_file_name", "file_stem", "group_by_component",
           "set_scenario", "set_failure", "record_set_samples", "run_set", "scalar_peaks",
           "scenario_from_plain"]

COMPONENT_WORDS: Mapping[str, str] = {
    **dict.fromkeys(("x", "h1", "e", "ew", "east"), "x"),
    **dict.fromkeys(("y", "h2", "n", "ns", "north"), "y"),
    **dict.fromkeys(("z", "up", "v", "ud", "vert"), "z"),
}

_SPLIT = re.compile(r"^(?P<stem>.+?)[-_.](?P<word>[A-Za-z0-9]+)$")


@dataclass(frozen=True)
class RecordSet:
    """Files for one run of a suite: plain data only (safe to send to any worker).

    Attributes
    ----------
    name : str
        Set name, unique within the suite.
    files : dict
        Component (``"x"``, ``"y"``, ``"z"``) → file path (str).
    scale : dict
        Component → scale factor (default 1.0).
    units : str or None
        Units of every file of the set (None: from the file, or the suite's ``--units``).
    dt : float or None
        Time step [s] for one-column text files (None: from the file).
    factor : float
        Amplitude factor of the whole set from scaling to a target (1.0: not scaled);
        it multiplies every component's ``scale``.
    """

    name: str
    files: Mapping[str, str]
    scale: Mapping[str, float] = field(default_factory=dict)
    units: str | None = None
    dt: float | None = None
    factor: float = 1.0

    def scales(self) -> dict[str, float]:
        """Component → the factor its record is multiplied by (``scale`` × ``factor``)."""
        return {c: float(self.scale.get(c, 1.0)) * float(self.factor) for c in self.files}

    def to_dict(self) -> dict:
        return {"name": self.name, "files": dict(self.files),
                "scale": {c: float(self.scale.get(c, 1.0)) for c in self.files},
                "units": self.units, "dt": self.dt, "factor": float(self.factor)}

    @classmethod
    def from_dict(cls, d: Mapping) -> "RecordSet":
        return cls(name=str(d["name"]), files=dict(d["files"]), scale=dict(d.get("scale", {})),
                   units=d.get("units"), dt=d.get("dt"), factor=float(d.get("factor", 1.0)))


def is_record_file_name(path: str | os.PathLike) -> bool:
    """Whether the file's ending (before a ``.gz``) is one a record reader names
    (:func:`groundshake.records.io.record_suffixes`); hidden files and README.md are not."""
    name = Path(path).name
    if name.startswith(".") or name.lower() == "readme.md":
        return False
    return Path(inner_name(path)).suffix.lower() in record_suffixes()


def component_of_file(path: str | os.PathLike) -> tuple[str, str] | None:
    """(set stem, axis) of a file named ``STEM-WORD.ext`` (``-``, ``_`` or ``.``), or None.

    WORD (case-insensitive) is one of :data:`COMPONENT_WORDS` (``x``, ``h1``, ``e``,
    ``ew``, ``east`` → x; ``y``, ``h2``, ``n``, ``ns``, ``north`` → y; ``z``, ``up``,
    ``v``, ``ud``, ``vert`` → z), or any component code the readers know
    (:func:`groundshake.records._components.describe`: ``hnz``, ``ud1``, ``360``,
    ``n28w``): vertical → z; a horizontal with an azimuth → the nearer axis, x east
    (90°, 270°) and y north (0°, 180°), as ``e`` → x and ``n`` → y; a horizontal without
    one → x if it ends in 1 and y if in 2 (``hn1``, ``hn2``, like ``h1``, ``h2``). A bare
    number needs two digits (``rec-1`` is a set number, not 1°); a diagonal (45°) is
    not guessed.
    """
    m = _SPLIT.match(file_stem(path))
    if not m:
        return None
    word = m.group("word")
    comp = COMPONENT_WORDS.get(word.lower())
    if comp is None and not (word.isdigit() and len(word) < 2):
        kind, az = describe(word)
        if kind == "vertical":
            comp = "z"
        elif kind == "horizontal" and az is not None:
            east, north = abs(math.sin(math.radians(az))), abs(math.cos(math.radians(az)))
            comp = None if math.isclose(east, north, rel_tol=1e-9) else (
                "x" if east > north else "y")
        elif kind == "horizontal":
            comp = {"1": "x", "2": "y"}.get(word[-1:])
    return None if comp is None else (m.group("stem"), comp)


def group_by_component(files: Sequence[str | os.PathLike]) -> dict[str, dict[str, str]]:
    """Files grouped into sets by name (:func:`component_of_file`), sorted by set name.

    Returns set stem → {axis: file path (str)}, the axes sorted (x, y, z).

    Raises
    ------
    InputError
        A file whose component cannot be told, or two files for one component of a set.
    """
    groups: dict[str, dict[str, str]] = {}
    for f in files:
        found = component_of_file(f)
        if found is None:
            raise InputError(
                f"{f}: cannot tell the component from the name; end the stem with one of "
                f"{', '.join(sorted(COMPONENT_WORDS))} (e.g. rec01-h1.mseed) or use a manifest CSV")
        stem, comp = found
        group = groups.setdefault(stem, {})
        if comp in group:
            raise InputError(f"{f}: set {stem!r} already has a {comp} component ({group[comp]})")
        group[comp] = str(f)
    return {stem: dict(sorted(g.items())) for stem, g in sorted(groups.items())}


def set_scenario(scenario: Scenario, rs: RecordSet, *, with_factor: bool = True, **motion):
    """The scenario with the set's files as its ``[motion]`` components.

    Each component is scaled by the set's ``scale`` times (``with_factor``) its target
    factor, with the set's ``units`` and ``dt`` where given; ``motion`` passes
    ``target``/``match_target`` on to :meth:`Scenario.with_motion`.
    """
    scales = rs.scales() if with_factor else {c: float(rs.scale.get(c, 1.0)) for c in rs.files}
    comps: dict[str, dict[str, Any]] = {}
    for c, f in rs.files.items():
        comp: dict[str, Any] = {"file": f, "scale": scales[c]}
        if rs.units:
            comp["units"] = rs.units
        if rs.dt:
            comp["dt"] = float(rs.dt)
        comps[c] = comp
    return scenario.with_motion(**comps, **motion)


def set_failure(rs: RecordSet, error: BaseException, note: str = "") -> dict:
    """A set's failed result: ``record``, ``status`` ("failed"), ``files`` and the first
    line of the error (its type where it has no text), followed by ``note``."""
    text = str(error).strip().splitlines()
    return {"record": rs.name, "status": "failed", "files": dict(rs.files),
            "error": (text[0] if text else type(error).__name__) + note}


def record_set_samples(rs: RecordSet) -> int | None:
    """Samples in the set's longest record (a quick read), None if none can be read here."""
    longest = None
    for f in rs.files.values():
        for units in dict.fromkeys((rs.units, "m/s2")):
            try:
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore")
                    recs = read_record(f, units=units, dt=rs.dt)
            except (GroundshakeError, OSError, ValueError):
                continue
            n = max((len(r.acc) for r in recs), default=0)
            longest = n if longest is None else max(longest, n)
            break
    return longest


def scenario_from_plain(data: Mapping[str, Any], *, source: str,
                        base_dir: str | os.PathLike) -> Scenario:
    """The scenario again from ``Scenario.to_dict()`` (what a suite's workers receive)."""
    return Scenario.from_dict(dict(data), source=source, base_dir=Path(base_dir))


_NOT_PEAKS = {"time", "at", "signed", "position", "node", "element", "step", "where"}


def scalar_peaks(summary: Mapping[str, Any]) -> dict:
    """The peak values of a run's summary that a suite summarises.

    ``peaks`` (without the times and places of the peaks), and from ``sensors``
    and ``equipment`` every entry whose key starts with ``peak`` (anchors included).
    """
    def values_only(tree):
        if isinstance(tree, Mapping):
            return {k: values_only(v) for k, v in tree.items()
                    if k not in _NOT_PEAKS and not str(k).startswith("time")}
        if isinstance(tree, list):
            return [values_only(v) for v in tree]
        return tree

    def peaks_of(tree):
        if isinstance(tree, Mapping):
            out = {}
            for k, v in tree.items():
                if str(k).startswith("peak"):
                    out[k] = values_only(v)
                elif isinstance(v, (Mapping, list)):
                    sub = peaks_of(v)
                    if sub:
                        out[k] = sub
            return out
        if isinstance(tree, list):
            subs = [peaks_of(v) for v in tree]
            return subs if any(subs) else []
        return {}

    out: dict[str, Any] = {"peaks": values_only(summary.get("peaks", {}))}
    for section in ("sensors", "equipment"):
        sub = peaks_of(summary.get(section, {}) or {})
        if sub:
            out[section] = sub
    return out


def run_set(scenario: Scenario, rs: RecordSet, *, model: BlockModel | None = None,
            modes: Modes | None = None, residual: np.ndarray | None = None,
            method: str | None = None) -> dict:
    """Run one record set through the scenario's model (built once); return plain data.

    Parameters
    ----------
    scenario : Scenario
        Its ``[motion]`` is replaced by the set (:func:`set_scenario`).
    rs : RecordSet
    model, modes, residual
        From :func:`groundshake.pipeline.prepare_model`; built here when None.
    method : str, optional
        Overrides ``[analysis] method``.

    Returns
    -------
    dict
        ``record``, ``status`` ("ok"), ``files``, ``scale`` (component → total factor),
        ``target_factor``, ``peaks`` (:func:`scalar_peaks`), ``worst_dc``, ``warnings``,
        ``records`` and ``spectra`` (``periods`` [s], ``damping``, ``points``,
        ``ground_psa`` (3, n_d, n_p), ``floor_psa`` and ``floor_psa_broadened``
        (n_points, 3, n_d, n_p) [m/s²], as lists); never raises for a bad record: the
        result is then :func:`set_failure`'s.
    """
    try:
        run_scenario = set_scenario(scenario, rs)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", GroundshakeWarning)
            res = analyse(run_scenario, progress=False, method=method, model=model,
                          modes=modes, residual=residual)
    except (GroundshakeError, OSError, ValueError) as e:
        return set_failure(rs, e)
    s = res.summary
    floor = res.floor
    return {
        "record": rs.name, "status": "ok", "files": dict(rs.files),
        "scale": rs.scales(),
        "target_factor": float(rs.factor),
        "peaks": scalar_peaks(s),
        "worst_dc": s.get("worst_dc"),
        "warnings": list(s.get("warnings", [])),
        "records": s.get("records", []),
        "spectra": {
            "periods": np.asarray(floor["periods"], dtype=float).tolist(),
            "damping": np.asarray(floor["damping"], dtype=float).tolist(),
            "points": list(floor.get("points", [])),
            "ground_psa": np.asarray(res.ground_spectra["psa"], dtype=float).tolist(),
            "floor_psa": np.asarray(floor.get("psa", np.zeros((0,))), dtype=float).tolist(),
            "floor_psa_broadened": np.asarray(floor.get("psa_broadened", np.zeros((0,))),
                                              dtype=float).tolist(),
        },
    }
