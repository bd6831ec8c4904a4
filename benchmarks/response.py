"""Benchmark of `analyse`: the demo scenario and a 150k-DOF block, stage by stage.

Prints each stage's wall time and the process's peak resident memory after it, and
the direct method's time as a ratio to the modal one (measured in the same process).
The stress stage (surface points recovered from Gauss points) is also timed against
the former element-centre stresses on the same model and modal histories, in the same
process, and the two readings of the peak principal tension are printed side by side.

    python benchmarks/response.py            # demo + 150k-DOF block
    python benchmarks/response.py --quick    # demo only, and a ~40k-DOF block

The 150k-DOF case: three components × 12,000 steps (invented motion), 10 sensors,
2 equipment items, floor spectra at 2 damping values × 120 periods. The direct runs
are timed over a slice of steps from the strong part and scaled to the whole record
(said so in the output), with the modal peaks of the same slice beside them.
"""
from __future__ import annotations

import argparse
import resource
import sys
import time
import tomllib
import warnings
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

from groundshake._errors import GroundshakeWarning  # noqa: E402
from groundshake.dynamics import motion_from_arrays  # noqa: E402
from groundshake.pipeline import analyse  # noqa: E402
from groundshake.scenario import Scenario  # noqa: E402


def peak_rss_gib() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2 ** 20   # kB → GiB (Linux)


def machine_reference() -> float:
    """Dense matrix product rate [GFLOP/s] right now: a yardstick for the stage times."""
    a = np.random.default_rng(0).random((1200, 1200))
    a @ a
    t0 = time.perf_counter()
    for _ in range(3):
        a @ a
    return 3 * 2 * 1200 ** 3 / (time.perf_counter() - t0) / 1e9


def invented_motion(n_t: int = 12000, dt: float = 0.005, seed: int = 5):
    """Invented three-component motion: band-limited noise under a smooth envelope."""
    rng = np.random.default_rng(seed)
    t = np.arange(n_t) * dt
    env = (t / 4.0) ** 2 * np.exp(-t / 4.0 + 2.0)
    out = {}
    for d, amp in (("x", 3.0), ("y", 2.5), ("z", 1.5)):
        spec = np.fft.rfft(rng.normal(size=n_t))
        f = np.fft.rfftfreq(n_t, dt)
        spec *= (f > 0.2) * (f < 20.0)
        a = np.fft.irfft(spec, n_t) * env
        out[d] = amp * a / np.max(np.abs(a))
    return motion_from_arrays(out, dt)


def block_150k(lx=24.0, ly=15.0, lz=3.3, h=0.3) -> Scenario:
    sensors = [{"name": f"s{i + 1}", "at": [float(x), float(y), lz]}
               for i, (x, y) in enumerate([(0, 0), (lx, 0), (lx, ly), (0, ly), (lx / 2, ly / 2),
                                           (lx / 4, ly / 2), (3 * lx / 4, ly / 2), (lx / 2, 0),
                                           (lx / 2, ly), (lx / 4, ly / 4)])]
    eq = [{"name": "transformer", "mass": 60000.0, "mount": [lx / 3, ly / 2], "footprint": [4.2, 3.0],
           "cg_height": 2.2, "frequency_hz": [8.0, 8.5, 18.0], "damping_percent": 3,
           "anchors": [[-1.8, -1.2], [1.8, -1.2], [1.8, 1.2], [-1.8, 1.2]],
           "capacity": {"tension": 150e3, "shear": 100e3}},
          {"name": "switchgear", "mass": 8000.0, "mount": [2 * lx / 3, ly / 2], "footprint": [2.4, 1.2],
           "cg_height": 1.1, "anchors": [[-1.0, -0.45], [1.0, -0.45], [1.0, 0.45], [-1.0, 0.45]]}]
    return Scenario.from_dict({
        "title": "150k-DOF block (benchmark, invented)",
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "mat", "material": "c", "origin": [0, 0, 0], "size": [lx, ly, lz]}],
        "mesh": {"element_size": h, "element": "hex8-incompatible"},
        "support": {"kind": "soil", "shear_wave_velocity": 250.0, "poisson_ratio": 0.33,
                    "density": 1900.0},
        "equipment": eq, "sensors": sensors,
        "analysis": {"cutoff_hz": 50.0},
        "floor_spectra": {"damping_percent": [2, 5], "periods": {"min": 0.02, "max": 5.0, "count": 120}},
    })


