"""The output contract of a run: file names, CSV columns and summary.json keys, with units.

Every file a run writes is described here, and the writers (``_outputs.py``) and the
report (``groundshake.report``) both import it: the report never guesses a column from
its wording or a unit from a key's spelling. Files stay in SI units; each CSV header is
``label [unit]`` and each summary.json value's quantity kind is listed in
:data:`SUMMARY_KINDS` (a path pattern, ``*`` standing for one name or index).

Changing a name or a unit here is a change of the contract: raise
:data:`SCHEMA_VERSION`.
"""
from __future__ import annotations

import fnmatch
import math
import re
from dataclasses import dataclass
from typing import Any, Iterator, Mapping

from .._constants import DIRECTIONS

__all__ = ["SCHEMA_VERSION", "SUMMARY_FILE", "CSV_FILES", "OUTPUT_FILES", "REPORT_FILE", "FILES", "SUITE_FILES", "UNITS", "KIND_OF_UNIT", "Column", "COLUMNS", "SUMMARY_KINDS",
           "kind_of", "header", "parse_header", "history_label", "HISTORY_BASE",
           "iter_values", "DIRECTIONS", "SUMMARY_GROUPS", "declared", "read", "read_number",
           "read_table", "read_list"]

#: Version of the output contract, written into summary.json (``schema.version``).
SCHEMA_VERSION = 2

#: The files of a run's output folder, by role.
FILES: dict[str, str] = {
    "summary": "summary.json",
    "histories": "histories.csv",
    "records": "records.csv",
    "ground_spectra": "ground_spectra.csv",
    "floor_spectra": "floor_spectra.csv",
    "modes": "modes.csv",
    "element_peaks": "element_peaks.csv",
    "mode_shapes": "mode_shapes.csv",
    "mesh": "mesh.json",
    "report": "report.html",
}

#: The files of a suite's output folder (``groundshake suite``), by role: ``records`` is the
#: folder of each set's ``NAME.json``. In suite.json, ``statistics`` is keyed by the path of
#: each value in a run's summary.json, list positions counted from 0 as in its JSON
#: (``equipment.NAME.anchors[0].peak_tension``, kind from :func:`kind_of`); bolt numbers
#: count from 1 as in a run's files (``worst_dc.bolt``, the histories.csv columns), so
#: ``anchors[0]`` is bolt 1, and every page numbers bolts from 1.
SUITE_FILES: dict[str, str] = {
    "suite": "suite.json",
    "records": "records",
    "ground_spectra_statistics": "ground_spectra_statistics.csv",
    "floor_spectra_statistics": "floor_spectra_statistics.csv",
    "page": "suite.html",
}

#: The names the application layer and the docs use (derived from FILES).
SUMMARY_FILE = FILES["summary"]
CSV_FILES = tuple(k for k, v in FILES.items() if v.endswith(".csv"))
OUTPUT_FILES = (SUMMARY_FILE, *(FILES[k] for k in CSV_FILES), FILES["mesh"])
REPORT_FILE = FILES["report"]

#: SI unit of each quantity kind, as written in files ("" for a plain number).
UNITS: dict[str, str] = {
    "force": "N", "moment": "N*m", "length": "m", "stress": "Pa", "pressure": "Pa",
    "modulus": "Pa", "acceleration": "m/s2", "velocity": "m/s", "displacement": "m",
    "angular_acceleration": "rad/s2", "time": "s", "frequency": "Hz", "damping": "ratio",
    "ratio": "ratio", "mass": "kg", "density": "kg/m3", "area": "m2",
    "stiffness": "N/m", "rotational_stiffness": "N*m/rad", "dashpot": "N*s/m",
    "rotational_dashpot": "N*m*s/rad", "arias": "m/s", "count": "", "number": "",
    "percent": "%", "text": "", "flag": "", "weight": "N",
    # Γ = φᵀMι of a mass-normalised mode shape: kg^(1/2)
    "participation": "kg^0.5",
}


