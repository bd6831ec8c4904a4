"""Cost of stepping modes coupled by a full modal damping matrix.

Prints, for m = 10, 50 and 200 modes on 12,000 samples, the time of
``coupled_modal_response`` (matrix exponential of the 2m-state system, then one
matrix-vector product per step) against ``modal_response`` (the oscillator kernel, one
uncoupled oscillator per mode) in the same process, and the largest difference between
the two when the damping matrix is diagonal (they must then agree).

Modes, frequencies and the excitation are invented (seeded). Timings are best-of-3 wall
times. Run: python benchmarks/coupled_modal.py
"""
from __future__ import annotations

import os
import sys
import time

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.dirname(HERE))

from groundshake.dynamics import coupled_modal_response, modal_response  # noqa: E402


def best(fn, n=3):
    t = []
    for _ in range(n):
        t0 = time.perf_counter()
        fn()
        t.append(time.perf_counter() - t0)
    return min(t)


def main() -> None:
    rng = np.random.default_rng(1)
    n_t, dt = 12_000, 0.005
    ag = rng.standard_normal((3, n_t)) * np.sin(np.pi * np.arange(n_t) / n_t) ** 2
    print(f"{'modes':>6} {'coupled [s]':>12} {'kernel [s]':>11} {'ratio':>7} {'max diff':>9}")
    for m in (10, 50, 200):
        omega = 2 * np.pi * np.geomspace(2.0, 80.0, m)
        zeta = np.full(m, 0.05)
        gam = rng.standard_normal((m, 3))
        phi = np.eye(m)
        Cm = np.diag(2 * zeta * omega)
        tc = best(lambda: coupled_modal_response(phi, omega, Cm, gam, ag, dt))
        tk = best(lambda: modal_response(phi, omega, zeta, gam, ag, dt))
        a = coupled_modal_response(phi, omega, Cm, gam, ag, dt).q
        b = modal_response(phi, omega, zeta, gam, ag, dt).q
        diff = np.abs(a - b).max() / np.abs(b).max()
        print(f"{m:>6} {tc:>12.3f} {tk:>11.3f} {tc / tk:>7.1f} {diff:>9.1e}")


if __name__ == "__main__":
    main()
