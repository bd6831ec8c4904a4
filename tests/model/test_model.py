"""The block model (build_model) and its modes against outside references.

Sources: Kramer (1996) Geotechnical Earthquake Engineering ch. 7, shear column
fn = (2n−1)Vs/(4H); Gazetas (1991) J. Geotech. Eng. 117(9), rigid rectangle and circle
(docs/references.md §8, square vs circle of equal area within 1 % translation, 10 % rocking);
rigid-body dynamics (parallel-axis theorem, common practice) for the 6×6 check;
Chopra, Dynamics of Structures: SDOF f = √(k/m)/2π (§2.1), Rayleigh damping
(§11.4), effective modal masses sum to the total mass (§13.2); statics/D'Alembert for
base reactions (common practice); ASCE 7-16 §12.9.1.1 90 % mass practice.
"""
from __future__ import annotations

import time
import warnings

import numpy as np
import pytest
import scipy.linalg as sla
import scipy.sparse as sp

from groundshake._errors import GroundshakeWarning, ModelTooLargeError, ScenarioError
from groundshake.dynamics import compute_modes, lowest_modes
from groundshake.dynamics import damping_matrix, rayleigh_coefficients
from groundshake.model import build_model, circle_stiffness, gazetas_rectangle
from groundshake.model._assembly import assemble, element_keys
from groundshake.model._elements import brick_matrices
from groundshake.model._mesh import Box, mesh_boxes
from groundshake.scenario import Scenario

CONCRETE = {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}
SOIL = {"kind": "soil", "shear_wave_velocity": 150.0, "poisson_ratio": 0.3, "density": 1800.0}


def scenario(**over):
    d = {"materials": {"c": dict(CONCRETE)},
         "parts": [{"name": "pad", "material": "c", "origin": [0, 0, 0], "size": [4.0, 3.0, 1.0]}],
         "mesh": {"element_size": 0.5}}
    mats = over.pop("materials", None)
    if mats:
        d["materials"] = mats
    d.update(over)
    return Scenario.from_dict(d)


def test_confined_shear_column_kramer():
    """Shear column: horizontal motion uniform in each level, fixed at the base."""
    H, nz = 10.0, 40
    G, rho = 80e6, 2000.0
    nu = 0.25
    E = 2 * G * (1 + nu)
    mesh = mesh_boxes([Box("col", (0, 0, 0), (0.5, 0.5, H))], H / nz)
    kg, sizes, _ = element_keys(mesh, [0])
    K, M = assemble(mesh, kg, brick_matrices(sizes, E, nu, rho))
    # lateral confinement: u_x equal over each level, u_y = u_z = 0, base level fixed
    lev = np.searchsorted(mesh.lines[2], mesh.nodes[:, 2] - 1e-9)
    rows = 3 * np.arange(mesh.n_nodes)
    keep = lev > 0
    T = sp.csr_matrix((np.ones(keep.sum()), (rows[keep], lev[keep] - 1)),
                      shape=(K.shape[0], nz))
    w = sla.eigh((T.T @ K @ T).toarray(), (T.T @ M @ T).toarray(), eigvals_only=True)
    f = np.sqrt(w[:3]) / (2 * np.pi)
    vs = np.sqrt(G / rho)
    ref = (2 * np.arange(1, 4) - 1) * vs / (4 * H)
    # Kramer (1996) ch. 7: fn = (2n-1)Vs/4H, within 1 % on a fine mesh
    np.testing.assert_allclose(f, ref, rtol=0.01)


def test_axial_rod_through_build_model():
    """Fixed-free rod (ν = 0) built by build_model: axial mode (2n−1)/(4L)√(E/ρ)."""
    mats = {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.0, "density": 2400.0}}
    s = scenario(materials=mats,
                 parts=[{"name": "rod", "material": "c", "origin": [0, 0, 0],
                         "size": [0.4, 0.4, 8.0]}],
                 mesh={"element_size": 0.2})
    m = build_model(s)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        md = compute_modes(m, n_modes=12)
    iz = np.flatnonzero(md.effective_mass_ratio[:, 2] > 0.5)[0]
    ref = 1 / (4 * 8.0) * np.sqrt(30e9 / 2400.0)
    # rod closed form (docs/references.md §7), 1 %
    assert md.frequency[iz] == pytest.approx(ref, rel=0.01)
    # first axial mode carries 8/π² of the rod's mass (rod modal analysis, closed form);
    # here the base-node mass is not driven, so compare with the model's total
    assert md.effective_mass_ratio[iz, 2] == pytest.approx(8 / np.pi ** 2, rel=0.02)


