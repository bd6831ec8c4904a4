"""The block driven by base motion: rigid-body checks, equipment, linearity, symmetry.

Sources: Newton's second law (a near-rigid block's base shear is m·a_g at every step,
its points move with the ground); the rigid-plate bolt formulas of common practice;
the exact response of a damped oscillator from scipy.signal.cont2discrete(method="foh")
(independent of our kernel); linearity and mirror symmetry of a linear elastic model
(facts of linear mechanics). Records here are invented test signals.
"""
from __future__ import annotations

import numpy as np
import pytest

from _oracles import sdof_foh

from groundshake.dynamics import motion_from_arrays
from groundshake.records import STANDARD_GRAVITY as G
from groundshake.pipeline import analyse
from groundshake.scenario import Scenario

DT = 0.005
N_T = 700


def record(seed: int, n_t: int = N_T, dt: float = DT, amp: float = 2.0) -> np.ndarray:
    """Invented band-limited test signal (0.5-12 Hz), tapered to zero at both ends."""
    rng = np.random.default_rng(seed)
    t = np.arange(n_t) * dt
    f = np.linspace(0.5, 12.0, 25)
    ph = rng.uniform(0, 2 * np.pi, f.size)
    a = np.sin(2 * np.pi * f[:, None] * t + ph[:, None]).sum(axis=0)
    a *= np.sin(np.pi * t / t[-1]) ** 2
    return amp * a / np.max(np.abs(a))


def scenario(**changes) -> Scenario:
    d = {
        "title": "test block (invented)",
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "block", "material": "c", "origin": [0, 0, 0], "size": [2.0, 2.0, 1.0]}],
        "mesh": {"element_size": 0.5, "element": "hex8-incompatible"},
        "support": {"kind": "fixed"},
        "sensors": [{"name": "top", "at": [1.0, 1.0, 1.0]}, {"name": "corner", "at": [2.0, 2.0, 1.0]}],
        "analysis": {"cutoff_hz": 200.0},
        "floor_spectra": {"damping_percent": [5], "periods": {"min": 0.05, "max": 1.0, "count": 12}},
    }
    for k, v in changes.items():
        d[k] = v
    return Scenario.from_dict(d)


RIGID = {"c": {"youngs_modulus": 30e13, "poisson_ratio": 0.2, "density": 2400.0}}




@pytest.fixture(scope="module")
def rigid_run():
    scen = scenario(materials=RIGID, equipment=[{
        "name": "cabinet", "mass": 2000.0, "mount": [1.0, 1.0], "footprint": [1.0, 1.0],
        "cg_height": 0.8, "anchors": [[-0.4, -0.4], [0.4, -0.4], [0.4, 0.4], [-0.4, 0.4]],
        "dead_load_factor": 0.9, "capacity": {"tension": 20e3, "shear": 15e3}}])
    acc = {"x": record(1), "y": record(2, amp=1.5), "z": record(3, amp=1.0)}
    return analyse(scen, motion=motion_from_arrays(acc, DT), progress=False), acc


def test_rigid_block_base_shear_is_mass_times_ground(rigid_run):
    res, acc = rigid_run
    m_total = 2.0 * 2.0 * 1.0 * 2400.0 + 2000.0
    h = res.histories
    for d, key in (("x", "base Fx [N]"), ("y", "base Fy [N]"), ("z", "base Fz [N]")):
        ref = -m_total * acc[d]                       # Newton's second law: R = −m·a_g on the support
        # every step within 1 % of the peak (Newton's second law)
        np.testing.assert_allclose(h[key], ref, atol=0.01 * np.max(np.abs(ref)))
    assert res.summary["peaks"]["base_shear"]["x"] == pytest.approx(
        m_total * np.max(np.abs(acc["x"])), rel=0.01)   # Newton's second law


def test_rigid_block_sensors_move_with_the_ground(rigid_run):
    res, acc = rigid_run
    for d in "xyz":
        # a rigid body's points share the ground's acceleration (kinematics), within 1 %
        np.testing.assert_allclose(res.histories[f"corner abs acc {d} [m/s2]"], acc[d],
                                   atol=0.01 * np.max(np.abs(acc[d])))
        assert res.summary["sensors"]["top"]["peak_absolute_acceleration"][d] == pytest.approx(
            np.max(np.abs(acc[d])), rel=0.01)


