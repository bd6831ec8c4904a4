"""Suite engines that never lose a set and never hang.

Checks (sources): a suite repeats one computation, so every engine must give the
plain loop's numbers to round-off (issue contract: identical to 1e-12); counts of
sets, results and files follow from the issue's contract ("no finished set lost or
written twice", "a set past its limit is reported failed"). The record files are
invented test data (windowed sines with seeded noise), not real motions.
"""
from __future__ import annotations

import json
import multiprocessing
import os
import signal
import threading
import time
import warnings
from concurrent.futures import ThreadPoolExecutor

import pytest

from _blocks import concrete_block
from groundshake._errors import GroundshakeWarning
from groundshake.cli import main
from groundshake.scenario import load_scenario
from groundshake.suite import discover_record_sets
from groundshake.suite import _engine
from groundshake.suite._engine import EngineReport, SuiteStalled, run_tasks
from groundshake.suite._run import default_set_timeout, prepare_suite, run_record_set, run_suite
from test_suite import SCENARIO, _assert_same, _numbers, _write_record


@pytest.fixture(scope="module")
def case(tmp_path_factory):
    root = tmp_path_factory.mktemp("engines")
    rec = root / "recs"
    rec.mkdir()
    for k, name in enumerate("abcd"):
        _write_record(rec / f"{name}-x.csv", 1.0 + k, 2.0 + k, seed=k)
        _write_record(rec / f"{name}-y.csv", 0.5 + k, 3.0 + k, seed=20 + k)
    scen = root / "scen" / "scenario.toml"
    scen.parent.mkdir()
    scen.write_text(SCENARIO.format(rec=rec.as_posix(), block=concrete_block()))
    scenario = load_scenario(scen)
    shared = prepare_suite(scenario)
    sets = discover_record_sets(str(rec), units="m/s2", dt=0.01)
    return root, rec, scen, scenario, shared, sets


@pytest.fixture(scope="module")
def long_sets(case):
    # sets that take a noticeable time each (60,000 steps), so a worker can be lost mid-set;
    # the first is short, so when its result arrives the next set is still running
    root = case[0]
    rec = root / "long"
    rec.mkdir()
    for k in range(6):
        n = 4000 if k == 0 else 60000
        _write_record(rec / f"l{k}-x.csv", 1.0, 2.0 + 0.1 * k, n=n, seed=k)
        _write_record(rec / f"l{k}-y.csv", 0.5, 3.0, n=n, seed=30 + k)
    return discover_record_sets(str(rec), units="m/s2", dt=0.01)


def _all_ok(res, n):
    assert [r["status"] for r in res.records] == ["ok"] * n, \
        [r.get("error") for r in res.records]
    assert all("peaks" in r for r in res.records)


# ---------------------------------------------------------------- issue 12: pool


def test_pool_after_a_run_in_this_process_twice(case, tmp_path):
    # the sequence that lost every record: a run (its parallel stress kernel starts
    # numba's threading layer here; GNU OpenMP where TBB is missing), then two suites
    # on a pool of 2 in the same process; NUMBA_THREADING_LAYER is left alone
    import numba

    from groundshake.pipeline import analyse

    root, rec, scen, scenario, shared, sets = case
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        analyse(scenario, progress=False)
    layer = numba.threading_layer()          # raises if no parallel kernel ran here
    assert layer in ("omp", "tbb", "workqueue")
    plain = [run_record_set(dict(shared), rs.to_dict()) for rs in sets]
    for k in range(2):
        res = run_suite(scenario, sets, tmp_path / f"p{k}", shared=shared, workers=2)
        _all_ok(res, len(sets))                                       # contract: no set lost
        assert res.engine.name == "pool" and res.engine.workers == 2
        assert res.engine.start_method in ("forkserver", "spawn")   # never a fork of this process
        _assert_same(_numbers(plain), _numbers(res.records))          # contract: 1e-12


