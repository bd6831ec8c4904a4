"""Speed of the oscillator kernel, response spectra and RotD100.

Prints ns per oscillator-step for 300 periods x 5 damping values on 12,000 samples
(1.8e7 oscillator-steps), against a per-oscillator scipy reference
(cont2discrete(method="foh") + dlsim) timed on a subset in the same run, the numpy
engine, the first call in a fresh process (JIT included), and the cost of RotD100
over 180 angles relative to one spectrum (also at 100 periods, the goal's case). Also
the largest relative difference from the scipy reference on the subset, and the cost of
the refinement of coarse records (per-period power-of-two factors, 40 samples a period,
at most 16) against the rule it replaced (one factor for all periods under 10·dt, set by
the shortest of them).

The excitation is invented (seeded filtered noise under an envelope). Timings are
best-of-N wall times; CPU times are shown too, since a shared machine inflates wall
time. Run: python benchmarks/spectra.py [--quick]

``--against REV`` instead times the compiled loops of git revision REV against this
tree's, alternately in one process (a 5 %-damped spectrum of 300 periods on 20,000
steps, peaks with mixed excitation rows, histories, RotD), and says whether the results
are the same to the bit.
"""
from __future__ import annotations

import argparse
import importlib.util
import os
import subprocess
import sys
import tempfile
import textwrap
import time

import numpy as np
from scipy import signal

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.dirname(HERE))

from groundshake.spectra import (fourier_upsample, kernel_engine,  # noqa: E402
                                 oscillator_peaks, response_spectrum, rotd)

N_T, DT = 12_000, 0.005
PERIODS = np.geomspace(0.05, 10.0, 300)
DAMPING = np.array([0.0, 0.02, 0.05, 0.10, 0.20])


def record(seed=0, n=N_T):
    """Invented test excitation [m/s²]: filtered seeded noise under a smooth envelope."""
    rng = np.random.default_rng(seed)
    t = np.arange(n) * DT
    env = np.sin(np.pi * t / t[-1]) ** 2
    b, a = signal.butter(4, [0.2, 15.0], btype="band", fs=1 / DT)
    return env * signal.lfilter(b, a, rng.standard_normal(n))


def best(fn, repeat):
    walls, cpus = [], []
    for _ in range(repeat):
        w, c = time.perf_counter(), time.process_time()
        fn()
        walls.append(time.perf_counter() - w)
        cpus.append(time.process_time() - c)
    return min(walls), min(cpus)


def scipy_reference(acc, omega, xi):
    """Peaks of one oscillator by scipy's first-order hold (x, v, absolute acceleration)."""
    a = np.array([[0.0, 1.0], [-omega ** 2, -2 * xi * omega]])
    c = np.array([[1.0, 0.0], [0.0, 1.0], [-omega ** 2, -2 * xi * omega]])
    sysd = signal.cont2discrete((a, np.array([[0.0], [-1.0]]), c, np.zeros((3, 1))), DT,
                                method="foh")
    _, y, _ = signal.dlsim(sysd, acc, x0=-sysd[3][:2, 0] * acc[0])
    return np.abs(y).max(axis=0)


FIRST_CALL = textwrap.dedent("""
    import time, sys
    t0 = time.perf_counter(); c0 = time.process_time()
    sys.path.insert(0, {root!r})
    import numpy as np
    from groundshake.spectra import response_spectrum
    acc = np.sin(np.arange(12000) * 0.005 * 6.0)
    response_spectrum(acc, 0.005, np.geomspace(0.05, 10, 300), [0, .02, .05, .1, .2])
    print(time.perf_counter() - t0, time.process_time() - c0)
""")


def first_call(cold: bool):
    env = dict(os.environ)
    tmp = None
    if cold:
        tmp = tempfile.mkdtemp(prefix="gs-numba-cache-")
        env["NUMBA_CACHE_DIR"] = tmp           # empty cache: everything is compiled
    code = FIRST_CALL.format(root=os.path.dirname(HERE))
    out = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True,
                         check=True).stdout.split()
    return float(out[0]), float(out[1])


