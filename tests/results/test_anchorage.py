"""Anchor-bolt demands: rigid base plate, elastic bolt group.

Sources: the rigid-plate hand formulas of common practice — overturning moment
M = m·a·h resisted by bolt pairs, T = M/(n_row · lever) − f_d·W/n; direct shear V/n
plus torsional shear T·r/Σr² — and ASCE 7-16 §13.3.1 for Fp (docs/references.md §5).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake.records import STANDARD_GRAVITY as G
from groundshake.results._anchorage import SCREENING_WORDING, bolt_forces, fp_comparison

BOLTS = np.array([[-1.0, -0.6], [1.0, -0.6], [1.0, 0.6], [-1.0, 0.6]])


def test_overturning_in_x_matches_hand_formula():
    m, h, ax, az = 18000.0, 1.6, 3.0, 1.5
    acc = np.array([[ax], [0.0], [az], [0.0], [0.0], [0.0]])
    bf = bolt_forces(acc, BOLTS, mass=m, inertia=np.zeros(3), cg_height=h, dead_load_factor=0.9)
    # common practice: two bolts at x = +1 m carry M/(2·2 m); the weight share 0.9·m·g/4 and
    # the vertical inertia m·az/4 press them down (rigid plate, elastic bolts)
    t_hand = m * ax * h / (2 * 2.0) - (0.9 * m * G + m * az) / 4
    assert bf.tension[1, 0] == pytest.approx(t_hand, rel=1e-12)
    assert bf.tension[2, 0] == pytest.approx(t_hand, rel=1e-12)
    assert bf.tension[0, 0] == pytest.approx(-m * ax * h / 4.0 - (0.9 * m * G + m * az) / 4, rel=1e-12)
    # direct shear V/n (common practice)
    np.testing.assert_allclose(bf.shear[:, 0], m * ax / 4, rtol=1e-12)


def test_biaxial_and_torsion_match_hand_formula():
    m, h = 5000.0, 1.0
    ay, alpha_z, Iz = 2.0, 0.8, 900.0
    acc = np.array([[0.0], [ay], [0.0], [0.0], [0.0], [alpha_z]])
    bf = bolt_forces(acc, BOLTS, mass=m, inertia=[0.0, 0.0, Iz], cg_height=h, dead_load_factor=0.0)
    # overturning about x: the inertia force (−m·ay at the CG) tips the block toward −y, so the
    # bolts at y = +0.6 lift: M/(2·1.2 m) each (common practice)
    assert bf.tension[3, 0] == pytest.approx(m * ay * h / (2 * 1.2), rel=1e-12)
    assert bf.tension[0, 0] == pytest.approx(-m * ay * h / (2 * 1.2), rel=1e-12)
    # torsion T = Iz·αz shared as T·r/Σr² perpendicular to r, plus direct V/n (common practice)
    T = Iz * alpha_z
    r2 = 4 * (1.0 + 0.36)
    for (x, y), v in zip(BOLTS, bf.shear[:, 0]):
        vx = -T * y / r2
        vy = m * ay / 4 + T * x / r2
        assert v == pytest.approx(np.hypot(vx, vy), rel=1e-12)


def test_offset_group_shifts_moments_to_centroid():
    # one row of two bolts off the plate centre: pure vertical load must still sum to Fz and
    # make moment equilibrium (statics)
    bolts = np.array([[0.5, -0.5], [0.5, 0.5], [1.5, 0.5], [1.5, -0.5]])
    m = 1000.0
    acc = np.zeros((6, 1))
    bf = bolt_forces(acc, bolts, mass=m, inertia=np.zeros(3), cg_height=1.0, dead_load_factor=1.0)
    f_up = -bf.tension[:, 0]
    assert f_up.sum() == pytest.approx(m * G, rel=1e-12)                  # ΣF = W (statics)
    assert (bolts[:, 0] * f_up).sum() == pytest.approx(0.0, abs=1e-6)     # Σ x f = 0 about CG
    assert (bolts[:, 1] * f_up).sum() == pytest.approx(0.0, abs=1e-6)


def test_fp_formula_and_bounds():
    W = 18000.0 * G
    r = fp_comparison(weight=W, sds=1.0, ap=2.5, rp=2.5, ip=1.5, z_over_h=1.0, anchors=BOLTS,
                      mass=18000.0, cg_height=1.6, dead_load_factor=1.0)   # the whole weight
    # ASCE 7-16 §13.3.1: 0.4·2.5·1.0·W·(1 + 2)/(2.5/1.5) = 1.8 W, capped at 1.6·SDS·Ip·W = 2.4 W
    assert r["fp_unbounded"] == pytest.approx(1.8 * W, rel=1e-12)
    assert r["fp"] == pytest.approx(1.8 * W, rel=1e-12)
    assert r["fv"] == pytest.approx(0.2 * W, rel=1e-12)               # Fv = 0.2 SDS Wp
    low = fp_comparison(weight=W, sds=1.0, ap=1.0, rp=6.0, ip=1.0, z_over_h=0.0, anchors=BOLTS,
                        mass=18000.0, cg_height=1.6)
    assert low["fp"] == pytest.approx(0.3 * W, rel=1e-12)             # floor 0.3 SDS Ip Wp
    # worst bolt, hand formula (common practice): Fp·h/(2·1.2 m) about x − (W − Fv)/4
    t_hand = r["fp"] * 1.6 / (2 * 1.2) - (W - r["fv"]) / 4
    assert r["peak_tension"] == pytest.approx(t_hand, rel=1e-12)
    assert r["note"] == SCREENING_WORDING and "not a code capacity check" in r["note"]


# ---- tension–shear interaction (screening ratio against the user's capacities)
from groundshake.results._anchorage import bolt_interaction  # noqa: E402


def test_interaction_power_form():
    t = np.array([60e3, 0.0, -5e3, 30e3])
    v = np.array([0.0, 40e3, 20e3, 20e3])
    r = bolt_interaction(t, v, tension_capacity=60e3, shear_capacity=40e3)
    # (T/Tc)^(5/3) + (V/Vc)^(5/3) (ACI 318-19 R17.8, from memory); compression counts as 0
    expect = [1.0, 1.0, 0.5 ** (5 / 3), 0.5 ** (5 / 3) + 0.5 ** (5 / 3)]
    np.testing.assert_allclose(r, expect, rtol=1e-12)


def test_interaction_trilinear_form():
    t = np.array([50e3, 10e3, 50e3])
    v = np.array([5e3, 40e3, 30e3])
    r = bolt_interaction(t, v, tension_capacity=100e3, shear_capacity=50e3, form="trilinear")
    # ACI 318-19 §17.8 (from memory): V/Vc = 0.1 ≤ 0.2 → T/Tc; T/Tc = 0.1 ≤ 0.2 → V/Vc;
    # otherwise (T/Tc + V/Vc)/1.2
    np.testing.assert_allclose(r, [0.5, 0.8, (0.5 + 0.6) / 1.2], rtol=1e-12)


def test_interaction_rejects_bad_input():
    with pytest.raises(ValueError, match="capacities"):
        bolt_interaction(np.ones(2), np.ones(2), tension_capacity=0.0, shear_capacity=1.0)
    with pytest.raises(ValueError, match="allowed"):
        bolt_interaction(np.ones(2), np.ones(2), tension_capacity=1.0, shear_capacity=1.0,
                         form="linear")
