"""Benchmark of the block model: assembly (vs scikit-fem), factorization, 30 modes, a
static solve and peak memory, for fixed blocks of about 10k, 50k, 150k and 400k DOFs.

    python benchmarks/model.py                      # 10k, 50k, 150k
    python benchmarks/model.py --sizes 400000       # the largest block alone
    python benchmarks/model.py --methods lanczos,block

Each size runs in its own process so that its peak memory (ru_maxrss) is its own.
Figures are printed, never asserted; ratios are against scikit-fem assembling the same
mesh in the same process, and the whole modes pipeline (build the model, factor, 30
modes by the block Lanczos solver) against a bare reference pipeline run in the same
process just before it: Kronecker assembly, the thin PARDISO wrapper, and scipy's
``eigsh`` in shift-invert mode (ARPACK) on that factor.
"""
from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import time
import warnings

import numpy as np

BLOCK = (8.0, 6.0, 2.0)  # m


def _element_size(target_dofs: int) -> float:
    from scipy.optimize import brentq
    f = lambda h: 3 * (BLOCK[0] / h + 1) * (BLOCK[1] / h + 1) * (BLOCK[2] / h + 1) - target_dofs  # noqa: E731
    return float(brentq(f, 0.01, 5.0))


def _scenario(h: float) -> dict:
    return {"materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
            "parts": [{"name": "block", "material": "c", "origin": [0, 0, 0], "size": list(BLOCK)}],
            "mesh": {"element_size": h, "element": "hex8"}, "support": {"kind": "fixed"}}


def _skfem_assembly(mesh) -> float:
    import skfem
    from skfem.helpers import dot
    from skfem.models.elasticity import lame_parameters, linear_elasticity
    t0 = time.perf_counter()
    m = skfem.MeshHex.init_tensor(*mesh.lines)
    basis = skfem.Basis(m, skfem.ElementVector(skfem.ElementHex1()))

    @skfem.BilinearForm
    def mass(u, v, w):
        return 2400.0 * dot(u, v)

    K = skfem.asm(linear_elasticity(*lame_parameters(30e9, 0.2)), basis)
    M = skfem.asm(mass, basis)
    dt = time.perf_counter() - t0
    del K, M
    return dt