def _rigid_body_6x6(m, lx, ly, lz, extra_k):
    """Mass matrix of a solid box about the centre of its base (parallel-axis theorem)."""
    zc = lz / 2
    Ix = m * (ly ** 2 + lz ** 2) / 12 + m * zc ** 2
    Iy = m * (lx ** 2 + lz ** 2) / 12 + m * zc ** 2
    Iz = m * (lx ** 2 + ly ** 2) / 12
    Mr = np.diag([m, m, m, Ix, Iy, Iz])
    Mr[0, 4] = Mr[4, 0] = m * zc
    Mr[1, 3] = Mr[3, 1] = -m * zc
    return sla.eigh(np.diag(extra_k), Mr, eigvals_only=True)


@pytest.mark.parametrize("springs", ["lumped", "distributed"])
def test_stiff_block_on_soil_matches_rigid_body_eigenproblem(springs):
    mats = {"c": {"youngs_modulus": 3e13, "poisson_ratio": 0.2, "density": 2400.0}}
    s = scenario(materials=mats, support=dict(SOIL, springs=springs))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        model = build_model(s)
        md = compute_modes(model, n_modes=6)
    imp = gazetas_rectangle(4.0, 3.0, shear_wave_velocity=150.0, poisson_ratio=0.3,
                            density=1800.0, warn=False)
    m = 2400.0 * 4 * 3 * 1
    k6 = imp.stiffness.copy()
    if springs == "distributed":
        # a uniform Winkler bed k_d = K_d/A under a rigid base rocks with k_z·I and twists with
        # k_x·Ix + k_y·Iy (Winkler foundation statics; I of a rectangle b·h³/12, common practice)
        A, Ix, Iy = 12.0, 4.0 * 3.0 ** 3 / 12, 3.0 * 4.0 ** 3 / 12
        k6[3], k6[4] = k6[2] * Ix / A, k6[2] * Iy / A
        k6[5] = (k6[0] * Ix + k6[1] * Iy) / A
    lam = _rigid_body_6x6(m, 4.0, 3.0, 1.0, k6)
    # 6x6 rigid block on the Gazetas (1991) springs (or the bed's), parallel-axis mass: 0.5 %
    np.testing.assert_allclose(md.frequency, np.sqrt(lam) / (2 * np.pi), rtol=5e-3)
    fz = np.sqrt(k6[2] / m) / (2 * np.pi)
    iz = np.argmax(md.effective_mass_ratio[:, 2])
    # vertical mode sqrt(Kz/m)/2π (uncoupled, SDOF, Chopra §2.1): 0.5 %
    assert md.frequency[iz] == pytest.approx(fz, rel=5e-3)


def test_gazetas_square_vs_circle_of_equal_area():
    G, nu, half = 50e6, 0.3, 2.0
    imp = gazetas_rectangle(2 * half, 2 * half, shear_wave_velocity=np.sqrt(G / 1800.0),
                            poisson_ratio=nu, density=1800.0, radiation_damping=False,
                            warn=False)
    assert imp.shear_modulus == pytest.approx(G, rel=1e-12)
    R = np.sqrt(4 * half ** 2 / np.pi)
    ref = circle_stiffness(R, shear_modulus=G, poisson_ratio=nu)
    # docs/references.md §8: a square agrees with the circle of equal area within about 1 %
    # (translations) and 10 % (rocking)
    np.testing.assert_allclose(imp.stiffness[:3], ref[:3], rtol=0.01)
    np.testing.assert_allclose(imp.stiffness[3:5], ref[3:5], rtol=0.10)
    # circle closed form, Kz = 4GR/(1-ν) (Gazetas 1991 Table 1)
    assert ref[2] == pytest.approx(4 * G * R / (1 - nu), rel=1e-12)


