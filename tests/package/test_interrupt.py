"""An interrupted run leaves the previous output untouched and says so.

Contract (issue "Nothing lost"; common practice for atomic outputs: write under a
temporary name in the same folder, rename when complete): SIGINT or SIGTERM during
`groundshake run` ends it with status 130 and one line on stderr, the earlier
output folder is byte for byte as it was, and no temporary folder is left behind.
The run is interrupted once it has used several seconds of CPU time (past the
imports, inside the computation), measured from /proc, so the test does not depend
on how busy the machine is.
"""
from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from _tables import block_scenario, part, sensor

ROOT = Path(__file__).resolve().parents[2]

SCENARIO = block_scenario(
    "interrupt test (invented)", [part("block", (3.0, 3.0, 1.0))], element_size=0.12,
    before=['[motion]\nx = {{ file = "{rec}", units = "m/s2" }}\n'],
    after=[sensor("top", (3.0, 3.0, 1.0)), "[analysis]\nmodes = 30\n"])


def _default_interrupt() -> None:
    # A shell without job control starts background commands with SIGINT ignored (POSIX,
    # Shell Command Language §2.11), and a child inherits that: give the run the usual
    # disposition, as a terminal user's run has it.
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def _cpu_seconds(pid: int) -> float:
    fields = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


@pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="needs /proc")
@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGINT], ids=["SIGTERM", "SIGINT"])
def test_interrupted_run_keeps_previous_output(tmp_path, sig):
    scen = tmp_path / "s.toml"
    scen.write_text(SCENARIO.format(rec=(ROOT / "records" / "demo-h1.mseed").as_posix()))
    out = tmp_path / "out"
    out.mkdir()
    (out / "summary.json").write_text('{"previous": true}\n')
    before = sorted((p.name, p.read_bytes()) for p in out.iterdir())
    proc = subprocess.Popen([sys.executable, "-m", "groundshake", "run", str(scen), "-o",
                             str(out), "--force", "--quiet"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, cwd=tmp_path,
                            preexec_fn=_default_interrupt)
    deadline = time.monotonic() + 600
    try:
        while proc.poll() is None and _cpu_seconds(proc.pid) < 7.0:
            assert time.monotonic() < deadline
            time.sleep(0.05)
        assert proc.poll() is None, "the run finished before it could be interrupted"
        proc.send_signal(sig)
        _, err = proc.communicate(timeout=120)
    finally:
        if proc.poll() is None:
            proc.kill()
    lines = err.decode().strip().splitlines()
    assert proc.returncode == 130                       # 128 + SIGINT, shell convention
    assert lines and "interrupted" in lines[-1] and "Traceback" not in err.decode()
    assert sorted((p.name, p.read_bytes()) for p in out.iterdir()) == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out", "s.toml"]
