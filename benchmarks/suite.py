"""Suite benchmark: many invented synthetic record sets through the demo model.

Runs the same suite serially (a plain loop: the reference), on a local pool of 1
and 2 workers, and on a 2-worker Dask LocalCluster, all in this process, and prints
per-record times, the speed-up and each engine's overhead against the plain loop.
The records are synthetic (Boore 2003 stochastic method, invented scenario), one
seed per set.

    python benchmarks/suite.py [--records 100] [--duration 20] [--skip-dask]
"""
from __future__ import annotations

import argparse
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
from groundshake.suite._run import prepare_suite, run_record_set, run_suite

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
    ap.add_argument("--skip-dask", action="store_true")
    args = ap.parse_args()
    warnings.simplefilter("ignore", GroundshakeWarning)
    with tempfile.TemporaryDirectory() as tmp:
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
        print(f"model and modes built once: {t_prep:.2f} s")
        times = {}
        plain = dict(shared)
        t0 = time.perf_counter()
        for rs in sets:        # the reference: a plain loop, no files, no engine
            assert run_record_set(plain, rs.to_dict())["status"] == "ok"
        times["plain loop"] = time.perf_counter() - t0
        for label, kw in (("suite, 1 worker (in process)", dict(workers=1)),
                          ("pool, 2 workers", dict(workers=2))):
            t0 = time.perf_counter()
            res = run_suite(scenario, sets, tmp / label.replace(" ", "_").replace(",", ""),
                            shared=shared, **kw)
            times[label] = time.perf_counter() - t0
            assert res.n_failed == 0, [r.get("error") for r in res.records if r["status"] != "ok"]
        if not args.skip_dask:
            from distributed import Client, LocalCluster

            with LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                              dashboard_address=None) as cluster, Client(cluster) as client:
                # new worker processes import the package and load the compiled kernels
                # once (a forked pool inherits them): timed apart as start-up
                t0 = time.perf_counter()
                run_suite(scenario, sets[:2], tmp / "dask-warm", shared=shared, scheduler=client)
                print(f"dask start-up (2 sets on fresh workers): {time.perf_counter() - t0:.2f} s")
                t0 = time.perf_counter()
                res = run_suite(scenario, sets, tmp / "dask", shared=shared, scheduler=client)
                times["dask LocalCluster, 2 workers"] = time.perf_counter() - t0
                assert res.n_failed == 0
        ref = times["plain loop"]
        n = args.records
        print(f"\n{'engine':<32}{'total [s]':>10}{'per record [s]':>16}{'speed-up':>10}")
        for label, t in times.items():
            print(f"{label:<32}{t:>10.2f}{t / n:>16.3f}{ref / t:>10.2f}")
        if "dask LocalCluster, 2 workers" in times:
            pool2 = times["pool, 2 workers"]
            dask2 = times["dask LocalCluster, 2 workers"]
            print(f"\nDask per-record overhead over the 2-worker pool: "
                  f"{100 * (dask2 - pool2) / pool2:+.1f} %")
        print(f"2 workers vs 1: "
              f"{times['suite, 1 worker (in process)'] / times['pool, 2 workers']:.2f}x")


if __name__ == "__main__":
    main()