def previous_refinement(acc, dt, periods, damping):
    """The rule replaced: periods under 10·dt all use one factor, ceil(10·dt / T_min).

    ``acc`` (n_t,) or (n_rec, n_t), all records in one batch as response_spectrum did."""
    flat = np.atleast_2d(acc)
    short = periods < 10 * dt
    out = []
    for sel in (~short, short):
        if not sel.any():
            continue
        m = int(np.ceil(10 * dt / periods[sel].min() - 1e-9)) if sel is short else 1
        rec = fourier_upsample(flat, m) if m > 1 else flat
        k = int(sel.sum()) * damping.size
        om = np.tile(np.tile(2 * np.pi / periods[sel], damping.size), flat.shape[0])
        xi = np.tile(np.repeat(damping, sel.sum()), flat.shape[0])
        src = np.repeat(np.arange(flat.shape[0]), k)
        out.append(oscillator_peaks(rec, dt / m, om, xi, source=src))
    return out


def refinement_cost(rep):
    """Wall time of the new refinement against the previous rule, same records."""
    print("\nrefinement of coarse records, new rule vs previous rule (5 % damping unless said):")
    print(f"{'case':<46}{'new ms':>9}{'before ms':>11}{'ratio':>8}{'CPU ratio':>11}")
    damping = np.array([0.05])
    cases = (("50 Hz, 100 periods 0.01-10 s", 0.02, np.geomspace(0.01, 10.0, 100)),
             ("100 Hz, 100 periods 0.01-10 s", 0.01, np.geomspace(0.01, 10.0, 100)),
             ("200 Hz, 100 periods 0.01-10 s", 0.005, np.geomspace(0.01, 10.0, 100)),
             ("200 Hz, 300 periods 0.05-10 s (this file)", 0.005, PERIODS))
    for label, dt, periods in cases:
        acc = record(seed=2, n=int(60.0 / dt))
        w_new, c_new = best(lambda: response_spectrum(acc, dt, periods, damping), rep)
        w_old, c_old = best(lambda: previous_refinement(acc, dt, periods, damping), rep)
        print(f"{label:<46}{1e3 * w_new:>9.1f}{1e3 * w_old:>11.1f}{w_new / w_old:>7.2f}x"
              f"{c_new / max(c_old, 1e-9):>10.2f}x")
    # like a run's floor spectra (the example scenario): 12 histories at 200 Hz, 100 s,
    # 120 periods 0.02-5 s, 2 and 5 % damping
    label, dt = "floor-like: 12 x 20,001 samples, 120 x 2 osc.", 0.005
    periods, damping = np.geomspace(0.02, 5.0, 120), np.array([0.02, 0.05])
    accs = np.stack([record(seed=s, n=20_001) for s in range(12)])
    w_new, c_new = best(lambda: response_spectrum(accs, dt, periods, damping), rep)
    w_old, c_old = best(lambda: previous_refinement(accs, dt, periods, damping), rep)
    print(f"{label:<46}{1e3 * w_new:>9.1f}{1e3 * w_old:>11.1f}{w_new / w_old:>7.2f}x"
          f"{c_new / max(c_old, 1e-9):>10.2f}x")


def _loops_of(rev):
    """The compiled-loop module of git revision ``rev``, imported from a temporary copy."""
    text = subprocess.run(["git", "show", f"{rev}:groundshake/spectra/_jit.py"],
                          cwd=os.path.dirname(HERE), capture_output=True, text=True,
                          check=True).stdout
    folder = tempfile.mkdtemp(prefix="gs-loops-")
    path = os.path.join(folder, "_jit_at_rev.py")
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(text)
    spec = importlib.util.spec_from_file_location("_jit_at_rev", path)
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module          # numba's cache finds the module by name
    spec.loader.exec_module(module)
    return module