def test_relative_records_resolve_from_the_working_directory(case, tmp_path, monkeypatch,
                                                             capsys):
    # issue 12: --records DIR and patterns are relative to the working directory, as a
    # shell's are; a manifest's paths stay relative to the manifest
    root, rec, scen, scenario, shared, sets = case
    work = tmp_path / "work"
    (work / "myrecs").mkdir(parents=True)
    for f in rec.iterdir():
        (work / "myrecs" / f.name).write_bytes(f.read_bytes())
    monkeypatch.chdir(work)
    for k, spec in enumerate(("myrecs", "myrecs/*.csv", "./myrecs/a-*.csv")):
        out = tmp_path / f"out{k}"
        status = main(["suite", str(scen), "--records", spec, "--units", "m/s2", "--dt", "0.01",
                       "--workers", "1", "-o", str(out), "--quiet"])
        doc = json.loads((out / "suite.json").read_text())
        assert status == 0, [r.get("error") for r in doc["records"]]   # contract: 0 when all ok
        assert {r["status"] for r in doc["records"]} == {"ok"}
        # issue 21: the terminal and suite.json say which engine ran and how it went
        assert "engine: in this process, 1 worker; 0 retries, 0 timed out, 0 failed" \
            in capsys.readouterr().out
        assert doc["engine"]["name"] == "in-process" and doc["engine"]["failed"] == 0
        assert "engine: in this process, 1 worker" in (out / "suite.html").read_text()
        assert all(os.path.isabs(f) and f.startswith(str(work))
                   for r in doc["records"] for f in r["files"].values())
    (work / "lists").mkdir()
    (work / "lists" / "m.csv").write_text("set,x,y\none,../myrecs/a-x.csv,../myrecs/a-y.csv\n")
    monkeypatch.chdir(tmp_path)
    (s,) = discover_record_sets("work/lists/m.csv", units="m/s2", dt=0.01)
    assert s.files == {"x": str(work / "myrecs" / "a-x.csv"), "y": str(work / "myrecs" / "a-y.csv")}


# ---------------------------------------------------------------- issue 21: Dask


def _scheduler_keys(client):
    return client.run_on_scheduler(lambda dask_scheduler: sorted(map(str, dask_scheduler.tasks)))


def test_benchmark_sequence_twice_on_one_cluster(case, tmp_path):
    # the benchmark's order on one LocalCluster (plain loop, in-process suite, pool of 2,
    # Dask warm-up on 2 sets, Dask full run), twice; then two suites at once on the client
    distributed = pytest.importorskip("distributed")
    root, rec, scen, scenario, shared, sets = case
    plain = _numbers([run_record_set(dict(shared), rs.to_dict()) for rs in sets])
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            for k in range(2):
                serial = run_suite(scenario, sets, tmp_path / f"s{k}", shared=shared, workers=1)
                pool = run_suite(scenario, sets, tmp_path / f"p{k}", shared=shared, workers=2)
                warm = run_suite(scenario, sets[:2], tmp_path / f"w{k}", shared=shared,
                                 scheduler=client)
                full = run_suite(scenario, sets, tmp_path / f"d{k}", shared=shared,
                                 scheduler=client)
                for res, n in ((serial, 4), (pool, 4), (warm, 2), (full, 4)):
                    _all_ok(res, n)                                  # contract: none lost
                    _assert_same({k_: plain[k_] for k_ in _numbers(res.records)},
                                 _numbers(res.records))              # contract: 1e-12
                assert full.engine.name == "dask" and full.engine.workers == 2
                doc = json.loads((tmp_path / f"d{k}" / "suite.json").read_text())
                assert doc["engine"]["name"] == "dask" and doc["engine"]["failed"] == 0
                assert doc["engine"]["set_timeout_s"]["min"] > 0
            with ThreadPoolExecutor(2) as ex:     # concurrent suites share the client
                runs = [ex.submit(run_suite, scenario, sets, tmp_path / f"c{j}", shared=shared,
                                  scheduler=client) for j in range(2)]
                for fut in runs:
                    _all_ok(fut.result(timeout=120), 4)
            # held for the run only: nothing of ours is left on the scheduler afterwards
            deadline = time.monotonic() + 10
            while time.monotonic() < deadline:
                left = [k for k in _scheduler_keys(client) if "groundshake" in k or "dict-" in k]
                if not left:
                    break
                time.sleep(0.2)
            assert left == []