def demo_scenario() -> Scenario:
    path = ROOT / "examples" / "transformer-pad.toml"
    d = tomllib.loads(path.read_text(encoding="utf-8"))
    for comp in d.get("motion", {}).values():      # MiniSEED carries no units: state them
        if isinstance(comp, dict):
            comp.setdefault("units", "m/s2")
    return Scenario.from_dict(d, source=str(path), base_dir=path.parent)


def show(label: str, res, wall: float) -> None:
    t = res.summary["provenance"]["timings_s"]
    m = res.summary["model"]
    print(f"\n{label}: {m['n_dof']} DOFs, {m['n_elements']} elements, "
          f"{res.summary['analysis']['n_modes']} modes, {res.summary['analysis']['n_steps']} steps, "
          f"method {res.summary['analysis']['method']}")
    for k, v in t.items():
        print(f"  {k:<14} {v:8.2f} s")
    th = t.get("time_history", 0.0) + t.get("stress_peaks", 0.0)
    print(f"  {'time history + stress peaks':<28} {th:8.2f} s")
    if t.get("stress_peaks"):
        r = res.summary["analysis"]["n_modes"] + 3
        n_pts = res.summary["stresses"].get("n_points", m["n_elements"])
        flops = 2 * 6 * n_pts * r * res.summary["analysis"]["n_steps"]
        print(f"  stress stage: {flops / t['stress_peaks'] / 1e9:.2f} GFLOP/s effective "
              f"(dense product reference now: {machine_reference():.1f} GFLOP/s)")
    print(f"  {'end to end':<28} {wall:8.2f} s   peak RSS {peak_rss_gib():.2f} GiB")


