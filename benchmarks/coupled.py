"""`coupled` against `direct` and `modal` on the bundled soil example.

The transformer pad on soil (radiation dashpots, a flexible transformer: non-classical
damping) is run three ways on a strong-motion slice of the bundled demo records (the
strongest window of the horizontal motion, tapered 0.2 s at each end): `direct` (the
reference: the whole damping matrix, Newmark), `coupled` (that matrix on the modes plus
missing-mass vectors, stepped exactly) and `modal`. Prints every reported peak of the
three runs with the differences from direct, and the time of each response stage against
`modal`'s in the same process. Printed, never asserted.

The demo site and records are invented (see examples/transformer-pad.toml).

    python benchmarks/coupled.py [--seconds 3] [--whole]
"""
from __future__ import annotations

import argparse
import os
import sys
import time
import warnings

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
sys.path.insert(0, ROOT)


def _peaks(summary: dict) -> dict[str, float]:
    """Flat {name: value} of the reported peaks of a summary."""
    out: dict[str, float] = {}

    def walk(prefix, obj):
        if isinstance(obj, dict):
            for k, v in obj.items():
                if k in ("time", "times", "node", "step", "at", "position", "part"):
                    continue
                walk(f"{prefix}.{k}" if prefix else k, v)
        elif isinstance(obj, list):
            for i, v in enumerate(obj):
                walk(f"{prefix}[{i}]", v)
        elif isinstance(obj, (int, float)) and not isinstance(obj, bool):
            out[prefix] = float(obj)

    walk("peaks", summary.get("peaks", {}))
    for name, s in (summary.get("sensors") or {}).items():
        for q in ("peak_absolute_acceleration", "peak_relative_displacement"):
            walk(f"sensors.{name}.{q}", s.get(q, {}))
    for name, e in (summary.get("equipment") or {}).items():
        walk(f"equipment.{name}.peak_absolute_acceleration",
             e.get("peak_absolute_acceleration", {}))
        for i, a in enumerate(e.get("anchors") or []):
            for q in ("peak_tension", "peak_shear"):
                if q in a:
                    out[f"equipment.{name}.anchors[{i}].{q}"] = float(a[q])
    return out


def _timings(summary: dict) -> dict:
    t = (summary.get("provenance") or {}).get("timings_s")
    if not isinstance(t, dict):
        t = (summary.get("analysis") or {}).get("timings") or {}
    return t


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seconds", type=float, default=3.0, help="length of the slice [s]")
    ap.add_argument("--whole", action="store_true", help="the whole record (direct is slow)")
    a = ap.parse_args(argv)
    from groundshake import load_scenario
    from groundshake.dynamics import compute_modes, motion_from_arrays
    from groundshake.pipeline import build_motion
    from groundshake.model import build_model
    from groundshake.results import analyse

    sc = load_scenario(os.path.join(ROOT, "examples", "transformer-pad.toml"))
    mo = build_motion(sc)
    acc = np.asarray(mo.acc, float)
    if not a.whole:
        n = int(round(a.seconds / mo.dt))
        e = np.convolve(np.hypot(acc[0], acc[1]) ** 2, np.ones(n), mode="valid")
        i0 = int(np.argmax(e))
        acc = acc[:, i0:i0 + n].copy()
        nt = int(round(0.2 / mo.dt))
        w = np.ones(n)
        w[:nt] = np.sin(0.5 * np.pi * np.arange(nt) / nt) ** 2
        w[-nt:] = w[:nt][::-1]
        acc *= w
    motion = motion_from_arrays(acc, mo.dt)
    model = build_model(sc)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        modes = compute_modes(model, cutoff_hz=sc.analysis.cutoff_hz, warn=False)
    print(f"transformer pad on soil: {model.n_dof} DOFs, {modes.n_modes} modes to "
          f"{sc.analysis.cutoff_hz:g} Hz, {acc.shape[1]} steps of {mo.dt:g} s; classical "
          f"damping: {model.is_classically_damped}; load average {os.getloadavg()[0]:.1f}")
    runs, secs = {}, {}
    with warnings.catch_warnings():      # load compiled code and caches once, untimed
        warnings.simplefilter("ignore")
        for meth in ("modal", "coupled"):
            analyse(sc, progress=False, method=meth, motion=motion, model=model, modes=modes)
    for meth in ("modal", "coupled", "direct"):
        t0 = time.perf_counter()
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            r = analyse(sc, progress=False, method=meth, motion=motion, model=model,
                        modes=modes)
        secs[meth] = time.perf_counter() - t0
        runs[meth] = r.summary
        tim = _timings(r.summary)
        print(f"{meth}: whole run {secs[meth]:.2f} s; response stage "
              f"{tim.get('response', float('nan')):.3f} s (time histories "
              f"{tim.get('time_history', float('nan')):.3f} s)")
    ref = _peaks(runs["direct"])
    big = max(abs(v) for v in ref.values())
    worst = {"modal": 0.0, "coupled": 0.0}
    print(f"\n{'peak':<64}{'direct':>12}{'coupled %':>11}{'modal %':>10}")
    for k, v in ref.items():
        row = f"{k[:63]:<64}{v:>12.4g}"
        if abs(v) < 1e-9 * big:          # zero by symmetry, rounding noise only
            print(row + "   (numerically zero: not compared)")
            continue
        for meth in ("coupled", "modal"):
            got = _peaks(runs[meth]).get(k)
            if got is None or v == 0:
                row += f"{'-':>11}" if meth == "coupled" else f"{'-':>10}"
                continue
            d = 100 * (got / v - 1)
            worst[meth] = max(worst[meth], abs(d))
            row += f"{d:>11.2f}" if meth == "coupled" else f"{d:>10.2f}"
        print(row)
    print(f"\nlargest difference from direct over {len(ref)} peaks: coupled "
          f"{worst['coupled']:.2f} %, modal {worst['modal']:.2f} %")
    tm = {m: _timings(runs[m]).get("response") for m in runs}
    if tm["modal"]:
        print(f"response stage (histories, recovery, stress peaks): coupled {tm['coupled']:.3f} s = {tm['coupled'] / tm['modal']:.1f}x "
              f"modal ({tm['modal']:.3f} s); direct {tm['direct']:.1f} s = "
              f"{tm['direct'] / tm['modal']:.0f}x modal")
    print(f"whole run: coupled {secs['coupled'] / secs['modal']:.2f}x modal, direct "
          f"{secs['direct'] / secs['modal']:.1f}x modal")
    return 0


if __name__ == "__main__":
    sys.exit(main())
