"""A suite: many record sets through one model, built once.

``prepare_suite`` builds the model and its modes once; ``run_record_set`` is the
task each worker runs for one record set (it rebuilds nothing that does not
depend on the record, and runs the set by :func:`groundshake.pipeline.run_set`);
``run_suite`` drives the engine, writes each finished record's result as it
completes, and the statistics at the end (over the application layer's
:func:`~groundshake.pipeline.peak_statistics`, scaling and combination).
"""
from __future__ import annotations

import datetime as _dt
import json
import math
import time
import uuid
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Callable, Mapping, Sequence

import numpy as np

from .._atomic import atomic_write_text
from .._cautions import CAUTIONS
from .._json import json_dumps
from .._errors import GroundshakeError, InputError
from ..pipeline import (SUITE_FILES, RecordSet, SuiteScaling, combine_by_rule, peak_statistics,
                        prepare_model, record_set_samples, run_set, scale_record_sets,
                        scenario_from_plain, set_failure, spectra_statistics)
from ._engine import EngineReport, SuiteStalled, run_tasks
from ._plain import from_plain, to_plain

if TYPE_CHECKING:  # pragma: no cover
    from .. import Scenario

__all__ = ["prepare_suite", "run_record_set", "run_suite", "SuiteResult",
           "default_set_timeout"]

_PROGRESS_EVERY_S = 10.0     # suite.json is rewritten at most this often while running


def prepare_suite(scenario: Scenario, *, method: str | None = None) -> dict:
    """Build the model, its modes and the missing-mass shapes once.

    Returns the data every task shares, as arrays and plain data only: the
    scenario (``scenario.to_dict()``), the model and its modes taken apart by
    :func:`groundshake.suite._plain.to_plain`, the method, and (modal) the
    missing-mass shapes (n, 3) from one static solve; nothing that depends on a
    record.
    """
    prepared = prepare_model(scenario, method=method)    # workers never factorize K
    model, modes, residual = prepared.model, prepared.modes, prepared.residual
    return {"scenario": scenario.to_dict(), "source": str(scenario.source),
            "base_dir": str(scenario.base_dir), "model": to_plain(model),
            "modes": to_plain(modes), "method": method, "residual": residual,
            "n_dof": int(model.K.shape[0]), "token": uuid.uuid4().hex}


#: this process's scenario, model and modes, rebuilt once per prepared model (its token);
#: kept outside ``shared`` so that the shared data itself never changes on a worker
_OBJECTS: dict[str, tuple[Any, Any, Any]] = {}


def _objects(shared: Mapping[str, Any]) -> tuple[Any, Any, Any]:
    """Scenario, model and modes rebuilt from the shared plain data, once per worker."""
    token = str(shared.get("token") or id(shared))
    cache = _OBJECTS.get(token)
    if cache is None:
        scenario = scenario_from_plain(shared["scenario"], source=shared["source"],
                                       base_dir=shared["base_dir"])
        cache = (scenario, from_plain(shared["model"]), from_plain(shared["modes"]))
        while len(_OBJECTS) >= 4:       # a few models at a time per process
            _OBJECTS.pop(next(iter(_OBJECTS)))
        _OBJECTS[token] = cache
    return cache


#: the default per-set time limit [s]: a fixed allowance for a worker's start-up
#: (imports, compiled kernels loaded or built) plus a generous bound on the work
_LIMIT_BASE_S = 120.0
_LIMIT_PER_DOF_STEP_S = 1e-6
_LIMIT_DIRECT_FACTOR = 10.0


def default_set_timeout(n_dof: int, n_steps: int, *, method: str | None = "modal") -> float:
    """The default time limit of one record set [s].

    ``120 s + 1e-6 s × n_dof × n_steps`` (× 10 on the work term for the direct
    method, which solves the full system every step). Measured on a 2-core machine,
    the demo model (3606 DOFs) takes about 0.3 s for a 20 s record at 200 Hz
    (4000 steps), about 2e-8 s per DOF and step, so the limit leaves a margin of
    some 50× on the work plus two minutes for a fresh worker's start-up.

    Parameters
    ----------
    n_dof : int
        Degrees of freedom of the model.
    n_steps : int
        Samples of the set's longest record.
    method : {"modal", "direct"}, optional
    """
    work = _LIMIT_PER_DOF_STEP_S * float(n_dof) * float(n_steps)
    if method == "direct":
        work *= _LIMIT_DIRECT_FACTOR
    return _LIMIT_BASE_S + work