def test_gazetas_orientation_and_dashpots():
    kw = dict(shear_wave_velocity=200.0, poisson_ratio=0.35, density=1900.0, warn=False)
    a = gazetas_rectangle(6.0, 2.0, **kw)
    b = gazetas_rectangle(2.0, 6.0, **kw)
    # the plan turned by 90° swaps x/y springs and rocking (geometry, common practice)
    np.testing.assert_allclose(b.stiffness, a.stiffness[[1, 0, 2, 4, 3, 5]], rtol=1e-12)
    # Gazetas (1991): Kx ≤ Ky with x along the long side; rocking about the long axis softer
    assert a.stiffness[0] < a.stiffness[1] and a.stiffness[3] < a.stiffness[4]
    # docs/references.md §8 dashpots: Cz = ρ·VLa·A, VLa = 3.4Vs/(π(1−ν)); Ch = ρVs·A
    area = 12.0
    assert a.damping[2] == pytest.approx(1900 * 3.4 * 200 / (np.pi * 0.65) * area, rel=1e-12)
    assert a.damping[0] == pytest.approx(1900 * 200 * area, rel=1e-12)
    with pytest.warns(GroundshakeWarning, match="L/B"):
        gazetas_rectangle(24.0, 2.0, shear_wave_velocity=200.0, poisson_ratio=0.3,
                          density=1900.0)


def test_effective_masses_sum_to_total_mass_and_warning():
    s = scenario(parts=[{"name": "p", "material": "c", "origin": [0, 0, 0],
                         "size": [1.0, 1.0, 1.0]}],
                 mesh={"element_size": 0.5},
                 equipment=[{"name": "e", "mass": 500.0, "mount": [0.5, 0.5],
                             "footprint": [0.5, 0.5], "cg_height": 0.4,
                             "frequency_hz": [8.0, 9.0, 20.0]}])
    for sup in ({"kind": "fixed"}, dict(SOIL)):
        model = build_model(scenario(**{**_as_dict(s), "support": sup}))
        md = compute_modes(model, n_modes=model.n_dof, warn=False)
        assert md.n_modes == model.n_dof
        # Chopra §13.2: Σ effective modal masses over all modes = the mass the ground load
        # drives, Lᵀ M⁻¹ L; with the mass moving rigidly with the ground (fixed base nodes,
        # Clough & Penzien support excitation) it makes up the whole mass ρV + equipment
        np.testing.assert_allclose(md.effective_mass.sum(axis=0) + model.rigid_mass,
                                   model.total_mass, rtol=1e-9)
        np.testing.assert_allclose(model.total_mass, 2400.0 * 1.0 + 500.0, rtol=1e-12)
        if sup["kind"] == "soil":   # nothing is held by the ground on springs (definition)
            np.testing.assert_allclose(model.rigid_mass, 0.0, atol=1e-9)
    with pytest.warns(GroundshakeWarning, match="ASCE 7-16"):
        compute_modes(model, n_modes=2)   # 2 modes cannot hold 90 % in every direction


def _as_dict(s):
    d = s.to_dict()
    return {k: d[k] for k in ("materials", "parts", "mesh", "equipment")}


def test_equipment_on_flexible_support_frequency_on_rigid_base():
    mats = {"c": {"youngs_modulus": 3e14, "poisson_ratio": 0.2, "density": 2400.0}}
    fr = [6.0, 7.0, 15.0]
    s = scenario(materials=mats, equipment=[{"name": "e", "mass": 2000.0, "mount": [2.0, 1.5],
                                             "footprint": [1.0, 1.0], "cg_height": 0.8,
                                             "frequency_hz": fr, "damping_percent": 2.0}])
    model = build_model(s)
    md = compute_modes(model, n_modes=3, warn=False)
    # SDOF on a rigid base: f = sqrt(k/m)/2π with k = m(2πf)² (Chopra §2.1), 0.1 %
    np.testing.assert_allclose(md.frequency, fr, rtol=1e-3)
    # composite damping: the support's strain energy dominates → its own 2 % (definition
    # of strain-energy weighted modal damping), within 0.01 percentage points
    np.testing.assert_allclose(md.damping, 0.02, atol=1e-4)
    eq = model.equipment[0]
    assert eq.operator.shape == (6, model.n_dof)
    # weight known for anchorage: W = m·g (g = 9.80665 m/s², standard gravity)
    assert eq.weight == pytest.approx(2000.0 * 9.80665, rel=1e-12)


