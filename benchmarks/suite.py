"""Suite benchmark: many invented synthetic record sets through the demo model.

Runs the same suite serially (a plain loop: the reference), then in this process, on
a local pool of 2 workers and on a 2-worker Dask LocalCluster (a warm-up on 2 sets,
then the full run), and the whole sequence again (``--rounds``) on the same cluster;
prints per-record times, the speed-up against the plain loop, which engine ran, and
the CPU seconds per set summed over the worker's threads (measured inside each task by
``_suite_probe.probed_set``: less sensitive to a loaded machine than wall time; the
load average is printed beside it). A pool's figure includes its fresh workers'
loading of the compiled kernels; Dask's warm-up is timed apart. The records are
synthetic (Boore 2003 stochastic method, invented scenario), one seed per set.

    python benchmarks/suite.py [--records 100] [--duration 20] [--rounds 2] [--skip-dask]
"""
from __future__ import annotations

import argparse
import contextlib
import os
import tempfile
import time
import warnings
from pathlib import Path

import numpy as np

from groundshake._errors import GroundshakeWarning
from groundshake.records import Record, write_record
from groundshake.records.synthetic import stochastic_acceleration
from groundshake.scenario import load_scenario
from groundshake.suite import discover_record_sets
from groundshake.suite import _run
from groundshake.suite._run import prepare_suite, run_suite

import _suite_probe  # noqa: E402 - beside this file; imported before the swap below

ROOT = Path(__file__).resolve().parents[1]


def make_records(folder: Path, n: int, duration: float, dt: float = 0.005) -> None:
    for k in range(n):
        streams = np.random.SeedSequence(1000 + k).spawn(3)
        for comp, scale, ss in zip(("h1", "h2", "up"), (1.0, 1.0, 0.6), streams):
            acc = scale * stochastic_acceleration(np.random.default_rng(ss), dt=dt,
                                                  duration=duration)
            write_record(Record(acc=acc, dt=dt, name=f"set{k:03d}-{comp}", units="m/s2"),
                         folder / f"set{k:03d}-{comp}.mseed")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--records", type=int, default=100)
    ap.add_argument("--duration", type=float, default=20.0, help="record length [s]")
    ap.add_argument("--scenario", default=str(ROOT / "examples" / "transformer-pad.toml"))
    ap.add_argument("--rounds", type=int, default=2,
                    help="times the whole engine sequence runs, on one Dask cluster")
    ap.add_argument("--skip-dask", action="store_true")
    args = ap.parse_args()
    warnings.simplefilter("ignore", GroundshakeWarning)
    with tempfile.TemporaryDirectory() as tmp, contextlib.ExitStack() as stack:
        tmp = Path(tmp)
        recs = tmp / "recs"
        recs.mkdir()
        t0 = time.perf_counter()
        make_records(recs, args.records, args.duration)
        print(f"records: {args.records} sets x 3 components, {args.duration:g} s at 200 Hz "
              f"(invented, synthetic), written in {time.perf_counter() - t0:.1f} s")
        scenario = load_scenario(args.scenario)
        sets = discover_record_sets(str(recs), units="m/s2")
        t0 = time.perf_counter()
        shared = prepare_suite(scenario)
        t_prep = time.perf_counter() - t0
        print(f"model ({shared['n_dof']} DOFs) and modes built once: {t_prep:.2f} s; "
              f"load average at the start {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
        plain = dict(shared)
        t0 = time.perf_counter()
        probes = []
        for rs in sets:        # the reference: a plain loop, no files, no engine
            r = _suite_probe.probed_set(plain, rs.to_dict())
            assert r["status"] == "ok"
            probes.append(r["_probe"])
        ref = time.perf_counter() - t0
        ref_cpu = sum(p["user_s"] + p["sys_s"] for p in probes) / len(probes)
        # every engine runs the measuring wrapper (it calls the real task and adds
        # ``_probe``); workers import it by name from this folder
        _run.run_record_set = _suite_probe.probed_set
        client = None
        if not args.skip_dask:
            from distributed import Client, LocalCluster

            cluster = stack.enter_context(LocalCluster(n_workers=2, threads_per_worker=1,
                                                       processes=True, dashboard_address=None))
            client = stack.enter_context(Client(cluster))
        n = args.records
        for rnd in range(1, args.rounds + 1):
            times = {"plain loop (reference)": ref}
            cpu = {"plain loop (reference)": ref_cpu}
            load = {"plain loop (reference)": None}
            engines = [("suite, 1 worker (in process)", dict(workers=1)),
                       ("local pool, 2 workers", dict(workers=2))]
            if client is not None:
                engines.append(("dask LocalCluster, 2 workers", dict(scheduler=client)))
            print(f"\nround {rnd} of {args.rounds}")
            for label, kw in engines:
                if "scheduler" in kw:
                    # the workers' first sets import the package and load the compiled
                    # kernels (a pool worker gets them from its fork server): timed apart
                    t0 = time.perf_counter()
                    warm = run_suite(scenario, sets[:2], tmp / f"warm{rnd}", shared=shared, **kw)
                    assert warm.n_failed == 0
                    print(f"  dask warm-up (2 sets): {time.perf_counter() - t0:.2f} s")
                t0 = time.perf_counter()
                res = run_suite(scenario, sets, tmp / f"{rnd}-{label.split(',')[0].replace(' ', '_')}",
                                shared=shared, **kw)
                times[label] = time.perf_counter() - t0
                load[label] = os.getloadavg()[0]
                got = [r["_probe"] for r in res.records]
                cpu[label] = sum(p["user_s"] + p["sys_s"] for p in got) / len(got)
                assert res.n_failed == 0, [r.get("error") for r in res.records
                                           if r["status"] != "ok"]
                print(f"  {label}: {res.engine.line()}")
            print(f"  {'engine':<32}{'total [s]':>10}{'per record [s]':>16}{'speed-up':>10}"
                  f"{'CPU per set [s]':>17}{'load':>6}")
            for label, t in times.items():
                ld = f"{load[label]:>6.1f}" if load[label] is not None else f"{'':>6}"
                print(f"  {label:<32}{t:>10.2f}{t / n:>16.3f}{ref / t:>10.2f}"
                      f"{cpu[label]:>17.3f}{ld}")
            one, pool2 = times["suite, 1 worker (in process)"], times["local pool, 2 workers"]
            print(f"  2 workers vs 1: {one / pool2:.2f}x")
            if "dask LocalCluster, 2 workers" in times:
                dask2 = times["dask LocalCluster, 2 workers"]
                more = cpu["dask LocalCluster, 2 workers"] / cpu["local pool, 2 workers"] - 1
                print(f"  Dask over the 2-worker pool: wall {100 * (dask2 - pool2) / pool2:+.1f} %,"
                      f" CPU per set {100 * more:+.1f} %")


if __name__ == "__main__":
    main()