def _suite_losing_a_worker(case, sets, out, n_workers, victim):
    """``run_suite`` on a local Dask cluster of ``n_workers`` one-thread processes, where
    the worker whose process id ``victim(client)`` names (None: not yet) is killed once,
    as results arrive. Returns the suite's result, the records in the order they arrived
    and the process ids killed."""
    distributed = pytest.importorskip("distributed")
    _, _, _, scenario, shared, _ = case
    seen, killed = [], []

    def kill_once(r):
        seen.append(r["record"])
        if not killed:
            pid = victim(client)
            if pid is not None:
                os.kill(pid, signal.SIGKILL)
                killed.append(pid)

    with distributed.LocalCluster(n_workers=n_workers, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            res = run_suite(scenario, sets, out, shared=shared, scheduler=client,
                            on_result=kill_once)
    return res, seen, killed


def test_lost_dask_worker_costs_time_not_results(case, long_sets, tmp_path):
    def a_busy_worker(client):
        busy = [w for w, keys in client.processing().items() if keys]
        pids = client.run(os.getpid)
        return pids[busy[0]] if busy else None

    res, seen, killed = _suite_losing_a_worker(case, long_sets, tmp_path / "out", 2,
                                               a_busy_worker)
    assert killed                                           # the test did what it says
    _all_ok(res, len(long_sets))                            # contract: no set lost
    assert sorted(seen) == sorted(rs.name for rs in long_sets)   # each written exactly once
    assert len(list((tmp_path / "out" / "records").iterdir())) == len(long_sets)
    assert res.engine.retries >= 1                          # the lost set ran again


def test_lost_pool_worker_and_resume_after_an_interrupt(case, long_sets, tmp_path):
    root, rec, scen, scenario, shared, sets = case
    seen = []

    def kill_workers(r):
        # at the first (short) set's result the other worker is inside a long set:
        # kill every worker, so that at least one dies mid-set
        seen.append(r["record"])
        if len(seen) == 1:
            for p in multiprocessing.active_children():
                if p.name == "groundshake-suite-worker":
                    os.kill(p.pid, signal.SIGKILL)

    res = run_suite(scenario, long_sets, tmp_path / "out", shared=shared, workers=2,
                    on_result=kill_workers)
    _all_ok(res, len(long_sets))                            # contract: no set lost
    assert sorted(seen) == sorted(rs.name for rs in long_sets)   # each exactly once
    assert len(list((tmp_path / "out" / "records").iterdir())) == len(long_sets)
    assert res.engine.lost_workers == 2 and res.engine.retries >= 1   # the lost set ran again

    class Stop(Exception):
        pass

    first = []

    def stop_after_two(r):
        first.append(r["record"])
        if len(first) == 2:
            raise Stop   # as an interrupt: the suite ends here, the two sets are written

    with pytest.raises(Stop):
        run_suite(scenario, long_sets, tmp_path / "again", shared=shared, workers=2,
                  on_result=stop_after_two)
    assert not [p for p in multiprocessing.active_children()
                if p.name == "groundshake-suite-worker"]   # no worker left behind
    rest = []
    again = run_suite(scenario, long_sets, tmp_path / "again", shared=shared, workers=2,
                      resume=True, on_result=lambda r: rest.append(r["record"]))
    assert sorted(rest) == sorted(set(rs.name for rs in long_sets) - set(first))  # only the rest
    _all_ok(again, len(long_sets))


# ---------------------------------------------------------------- time limits


def _nap(shared, item):
    """A test task: sleeps ``item["sleep"]`` s in small steps (the soft limit can stop it)."""
    end = time.monotonic() + item["sleep"]
    while time.monotonic() < end:
        time.sleep(0.01)
    return {"record": item["name"], "status": "ok"}


def _stuck(shared, item):
    """A test task: one long C call (the soft limit cannot stop it; the hard stop must)."""
    time.sleep(item["sleep"])
    return {"record": item["name"], "status": "ok"}


def _timed(fn, items, limits, **kw):
    report = EngineReport()
    t0 = time.monotonic()
    out = {r["record"]: r for r in run_tasks(fn, {}, items, limits=limits, report=report, **kw)}
    return out, report, time.monotonic() - t0


def test_a_set_past_its_limit_is_reported_failed(monkeypatch):
    items = [{"name": "slow", "sleep": 30.0}, {"name": "quick", "sleep": 0.0}]
    for kw in (dict(workers=1), dict(workers=2)):
        out, report, took = _timed(_nap, items, [0.5, 0.5], **kw)
        assert out["quick"]["status"] == "ok"
        assert out["slow"]["status"] == "failed" and out["slow"]["timed_out"]   # contract
        assert "time limit of 0 s" in out["slow"]["error"] or "time limit" in out["slow"]["error"]
        assert report.timed_out == 1 and took < 20
    # a worker stuck in one long call is stopped (grace shortened for the test) and replaced
    monkeypatch.setattr(_engine, "_grace", lambda limit: 1.0)
    out, report, took = _timed(_stuck, items + [{"name": "after", "sleep": 0.0}],
                               [0.5, 0.5, 0.5], workers=2)
    assert out["slow"]["status"] == "failed" and "worker was stopped" in out["slow"]["error"]
    assert out["quick"]["status"] == "ok" and out["after"]["status"] == "ok"
    assert took < 20


def test_dask_time_limit_and_silence(case, tmp_path, monkeypatch):
    distributed = pytest.importorskip("distributed")
    root, rec, scen, scenario, shared, sets = case
    items = [{"name": "slow", "sleep": 30.0}, {"name": "quick", "sleep": 0.0}]
    with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            out, report, took = _timed(_nap, items, [0.5, 0.5], scheduler=client)
    assert out["slow"]["status"] == "failed" and out["slow"]["timed_out"]      # contract
    assert out["quick"]["status"] == "ok" and took < 20
    # a cluster that never starts our sets (its only thread is held by other work):
    # silence past any set's limit ends in a clear error, not a wait
    monkeypatch.setattr(_engine, "_grace", lambda limit: 0.2)
    monkeypatch.setattr(_engine, "_SILENCE_MARGIN_S", 0.5)
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            other = client.submit(_nap, {}, {"name": "other", "sleep": 8.0}, pure=False)
            t0 = time.monotonic()
            with pytest.raises(SuiteStalled, match="gave no result"):
                run_suite(scenario, sets, tmp_path / "stalled", shared=shared,
                          scheduler=client, set_timeout=0.2)
            assert time.monotonic() - t0 < 8
            other.cancel()
    doc = json.loads((tmp_path / "stalled" / "suite.json").read_text())
    assert doc["complete"] is False and "gave no result" in doc["engine"]["notes"][0]
    # no worker at all: the shared data finds no taker, a clear error
    monkeypatch.setattr(_engine, "_SCATTER_TIMEOUT_S", 1.0)
    with distributed.LocalCluster(n_workers=0, processes=False,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            with pytest.raises(SuiteStalled, match="took no copy"):
                list(run_tasks(_nap, {}, items, limits=[0.2, 0.2], scheduler=client))


def test_default_limit_formula_and_option(case, tmp_path):
    # the documented formula: 120 s + 1e-6 s x DOFs x samples (x10 work for direct)
    assert default_set_timeout(1000, 4000) == pytest.approx(120 + 4.0)
    assert default_set_timeout(1000, 4000, method="direct") == pytest.approx(120 + 40.0)
    root, rec, scen, scenario, shared, sets = case
    res = run_suite(scenario, sets[:1], tmp_path / "o", shared=shared)
    doc = json.loads((tmp_path / "o" / "suite.json").read_text())
    n_dof = shared["n_dof"]
    assert doc["engine"]["set_timeout_s"]["max"] == pytest.approx(120 + 1e-6 * n_dof * 400)
    assert res.engine.name == "in-process"
    status = main(["suite", str(scen), "--records", str(rec), "--set-timeout", "-1",
                   "-o", str(tmp_path / "bad"), "--quiet"])
    assert status == 2                                  # contract: bad option, status 2


def test_dask_cluster_that_loses_the_shared_model_scatters_it_again(case, long_sets, tmp_path):
    # one worker: killing it loses the only copy of the shared model (the scheduler
    # forgets scattered data it cannot recompute); the suite scatters it again
    def the_worker(client):
        (pid,) = client.run(os.getpid).values()
        return pid

    res, seen, killed = _suite_losing_a_worker(case, long_sets[:3], tmp_path / "out", 1,
                                               the_worker)
    _all_ok(res, 3)                                                   # contract: no set lost
    assert sorted(seen) == sorted(rs.name for rs in long_sets[:3])   # each exactly once
    assert res.engine.retries >= 1


def _settings(shared, item):
    """A test task: the thread settings in force where it runs."""
    import numba

    from groundshake.spectra._kernel import kernel_threads

    return {"record": item["name"], "status": "ok", "numba": numba.get_num_threads(),
            "kernel": kernel_threads(), "env": os.environ.get("GROUNDSHAKE_THREADS"),
            "malloc": _engine._malloc_tuned}


def test_workers_run_compiled_kernels_on_one_thread():
    # the workers are the parallelism: inside a pool worker and a Dask task, numba's
    # thread count (numba docs: set_num_threads, per calling thread) and the oscillator
    # kernel's are 1; on glibc the allocator settings were applied (mallopt returns 1)
    distributed = pytest.importorskip("distributed")
    items = [{"name": f"s{k}"} for k in range(3)]
    runs = {"pool": list(run_tasks(_settings, {}, items, workers=2))}
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            runs["dask"] = list(run_tasks(_settings, {}, items, scheduler=client))
    glibc = _engine._glibc() is not None
    for name, out in runs.items():
        assert len(out) == 3, name
        for r in out:
            assert r["numba"] == 1 and r["kernel"] == 1 and r["env"] == "1", (name, r)
            assert r["malloc"] == glibc, (name, r)