@dataclass(frozen=True)
class Column:
    """One CSV column: its label and quantity kind (the unit follows from the kind)."""

    label: str
    kind: str

    @property
    def unit(self) -> str:
        return UNITS[self.kind]

    @property
    def header(self) -> str:
        return header(self.label, self.kind)


#: The kind a value has when only its SI unit is stated (``"label [N]"``), by unit.
KIND_OF_UNIT: dict[str, str] = {"N": "force", "N*m": "moment", "Pa": "stress",
                                "m/s2": "acceleration", "m": "displacement", "s": "time",
                                "Hz": "frequency", "m/s": "velocity", "kg": "mass",
                                "rad/s2": "angular_acceleration"}


def header(label: str, kind: str) -> str:
    """The CSV header of a column: ``"label [unit]"`` (the label alone for text/counts)."""
    unit = UNITS[kind]
    return f"{label} [{unit}]" if unit else label


_HEADER = re.compile(r"^(.*?)\s*\[([^\]]*)\]\s*$")


def parse_header(text: str) -> tuple[str, str]:
    """Split a header written by :func:`header` into ``(label, unit)``."""
    m = _HEADER.match(text)
    return (m.group(1), m.group(2)) if m else (text.strip(), "")


#: Fixed columns of the CSV files (files with per-name columns list their patterns).
COLUMNS: dict[str, tuple[Column, ...]] = {
    # long format: one row per (direction, damping, period); the target, when given,
    # has direction "target"
    "ground_spectra": (Column("direction", "text"), Column("damping", "damping"),
                       Column("period", "time"), Column("psa", "acceleration")),
    # long format: one row per (point, direction, damping, period); "envelope" is the
    # envelope over the points
    "floor_spectra": (Column("point", "text"), Column("direction", "text"),
                      Column("damping", "damping"), Column("period", "time"),
                      Column("psa", "acceleration"), Column("psa broadened", "acceleration")),
    "modes": (Column("mode", "count"), Column("frequency", "frequency"),
              Column("period", "time"), Column("damping", "damping"),
              *(Column(f"effective mass ratio {d}", "ratio") for d in DIRECTIONS),
              *(Column(f"cumulative mass ratio {d}", "ratio") for d in DIRECTIONS),
              *(Column(f"rotational participation {d}", "ratio") for d in DIRECTIONS),
              Column("dominant direction", "text")),
    # rows in the element order of mesh.json "cells"; NaN where an element has no value;
    # a response-spectrum run (no times) has no "time of von mises peak" column
    "element_peaks": (Column("x", "length"), Column("y", "length"), Column("z", "length"),
                      Column("von mises", "stress"), Column("principal tension", "stress"),
                      Column("principal compression", "stress"),
                      Column("time of von mises peak", "time"), Column("part", "text")),
    # then per mode k: "mode k ux/uy/uz" [m] (mass-normalised shapes, arbitrary scale)
    "mode_shapes": (Column("x", "length"), Column("y", "length"), Column("z", "length")),
    # one time column on the as-read axis (0 at the first sample as read, pads at negative
    # times), then per direction d and state s (raw, corrected): "d s acc" [m/s2],
    # "d s vel" [m/s], "d s disp" [m]; blank where a series has no sample
    "records": (Column("time", "time"),),
    # first the time, then HISTORY_BASE, then per sensor / equipment / bolt (history_label)
    "histories": (Column("time", "time"),),
}

#: The base resultants in histories.csv (the structure on its support, about the base centre).
HISTORY_BASE: tuple[Column, ...] = (
    Column("base Fx", "force"), Column("base Fy", "force"), Column("base Fz", "force"),
    Column("base Mx", "moment"), Column("base My", "moment"), Column("base Mz", "moment"))

_HISTORY_KINDS = {"ground acc": "acceleration", "abs acc": "acceleration",
                  "rel disp": "displacement", "tension": "force", "shear": "force"}


