"""Stress recovery: principal stresses, von Mises, chunked peaks and surface recovery.

Sources: numpy.linalg.eigvalsh as an independent eigen-solver for the principal
stresses; von Mises σ_vm = √(3 J₂) = √(½[(σ1−σ2)² + (σ2−σ3)² + (σ3−σ1)²]) (any
mechanics of materials text, e.g. Timoshenko & Goodier); the chunked tracker is
checked against a brute-force evaluation with numpy. Block models under static loads:
Euler-Bernoulli beam theory σ = M·c/I at the extreme fibre (exact in elasticity for pure
bending, and for the axial stress of a cantilever under an end load away from its ends:
Saint-Venant's flexure solution, Timoshenko & Goodier, Theory of Elasticity); torsion of
a square shaft, τ_max = T/(k·a³) with the series of Timoshenko & Goodier for a rectangle
(k = 0.208 for a square, their table); docs/references.md §10 for the 1×1×3 m pedestal
(M/S = 635.5 kPa under 1 g).
"""
from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse.linalg as spla

from groundshake.model import build_model
from groundshake.results._stress import (StressPeaks, element_peaks, modal_stress_peaks,
                                         principal_stresses, stress_summary, von_mises)
from groundshake.scenario import Scenario

G = 9.80665          # standard gravity [m/s²] (CGPM 1901)


def tensors(s):
    sxx, syy, szz, tyz, txz, txy = s
    return np.stack([np.stack([sxx, txy, txz], -1), np.stack([txy, syy, tyz], -1),
                     np.stack([txz, tyz, szz], -1)], -2)


def test_principal_and_von_mises_match_eigvalsh():
    rng = np.random.default_rng(1)
    s = rng.normal(size=(6, 500)) * 1e6
    s[:, 0] = [1e6, 1e6, 1e6, 0, 0, 0]                 # hydrostatic: repeated roots
    s[:, 1] = [2e6, 0, 0, 0, 0, 0]                     # uniaxial
    hi, lo = principal_stresses(s)
    ev = np.linalg.eigvalsh(tensors(s))                # independent reference (numpy LAPACK)
    np.testing.assert_allclose(hi, ev[:, 2], rtol=0, atol=1e-6 * 1e6)
    np.testing.assert_allclose(lo, ev[:, 0], rtol=0, atol=1e-6 * 1e6)
    vm_ref = np.sqrt(0.5 * ((ev[:, 0] - ev[:, 1]) ** 2 + (ev[:, 1] - ev[:, 2]) ** 2
                            + (ev[:, 2] - ev[:, 0]) ** 2))       # von Mises from principals
    np.testing.assert_allclose(von_mises(s), vm_ref, rtol=1e-10, atol=1e-6)
    assert von_mises(s)[1] == pytest.approx(2e6, rel=1e-12)       # uniaxial: σ_vm = σ


@pytest.mark.parametrize("engine,prune,n_t", [("numba", False, 300), ("numpy", False, 300),
                                               ("numba", True, 3000), ("numpy", True, 3000)])
def test_chunked_modal_peaks_equal_brute_force(engine, prune, n_t):
    rng = np.random.default_rng(2)
    n_el, r = 37, 5
    A = rng.normal(size=(6 * n_el, r)) * 1e5
    t = np.arange(n_t) * 0.01
    env = np.exp(-((t - 0.4 * t[-1]) / (0.2 * t[-1])) ** 2)       # a strong part, as in records
    Z = np.vstack([env * np.sin((k + 1) * 3.1 * t + k) for k in range(r)])
    peaks = modal_stress_peaks(A, Z, n_el, max_values=6 * 4 * 64,   # small blocks
                               engine=engine, prune=prune)
    sig = (A @ Z).reshape(n_el, 6, n_t).transpose(1, 0, 2)           # brute force with numpy
    ev = np.linalg.eigvalsh(tensors(sig))                            # (n_el, n_t, 3)
    # peaks are clipped at zero: "no tension" reads 0 (definition of the output)
    np.testing.assert_allclose(peaks.tension, np.maximum(ev[..., 2].max(axis=1), 0), rtol=1e-9)
    np.testing.assert_allclose(peaks.compression, np.minimum(ev[..., 0].min(axis=1), 0), rtol=1e-9)
    np.testing.assert_array_equal(peaks.tension_step, ev[..., 2].argmax(axis=1))
    vm = von_mises(sig)
    np.testing.assert_allclose(peaks.von_mises, vm.max(axis=1), rtol=1e-12)
    np.testing.assert_array_equal(peaks.von_mises_step, vm.argmax(axis=1))
    gov = peaks.governing(0.01)
    assert gov["von_mises"]["value"] == pytest.approx(vm.max(), rel=1e-12)
    assert gov["von_mises"]["time"] == pytest.approx(0.01 * np.unravel_index(vm.argmax(), vm.shape)[1])