def test_rigid_equipment_bolts_match_rigid_plate_formula(rigid_run):
    res, acc = rigid_run
    m, h, dlf, a = 2000.0, 0.8, 0.9, 0.4
    ax, ay, az = acc["x"], acc["y"], acc["z"]
    # common practice (rigid plate, elastic bolts): bolt at (+a, +a) takes
    # m·ax·h/(4a) + m·ay·h/(4a) of overturning tension, minus (dlf·m·g + m·az)/4
    # (bolt 3 is at (+0.4, +0.4); the inertia force −m·a tips the block away from +x, +y)
    t_hand = m * ax * h / (4 * a) + m * ay * h / (4 * a) - (dlf * m * G + m * az) / 4
    t = res.histories["cabinet bolt 3 tension [N]"]
    np.testing.assert_allclose(t, t_hand, atol=0.01 * np.max(np.abs(t_hand)))
    v_hand = np.hypot(m * ax / 4, m * ay / 4)            # direct shear V/n (no torsion: rigid)
    np.testing.assert_allclose(res.histories["cabinet bolt 3 shear [N]"], v_hand,
                               atol=0.01 * np.max(v_hand))
    b = res.summary["equipment"]["cabinet"]["anchors"][2]
    assert b["peak_tension"] == pytest.approx(max(0.0, t_hand.max()), rel=0.01)   # same formula
    assert b["dc_tension"] == pytest.approx(b["peak_tension"] / 20e3, rel=1e-12)  # definition


def test_flexible_equipment_peak_equals_sa_from_foh():
    f, zeta = 9.0, 0.03
    scen = scenario(materials=RIGID, equipment=[{
        "name": "unit", "mass": 3000.0, "mount": [1.0, 1.0], "footprint": [1.0, 1.0],
        "cg_height": 0.7, "frequency_hz": [f, f, 20.0], "damping_percent": 100 * zeta}])
    ax = record(7)
    res = analyse(scen, motion=motion_from_arrays({"x": ax}, DT), progress=False)
    sa = np.max(np.abs(sdof_foh(ax, DT, 2 * np.pi * f, zeta)[:, 2]))      # scipy cont2discrete foh, independent
    got = res.summary["equipment"]["unit"]["peak_absolute_acceleration"]["x"]
    assert got == pytest.approx(sa, rel=0.01)            # issue: SA(1/f, ζ) within 1 %


def test_linearity_twice_the_record_twice_the_response():
    scen = scenario()
    acc = {"x": record(4), "y": record(5, amp=1.2), "z": record(6, amp=0.7)}
    one = analyse(scen, motion=motion_from_arrays(acc, DT), progress=False).summary
    two = analyse(scen, motion=motion_from_arrays({k: 2 * v for k, v in acc.items()}, DT),
                  progress=False).summary
    # a linear model (superposition): every response doubles, to round-off
    for d in "xy":
        assert two["peaks"]["base_shear"][d] == pytest.approx(2 * one["peaks"]["base_shear"][d], rel=1e-9)
    for d in "xyz":
        assert two["peaks"]["relative_displacement"][d]["value"] == pytest.approx(
            2 * one["peaks"]["relative_displacement"][d]["value"], rel=1e-9)
        for q in ("peak_absolute_acceleration", "peak_relative_displacement"):
            assert two["sensors"]["corner"][q][d] == pytest.approx(2 * one["sensors"]["corner"][q][d],
                                                                   rel=1e-9)
    assert two["peaks"]["von_mises"] == pytest.approx(2 * one["peaks"]["von_mises"], rel=1e-9)


def test_swapping_x_and_y_on_a_square_block_swaps_results():
    # keep both members of the degenerate first pair (477 Hz): a cut between them would
    # break the symmetry of the retained set
    scen = scenario(sensors=[{"name": "centre", "at": [1.0, 1.0, 1.0]}],
                    analysis={"cutoff_hz": 600.0})
    ax, ay = record(8), record(9, amp=1.3)
    a = analyse(scen, motion=motion_from_arrays({"x": ax, "y": ay}, DT), progress=False).summary
    b = analyse(scen, motion=motion_from_arrays({"x": ay, "y": ax}, DT), progress=False).summary
    # mirror symmetry of a square block about x = y (geometry), to 1e-6
    assert a["peaks"]["base_shear"]["x"] == pytest.approx(b["peaks"]["base_shear"]["y"], rel=1e-6)
    assert a["peaks"]["base_shear"]["y"] == pytest.approx(b["peaks"]["base_shear"]["x"], rel=1e-6)
    s, t = a["sensors"]["centre"], b["sensors"]["centre"]
    for q in ("peak_absolute_acceleration", "peak_relative_displacement"):
        assert s[q]["x"] == pytest.approx(t[q]["y"], rel=1e-6)
        assert s[q]["y"] == pytest.approx(t[q]["x"], rel=1e-6)