def history_label(what: str, *, name: str = "", direction: str = "", bolt: int = 0) -> Column:
    """The column of one history in histories.csv.

    ``what`` is ``"ground acc"`` (label ``ground x acc``), ``"abs acc"`` or ``"rel disp"``
    (``NAME abs acc x``) of a sensor or equipment, ``"tension"`` or ``"shear"`` of bolt
    ``bolt`` (numbered from 1) of equipment ``name`` (``NAME bolt 1 tension``).
    """
    kind = _HISTORY_KINDS[what]
    if what == "ground acc":
        return Column(f"ground {direction} acc", kind)
    if what in ("tension", "shear"):
        return Column(f"{name} bolt {bolt} {what}", kind)
    return Column(f"{name} {what} {direction}", kind)


#: Quantity kind of each summary.json value, by path (``*`` matches one key or index).
#: Paths not listed are words (text); the ``scenario`` echo keeps the units its keys
#: name (see the scenario reference), so it is not listed here.
SUMMARY_KINDS: dict[str, str] = {
    "peaks.base_shear.*": "force",
    "peaks.base_axial": "force",
    "peaks.overturning_moment.*": "moment",
    "peaks.torsion": "moment",
    "peaks.relative_displacement.*.value": "displacement",
    "peaks.relative_displacement.*.time": "time",
    "peaks.relative_displacement.*.at": "length",
    "peaks.von_mises": "stress",
    "peaks.principal_tension": "stress",
    "peaks.principal_compression": "stress",
    "sensors.*.position": "length",
    "sensors.*.peak_absolute_acceleration.*": "acceleration",
    "sensors.*.peak_relative_displacement.*": "displacement",
    "sensors.*.time_of_peak_absolute_acceleration.*": "time",
    "sensors.*.time_of_peak_relative_displacement.*": "time",
    "equipment.*.mass": "mass",
    "equipment.*.cg": "length",
    "equipment.*.frequency_hz": "frequency",
    "equipment.*.damping": "damping",
    "equipment.*.peak_absolute_acceleration.*": "acceleration",
    "equipment.*.peak_relative_displacement.*": "displacement",
    "equipment.*.time_of_peak_absolute_acceleration.*": "time",
    "equipment.*.peak_angular_acceleration.*": "angular_acceleration",
    "equipment.*.anchors.*.position": "length",
    "equipment.*.anchors.*.peak_tension": "force",
    "equipment.*.anchors.*.time_of_peak_tension": "time",
    "equipment.*.anchors.*.peak_shear": "force",
    "equipment.*.anchors.*.time_of_peak_shear": "time",
    "equipment.*.anchors.*.min_axial": "force",
    "equipment.*.anchors.*.dc_tension": "ratio",
    "equipment.*.anchors.*.dc_shear": "ratio",
    "equipment.*.capacity.tension": "force",
    "equipment.*.capacity.shear": "force",
    "equipment.*.fp.fp": "force",
    "equipment.*.fp.fp_unbounded": "force",
    "equipment.*.fp.fp_over_weight": "ratio",
    "equipment.*.fp.fv": "force",
    "equipment.*.fp.peak_tension": "force",
    "equipment.*.fp.peak_shear": "force",
    "equipment.*.fp.time_history_peak_tension": "force",
    "equipment.*.fp.time_history_peak_shear": "force",
    "equipment.*.anchors.*.interaction_ratio": "ratio",
    "equipment.*.anchors.*.time_of_peak_interaction": "time",
    "equipment.*.dead_load_factor": "ratio",
    "worst_dc.value": "ratio",
    "worst_interaction.value": "ratio",
    "worst_interaction.bolt": "number",
    "worst_dc.bolt": "number",
    "stresses.*.value": "stress",
    "stresses.*.time": "time",
    "stresses.*.at": "length",
    "stresses.*.away_from_features.value": "stress",
    "stresses.*.away_from_features.time": "time",
    "stresses.*.away_from_features.at": "length",
    "stresses.*.point": "number",
    "stresses.*.away_from_features.point": "number",
    "stresses.n_points": "count",
    "base.about": "length",
    "base.peaks.Fx.*": "force", "base.peaks.Fy.*": "force", "base.peaks.Fz.*": "force",
    "base.peaks.Mx.*": "moment", "base.peaks.My.*": "moment", "base.peaks.Mz.*": "moment",
    "base.peaks.*.time": "time",
    "base.contact.static_pressure": "pressure",
    "base.contact.peak_pressure": "pressure",
    "base.contact.time_of_peak_pressure": "time",
    "base.contact.min_pressure": "pressure",
    "base.contact.time_of_min_pressure": "time",
    "stability.base.lx": "length", "stability.base.ly": "length",
    "stability.sliding.min_safety_factor": "ratio",
    "stability.sliding.friction_coefficient": "ratio",
    "stability.sliding.passive_resistance": "force",
    "stability.overturning.min_safety_factor": "ratio",
    "stability.overturning.edges.*.min_safety_factor": "ratio",
    "stability.overturning.edges.*.time": "time",
    "stability.bearing.peak_pressure": "pressure",
    "stability.bearing.peak_linear_pressure": "pressure",
    "stability.bearing.min_linear_pressure": "pressure",
    "stability.bearing.time_of_min_linear_pressure": "time",
    "stability.bearing.min_contact_ratio": "ratio",
    "stability.bearing.allowable_bearing_pressure": "pressure",
    "stability.bearing.ratio_to_allowable": "ratio",
    "stability.*.time": "time",
    "floor_spectra.damping_percent": "percent",
    "floor_spectra.broadening_percent": "percent",
    "floor_spectra.points.*.*.*.peak_psa": "acceleration",
    "floor_spectra.points.*.*.*.period_of_peak": "time",
    "floor_spectra.points.*.*.*.zpa": "acceleration",
    "modes.total_mass.*": "mass",
    "modes.rigid_mass.*": "mass",
    "modes.modes.*.participation.*": "participation",
    "modes.n_modes": "count",
    "modes.captured_ratio.*": "ratio",
    "modes.modes.*.mode": "number",
    "modes.modes.*.frequency": "frequency",
    "modes.modes.*.period": "time",
    "modes.modes.*.damping": "damping",
    "modes.modes.*.effective_mass.*": "mass",
    "modes.modes.*.effective_mass_ratio.*": "ratio",
    "modes.modes.*.cumulative_ratio.*": "ratio",
    "modes.modes.*.rotational_participation.*": "ratio",
    "model.n_nodes": "count", "model.n_elements": "count", "model.n_dof": "count",
    "model.materials.*.youngs_modulus": "modulus",
    "model.materials.*.poisson_ratio": "ratio",
    "model.materials.*.density": "density",
    "model.total_mass": "mass",
    "model.rigid_mass": "mass",
    "model.weight": "weight",
    "model.support.springs.k_x": "stiffness", "model.support.springs.k_y": "stiffness",
    "model.support.springs.k_z": "stiffness",
    "model.support.springs.k_rx": "rotational_stiffness",
    "model.support.springs.k_ry": "rotational_stiffness",
    "model.support.springs.k_rz": "rotational_stiffness",
    "model.support.dashpots.c_x": "dashpot", "model.support.dashpots.c_y": "dashpot",
    "model.support.dashpots.c_z": "dashpot",
    "model.support.dashpots.c_rx": "rotational_dashpot",
    "model.support.dashpots.c_ry": "rotational_dashpot",
    "model.support.dashpots.c_rz": "rotational_dashpot",
    "model.support.shear_modulus": "modulus",
    "model.base.area": "area", "model.base.lx": "length", "model.base.ly": "length",
    "model.base.centre": "length", "model.base.z": "length",
    "model.damping.ratio": "damping",
    "model.equipment.*.mass": "mass",
    "model.equipment.*.cg": "length",
    "model.equipment.*.frequency_hz": "frequency",
    "model.equipment.*.damping": "damping",
    "model.sensors.*.at": "length",
    "model.damping.rayleigh_hz": "frequency",
    "analysis.cutoff_hz": "frequency",
    "analysis.n_modes": "count",
    "analysis.retained_mass_ratio.*": "ratio",
    "analysis.dt": "time",
    "analysis.n_steps": "count",
    "analysis.duration": "time",
    "analysis.pad_before_s": "time",
    "analysis.rayleigh_hz": "frequency",
    "analysis.reduced_basis.modes": "count",
    "analysis.reduced_basis.missing_mass_vectors": "count",
    "provenance.solver.rayleigh_hz": "frequency",
    "provenance.solver.reduced_basis.*": "count",
    "analysis.modal_damping_diagonal_ratios": "damping",
    "analysis.spectrum_motions.n": "count",
    "analysis.spectrum_motions.dt": "time",
    "analysis.spectrum_motions.duration": "time",
    "analysis.spectrum_motions.largest_match_misfit": "ratio",
    "analysis.spectrum_motions.pga_mean.*": "acceleration",
    "provenance.solver.modal_damping_diagonal_ratios": "damping",
    "records.*.dt": "time",
    "records.*.n": "count",
    "records.*.pad_before_s": "time",
    "records.*.measures.pga": "acceleration",
    "records.*.measures.pgv": "velocity",
    "records.*.measures.pgd": "displacement",
    "records.*.measures.*_time": "time",
    "records.*.measures.arias_intensity": "arias",
    "records.*.measures.d5_75": "time",
    "records.*.measures.d5_95": "time",
    "records.*.measures.bracketed_duration": "time",
    "records.*.measures.cav": "velocity",
    "records.*.measures.cav_std": "velocity",
    "records.*.measures.mean_period": "time",
    "records.*.measures.t5": "time",
    "records.*.measures.t75": "time",
    "records.*.measures.t95": "time",
    "motion.dt": "time",
    "motion.n_steps": "count",
    "provenance.settings.cutoff_hz": "frequency",
    "provenance.settings.hht_alpha": "number",
    "provenance.settings.modes": "count",
    "provenance.timings_s.*": "time",
    "schema.version": "number",
    "schema_version": "number",
    "soil_cases.*.shear_modulus": "modulus",
    "soil_cases.*.modulus_ratio": "ratio",
    "soil_cases.*.modes.*.frequency": "frequency",
    "soil_cases.*.modes.*.period": "time",
}