@pytest.mark.parametrize("engine", ["numba", "numpy"])
def test_time_blocks_fold_like_one_pass(engine):
    rng = np.random.default_rng(3)
    sig = rng.normal(size=(6, 10, 90))
    el_major = np.ascontiguousarray(sig.transpose(1, 0, 2))
    one = StressPeaks.empty(10)
    one.update(0, el_major, np.arange(90), engine=engine)
    blocks = StressPeaks.empty(10)
    for s in range(0, 90, 16):                                       # direct-style time blocks
        blocks.update(0, el_major[:, :, s:s + 16], np.arange(s, min(s + 16, 90)), engine=engine)
    ev = np.linalg.eigvalsh(tensors(sig))                            # numpy reference
    np.testing.assert_allclose(blocks.tension, np.maximum(ev[..., 2].max(axis=1), 0), rtol=1e-9)
    np.testing.assert_allclose(blocks.von_mises, one.von_mises, rtol=0)
    np.testing.assert_array_equal(blocks.compression_step, one.compression_step)


def test_element_peaks_take_the_largest_corner_point():
    rng = np.random.default_rng(4)
    steps = lambda: rng.integers(0, 99, 20)                           # noqa: E731
    pk = StressPeaks(rng.uniform(1, 2, 20), steps(), rng.uniform(1, 2, 20), steps(),
                     -rng.uniform(1, 2, 20), steps())
    ep = rng.integers(-1, 20, size=(7, 8))
    ep[3] = -1                                                       # no corner on the surface
    el = element_peaks(pk, ep)
    for e in range(7):                                               # brute force (definition)
        pts = ep[e][ep[e] >= 0]
        if pts.size == 0:
            assert np.isnan(el.von_mises[e]) and np.isnan(el.compression[e])
            continue
        assert el.von_mises[e] == pk.von_mises[pts].max()
        assert el.tension_step[e] == pk.tension_step[pts[np.argmax(pk.tension[pts])]]
        assert el.compression[e] == pk.compression[pts].min()


# --------------------------------------------------------------------------- block models
def pedestal(n: int, *, nu: float = 0.2, height: float = 3.0, element="hex8-incompatible"):
    """A 1 × 1 m column of the given height, fixed at its base, n elements across."""
    return build_model(Scenario.from_dict({
        "title": "test pedestal (invented)",
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": nu, "density": 2400.0}},
        "parts": [{"name": "p", "material": "c", "origin": [0, 0, 0],
                   "size": [1.0, 1.0, height]}],
        "mesh": {"element_size": 1.0 / n, "element": element},
        "support": {"kind": "fixed"}}))


def static_stresses(model, node_forces: np.ndarray) -> np.ndarray:
    """Stresses (6, n_points) [Pa] under node forces (n_nodes, 3) [N]."""
    f = model.node_map.T @ node_forces.ravel()
    u = spla.spsolve(model.K.tocsc(), f)
    return (model.stress @ u).reshape(-1, 6).T


