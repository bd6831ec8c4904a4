"""Long fuzzing profile of the delimited-text reader.

Feeds N generated files (random bytes, random numeric tables with headers and odd
separators, huge and tiny values, NaN/inf, repeated or backwards times) to
``read_record`` and counts the outcomes: valid records, the package's own error, or
anything else (an uncaught exception — the goal is zero). Also reports the largest
memory growth seen (tracemalloc) and the slowest single input.

    python benchmarks/fuzz_records.py [--count 10000] [--seed 1]
"""
from __future__ import annotations

import argparse
import collections
import tempfile
import time
import tracemalloc
import warnings
from pathlib import Path

import numpy as np

from groundshake._errors import GroundshakeError, GroundshakeWarning
from groundshake.records import read_record

SEPS = [",", ";", " ", "\t", ", ", "|", ":"]
SPECIAL = ["nan", "inf", "-inf", "1e308", "-1e308", "1e-320", "0x10", "1,5", "--1", "", "e5"]
HEADERS = ["# units: g", "# units: cm/s2", "# dt: 0.01", "time [s], acc [g]", "t acc",
           "# units: parsecs", "# dt: -1", "acc [m/s2]", "station: X<script>", ""]


def one_input(rng: np.random.Generator) -> bytes:
    kind = rng.integers(4)
    if kind == 0:
        return rng.bytes(int(rng.integers(0, 4096)))
    sep = SEPS[rng.integers(len(SEPS))]
    n_rows = int(rng.integers(0, 300))
    n_cols = int(rng.integers(1, 4))
    lines = [HEADERS[rng.integers(len(HEADERS))] for _ in range(rng.integers(0, 4))]
    t = np.cumsum(rng.choice([0.01, 0.01, 0.01, 0.0, -0.01, 0.0103], size=n_rows)) \
        if kind == 2 else np.arange(n_rows) * 0.01
    scale = 10.0 ** rng.integers(-300, 300) if kind == 3 else 1.0
    for i in range(n_rows):
        cells = [f"{t[i]:.5f}"] if n_cols > 1 else []
        for _ in range(n_cols - len(cells)):
            if rng.random() < 0.01:
                cells.append(SPECIAL[rng.integers(len(SPECIAL))])
            else:
                cells.append(repr(float(rng.standard_normal() * scale)))
        lines.append(sep.join(cells))
    return ("\n".join(lines) + "\n").encode()


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--count", type=int, default=10000)
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args()
    rng = np.random.default_rng(args.seed)
    outcomes = collections.Counter()
    uncaught = []
    slowest = 0.0
    tracemalloc.start()
    base = tracemalloc.get_traced_memory()[0]
    peak_growth = 0
    t_all = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "fuzz.csv"
        for i in range(args.count):
            path.write_bytes(one_input(rng))
            kw = [dict(), dict(units="g"), dict(units="m/s2", dt=0.01)][i % 3]
            t0 = time.perf_counter()
            try:
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", GroundshakeWarning)
                    read_record(path, **kw)
                outcomes["valid records"] += 1
            except GroundshakeError:
                outcomes["package error"] += 1
            except Exception as e:  # noqa: BLE001 - counting is the point
                outcomes["UNCAUGHT"] += 1
                uncaught.append(f"{type(e).__name__}: {e}")
            slowest = max(slowest, time.perf_counter() - t0)
            peak_growth = max(peak_growth, tracemalloc.get_traced_memory()[1] - base)
    total = time.perf_counter() - t_all
    print(f"inputs: {args.count}  ({total:.1f} s, {1e3 * total / args.count:.2f} ms each, "
          f"slowest {1e3 * slowest:.1f} ms)")
    for k in ("valid records", "package error", "UNCAUGHT"):
        print(f"  {k:<15} {outcomes.get(k, 0)}")
    print(f"largest traced memory growth: {peak_growth / 2**20:.1f} MiB")
    for u in uncaught[:10]:
        print("  ", u)


if __name__ == "__main__":
    main()