#: Paths of summary.json that hold a table, a list or words rather than a quantity (``*``
#: matches one key or index). With the paths of :data:`SUMMARY_KINDS` they are every path
#: a reader of summary.json may look up (:func:`read`).
SUMMARY_GROUPS: frozenset[str] = frozenset({
    "title", "warnings", "cautions", "scenario", "schema",
    "peaks", "peaks.relative_displacement", "peaks.relative_displacement.*",
    "sensors", "sensors.*", "sensors.*.peak_absolute_acceleration",
    "sensors.*.peak_relative_displacement",
    "equipment", "equipment.*", "equipment.*.peak_absolute_acceleration",
    "equipment.*.peak_relative_displacement", "equipment.*.anchors", "equipment.*.anchors.*",
    "equipment.*.capacity", "equipment.*.fp",
    "worst_dc", "worst_interaction",
    "stresses", "stresses.*", "stresses.*.away_from_features", "stresses.*.feature",
    "base", "base.peaks", "base.peaks.*", "base.contact", "base.contact.uplift",
    "stability", "stability.*", "stability.*.case", "stability.*.edge",
    "floor_spectra", "modes", "modes.modes", "modes.modes.*", "modes.modes.*.dominant_direction",
    "model", "model.materials", "model.materials.*", "model.support", "model.base",
    "analysis", "analysis.method", "analysis.assumptions", "analysis.retained_mass_ratio",
    "analysis.spectrum_motions",
    "records", "records.*", "records.*.measures", "records.*.history",
    "motion", "motion.matching", "motion.matching.*",
    "provenance", "provenance.inputs",
    "soil_cases", "soil_cases.*", "soil_cases.*.name", "soil_cases.*.modes",
    "soil_cases.*.modes.*", "soil_cases.*.stability",
    "soil_cases.*.stability.sliding.min_safety_factor",
    "soil_cases.*.stability.overturning.min_safety_factor",
    "soil_cases.*.stability.bearing.peak_pressure",
})