def top_face_weights(model, height: float) -> np.ndarray:
    """∫N_A dA over the top face (uniform grid: ¼ of each adjacent square), (n_nodes,) [m²]."""
    x, y, z = model.nodes.T
    h = np.diff(np.unique(x))[0]
    edge = lambda c: np.where(np.isclose(c, 0) | np.isclose(c, 1), 0.5, 1.0)   # noqa: E731
    return np.where(np.isclose(z, height), h * h * edge(x) * edge(y), 0.0)


def point_at(model, x, y, z) -> int:
    pos = model.stress_points.position
    return int(np.flatnonzero(np.all(np.isclose(pos, [x, y, z]), axis=1))[0])


def end_moment_forces(model, n: int, M: float, height: float) -> np.ndarray:
    """Node forces (n_nodes, 3) [N] of the top traction t_z = −M(x − ½)/I (tension at x = 0).

    Consistent loads ∫N_A t dA, exact for a linear t: h(t_i/3 + t_j/6) over each interval
    next to node i (along x), times ∫N dy (h/2 at the edges, h inside).
    """
    x, y, z = model.nodes.T
    h = 1.0 / n
    t = lambda xx: -M * (xx - 0.5) / (1.0 / 12.0)                        # noqa: E731
    fx = np.zeros_like(x)
    for side in (-1.0, 1.0):
        other = x + side * h
        inside = (other > -1e-9) & (other < 1 + 1e-9)
        fx += np.where(inside, h * (t(x) / 3 + t(other) / 6), 0.0)
    wy = h * np.where(np.isclose(y, 0) | np.isclose(y, 1), 0.5, 1.0)
    forces = np.zeros((x.size, 3))
    forces[:, 2] = np.where(np.isclose(z, height), fx * wy, 0.0)
    return forces


@pytest.mark.parametrize("n", [2, 4])
def test_pure_moment_gives_beam_theory_at_the_fixed_end(n):
    """ν = 0: the pure-bending field vanishes on the base plane, so a clamped base is exact."""
    height, M = 3.0, 2e5
    model = pedestal(n, nu=0.0, height=height)
    sig = static_stresses(model, end_moment_forces(model, n, M, height))
    s1, s3 = principal_stresses(sig)
    ref = M * 0.5 / (1.0 / 12.0)                         # Euler-Bernoulli, M·c/I
    p = int(np.argmax(s1))
    # beam theory (exact in elasticity for pure bending, Timoshenko & Goodier): 1e-9
    assert s1[p] == pytest.approx(ref, rel=1e-9)
    assert s3.min() == pytest.approx(-ref, rel=1e-9)
    # ... and the extreme fibre of the fixed end carries it (σzz there, same source)
    for yy in np.linspace(0, 1, n + 1):
        assert sig[2, point_at(model, 0.0, yy, 0.0)] == pytest.approx(ref, rel=1e-9)


def test_pure_moment_plain_hex8_is_low():
    """Trilinear bricks lock in bending (Wilson et al. 1973): below beam theory by > 5 %."""
    height, M, n = 3.0, 2e5, 2
    model = pedestal(n, nu=0.0, height=height, element="hex8")
    s1, _ = principal_stresses(static_stresses(model, end_moment_forces(model, n, M, height)))
    assert s1.max() < 0.95 * M * 0.5 / (1.0 / 12.0)      # Euler-Bernoulli M·c/I


@pytest.mark.parametrize("n", [4, 6])
def test_pedestal_under_1g_lateral_peak_tension_not_below_beam_theory(n):
    """The case of the review: 1×1×3 m concrete pedestal, fixed base, quasi-static 1 g in x."""
    model = pedestal(n)
    f = model.M @ model.influence[:, 0] * G
    sig = (model.stress @ spla.spsolve(model.K.tocsc(), f)).reshape(-1, 1, 6).transpose(0, 2, 1)
    peaks = StressPeaks.empty(sig.shape[0])
    peaks.update(0, np.ascontiguousarray(sig), np.array([0]))
    out, cautions = stress_summary(peaks, model.stress_points, 0.01)
    ms = 2400 * 1.0 * 3.0 * G * 1.5 / (1.0 / 6.0)     # M/S at the base, docs/references.md §10
    assert ms == pytest.approx(635.5e3, rel=1e-3)       # docs/references.md §10: 635.5 kPa
    pt = out["principal_tension"]
    # Euler-Bernoulli M/S at the fixed end's extreme fibre: the surface value is not below
    # it (the element-centre reading was 0.72 of it with 4 elements across); the clamped
    # edge concentrates stress, so it lies above, by less than 20 % on these meshes
    assert ms <= pt["value"] <= 1.2 * ms
    assert pt["at"][0] == 0.0 and pt["at"][2] == 0.0   # tension face x = 0, at the base
    assert pt["feature"] == "base edge"
    assert len(cautions) == 1 and "edge of the fixed or rigid base" in cautions[0]
    assert "Gauss points" in out["recovery"]
    # the largest peak off the flagged points lies off the base plane (definition)
    away = pt["away_from_features"]
    assert away["value"] <= pt["value"]
    assert away["at"][2] >= 1.0 / n - 1e-12


