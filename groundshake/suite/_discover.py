"""Finding record sets for a suite: a folder, a glob pattern or a manifest CSV.

A *record set* (:class:`groundshake.pipeline.RecordSet`) is what one run needs: one file
per ground-motion component (x, y horizontal; z vertical), each with a scale factor and
units.

File-name rule (used for folders and globs; :func:`groundshake.pipeline.group_by_component`). The component is the last word of
the file's stem, after a ``-``, ``_`` or ``.``, case-insensitive:

====================  =========
last word             component
====================  =========
x, h1, e, ew, east    x
y, h2, n, ns, north   y
z, up, v, ud, vert    z
====================  =========

Any other component code the readers recognise also works: a vertical one (``hnz``,
``ud1``) is z; a horizontal azimuth goes to the nearer axis, x east and y north
(``360`` → y, ``090`` → x, ``n28w`` → y); ``hn1``/``hn2`` are x/y.

Files whose stems agree once that word is removed form one set, named by the
remaining stem (``rec07-h1.mseed``, ``rec07-h2.mseed``, ``rec07-up.mseed`` →
set ``rec07``). When the scenario's ``[motion]`` has a single component, every
file is a set of its own applied to that component, whatever its name.

A relative folder or pattern is taken from the current working directory (as a
shell would), never from the scenario's folder; the sets hold absolute paths.

Manifest (CSV with a header row): ``set`` (or ``name``), ``x``, ``y``, ``z``
(file paths, relative to the manifest; blank where absent), and optionally
``scale`` (all components), ``scale_x``, ``scale_y``, ``scale_z``, ``units``, ``dt``
(time step [s] of one-column text files).
"""
from __future__ import annotations

import csv
import glob
import math
import os
from pathlib import Path

from .._errors import InputError
from ..pipeline import (COMPONENT_WORDS, RecordSet, group_by_component, is_record_file_name,
                        file_stem)

__all__ = ["RecordSet", "discover_record_sets", "COMPONENT_WORDS"]

def _candidate_files(spec: str) -> list[Path]:
    """Record files of a folder, a pattern or one file, as absolute paths (from the cwd)."""
    p = Path(os.path.abspath(spec))
    if p.is_dir():
        files = [q for q in sorted(p.iterdir()) if q.is_file() and is_record_file_name(q)]
        if not files:
            raise InputError(f"{spec}: folder holds no record files")
        return files
    if any(ch in spec for ch in "*?["):
        files = [Path(os.path.abspath(f)) for f in sorted(glob.glob(spec)) if Path(f).is_file()]
        if not files:
            raise InputError(f"{spec}: pattern matches no files")
        return files
    if not p.exists():
        raise InputError(f"{spec}: no such folder, pattern or manifest")
    return [p]


def discover_record_sets(spec: str, *, components: tuple[str, ...] = ("x", "y", "z"),
                         units: str | None = None, dt: float | None = None) -> list[RecordSet]:
    """Record sets from a folder, a glob pattern or a manifest CSV.

    Parameters
    ----------
    spec : str
        A folder, a glob pattern (``"recs/*.mseed"``) or a ``.csv`` manifest.
    components : tuple of str
        Components the scenario's ``[motion]`` applies; with a single one, every
        file is a set of its own applied to it.
    units : str, optional
        Units for every file that does not state its own.
    dt : float, optional
        Time step [s] for one-column text files.

    Raises
    ------
    InputError
        Nothing found, a file whose component cannot be told, two files for one
        component of a set, or a bad manifest row (with its line number).
    """
    p = Path(spec)
    if p.is_file() and p.suffix.lower() == ".csv" and _looks_like_manifest(p):
        return _read_manifest(p, units=units, dt=dt)
    files = _candidate_files(spec)
    if len(components) == 1:
        comp = components[0]
        sets = [RecordSet(name=file_stem(f), files={comp: str(f)}, units=units, dt=dt) for f in files]
        _check_unique([s.name for s in sets], spec)
        return sets
    return [RecordSet(name=stem, files=group, units=units, dt=dt)
            for stem, group in group_by_component(files).items()]


def _looks_like_manifest(path: Path) -> bool:
    try:
        with open(path, newline="", encoding="utf-8") as fh:
            first = fh.readline()
    except (OSError, UnicodeDecodeError):
        return False
    words = {w.strip().lower() for w in first.split(",")}
    return bool(words & {"set", "name"}) and bool(words & {"x", "y", "z"})


def _check_unique(names: list[str], where: str) -> None:
    seen = set()
    for n in names:
        if n in seen:
            raise InputError(f"{where}: two record sets are named {n!r}")
        seen.add(n)


def _positive(text: str, what: str, where: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise InputError(f"{where}: {what} {text!r} is not a number") from None
    if not math.isfinite(value) or value <= 0:
        raise InputError(f"{where}: {what} {text!r} must be a finite number > 0")
    return value


def _read_manifest(path: Path, *, units: str | None, dt: float | None) -> list[RecordSet]:
    base = path.parent
    sets: list[RecordSet] = []
    with open(path, newline="", encoding="utf-8") as fh:
        reader = csv.DictReader(fh)
        fields = [f.strip().lower() for f in (reader.fieldnames or [])]
        allowed = {"set", "name", "x", "y", "z", "scale", "scale_x", "scale_y", "scale_z",
                   "units", "dt"}
        unknown = [f for f in fields if f not in allowed]
        if unknown:
            raise InputError(f"{path}:1: unknown manifest column(s) {unknown}; allowed "
                             f"{sorted(allowed)}")
        for lineno, row in enumerate(reader, start=2):
            row = {k.strip().lower(): (v or "").strip() for k, v in row.items() if k}
            name = row.get("set") or row.get("name")
            if not name:
                raise InputError(f"{path}:{lineno}: the set name is empty")
            files = {c: str((base / row[c]).resolve()) for c in ("x", "y", "z") if row.get(c)}
            if not files:
                raise InputError(f"{path}:{lineno}: set {name!r} names no file in x, y or z")
            scale = {}
            for c in files:
                text = row.get(f"scale_{c}") or row.get("scale") or "1"
                try:
                    value = float(text)
                except ValueError:
                    raise InputError(f"{path}:{lineno}: scale {text!r} is not a number") from None
                if not math.isfinite(value) or value == 0:
                    raise InputError(f"{path}:{lineno}: scale {text!r} must be finite and non-zero")
                scale[c] = value
            row_dt = _positive(row["dt"], "dt", f"{path}:{lineno}") if row.get("dt") else dt
            sets.append(RecordSet(name=name, files=files, scale=scale,
                                  units=row.get("units") or units, dt=row_dt))
    if not sets:
        raise InputError(f"{path}: manifest has no rows")
    _check_unique([s.name for s in sets], str(path))
    return sets