_PATTERNS = [(tuple(p.split(".")), k) for p, k in SUMMARY_KINDS.items()]
_DECLARED = [tuple(p.split(".")) for p in (*SUMMARY_KINDS, *SUMMARY_GROUPS)]


def kind_of(path: str | tuple[str, ...]) -> str | None:
    """The quantity kind of the summary.json value at ``path`` (``"peaks.base_axial"`` or
    a tuple of keys/indices), or None when the contract gives it none.

    The most specific pattern wins (fewest ``*``), so ``base.peaks.*.time`` beats nothing
    but ``base.peaks.Fx.*`` is read for ``value``/``signed``.
    """
    parts = tuple(str(p) for p in (path.split(".") if isinstance(path, str) else path))
    best, best_stars = None, 99
    for pat, kind in _PATTERNS:
        if len(pat) != len(parts):
            continue
        if all(fnmatch.fnmatchcase(a, b) for a, b in zip(parts, pat)):
            stars = sum(1 for b in pat if "*" in b)
            # a literal last key (…*.time) beats a wildcard last key (…Fx.*)
            stars += 0.5 if "*" in pat[-1] else 0
            if stars < best_stars:
                best, best_stars = kind, stars
    return best


def iter_values(d: Any, prefix: tuple[str, ...] = ()) -> Iterator[tuple[tuple[str, ...], Any]]:
    """Every scalar leaf of a summary as ``(path, value)`` (lists of numbers are leaves)."""
    if isinstance(d, Mapping):
        for k, v in d.items():
            yield from iter_values(v, prefix + (str(k),))
    elif isinstance(d, list) and d and any(isinstance(x, (Mapping, list)) for x in d):
        for i, v in enumerate(d):
            yield from iter_values(v, prefix + (str(i),))
    else:
        yield prefix, d