def _reference_pipeline(mesh, n_modes: int) -> dict:
    """A bare modes pipeline: Kronecker assembly, PARDISO (SPD, thin wrapper), ARPACK
    shift-invert Lanczos through scipy's ``eigsh`` (fixed base: the base nodes removed)."""
    import scipy.sparse.linalg as spla
    from groundshake.model._assembly import assemble, element_keys
    from groundshake.model._elements import brick_matrices
    from groundshake.linalg import factorize
    out = {}
    c0 = time.process_time()
    t0 = time.perf_counter()
    kg, sizes, _ = element_keys(mesh, [0])
    mats = brick_matrices(sizes, 30e9, 0.2, 2400.0, element="hex8")
    K, M = assemble(mesh, kg, mats)
    free = np.flatnonzero(np.repeat(mesh.nodes[:, 2] > 1e-9, 3))   # base face fixed
    K = K[free][:, free].tocsr()
    M = M[free][:, free].tocsr()
    out["ref_assembly_s"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    fac = factorize(K, solver="pardiso")
    out["ref_factor_s"] = time.perf_counter() - t0
    n = K.shape[0]
    calls = [0]

    def mv(x):
        calls[0] += 1
        return fac.solve(x)
    op = spla.LinearOperator((n, n), matvec=mv, dtype=float)
    t0 = time.perf_counter()
    lam, _ = spla.eigsh(K, k=n_modes, M=M, sigma=0.0, OPinv=op, which="LM", tol=1e-10,
                        ncv=min(n - 1, max(2 * n_modes + 1, n_modes + 24)),
                        v0=np.random.default_rng(12345).standard_normal(n))
    out["ref_eigen_s"] = time.perf_counter() - t0
    out["ref_cpu_s"] = time.process_time() - c0
    out["ref_solves"] = calls[0]
    out["ref_total_s"] = out["ref_assembly_s"] + out["ref_factor_s"] + out["ref_eigen_s"]
    out["ref_n_dof"] = n
    out["ref_f1_f30"] = [float(np.sqrt(lam.min()) / 2 / np.pi), float(np.sqrt(lam.max()) / 2 / np.pi)]
    fac.free()
    return out


def run_one(target: int, methods: list[str], skfem_limit: int, n_modes: int,
            reference: bool = True) -> dict:
    from groundshake.dynamics import lowest_modes
    from groundshake.model import build_model, estimate_memory
    from groundshake.model._assembly import assemble, element_keys
    from groundshake.model._elements import brick_matrices
    from groundshake.model._mesh import Box, mesh_boxes

    h = _element_size(target)
    out: dict = {"target": target, "element_size": h}
    box = [Box("block", (0, 0, 0), BLOCK)]
    t0 = time.perf_counter()
    mesh = mesh_boxes(box, h)
    kg, sizes, _ = element_keys(mesh, [0])
    mats = brick_matrices(sizes, 30e9, 0.2, 2400.0, element="hex8")
    K, M = assemble(mesh, kg, mats)
    out["assembly_s"] = time.perf_counter() - t0
    out["n_dof_grid"] = K.shape[0]
    del K, M
    if out["n_dof_grid"] <= skfem_limit:
        try:
            out["skfem_assembly_s"] = _skfem_assembly(mesh)
            out["ratio_skfem"] = out["skfem_assembly_s"] / out["assembly_s"]
        except ImportError:
            pass
    est = estimate_memory(mesh.n_nodes, n_modes=n_modes)
    out["estimate_peak_GiB"] = est["peak"] / 2**30
    if reference:
        out.update(_reference_pipeline(mesh, n_modes))
    c_ours = time.process_time()
    t0 = time.perf_counter()
    model = build_model(_scenario(h))
    out["build_model_s"] = time.perf_counter() - t0
    out["n_dof"] = model.n_dof
    t0 = time.perf_counter()
    fac = model.factor()
    out["factor_s"] = time.perf_counter() - t0
    out["factor_kind"] = fac.kind
    out["factor_nnz"] = fac.factor_nnz
    out["factor_fill_c"] = (fac.factor_nnz / model.n_dof ** (4 / 3)) if fac.factor_nnz else None
    rhs = -(model.M @ model.influence)
    t0 = time.perf_counter()
    fac.solve(rhs[:, 0])
    out["static_solve_s"] = time.perf_counter() - t0
    t0 = time.perf_counter()
    fac.solve(rhs)
    out["static_solve_3rhs_s"] = time.perf_counter() - t0
    for meth in methods:
        t0 = time.perf_counter()
        st: dict = {}
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            lam, phi = lowest_modes(model.K, model.M, n_modes=n_modes, factor=fac, method=meth,
                                    stats=st)
        out[f"modes_{meth}_s"] = time.perf_counter() - t0
        if st:
            out[f"modes_{meth}_parts"] = st
        if meth == "block" and "ref_total_s" in out:
            # CPU time of ours: build, factor, the static solves above, then the modes
            out["pipeline_block_cpu_s"] = time.process_time() - c_ours
            out["pipeline_block_s"] = out["build_model_s"] + out["factor_s"] + out["modes_block_s"]
            out["ratio_to_reference"] = out["pipeline_block_s"] / out["ref_total_s"]
        f = np.sqrt(lam) / (2 * np.pi)
        out[f"modes_{meth}_f1_f30"] = [float(f[0]), float(f[-1])]
        R = model.K @ phi - (model.M @ phi) * lam
        out[f"modes_{meth}_max_rel_residual"] = float(
            (np.linalg.norm(R, axis=0) / np.linalg.norm(model.K @ phi, axis=0)).max())
        gam = phi.T @ (model.M @ model.influence)
        out["mass_captured_30"] = ((gam ** 2).sum(axis=0) / model.total_mass).tolist()
        del phi, R
    if reference and "pipeline_block_s" in out:
        # the reference again, after ours: a shared machine's load drifts, so the ratio is
        # given against each run and against their mean
        del model, fac
        again = _reference_pipeline(mesh, n_modes)
        out["ref_again"] = again
        out["ratio_to_reference_again"] = out["pipeline_block_s"] / again["ref_total_s"]
        out["ratio_to_reference_mean"] = out["pipeline_block_s"] / (
            0.5 * (out["ref_total_s"] + again["ref_total_s"]))
        out["cpu_ratio_to_reference_mean"] = out["pipeline_block_cpu_s"] / (
            0.5 * (out["ref_cpu_s"] + again["ref_cpu_s"]))
    out["peak_rss_GiB"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2**20
    return out


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--sizes", default="10000,50000,150000",
                   help="target DOF counts, comma-separated (default 10k, 50k, 150k; add 400000)")
    p.add_argument("--methods", default="lanczos,block",
                   help="eigen-solvers: lanczos, block, amg (LOBPCG + pyamg, no factor)")
    p.add_argument("--modes", type=int, default=30)
    p.add_argument("--skfem-limit", type=int, default=160000,
                   help="largest DOF count assembled with scikit-fem too")
    p.add_argument("--no-reference", action="store_true",
                   help="skip the bare reference pipeline (assembly, PARDISO, eigsh)")
    p.add_argument("--one", type=int, help=argparse.SUPPRESS)
    a = p.parse_args(argv)
    methods = [m for m in a.methods.split(",") if m]
    if a.one:
        print(json.dumps(run_one(a.one, methods, a.skfem_limit, a.modes,
                                 reference=not a.no_reference), default=float))
        return 0
    print(f"fixed hex8 block {BLOCK} m, {a.modes} modes; cores: {os.cpu_count()}, "
          f"load average {os.getloadavg()[0]:.1f}")
    rows = []
    for s in [int(float(v)) for v in a.sizes.split(",")]:
        cmd = [sys.executable, __file__, "--one", str(s), "--methods", a.methods,
               "--modes", str(a.modes), "--skfem-limit", str(a.skfem_limit)]
        if a.no_reference:
            cmd.append("--no-reference")
        r = subprocess.run(cmd, capture_output=True, text=True)
        if r.returncode != 0:
            print(f"{s}: failed\n{r.stderr[-2000:]}")
            continue
        d = json.loads(r.stdout.strip().splitlines()[-1])
        rows.append(d)
        print(json.dumps(d, indent=None))
        sys.stdout.flush()
    print("\nDOFs | assembly s | scikit-fem s | ratio | factor s | static s | "
          + " | ".join(f"{m} 30 modes s" for m in methods) + " | peak GiB (estimate)")
    for d in rows:
        sk = d.get("skfem_assembly_s")
        print(f"{d['n_dof']} | {d['assembly_s']:.2f} | {sk if sk is None else round(sk, 2)} | "
              f"{d.get('ratio_skfem', float('nan')):.1f} | {d['factor_s']:.2f} | "
              f"{d['static_solve_s']:.3f} | "
              + " | ".join(f"{d.get(f'modes_{m}_s', float('nan')):.1f}" for m in methods)
              + f" | {d['peak_rss_GiB']:.2f} ({d['estimate_peak_GiB']:.2f})")
    ref = [d for d in rows if "ratio_to_reference" in d]
    if ref:
        print("\nmodes pipeline, same process: reference (assembly + PARDISO + eigsh) against "
              "build_model + factor + block Lanczos")
        print("DOFs | reference s (assembly, factor, eigsh, solves) | ours s (build, factor, "
              "block: solves, orthogonalisation, Ritz/recovery; columns) | ratio")
        for d in ref:
            pb = d.get("modes_block_parts", {})
            print(f"{d['n_dof']} | {d['ref_total_s']:.1f} ({d['ref_assembly_s']:.1f}, "
                  f"{d['ref_factor_s']:.1f}, {d['ref_eigen_s']:.1f}, {d['ref_solves']}) | "
                  f"{d['pipeline_block_s']:.1f} ({d['build_model_s']:.1f}, {d['factor_s']:.1f}, "
                  f"{d['modes_block_s']:.1f}: {pb.get('solve_s', 0):.1f}, {pb.get('orth_s', 0):.1f}, "
                  f"{pb.get('ritz_s', 0):.1f}; {pb.get('columns', 0)}) | "
                  f"{d['ratio_to_reference']:.2f}")
            r2 = d.get("ref_again")
            if r2:
                print(f"  reference again after ours: {r2['ref_total_s']:.1f} "
                      f"({r2['ref_assembly_s']:.1f}, {r2['ref_factor_s']:.1f}, "
                      f"{r2['ref_eigen_s']:.1f}, {r2['ref_solves']}); ratio "
                      f"{d['ratio_to_reference_again']:.2f}, against the mean of the two "
                      f"{d['ratio_to_reference_mean']:.2f}")
                print(f"  CPU time (all threads; steadier than wall time on a shared machine): "
                      f"reference {d['ref_cpu_s']:.1f} and {r2['ref_cpu_s']:.1f} s, ours "
                      f"{d['pipeline_block_cpu_s']:.1f} s (two extra static solves included); "
                      f"ratio to their mean {d['cpu_ratio_to_reference_mean']:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