def stress_stage_vs_centres(res, scen) -> None:
    """Stress stage at the surface points against element centres, same process and Z."""
    import scipy.sparse as sp

    from groundshake.dynamics._modal import modal_response, residual_vectors
    from groundshake.model._assembly import assemble_stress, element_keys
    from groundshake.model._elements import brick_matrices
    from groundshake.model._recovery import surface_stress_points
    from groundshake.results._stress import modal_stress_peaks

    model, modes, motion = res.model, res.modes, res.motion
    get = lambda o, k: o[k] if isinstance(o, dict) else getattr(o, k)   # noqa: E731
    names = list(model.materials)
    parts = [names.index(get(p, "material")) for p in get(scen, "parts")]
    mesh = model.mesh
    t0 = time.perf_counter()
    kg, sizes, kmat = element_keys(mesh, parts)
    props = np.array([[model.materials[nm][k] for k in ("youngs_modulus", "poisson_ratio",
                                                        "density")] for nm in names])[kmat]
    mats = brick_matrices(sizes, props[:, 0], props[:, 1], props[:, 2],
                          element=model.element_kind)
    t1 = time.perf_counter()
    S_old = sp.csr_matrix(assemble_stress(mesh, kg, mats) @ model.node_map)
    t2 = time.perf_counter()
    pts = surface_stress_points(mesh, kg, mats, kmat)
    S_new = sp.csr_matrix(pts.operator @ model.node_map)
    t3 = time.perf_counter()
    shapes = np.asarray(modes.shapes)
    gam = np.asarray(modes.participation)
    residual = residual_vectors(model.M, model.influence, shapes, gam, model.factor().solve)
    r = modal_response(shapes, modes.omega, modes.damping, gam, np.asarray(motion.acc),
                       motion.dt, residual=residual)
    Z = r.coordinates
    out = {}
    for label, S in (("element centres", S_old), ("surface points", S_new)):
        n_rows = S.shape[0] // 6
        a = time.perf_counter()
        pk = modal_stress_peaks(r.coefficients(S), Z, n_rows)
        out[label] = (time.perf_counter() - a, n_rows, float(pk.tension.max()), S.nnz)
    (to, no, vo, zo), (tn, nn, vn, zn) = out["element centres"], out["surface points"]
    print(f"  stress operator: element centres {t2 - t1:.2f} s ({zo:,} non-zeros), surface "
          f"points {t3 - t2:.2f} s ({zn:,} non-zeros); element matrices {t1 - t0:.2f} s")
    print(f"  stress stage, same modal histories: element centres {to:.2f} s ({no:,} points), "
          f"surface points {tn:.2f} s ({nn:,} points): ratio {tn / to:.2f}")
    print(f"  peak principal tension: element centres {vo / 1e3:.1f} kPa, surface points "
          f"{vn / 1e3:.1f} kPa ({vn / vo:.2f}×)")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--direct-steps", type=int, default=60,
                    help="steps of the large block's direct run (scaled to the record)")
    ap.add_argument("--demo-direct-steps", type=int, default=1500,
                    help="steps of the demo's direct run (scaled to the record)")
    args = ap.parse_args()
    warnings.simplefilter("ignore", GroundshakeWarning)
    print(f"machine reference: dense matrix product {machine_reference():.1f} GFLOP/s")

    # warm the kernel's compilation so that stage times are steady-state
    w = analyse(Scenario.from_dict({
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [1.0, 1.0, 1.0]}],
        "mesh": {"element_size": 0.5}, "sensors": [{"name": "s", "at": [1.0, 1.0, 1.0]}]}),
        motion=invented_motion(200), progress=False)
    del w

    try:
        scen = demo_scenario()
        t0 = time.perf_counter()
        modal = analyse(scen, progress=False)
        wm = time.perf_counter() - t0
        show("demo scenario (examples/transformer-pad.toml)", modal, wm)
        stress_stage_vs_centres(modal, scen)
        direct_slice("demo scenario", scen, modal, args.demo_direct_steps)
    except Exception as exc:  # noqa: BLE001 - a benchmark reports and goes on
        print(f"demo scenario skipped: {exc}")

    scen = block_150k(lx=14.0, ly=9.0, lz=2.4) if args.quick else block_150k()
    motion = invented_motion()
    t0 = time.perf_counter()
    big = analyse(scen, motion=motion, progress=False)
    wall = time.perf_counter() - t0
    show("large block" + (" (quick: smaller)" if args.quick else ""), big, wall)
    stress_stage_vs_centres(big, scen)
    direct_slice("large block", scen, big, args.direct_steps)
    print(f"  peak RSS {peak_rss_gib():.2f} GiB")


def direct_slice(label: str, scen, modal, n: int) -> None:
    """Time `direct` over the first ``n`` steps and scale it to the whole record."""
    motion = modal.motion
    n = min(n, motion.n)
    i0 = int(np.argmax(np.abs(motion.acc).max(axis=0) > 0.05 * np.abs(motion.acc).max()))
    part = motion_from_arrays(np.ascontiguousarray(motion.acc[:, i0:i0 + n]), motion.dt)
    d = analyse(scen, motion=part, model=modal.model, modes=modal.modes, method="direct",
                progress=False)
    tt = d.summary["provenance"]["timings_s"]
    td = tt["response"]
    tf = tt.get("factorization", 0.0)
    scaled = tf + (td - tf) * (motion.n - 1) / (n - 1)
    tm = modal.summary["provenance"]["timings_s"]["response"]
    print(f"  {label}, direct: {n} steps in {td:.1f} s of which {tf:.1f} s factorization "
          f"({d.summary['analysis']['substeps']} sub-steps each, solver "
          f"{d.summary['analysis'].get('solver')}); scaled to {motion.n} steps ≈ {scaled:.0f} s "
          f"= {scaled / tm:.0f}× the modal response stage ({tm:.2f} s)")
    # the same slice by modal, to compare peaks (both start at rest)
    m = analyse(scen, motion=part, model=modal.model, modes=modal.modes, method="modal",
                progress=False)
    for dname in ("x", "y"):
        a = m.summary["peaks"]["base_shear"][dname]
        b = d.summary["peaks"]["base_shear"][dname]
        print(f"    base shear {dname} over the slice: modal {a:.4g} N, direct {b:.4g} N "
              f"({100 * (a / b - 1):+.2f} %)")


if __name__ == "__main__":
    main()