@pytest.mark.parametrize("n", [2, 4])
def test_cantilever_end_load_gives_beam_theory_at_mid_length(n):
    """Saint-Venant flexure: σzz = P(L − z)·c/I exactly away from the ends."""
    L, P = 5.0, 1e5
    model = pedestal(n, height=L)
    w = top_face_weights(model, L)
    forces = np.zeros((w.size, 3))
    forces[:, 0] = P * w / w.sum()                      # end shear, +x
    sig = static_stresses(model, forces)
    p = point_at(model, 0.0, 0.5, L / 2)
    ref = P * (L - L / 2) * 0.5 / (1.0 / 12.0)          # Euler-Bernoulli M·c/I
    # Saint-Venant's flexure solution (Timoshenko & Goodier); end effects decay like
    # exp(−4.2 z/h) over 2.5 depths: 1e-3
    assert sig[2, p] == pytest.approx(ref, rel=1e-3)


def test_square_shaft_torsion_surface_shear_converges_at_second_order():
    """τ at the middle of a face, half-way up a 1 × 1 × 4 m shaft twisted at its top."""
    H, T = 4.0, 1e5
    a = 0.5                                             # half-side [m]
    odd = np.arange(1, 200, 2)
    # Timoshenko & Goodier, rectangle 2a × 2a: τ_max = 2Gθa[1 − 8/π² Σ 1/(n² cosh(nπ/2))],
    # T = (16/3)Gθa⁴[1 − 192/π⁵ Σ tanh(nπ/2)/n⁵]
    tau_g = 2 * a * (1 - 8 / np.pi ** 2 * np.sum(1 / (odd ** 2 * np.cosh(odd * np.pi / 2))))
    t_g = 16 / 3 * a ** 4 * (1 - 192 / np.pi ** 5 * np.sum(np.tanh(odd * np.pi / 2) / odd ** 5))
    ref = T * tau_g / t_g
    assert T / ref / (2 * a) ** 3 == pytest.approx(0.208, abs=5e-4)   # their table: k = 0.208
    hs, errs = [], []
    for n in (4, 6, 8):
        model = pedestal(n, height=H)
        w = top_face_weights(model, H)
        x, y = model.nodes[:, 0] - 0.5, model.nodes[:, 1] - 0.5
        forces = np.zeros((w.size, 3))
        forces[:, 0], forces[:, 1] = -y * w, x * w
        forces *= T / np.sum(x * forces[:, 1] - y * forces[:, 0])
        sig = static_stresses(model, forces)
        tau = abs(sig[3, point_at(model, 0.0, 0.5, H / 2)])            # τyz on the face x = 0
        hs.append(1.0 / n)
        errs.append(abs(tau - ref) / ref)
    rate = np.polyfit(np.log(hs), np.log(errs), 1)[0]
    # trilinear displacements: nodal stresses converge at O(h²) here (fitted, scikit-fem
    # style); the finest mesh within 5 % of the series
    assert 1.7 < rate < 2.4
    assert errs[-1] < 0.05