def _set_limits(sets: Sequence[RecordSet], shared: Mapping[str, Any], scenario: Scenario,
                method: str | None, set_timeout: float | None | str) -> list[float | None]:
    """Each set's time limit [s]: the given one, none (0 or None), or the default."""
    if set_timeout is None or set_timeout == 0:
        return [None] * len(sets)
    if set_timeout != "auto":
        value = float(set_timeout)
        if not math.isfinite(value) or value < 0:
            raise InputError(f"given {set_timeout}; allowed seconds > 0 (0: no limit)",
                             param="set_timeout", value=set_timeout)
        return [value] * len(sets)
    n_dof = int(shared.get("n_dof") or 0) or int(shared["model"]["fields"]["K"]["shape"][0])
    how = method or scenario.analysis.method
    steps = [record_set_samples(rs) for rs in sets]
    known = [s for s in steps if s]
    fallback = max(known) if known else 200 * 3600      # an hour at 200 Hz
    return [default_set_timeout(n_dof, s or fallback, method=how) for s in steps]


def run_record_set(shared: Mapping[str, Any], item: Mapping[str, Any]) -> dict:
    """Run one record set through the shared model (:func:`groundshake.pipeline.run_set`);
    return plain data, with ``elapsed_s`` [s] for a set that ran.

    Never raises for a bad record: the result then has ``status = "failed"`` and
    the one-line ``error``.
    """
    rs = RecordSet.from_dict(item)
    started = _dt.datetime.now(_dt.timezone.utc)
    try:
        scenario, model, modes = _objects(shared)
    except (GroundshakeError, OSError, ValueError) as e:
        return set_failure(rs, e)
    out = run_set(scenario, rs, model=model, modes=modes, residual=shared.get("residual"),
                  method=shared.get("method"))
    if out["status"] == "ok":
        out["elapsed_s"] = (_dt.datetime.now(_dt.timezone.utc) - started).total_seconds()
    return out


@dataclass
class SuiteResult:
    """What a suite produced (also written to ``DIR/suite.json``)."""

    records: list[dict]
    statistics: dict
    spectra_statistics: dict = field(default_factory=dict)
    out_dir: Path | None = None
    engine: EngineReport = field(default_factory=EngineReport)
    scaling: dict | None = None

    @property
    def n_failed(self) -> int:
        return sum(1 for r in self.records if r.get("status") != "ok")


def _safe_name(name: str) -> str:
    keep = "".join(ch if ch.isalnum() or ch in "-_." else "_" for ch in name)
    return keep.strip(".") or "record"


def _record_file(out_dir: Path, name: str) -> Path:
    return out_dir / SUITE_FILES["records"] / f"{_safe_name(name)}.json"


