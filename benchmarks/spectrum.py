"""Benchmark of the spectrum method on the demo block, against modal time histories.

1. Time: `analyse` of examples/transformer-pad-spectrum.toml (response-spectrum analysis)
   against examples/transformer-pad.toml (modal time history of the bundled demo records,
   20,001 steps), end to end and with the model and modes reused, in the same process;
   printed as times and ratios.
2. Agreement (``--matched N``, default 7; 0 skips it): N invented three-component motions
   (the stochastic method of groundshake.records.synthetic, seeds 101, 102, …), the
   horizontals matched to the example's design spectrum and the vertical to 2/3 of it
   (the example's vertical_fraction), each run by modal time history through the same
   model; the spectrum method's peaks beside the mean of the N time-history peaks.

    python benchmarks/spectrum.py [--matched 7] [--dt 0.002] [--duration 30]

The motions are invented for this comparison; a matched motion is a modified record.
"""
from __future__ import annotations

import argparse
import dataclasses
import sys
import time
import warnings
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

from groundshake._errors import GroundshakeWarning  # noqa: E402
from groundshake.dynamics import motion_from_arrays  # noqa: E402
from groundshake.pipeline import analyse  # noqa: E402
from groundshake.scenario import load_scenario  # noqa: E402

QUANTITIES = (
    ("base shear x [kN]", lambda s: s["peaks"]["base_shear"]["x"] / 1e3),
    ("base shear y [kN]", lambda s: s["peaks"]["base_shear"]["y"] / 1e3),
    ("base axial [kN]", lambda s: s["peaks"]["base_axial"] / 1e3),
    ("overturning moment x [kN·m]", lambda s: s["peaks"]["overturning_moment"]["x"] / 1e3),
    ("overturning moment y [kN·m]", lambda s: s["peaks"]["overturning_moment"]["y"] / 1e3),
    ("top corner acc x [m/s2]",
     lambda s: s["sensors"]["top corner"]["peak_absolute_acceleration"]["x"]),
    ("top corner acc z [m/s2]",
     lambda s: s["sensors"]["top corner"]["peak_absolute_acceleration"]["z"]),
    ("transformer acc x [m/s2]",
     lambda s: s["equipment"]["transformer"]["peak_absolute_acceleration"]["x"]),
    ("transformer acc y [m/s2]",
     lambda s: s["equipment"]["transformer"]["peak_absolute_acceleration"]["y"]),
    ("transformer acc z [m/s2]",
     lambda s: s["equipment"]["transformer"]["peak_absolute_acceleration"]["z"]),
    ("max bolt tension [kN]",
     lambda s: max(b["peak_tension"] for b in s["equipment"]["transformer"]["anchors"]) / 1e3),
    ("max bolt shear [kN]",
     lambda s: max(b["peak_shear"] for b in s["equipment"]["transformer"]["anchors"]) / 1e3),
    ("von Mises [kPa]", lambda s: s["peaks"]["von_mises"] / 1e3),
    ("relative displacement x [mm]",
     lambda s: s["peaks"]["relative_displacement"]["x"]["value"] * 1e3),
)


def _quiet(fn, *a, **k):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        return fn(*a, **k)


def timing():
    th = _quiet(load_scenario, ROOT / "examples" / "transformer-pad.toml")
    rs_full = _quiet(load_scenario, ROOT / "examples" / "transformer-pad-spectrum.toml")
    # the spectrum method alone (no spectrum-compatible motions for floor spectra)
    rs = dataclasses.replace(rs_full, analysis=dataclasses.replace(rs_full.analysis,
                                                                   spectrum_motions=0))
    _quiet(analyse, th, progress=False)          # warm-up: compiled kernels, caches
    _quiet(analyse, rs, progress=False)

    def best(fn, *a, **k):                       # best of three (a shared machine)
        times, out = [], None
        for _ in range(3):
            t0 = time.perf_counter()
            out = _quiet(fn, *a, **k)
            times.append(time.perf_counter() - t0)
        return min(times), out

    t_th, r_th = best(analyse, th, progress=False)
    t_rs, r_rs = best(analyse, rs, progress=False)
    # the same model and modes, response stage only (motion read once, before)
    t_th2, _ = best(analyse, th, progress=False, motion=r_th.motion, model=r_th.model,
                    modes=r_th.modes)
    t_rs2, _ = best(analyse, rs, progress=False, model=r_th.model, modes=r_th.modes)
    t0 = time.perf_counter()
    r_full = _quiet(analyse, rs_full, progress=False)
    t_full = time.perf_counter() - t0
    k = rs_full.analysis.spectrum_motions
    n = r_th.summary["analysis"]["n_steps"]
    print(f"demo block: {r_th.model.n_dof} DOFs, {r_th.modes.n_modes} modes, {n} steps")
    print(f"  end to end        modal time history {t_th:7.2f} s   spectrum {t_rs:6.2f} s   "
          f"ratio spectrum/modal {t_rs / t_th:.3f}")
    print(f"  model+modes reused modal time history {t_th2:6.2f} s   spectrum {t_rs2:6.2f} s   "
          f"ratio spectrum/modal {t_rs2 / t_th2:.3f}")
    print(f"  the example as written (spectrum_motions = {k}: matched motions for floor "
          f"spectra) {t_full:.2f} s, ratio to the modal time history {t_full / t_th:.2f}")
    del r_full
    return r_rs, r_th