def test_surface_points_and_features_of_a_pedestal_on_a_mat():
    """Which nodes are searched and which are flagged (definitions of the recovery)."""
    model = build_model(Scenario.from_dict({
        "title": "pedestal on a mat (invented)",
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0},
                      "g": {"youngs_modulus": 25e9, "poisson_ratio": 0.2, "density": 2300.0}},
        "parts": [{"name": "mat", "material": "c", "origin": [0, 0, 0], "size": [3.0, 3.0, 1.0]},
                  {"name": "ped", "material": "g", "origin": [1, 1, 1], "size": [1.0, 1.0, 1.0]}],
        "mesh": {"element_size": 0.5},
        "support": {"kind": "fixed"},
        "equipment": [{"name": "box", "mass": 1000.0, "mount": [1.5, 1.5], "footprint": [1.0, 1.0],
                       "cg_height": 0.5}]}))
    pts = model.stress_points
    pos = pts.position

    def feature_at(x, y, z):
        return {pts.feature(p) for p in np.flatnonzero(np.all(np.isclose(pos, [x, y, z]), axis=1))}

    # the mat: 7 × 7 × 3 nodes, 5 × 5 × 1 inside; the pedestal adds 3 × 3 × 2 nodes above
    # the mat, 1 × 1 × 1 inside; of its 9 nodes on the mat's top face the middle one is no
    # longer on the surface, the other 8 carry a point for each part (counting)
    assert np.unique(pts.node).size == (7 * 7 * 3 - 5 * 5 * 1) + (3 * 3 * 2 - 1 * 1 * 1) - 1
    assert pts.n_points == np.unique(pts.node).size + 8     # 8 interface-edge nodes twice
    foot = np.flatnonzero(np.all(np.isclose(pos, [1.0, 1.5, 1.0]), axis=1))
    assert sorted(pts.part[foot]) == [0, 1] and sorted(pts.material[foot]) == [0, 1]
    assert feature_at(1.0, 1.5, 1.0) == {"re-entrant corner"}   # pedestal foot on the mat
    assert feature_at(1.0, 1.0, 1.0) == {"re-entrant corner"}
    assert feature_at(3.0, 3.0, 1.0) == {None}                  # convex corner of the mat
    assert feature_at(0.0, 1.5, 0.0) == {"base edge"}           # fixed base perimeter
    assert feature_at(1.5, 1.5, 0.0) == {None}                  # inside the base face
    assert feature_at(1.0, 1.5, 2.0) == {"mount edge"}          # footprint perimeter
    assert feature_at(2.0, 2.0, 2.0) == {"mount edge"}
    assert feature_at(1.5, 1.5, 2.0) == {None}                  # inside the footprint
    assert feature_at(1.0, 1.5, 1.5) == {None}                  # pedestal side, mid-height


def test_uniform_strain_is_exact_at_every_surface_point_of_two_materials():
    """Patch test on a mesh of two materials: each point carries its own material's stress."""
    from groundshake.model._assembly import element_keys
    from groundshake.model._elements import brick_matrices
    from groundshake.model._mesh import Box, mesh_boxes
    from groundshake.model._recovery import surface_stress_points

    boxes = [Box("a", (0.0, 0.0, 0.0), (2.0, 1.5, 1.0), material=0),
             Box("b", (0.5, 0.5, 1.0), (1.0, 0.5, 0.6), material=1)]
    mats_e_nu = np.array([[30e9, 0.2], [20e9, 0.3]])
    mesh = mesh_boxes(boxes, 0.25)
    kg, sizes, kmat = element_keys(mesh, [0, 1])
    mats = brick_matrices(sizes, mats_e_nu[kmat, 0], mats_e_nu[kmat, 1], 2400.0)
    pts = surface_stress_points(mesh, kg, mats, kmat)
    eps = np.array([1e-4, -2e-4, 3e-4, 1e-4, 2e-4, -1e-4])   # xx yy zz yz xz xy (engineering)
    grad = np.array([[eps[0], eps[5] / 2, eps[4] / 2],
                     [eps[5] / 2, eps[1], eps[3] / 2],
                     [eps[4] / 2, eps[3] / 2, eps[2]]])
    u = (mesh.nodes @ grad.T).ravel()
    sig = (pts.operator @ u).reshape(-1, 6)
    for m, (E, nu) in enumerate(mats_e_nu):
        lam = E * nu / ((1 + nu) * (1 - 2 * nu))
        mu = E / (2 * (1 + nu))
        ref = np.r_[lam * eps[:3].sum() + 2 * mu * eps[:3], mu * eps[3:]]   # Hooke's law
        mine = pts.material == m
        assert mine.sum() > 0
        np.testing.assert_allclose(sig[mine], np.broadcast_to(ref, (mine.sum(), 6)), rtol=0,
                                   atol=1e-10 * np.abs(ref).max())