def _load_done(out_dir: Path, sets: Sequence[RecordSet]) -> dict[str, dict]:
    """Results already written for these very sets (same files and scales)."""
    done = {}
    for rs in sets:
        p = _record_file(out_dir, rs.name)
        if not p.is_file():
            continue
        try:
            r = json.loads(p.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            continue
        same = (r.get("status") == "ok" and r.get("files") == dict(rs.files)
                and r.get("scale") == rs.scales())
        if same:
            done[rs.name] = r
    return done



def run_suite(scenario: Scenario, sets: Sequence[RecordSet], out_dir: str | Path, *,
              workers: int | None = 1, scheduler: Any = None, resume: bool = False,
              method: str | None = None, shared: Mapping[str, Any] | None = None,
              on_result: Callable[[dict], None] | None = None,
              set_timeout: float | str | None = "auto", retries: int = 2,
              scaling: SuiteScaling | None = None) -> SuiteResult:
    """Run every record set through the scenario's model; write as results complete.

    Parameters
    ----------
    scenario : Scenario
        Gives the model; its ``[motion]`` is replaced by each set's files.
    sets : sequence of RecordSet
    out_dir : path
        Folder for ``suite.json``, ``records/NAME.json`` and the statistics.
    workers, scheduler
        See :func:`groundshake.suite.run_tasks`.
    resume : bool
        Skip sets whose result in ``out_dir/records`` is ok for the same files.
    method : {"modal", "direct"}, optional
        Overrides ``[analysis] method``.
    shared : mapping, optional
        Output of :func:`prepare_suite`, when already built.
    on_result : callable, optional
        Called with each result as it arrives (progress).
    set_timeout : float, "auto" or None
        Time limit of one set [s]; ``"auto"`` (default) gives each set
        :func:`default_set_timeout` of the model's DOFs and its record's samples;
        0 or None: no limit. A set past it is reported failed, with the reason.
    retries : int
        Times a set is run again after its worker was lost.
    scaling : SuiteScaling, optional
        Scale each set to a target before it runs (:func:`scale_record_sets`): the
        factor travels with the set, the factors go to ``suite.json`` ``scaling``, and
        the peaks are combined by the rule of :func:`groundshake.spectra._scaling.set_statistic`
        (the mean with 7 or more sets run, else the maximum), in ``scaling.combined``.

    Raises
    ------
    SuiteStalled
        The engine stopped answering (see :func:`groundshake.suite.run_tasks`);
        every set finished until then is written, and ``resume=True`` runs the rest.
    """
    out_dir = Path(out_dir)
    (out_dir / SUITE_FILES["records"]).mkdir(parents=True, exist_ok=True)
    names = [rs.name for rs in sets]
    if len(set(names)) != len(names):
        raise InputError("record sets: names must be unique")
    scale_doc = None
    unreadable: list[dict] = []
    if scaling is not None:
        periods = None
        if scaling.period is None:
            if shared is None:
                shared = prepare_suite(scenario, method=method)
            periods = np.asarray(from_plain(shared["modes"]).period, dtype=float)
        scaled, unreadable, scale_doc = scale_record_sets(scenario, sets, scaling,
                                                          mode_periods=periods)
        by_name = {rs.name: rs for rs in scaled}
        sets = [by_name.get(rs.name, rs) for rs in sets]
    skip = {f["record"] for f in unreadable}
    done = _load_done(out_dir, [rs for rs in sets if rs.name not in skip]) if resume else {}
    todo = [rs for rs in sets if rs.name not in done and rs.name not in skip]
    results: dict[str, dict] = dict(done)
    for r in unreadable:
        results[r["record"]] = r
        atomic_write_text(_record_file(out_dir, r["record"]), json_dumps(r, indent=None))
    report = EngineReport()
    limits: list = []
    if todo:
        if shared is None:
            shared = prepare_suite(scenario, method=method)
        limits = _set_limits(todo, shared, scenario, method, set_timeout)
        last = time.monotonic()
        try:
            for r in run_tasks(run_record_set, shared, [rs.to_dict() for rs in todo],
                               workers=workers, scheduler=scheduler, retries=retries,
                               limits=limits, report=report):
                name = r.get("record") or "record"
                if name in results:       # never written twice
                    continue
                results[name] = r
                atomic_write_text(_record_file(out_dir, name), json_dumps(r, indent=None))
                if on_result is not None:
                    on_result(r)
                if time.monotonic() - last > _PROGRESS_EVERY_S:   # a progress copy
                    _write_suite_json(out_dir, scenario, sets, results, complete=False,
                                      engine=report, scaling=scale_doc)
                    last = time.monotonic()
        except SuiteStalled as e:       # say so in suite.json, keep what is done
            report.notes.append(str(e))
            _write_suite_json(out_dir, scenario, sets, results, complete=False, engine=report,
                              scaling=scale_doc)
            raise
    ordered = [results[n] for n in names if n in results]
    report.failed = sum(1 for r in ordered if r.get("status") != "ok")
    known = [x for x in limits if x is not None]
    stats = peak_statistics([r["peaks"] for r in ordered if r.get("status") == "ok"])
    spec = spectra_statistics(ordered)
    if scale_doc is not None:
        scale_doc = {**scale_doc, **combine_by_rule(stats, report.failed, len(ordered))}
    result = SuiteResult(records=ordered, statistics=stats, spectra_statistics=spec,
                         out_dir=out_dir, engine=report, scaling=scale_doc)
    _write_suite_json(out_dir, scenario, sets, results, complete=True, stats=stats,
                      engine=report, scaling=scale_doc,
                      set_timeout_s=({"min": min(known), "max": max(known)}
                                     if known else None),
                      resumed=sorted(done), method=method, workers=workers,
                      scheduler=None if scheduler is None else str(scheduler))
    return result


def _write_suite_json(out_dir: Path, scenario: Scenario, sets: Sequence[RecordSet],
                      results: Mapping[str, dict], *, complete: bool,
                      stats: dict | None = None, engine: EngineReport | None = None,
                      set_timeout_s: dict | None = None, scaling: dict | None = None,
                      **extra) -> None:
    from .. import __version__

    records = []
    for rs in sets:
        r = results.get(rs.name)
        if r is None:
            records.append({"record": rs.name, "status": "pending", "files": dict(rs.files)})
            continue
        entry = {k: v for k, v in r.items() if k not in ("spectra", "elapsed_s")}
        records.append(entry)
    n_failed = sum(1 for r in records if r["status"] == "failed")
    doc = {
        "title": scenario.title,
        "complete": complete,
        "counts": {"sets": len(sets), "ok": sum(1 for r in records if r["status"] == "ok"),
                   "failed": n_failed},
        "engine": {**(engine.to_dict() if engine is not None else {}),
                   "set_timeout_s": set_timeout_s},
        "records": records,
        "statistics": stats or {},
        "statistics_note": "over the records with status ok: sample mean, std, median, "
                           "16th/84th percentiles, min, max; log-normal median and "
                           "16th/84th (exp(mu -/+ beta)) where every value is positive; "
                           "keyed by the path of the value in each run's summary.json, "
                           "list positions from 0 as in its JSON (anchors[0] is bolt 1; "
                           "bolt numbers count from 1, as in worst_dc.bolt)",
        "warnings": sorted({w for r in records for w in r.get("warnings", [])}
                           | set((scaling or {}).get("warnings", []))),
        "cautions": list(CAUTIONS),
        **({"scaling": scaling} if scaling is not None else {}),
        "scenario": scenario.to_dict(),
        "provenance": {"version": __version__, **{k: v for k, v in extra.items()}},
    }
    atomic_write_text(out_dir / SUITE_FILES["suite"], json_dumps(doc))