@pytest.mark.parametrize("support", [{"kind": "fixed"}, dict(SOIL), dict(SOIL, springs="distributed")])
def test_static_base_reaction_equals_inertia(support):
    s = scenario(support=support,
                 equipment=[{"name": "e", "mass": 3000.0, "mount": [2.0, 1.5],
                             "footprint": [1.0, 1.0], "cg_height": 0.6}])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        model = build_model(s)
    R = model.reaction
    m_blk = 2400.0 * 4 * 3 * 1
    for a in range(2):
        u = model.factor().solve(-model.ground_load[:, a])
        r = R.K @ u + R.G[:, a]
        # D'Alembert statics: the structure pushes its support with −(total mass)·a_g
        assert r[a] == pytest.approx(-(m_blk + 3000.0), rel=1e-8)
        # overturning moment about the base centre: −Σ m_i z_i (common practice)
        mom = -(m_blk * 0.5 + 3000.0 * 1.6)
        sign = 1 if a == 0 else -1
        assert r[4 if a == 0 else 3] == pytest.approx(sign * mom, rel=1e-8)
    # vertical: the whole mass, and the weight includes block + equipment (g = 9.80665)
    u = model.factor().solve(-model.ground_load[:, 2])
    assert (R.K @ u + R.G[:, 2])[2] == pytest.approx(-(m_blk + 3000.0), rel=1e-8)
    assert model.weight == pytest.approx(9.80665 * (m_blk + 3000.0), rel=1e-10)


def test_consistent_mass_total_and_sensor_interpolation():
    s = scenario(sensors=[{"name": "a", "at": [4.0, 3.0, 1.0]}, {"name": "b", "at": [1.3, 0.7, 0.45]},
                          {"name": "c", "at": [2.0, 2.0, 0.0]}],
                 support=dict(SOIL))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        model = build_model(s)
    # consistent mass carries ρV in each direction (common practice)
    np.testing.assert_allclose(model.total_mass, 2400.0 * 12.0, rtol=1e-10)
    for p in model.sensors:
        # shape functions reproduce a rigid translation (partition of unity, common practice)
        np.testing.assert_allclose(p.operator @ model.influence, np.eye(3), atol=1e-12)
    # a sensor on a fixed base reads no relative motion (definition)
    fixed = build_model(scenario(sensors=[{"name": "c", "at": [2.0, 2.0, 0.0]}]))
    assert fixed.sensors[0].operator.nnz == 0


def test_rayleigh_damping_gives_the_ratio_at_both_frequencies():
    s = scenario(damping={"ratio_percent": 4.0, "rayleigh_hz": [5.0, 40.0]})
    model = build_model(s)
    r = rayleigh_coefficients(model)
    a, b = r.a0, r.a1
    for f in (5.0, 40.0):
        w = 2 * np.pi * f
        # Chopra §11.4: ξ(ω) = a/(2ω) + bω/2 equals the ratio at f1 and f2
        assert a / (2 * w) + b * w / 2 == pytest.approx(0.04, rel=1e-12)
    C = damping_matrix(model)
    assert C.shape == model.K.shape and model.is_classically_damped


def test_memory_guard_refuses_quickly(monkeypatch):
    monkeypatch.setenv("GROUNDSHAKE_MEMORY_LIMIT", "200MB")
    s = scenario(mesh={"element_size": 0.02})
    t0 = time.perf_counter()
    with pytest.raises(ModelTooLargeError, match="element_size"):
        build_model(s)
    # the issue asks for a quick refusal (< 2 s) before any assembly
    assert time.perf_counter() - t0 < 2.0


def test_footprint_off_the_top_face_is_an_error():
    # build_model re-checks what the loader checks (a plain dict skips the loader)
    d = {"materials": {"c": dict(CONCRETE)},
         "parts": [{"name": "pad", "material": "c", "origin": [0, 0, 0], "size": [4.0, 3.0, 1.0]}],
         "mesh": {"element_size": 0.5},
         "equipment": [{"name": "e", "mass": 10.0, "mount": [9.0, 9.0],
                        "footprint": [0.5, 0.5], "cg_height": 0.2}]}
    with pytest.raises(ScenarioError, match="footprint"):
        build_model(d)
    d["equipment"] = []
    d["parts"].append({"name": "far", "material": "c", "origin": [10, 0, 0], "size": [1, 1, 1]})
    with pytest.raises(ScenarioError, match="touch"):
        build_model(d)


