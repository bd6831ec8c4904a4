"""Suite outputs beyond suite.json: spectra statistics as CSV, and suite.html (written by the
application layer through the report)."""
from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import TYPE_CHECKING, Sequence

import numpy as np

from .._atomic import atomic_write_text
from .._constants import DIRECTIONS
from ..pipeline import SUITE_FILES, write_suite_report

if TYPE_CHECKING:  # pragma: no cover
    from .. import Scenario
    from ._run import SuiteResult

__all__ = ["write_suite_outputs"]

_STATS = ("median", "p16", "p84", "mean", "min", "max")


def _csv(header: Sequence[str], columns: Sequence[np.ndarray]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for row in zip(*columns):
        w.writerow([f"{float(v):.9g}" for v in row])
    return buf.getvalue()


def _spectra_csv(spec: dict) -> dict[str, str]:
    periods = np.asarray(spec["periods"], dtype=float)
    damp = [f"{100 * d:g}%" for d in spec["damping"]]
    files = {}
    if "ground_psa" in spec:
        header, cols = ["period [s]"], [periods]
        for j, d in enumerate(DIRECTIONS):
            for i, dl in enumerate(damp):
                for st in _STATS:
                    header.append(f"ground {d} psa {dl} {st} [m/s2]")
                    cols.append(spec["ground_psa"][st][j, i])
        files[SUITE_FILES["ground_spectra_statistics"]] = _csv(header, cols)
    header, cols = ["period [s]"], [periods]
    for key, word in (("floor_psa", "raw"), ("floor_psa_broadened", "broadened")):
        if key not in spec:
            continue
        for p, name in enumerate(spec["points"]):
            for j, d in enumerate(DIRECTIONS):
                for i, dl in enumerate(damp):
                    for st in _STATS:
                        header.append(f"{name} {d} psa {dl} {word} {st} [m/s2]")
                        cols.append(spec[key][st][p, j, i])
    if len(header) > 1:
        files[SUITE_FILES["floor_spectra_statistics"]] = _csv(header, cols)
    return files


def write_suite_outputs(result: SuiteResult, scenario: Scenario, *, target: str | None = None,
                        units: str | None = None) -> list[Path]:
    """Write the spectra statistics (CSV) and ``suite.html`` into ``result.out_dir``.

    Parameters
    ----------
    result : SuiteResult
        Its ``suite.json`` is already in ``result.out_dir``.
    scenario : Scenario
    target : str, optional
        A target spectrum spec (see :func:`groundshake.spectra.parse_target`) drawn
        over the ground-spectra band; the scenario's ``motion.target`` if not given.
    units : {"si", "us"}, optional
        Display units of suite.html; default the scenario's ``[report] units``, else SI.
        The CSV files stay SI.
    """
    out = Path(result.out_dir)
    written: list[Path] = []
    spec = result.spectra_statistics
    if spec:
        for name, text in _spectra_csv(spec).items():
            written.append(atomic_write_text(out / name, text))
    prov = {"version": None,
            "scenario": Path(scenario.source).name if scenario.source else None,
            "how it ran": result.engine.line()}
    written.append(write_suite_report(out, scenario, spectra=spec, target=target, units=units,
                                      provenance={k: v for k, v in prov.items()
                                                  if v is not None}))
    return written