def _peaks(result):
    """Peaks and their times of a spectrum or of oscillator peaks, stacked."""
    names = ("sd", "sv", "sa", "sd_time", "sa_time") if hasattr(result, "sd") else (
        "disp", "vel", "abs_acc", "disp_time", "vel_time", "abs_acc_time")
    return np.stack([np.ravel(getattr(result, n)) for n in names])


def against(rev, rep):
    """This tree's compiled loops against those of ``rev``: times, ratios, sameness."""
    from groundshake.spectra import _kernel, oscillator_history

    mods = {"this tree": _kernel._jit(), rev: _loops_of(rev)}
    dt, acc, acc2 = DT, record(seed=0, n=20_000), record(seed=1, n=20_000)
    omega, xi = 2 * np.pi / PERIODS, np.full(PERIODS.size, 0.05)
    both = np.stack([acc, acc2])
    src = np.tile([0, 1], PERIODS.size // 2)          # two rows inside every block
    cases = {
        "spectrum 5 %, 300 periods, 20,000 steps": lambda: _peaks(response_spectrum(
            acc, dt, PERIODS, 0.05, interpolate=False)),
        "peaks, 300 osc., mixed rows, 1 thread": lambda: _peaks(oscillator_peaks(
            both, dt, omega, xi, source=src, threads=False)),
        "histories, 300 osc., 1 thread": lambda: np.stack(oscillator_history(
            acc, dt, omega, xi, threads=False)),
        "RotD50/100 5 %, 100 periods": lambda: rotd(
            acc, acc2, dt, PERIODS[::3], 0.05, interpolate=False).by_angle,
    }
    times = {(m, k): [] for m in mods for k in cases}
    out = {}
    for r in range(rep):
        for name in (mods if r % 2 == 0 else list(mods)[::-1]):
            _kernel._jit_module = mods[name]
            for k, fn in cases.items():
                out[name, k] = fn()                     # also loads compiled code
                times[name, k].append(best(fn, 3)[0])
    _kernel._jit_module = mods["this tree"]
    print(f"compiled loops of this tree against {rev} (best of {rep} x 3, alternating)")
    print(f"{'case':<42}{rev + ' ms':>12}{'now ms':>10}{'ratio':>8}  same bits")
    for k in cases:
        t_old, t_new = min(times[rev, k]), min(times["this tree", k])
        same = np.array_equal(out[rev, k], out["this tree", k])
        print(f"{k:<42}{1e3 * t_old:>12.2f}{1e3 * t_new:>10.2f}{t_new / t_old:>7.3f}x  {same}")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="fewer repeats")
    ap.add_argument("--against", metavar="REV", help="compare the compiled loops with "
                    "those of git revision REV, in one process")
    opts = ap.parse_args(argv)
    rep = 3 if opts.quick else 7
    if opts.against:
        against(opts.against, rep)
        return
    print(f"engine: {kernel_engine()}; cores: {os.cpu_count()}; load average now: "
          f"{', '.join(f'{x:.1f}' for x in os.getloadavg())} (a shared machine inflates wall times)")
    acc = record()
    omega = np.tile(2 * np.pi / PERIODS, DAMPING.size)
    xi = np.repeat(DAMPING, PERIODS.size)
    n_steps = omega.size * (N_T - 1)
    oscillator_peaks(acc[:200], DT, omega, xi)                      # load compiled code
    rows = []
    for label, kw in (("numba, threads", dict(threads=True)),
                      ("numba, one thread", dict(threads=False))):
        w, c = best(lambda: oscillator_peaks(acc, DT, omega, xi, **kw), rep)
        rows.append((label, w, c))
    w_spec, c_spec = best(lambda: response_spectrum(acc, DT, PERIODS, DAMPING,
                                                    interpolate=False), rep)
    # numpy engine on a fifth of the samples (its cost is linear in steps)
    short = acc[: N_T // 5]
    w_np, c_np = best(lambda: oscillator_peaks(short, DT, omega, xi, engine="numpy"), 2)
    np_ns = w_np / (omega.size * (short.size - 1)) * 1e9
    # scipy per-oscillator reference on a subset
    sub = np.linspace(0, omega.size - 1, 6).astype(int)
    t0 = time.perf_counter()
    ref = np.array([scipy_reference(acc, omega[k], xi[k]) for k in sub])
    scipy_ns = (time.perf_counter() - t0) / (sub.size * (N_T - 1)) * 1e9
    got = oscillator_peaks(acc, DT, omega[sub], xi[sub])
    err = np.max(np.abs(np.stack([got.disp, got.vel, got.abs_acc], axis=1) / ref - 1))

    print(f"\n{PERIODS.size} periods x {DAMPING.size} damping x {N_T} samples = "
          f"{n_steps:.3g} oscillator-steps")
    print(f"{'kernel':<28}{'wall ms':>10}{'ns/osc-step':>14}{'CPU ms':>10}{'vs scipy':>12}")
    for label, w, c in rows:
        ns = w / n_steps * 1e9
        print(f"{label:<28}{1e3 * w:>10.1f}{ns:>14.3f}{1e3 * c:>10.1f}{scipy_ns / ns:>11.0f}x")
    print(f"{'response_spectrum (total)':<28}{1e3 * w_spec:>10.1f}"
          f"{w_spec / n_steps * 1e9:>14.3f}{1e3 * c_spec:>10.1f}")
    print(f"{'numpy engine':<28}{'':>10}{np_ns:>14.2f}{'':>10}{scipy_ns / np_ns:>11.0f}x")
    print(f"{'scipy foh + dlsim':<28}{'':>10}{scipy_ns:>14.0f}{'':>10}{1:>11.0f}x")
    print(f"largest relative difference from the scipy reference "
          f"({sub.size} oscillators, x/v/abs acc peaks): {err:.2e}")

    a2 = record(seed=1)
    rotd(acc[:200], a2[:200], DT, PERIODS[:4], DAMPING[:2], (100,))   # load compiled code
    w_rot, c_rot = best(lambda: rotd(acc, a2, DT, PERIODS, DAMPING, (100,),
                                     interpolate=False), max(2, rep // 2))
    w_one, c_one = best(lambda: response_spectrum(acc, DT, PERIODS, DAMPING,
                                                  interpolate=False), rep)
    print(f"\nRotD100 over 180 angles: {1e3 * w_rot:.1f} ms wall ({1e3 * c_rot:.1f} ms CPU); "
          f"one spectrum {1e3 * w_one:.1f} ms ({1e3 * c_one:.1f} ms CPU); "
          f"ratio {w_rot / w_one:.1f}x wall, {c_rot / max(c_one, 1e-9):.1f}x CPU")
    p100 = np.geomspace(0.05, 10.0, 100)
    for label, damp in (("5 %", [0.05]), ("2, 5, 10, 20 %", [0.02, 0.05, 0.10, 0.20]),
                        ("0, 2, 5, 10, 20 %", list(DAMPING))):
        w_r, c_r = best(lambda: rotd(acc, a2, DT, p100, damp, (50, 100)), max(3, rep // 2))
        w_o, c_o = best(lambda: response_spectrum(acc, DT, p100, damp), rep)
        print(f"RotD50 and RotD100, 100 periods, damping {label}: {1e3 * w_r:.1f} ms wall "
              f"({1e3 * c_r:.1f} ms CPU); one spectrum {1e3 * w_o:.1f} ms ({1e3 * c_o:.1f} ms "
              f"CPU); ratio {w_r / w_o:.1f}x wall, {c_r / max(c_o, 1e-9):.1f}x CPU")

    refinement_cost(max(2, rep // 2))

    for cold in (False, True):
        w, c = first_call(cold)
        what = "empty numba cache (JIT compile)" if cold else "numba cache filled"
        print(f"first call in a fresh process, {what}: {w:.2f} s wall, {c:.2f} s CPU "
              f"(imports included)")


if __name__ == "__main__":
    main()
