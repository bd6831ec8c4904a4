"""Time to answer every case of the broken-input corpus, and the memory guard.

Runs ``groundshake info`` on each file of tests/data/bad/records and
``groundshake modes`` on each of tests/data/bad/scenarios through ``main([...])``
(the imports already warm, as in a test), and prints the status and the seconds each
took. Goal: status 2 for every case, each under 5 s; the memory guard
(``mesh-too-fine``) under 2 s.

    python benchmarks/bad_inputs.py
"""
from __future__ import annotations

import contextlib
import io
import shlex
import time
from pathlib import Path

from groundshake.cli import main

ROOT = Path(__file__).resolve().parents[1]
BAD = ROOT / "tests" / "data" / "bad"


def _run(argv: list[str]) -> tuple[int, float, str]:
    err = io.StringIO()
    t0 = time.perf_counter()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        status = main(argv)
    return status, time.perf_counter() - t0, err.getvalue().strip().splitlines()[-1:] or [""]


def main_() -> None:
    main(["--version"])  # warm the imports
    rows = []
    for line in (BAD / "records" / "expected.tsv").read_text().splitlines():
        if line.strip() and not line.startswith("#"):
            name, extra, _ = line.split("\t")
            rows.append(("record", name, ["info", str(BAD / "records" / name), *shlex.split(extra)]))
    for p in sorted((BAD / "scenarios").glob("*.toml")):
        rows.append(("scenario", p.name, ["modes", str(p)]))
    worst = 0.0
    bad_status = 0
    print(f"{'kind':<9}{'case':<40}{'status':>7}{'seconds':>9}")
    for kind, name, argv in rows:
        status, secs, _ = _run(argv)
        worst = max(worst, secs)
        bad_status += status != 2
        print(f"{kind:<9}{Path(name).name:<40}{status:>7}{secs:>9.3f}")
    print(f"\n{len(rows)} cases; {bad_status} without status 2; slowest {worst:.2f} s (goal < 5 s)")
    guard = BAD / "scenarios" / "mesh-too-fine.toml"
    if guard.exists():
        status, secs, msg = _run(["modes", str(guard)])
        print(f"memory guard: status {status} in {secs:.3f} s (goal < 2 s): {msg[0][:120]}")


if __name__ == "__main__":
    main_()
