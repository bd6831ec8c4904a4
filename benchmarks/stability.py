"""Cost of the stability histories and of the soil cases.

1. ``stability_histories`` on 20,000 steps (a 100 s record at 200 Hz) of invented base
   resultants, with contact lost on 0 %, 5 % and 50 % of the steps (the no-tension
   pressure is solved by Newton's method on a 64 × 64 grid only where contact is lost),
   as a ratio to the full-contact case in the same process.
2. A small scenario on soil run once and with ``variation`` (three soil cases, one model
   each) and ``frequency_dependent`` (springs iterated to their modes), as ratios to the
   single run in the same process.

    python benchmarks/stability.py
"""
from __future__ import annotations

import time
import warnings

import numpy as np

from groundshake.results._stability import stability_histories


def _time(fn, repeat: int = 3) -> float:
    best = np.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def histories() -> None:
    n_t, L, B, W = 20_000, 4.0, 3.0, 5e5
    rng = np.random.default_rng(0)
    base = rng.standard_normal((5, n_t))
    rows = []
    ref = None
    for share in (0.0, 0.05, 0.5):
        lost = rng.random(n_t) < share
        ecc = np.where(lost, 0.3, 0.08)                  # e/L beyond 1/6 where lost
        my = W * L * ecc * np.sign(base[4])
        mx = W * B * 0.05 * base[3] / np.abs(base[3]).max()
        args = (2e5 * base[0], 1e5 * base[1], np.full(n_t, W), mx, my)
        t = _time(lambda: stability_histories(*args, lx=L, ly=B, friction_coefficient=0.5))
        ref = ref or t
        rows.append((share, t, t / ref))
    print(f"stability_histories, {n_t} steps")
    for share, t, r in rows:
        print(f"  contact lost on {100 * share:4.0f} % of the steps: {t:8.3f} s  "
              f"({r:6.1f} x full contact)")


def cases() -> None:
    from groundshake.dynamics import motion_from_arrays
    from groundshake.pipeline import analyse
    from groundshake.scenario import Scenario

    def scen(**extra):
        return Scenario.from_dict({
            "title": "benchmark block (invented)",
            "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
            "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [4, 3, 1.2]}],
            "mesh": {"element_size": 0.3},
            "support": {"kind": "soil", "shear_wave_velocity": 200.0, "poisson_ratio": 0.3,
                        "density": 1900.0, "friction_coefficient": 0.5, **extra},
            "analysis": {"cutoff_hz": 40.0},
            "floor_spectra": {"damping_percent": [5], "periods": {"min": 0.05, "max": 1.0,
                                                                  "count": 20}}})

    dt = 0.005
    t = np.arange(4000) * dt
    a = 3.0 * np.sin(2 * np.pi * 2.0 * t) * np.sin(np.pi * t / t[-1]) ** 2   # invented
    motion = motion_from_arrays({"x": a, "y": 0.5 * a}, dt)
    runs = {"one soil model": scen(), "variation = 0.5 (3 cases)": scen(variation=0.5),
            "variation + frequency_dependent": scen(variation=0.5, frequency_dependent=True)}
    ref = None
    print("analyse() on soil, 20 s record (after one untimed run to warm the compiled kernels)")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        analyse(runs["one soil model"], motion=motion, progress=False, stresses=False)
        for name, s in runs.items():
            tm = _time(lambda: analyse(s, motion=motion, progress=False, stresses=False),
                       repeat=1)
            ref = ref or tm
            print(f"  {name:34s} {tm:8.2f} s  ({tm / ref:5.2f} x one model)")


if __name__ == "__main__":
    histories()
    cases()