@pytest.mark.parametrize("method", ["modal", "direct"])
def test_run_reports_surface_peaks_and_how_they_were_recovered(method):
    from groundshake.dynamics import motion_from_arrays
    from groundshake.pipeline import analyse

    scen = Scenario.from_dict({
        "title": "test block (invented)",
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [2.0, 1.0, 1.0]}],
        "mesh": {"element_size": 0.5}, "support": {"kind": "fixed"},
        "damping": {"ratio_percent": 5, "rayleigh_hz": [50.0, 300.0]},
        "analysis": {"cutoff_hz": 400.0}})
    t = np.arange(400) * 0.005
    acc = 2.0 * np.sin(2 * np.pi * 3.0 * t) * np.sin(np.pi * t / t[-1]) ** 2   # invented
    with pytest.warns(Warning):
        res = analyse(scen, motion=motion_from_arrays({"x": acc}, 0.005), method=method,
                      progress=False)
    st = res.summary["stresses"]
    assert st["n_points"] == res.model.stress_points.n_points
    assert st["recovery"] in res.summary["analysis"]["assumptions"]
    # per-element peaks are the largest of their corner points (definition), so the
    # largest element peak is the governing point peak
    assert np.nanmax(res.stress.tension) == pytest.approx(st["principal_tension"]["value"],
                                                          rel=1e-12)
    assert st["principal_tension"]["feature"] == "base edge"
    assert st["principal_tension"]["part"] == "b"
    assert any("edge of the fixed or rigid base" in w for w in res.summary["warnings"])


def test_peak_at_a_pedestal_foot_is_flagged_as_a_re_entrant_corner():
    """Static 1 g lateral on a pedestal standing on a mat: the foot of the pedestal governs."""
    model = build_model(Scenario.from_dict({
        "title": "pedestal on a mat (invented)",
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "mat", "material": "c", "origin": [0, 0, 0], "size": [3.0, 3.0, 0.5]},
                  {"name": "ped", "material": "c", "origin": [1, 1, 0.5], "size": [1.0, 1.0, 2.0]}],
        "mesh": {"element_size": 0.25}, "support": {"kind": "fixed"}}))
    f = model.M @ model.influence[:, 0] * G
    sig = (model.stress @ spla.spsolve(model.K.tocsc(), f)).reshape(-1, 1, 6).transpose(0, 2, 1)
    peaks = StressPeaks.empty(sig.shape[0])
    peaks.update(0, np.ascontiguousarray(sig), np.array([0]))
    out, cautions = stress_summary(peaks, model.stress_points, 0.01, part_names=["mat", "ped"])
    pt = out["principal_tension"]
    # the pedestal bends as a cantilever from its foot (Euler-Bernoulli): tension on its
    # x = 1 face at z = 0.5, where it meets the mat — a re-entrant edge (definition)
    assert pt["part"] == "ped" and pt["feature"] == "re-entrant corner"
    assert pt["at"][0] == 1.0 and pt["at"][2] == 0.5
    assert any("re-entrant corner" in c for c in cautions)
    # the re-entrant edge concentrates stress, so the recovered peak lies above beam
    # theory's M/S of the foot section (Euler-Bernoulli, pedestal as a cantilever)
    ms = 2400 * 1.0 * 2.0 * G * 1.0 / (1.0 / 6.0)
    assert pt["value"] > ms