def test_stepped_block_and_lumped_mass():
    s = scenario(parts=[{"name": "mat", "material": "c", "origin": [0, 0, 0], "size": [4.0, 3.0, 0.5]},
                        {"name": "plinth", "material": "c", "origin": [1.0, 1.0, 0.5],
                         "size": [2.0, 1.0, 0.6]}],
                 mesh={"element_size": 0.25, "mass": "lumped"},
                 equipment=[{"name": "e", "mass": 800.0, "mount": [2.0, 1.5],
                             "footprint": [1.0, 0.5], "cg_height": 0.5}])
    model = build_model(s)
    assert set(np.unique(model.element_part)) == {0, 1}
    # lumped mass is diagonal (row-sum lumping, common practice)
    M = model.M.tocoo()
    nodes_only = M.row < model.n_dof - 6
    assert np.all(M.row[nodes_only] == M.col[nodes_only])
    vol = 4 * 3 * 0.5 + 2 * 1 * 0.6
    assert model.weight == pytest.approx(9.80665 * (2400 * vol + 800.0), rel=1e-10)


def test_distributed_bed_is_uniform_and_keeps_gazetas_totals():
    # a flexible mat (6 × 4 × 0.4 m) on a distributed bed (issue 13 item 5)
    s = scenario(parts=[{"name": "mat", "material": "c", "origin": [0, 0, 0],
                         "size": [6.0, 4.0, 0.4]}], mesh={"element_size": 0.5},
                 support=dict(SOIL, springs="distributed"))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        model = build_model(s)
    G, nu, L, B = 1800.0 * 150.0 ** 2, 0.3, 3.0, 2.0
    kz = 2 * G * L / (1 - nu) * (0.73 + 1.54 * (B / L) ** 0.75)     # Gazetas (1991) Kz
    # statics under 1 g down: the springs carry the weight, and the contact pressure of a
    # uniform bed under a uniform mat is uniform, ρ·g·t (Winkler statics), node by node
    u = model.factor().solve(-model.ground_load[:, 2] * 9.80665)
    Kb = model._stiff_parts[0][1]                                     # the bed's springs
    f = -(Kb @ u)
    base = np.flatnonzero(np.isclose(model.nodes[:, 2], 0.0))
    fz = f[model.node_map[3 * base + 2].indices]                      # free base DOFs
    xs, ys = np.unique(model.nodes[base, 0]), np.unique(model.nodes[base, 1])
    tx = np.diff(np.concatenate([[xs[0]], (xs[1:] + xs[:-1]) / 2, [xs[-1]]]))
    ty = np.diff(np.concatenate([[ys[0]], (ys[1:] + ys[:-1]) / 2, [ys[-1]]]))
    ixn = np.searchsorted(xs, model.nodes[base, 0])
    iyn = np.searchsorted(ys, model.nodes[base, 1])
    w = tx[ixn] * ty[iyn]                                             # tributary areas
    p = fz / w
    np.testing.assert_allclose(p, 2400.0 * 9.80665 * 0.4, rtol=1e-3)
    # the bed's vertical total is Gazetas' Kz: a unit rigid translation (definition)
    one = model.influence[:, 2]
    assert one @ (Kb @ one) == pytest.approx(kz, rel=1e-10)
    # radiation dashpots act on the averaged translation: Cz = ρ·VLa·A for a translation,
    # nothing for a rigid rocking or twist (as with lumped springs; docs/references.md §8)
    U, c = model.damping_update()
    vla = 3.4 * 150.0 / (np.pi * 0.7)
    assert c[2] * (U.T @ one)[2] ** 2 == pytest.approx(1800.0 * vla * 24.0, rel=1e-10)
    nodes_z = np.zeros(model.node_map.shape[0])
    nodes_z[2::3] = model.nodes[:, 1] - 2.0                           # θx: u_z = y − y_c
    rock = model.node_map.T @ nodes_z        # no masters here: the map selects node DOFs
    np.testing.assert_allclose(U.T @ rock, 0.0, atol=1e-9 * np.abs(U.T @ one).max())