def matched_motions(target, n, dt, duration, frac):
    from groundshake.matching import match_spectrum_report
    from groundshake.records import Record
    from groundshake.records.synthetic import stochastic_acceleration
    from groundshake.spectra._targets import TargetSpectrum

    vert = TargetSpectrum(label=f"{frac:g} x {target.label}", damping=target.damping,
                          kind="table", parameters={}, _fn=lambda t: frac * target._fn(t))
    band = (max(0.02, 10 * dt), 4.0)
    out = []
    for k in range(n):
        comps = {}
        for j, (d, tgt) in enumerate((("x", target), ("y", target), ("z", vert))):
            rng = np.random.default_rng(101 + 10 * k + j)
            acc = stochastic_acceleration(rng, dt=dt, duration=duration)
            rec = Record(acc=acc, dt=dt, name=f"invented-{k + 1}-{d}", component=d,
                         units="m/s2", metadata={"synthetic": "invented for the benchmark"})
            res = _quiet(match_spectrum_report, rec, tgt, target.damping, band=band)
            comps[d] = res
        n_max = max(c.record.n for c in comps.values())
        acc = {d: np.pad(np.asarray(c.record.acc), (0, n_max - c.record.n))
               for d, c in comps.items()}
        misfit = max(float(np.max(np.abs(c.psa_after / c.target_psa - 1.0))) for c in comps.values())
        out.append((motion_from_arrays(acc, dt), misfit))
        print(f"  set {k + 1}: matched ({n_max} steps, max misfit {100 * misfit:.1f} %)",
              flush=True)
    return out


def agreement(r_rs, r_th, n, dt, duration):
    from groundshake.spectra import parse_target

    scen = _quiet(load_scenario, ROOT / "examples" / "transformer-pad-spectrum.toml")
    th_scen = _quiet(load_scenario, ROOT / "examples" / "transformer-pad.toml")
    target = parse_target(scen.motion.target)
    frac = float(scen.motion.vertical_fraction)
    print(f"\n{n} invented motions matched to {target.label} (vertical {frac:g} x), "
          f"dt {dt:g} s, {duration:g} s:")
    t0 = time.perf_counter()
    motions = matched_motions(target, n, dt, duration, frac)
    print(f"  matching took {time.perf_counter() - t0:.1f} s")
    pga = np.array([np.max(np.abs(mo.acc), axis=1) for mo, _ in motions])     # (n, 3)
    zpa = float(target.psa(np.array([0.0]))[0])
    print(f"  mean PGA of the matched motions x, y, z: "
          + ", ".join(f"{v:.3g}" for v in pga.mean(axis=0))
          + f" m/s2; the target's ZPA {zpa:.3g} (horizontal), {frac * zpa:.3g} (vertical)")
    rows = []
    for mo, _ in motions:
        r = _quiet(analyse, th_scen, progress=False, motion=mo, model=r_th.model,
                   modes=r_th.modes)
        rows.append([q(r.summary) for _, q in QUANTITIES])
    rows = np.array(rows)
    mean, sd = rows.mean(axis=0), rows.std(axis=0, ddof=1) if n > 1 else np.zeros(rows.shape[1])
    rs = np.array([q(r_rs.summary) for _, q in QUANTITIES])
    print(f"\n| quantity | spectrum method | mean of {n} time histories (± 1 s.d.) | ratio |")
    print("|---|---|---|---|")
    for (name, _), a, m, s in zip(QUANTITIES, rs, mean, sd):
        print(f"| {name} | {a:.4g} | {m:.4g} ± {s:.2g} | {a / m:.3f} |")


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--matched", type=int, default=7, help="number of matched motions (0: none)")
    p.add_argument("--dt", type=float, default=0.002, help="step of the invented motions [s]")
    p.add_argument("--duration", type=float, default=30.0, help="their length [s]")
    a = p.parse_args(argv)
    r_rs, r_th = timing()
    if a.matched > 0:
        agreement(r_rs, r_th, a.matched, a.dt, a.duration)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