def declared(path: str | tuple) -> bool:
    """True when ``path`` (``"stability.sliding.min_safety_factor"`` or a tuple of keys and
    indices) is a path of the contract (:data:`SUMMARY_KINDS` or :data:`SUMMARY_GROUPS`)."""
    parts = tuple(str(p) for p in (path.split(".") if isinstance(path, str) else path))
    return any(len(pat) == len(parts) and all(fnmatch.fnmatchcase(a, b)
                                              for a, b in zip(parts, pat))
               for pat in _DECLARED)


def read(summary: Mapping, *keys: str | int) -> Any:
    """The value of summary.json at the path ``keys`` (names, and indices into lists), or
    None where this summary does not hold it (an older contract, a run without it).

    Raises
    ------
    KeyError
        When the path is not one of the contract (a reader asking for a key no run
        writes).
    """
    if not declared(keys):
        raise KeyError(f"summary.json: {'.'.join(map(str, keys))} is not a path of the "
                       "output contract (results/_schema.py)")
    d: Any = summary
    for k in keys:
        if isinstance(d, Mapping) and k in d:
            d = d[k]
        elif isinstance(d, list) and isinstance(k, int) and -len(d) <= k < len(d):
            d = d[k]
        else:
            return None
    return d


def read_number(summary: Mapping, *keys: str | int) -> float | None:
    """:func:`read` as a finite float, or None (absent, not a number, or not finite)."""
    v = read(summary, *keys)
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        return None
    return float(v) if math.isfinite(v) else None


def read_table(summary: Mapping, *keys: str | int) -> Mapping:
    """:func:`read` of a table (a JSON object); empty where the summary holds none."""
    v = read(summary, *keys)
    return v if isinstance(v, Mapping) else {}


def read_list(summary: Mapping, *keys: str | int) -> list:
    """:func:`read` of a list; empty where the summary holds none."""
    v = read(summary, *keys)
    return v if isinstance(v, list) else []
