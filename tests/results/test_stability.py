"""Stability histories of a rigid base: sliding, overturning, bearing.

Expected values come from the statics of a rigid block (common practice): a block of
weight W = m·g under a horizontal acceleration a at its centre of gravity (height h)
pushes V = m·a and M = m·a·h on its base.
"""
import numpy as np
import pytest

from groundshake.results._stability import (EDGES, no_tension_pressure,
                                            stability_histories)

from _tables import one_box

G = 9.80665


def _block(a, *, m=50e3, h=0.8):
    """Resultants of a rigid block under horizontal acceleration a (n_t,) along x."""
    a = np.asarray(a, dtype=float)
    z = np.zeros_like(a)
    return m * a, z, np.full_like(a, m * G), z, m * a * h      # vx, vy, n, mx, my


def test_sliding_and_overturning_against_rigid_block_statics():
    m, h, L, B, mu = 50e3, 0.8, 3.0, 2.0, 0.5
    a = np.array([0.0, 1.0, -2.5, 4.0, -0.5])
    s = stability_histories(*_block(a, m=m, h=h), lx=L, ly=B, friction_coefficient=mu)
    W = m * G
    with np.errstate(divide="ignore"):
        fs_slide = mu * W / (m * np.abs(a))                     # statics: FS = μW/V
        fs_over = W * (L / 2) / (m * np.abs(a) * h)             # statics: FS = W(L/2)/M
    np.testing.assert_allclose(s.sliding, fs_slide, rtol=1e-12)
    # positive a pushes My > 0: tipping about the +x edge (statics), negative about -x
    plus, minus = s.overturning[EDGES.index("+x")], s.overturning[EDGES.index("-x")]
    np.testing.assert_allclose(np.where(a > 0, plus, minus)[1:], fs_over[1:], rtol=1e-12)
    assert np.all(np.isinf(np.where(a > 0, minus, plus)))       # the other edge is not loaded
    assert np.all(np.isinf(s.overturning[2:]))                  # no moment about y edges
    summ = s.summary(0.01)
    # smallest FS at the largest |a| = 4 m/s² (statics as above)
    assert summ["sliding"]["min_safety_factor"] == pytest.approx(mu * G / 4.0, rel=1e-12)
    assert summ["sliding"]["time"] == pytest.approx(0.03)
    assert summ["overturning"]["min_safety_factor"] == pytest.approx(G * (L / 2) / (4.0 * h),
                                                                     rel=1e-12)
    assert summ["overturning"]["edge"] == "+x"


def test_passive_resistance_adds_to_friction():
    s = stability_histories([2e4], [0.0], [1e5], [0.0], [0.0], lx=2, ly=2,
                            friction_coefficient=0.4, passive_resistance=6e3)
    assert s.sliding[0] == pytest.approx((0.4 * 1e5 + 6e3) / 2e4)   # FS = (μN + P)/V, statics


def test_sliding_uses_resultant_of_both_shears():
    s = stability_histories([3e4], [4e4], [2e5], [0.0], [0.0], lx=2, ly=2,
                            friction_coefficient=0.5)
    assert s.sliding[0] == pytest.approx(0.5 * 2e5 / 5e4)          # |V| = √(3² + 4²)·1e4 (statics)


def test_overturning_about_y_edges_signs():
    # Mx < 0 is a downward pressure on the +y side: q = N/A − Mx·y/Ix (statics)
    s = stability_histories([0.0, 0.0], [0.0, 0.0], [1e5, 1e5], [-2e4, 2e4], [0.0, 0.0],
                            lx=4.0, ly=2.0)
    assert s.overturning[EDGES.index("+y"), 0] == pytest.approx(1e5 * 1.0 / 2e4)   # N·(B/2)/M
    assert s.overturning[EDGES.index("-y"), 1] == pytest.approx(1e5 * 1.0 / 2e4)
    assert s.pressure_edge[0] == EDGES.index("+y") and s.pressure_edge[1] == EDGES.index("-y")


def test_linear_pressure_with_full_contact():
    N, L, B, My, Mx = 4e5, 4.0, 3.0, 1.2e5, -0.5e5
    s = stability_histories([0.0], [0.0], [N], [Mx], [My], lx=L, ly=B)
    A, Sx, Sy = L * B, B * L ** 2 / 6, L * B ** 2 / 6          # q = N/A ± M/S (statics)
    qmax = N / A + My / Sx + abs(Mx) / Sy
    assert s.pressure_linear_max[0] == pytest.approx(qmax, rel=1e-12)
    assert s.pressure_linear_min[0] == pytest.approx(N / A - My / Sx - abs(Mx) / Sy, rel=1e-12)
    assert s.pressure_peak[0] == pytest.approx(qmax, rel=1e-12)
    assert s.contact_ratio[0] == 1.0


@pytest.mark.parametrize("e", [0.8, 1.0, 1.4])
def test_no_tension_triangle_one_way(e):
    N, L, B = 1e5, 4.0, 2.0
    p, c = no_tension_pressure([N], [0.0], [N * e], lx=L, ly=B)
    # rigid base, no tension, e > L/6: q_max = 2N/(3B(L/2 − e)) over 3(L/2 − e) (statics)
    assert p[0] == pytest.approx(2 * N / (3 * B * (L / 2 - e)), rel=1e-9)
    assert c[0] == pytest.approx(3 * (L / 2 - e) / L, rel=1e-9)
    p, c = no_tension_pressure([N], [-N * e], [0.0], lx=B, ly=L)   # the same turned to y
    assert p[0] == pytest.approx(2 * N / (3 * B * (L / 2 - e)), rel=1e-9)       # (statics)


@pytest.mark.parametrize("ex, ey", [(1.5, 0.6), (1.2, 0.55), (1.0, 0.5)])
def test_no_tension_corner_pyramid(ex, ey):
    # statics: with ex ≥ L/4 and ey ≥ B/4 the contact is a corner triangle with legs
    # s = 4(L/2 − ex), t = 4(B/2 − ey) (the centroid of the pressure pyramid lies a quarter
    # of each leg from the corner) and N = q_max·s·t/6
    N, L, B = 1e5, 4.0, 2.0
    s_, t_ = 4 * (L / 2 - ex), 4 * (B / 2 - ey)
    p, c = no_tension_pressure([N], [-N * ey], [N * ex], lx=L, ly=B)
    assert p[0] == pytest.approx(6 * N / (s_ * t_), rel=1e-3)
    assert c[0] == pytest.approx(s_ * t_ / 2 / (L * B), rel=1e-3)


def test_no_tension_biaxial_equilibrium_and_bounds():
    N, L, B = 1e5, 4.0, 2.0
    ex, ey = 0.9, 0.35
    p, c = no_tension_pressure([N], [-N * ey], [N * ex], lx=L, ly=B)
    # the contact pressure can only exceed the linear peak when tension is removed (statics)
    lin = N / (L * B) * (1 + 6 * ex / L + 6 * ey / B)
    assert p[0] > lin
    # resultant inside the base: contact lost, yet a finite pressure balances the loads
    assert 0 < c[0] < 1 and np.isfinite(p[0])
    # resultant outside the base: no pressure can balance it (statics)
    p, c = no_tension_pressure([N], [0.0], [N * 2.1], lx=L, ly=B)
    assert np.isinf(p[0]) and c[0] == 0


def test_bearing_summary_against_allowable():
    s = stability_histories([0.0, 0.0], [0.0, 0.0], [1e5, 1e5], [0.0, 0.0], [0.0, 1e5],
                            lx=4.0, ly=2.0, allowable_bearing_pressure=5e4)
    summ = s.summary(0.5)["bearing"]
    q = 2 * 1e5 / (3 * 2.0 * (2.0 - 1.0))                      # triangle, e = 1 m (statics)
    assert summ["peak_pressure"] == pytest.approx(q, rel=1e-9)
    assert summ["time"] == 0.5 and summ["edge"] == "+x" and summ["contact_lost"]
    assert summ["ratio_to_allowable"] == pytest.approx(q / 5e4, rel=1e-9)


def test_no_friction_means_no_sliding_check():
    s = stability_histories([1e3], [0.0], [1e5], [0.0], [0.0], lx=1, ly=1)
    out = s.summary(0.01)["sliding"]
    assert out["min_safety_factor"] is None and "not given" in out["note"]


def test_uplift_gives_zero_safety():
    # net tension on the base (N < 0): nothing resists sliding or tipping (statics)
    s = stability_histories([1e3], [0.0], [-1e3], [0.0], [1e3], lx=1, ly=1,
                            friction_coefficient=0.5)
    assert s.sliding[0] == 0.0 and s.overturning[0, 0] == 0.0


def test_shape_mismatch_is_an_error():
    with pytest.raises(ValueError, match="one length"):
        stability_histories([1.0, 2.0], [0.0], [1.0], [0.0], [0.0], lx=1, ly=1)


# ---- through a whole run: a near-rigid block under slow x-only shaking
def _rigid_block_run(support_kind="fixed", **support):
    from groundshake.dynamics import motion_from_arrays
    from groundshake.pipeline import analyse
    from groundshake.scenario import Scenario
    L, B, H = 3.0, 2.0, 1.2
    d = {"title": "stability test block (invented)",
         "materials": {"c": {"youngs_modulus": 30e13, "poisson_ratio": 0.2, "density": 2400.0}},
         "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [L, B, H]}],
         "mesh": {"element_size": 0.6},
         "support": {"kind": support_kind, **support},
         "analysis": {"cutoff_hz": 100.0},
         "floor_spectra": {"damping_percent": [5], "periods": {"min": 0.05, "max": 1.0,
                                                               "count": 8}}}
    scen = Scenario.from_dict(d)
    dt, n_t = 0.01, 400
    t = np.arange(n_t) * dt
    a = 3.0 * np.sin(2 * np.pi * 0.5 * t) * np.sin(np.pi * t / t[-1]) ** 2   # invented signal
    motion = motion_from_arrays({"x": a}, dt)
    res = analyse(scen, motion=motion, progress=False, stresses=False)
    m = 2400.0 * L * B * H
    return res, a, m, L, H


@pytest.mark.filterwarnings("ignore::groundshake._errors.GroundshakeWarning")
@pytest.mark.parametrize("kind, soil", [
    ("fixed", {}),
    # stiff soil (invented): its modes lie far above the 0.5 Hz shaking, so statics hold
    ("soil", {"shear_wave_velocity": 3000.0, "poisson_ratio": 0.3, "density": 2000.0}),
])
def test_run_sliding_and_overturning_against_statics(kind, soil):
    mu = 0.45
    res, a, m, L, H = _rigid_block_run(kind, friction_coefficient=mu, **soil)
    st = res.summary["stability"]
    W, amax = m * G, np.max(np.abs(a))
    # rigid block, x-only motion: FS = μW/V with V = m·a (statics; Newton's second law)
    assert st["sliding"]["min_safety_factor"] == pytest.approx(mu * W / (m * amax), rel=2e-3)
    # overturning about an x edge: FS = W(L/2)/M with M = m·a·H/2 (statics)
    assert st["overturning"]["min_safety_factor"] == pytest.approx(
        W * (L / 2) / (m * amax * H / 2), rel=2e-3)
    assert st["overturning"]["edge"] in ("+x", "-x")
    assert "not a code check" in st["note"]


@pytest.mark.filterwarnings("ignore::groundshake._errors.GroundshakeWarning")
def test_run_bolt_interaction_between_its_bounds():
    from groundshake.dynamics import motion_from_arrays
    from groundshake.pipeline import analyse
    from groundshake.scenario import Scenario
    scen = Scenario.from_dict(one_box(
        "bolt interaction test (invented)",
        "c", {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0},
        "b", (2.0, 2.0, 1.0), {"kind": "fixed"}, mesh={"element_size": 0.5},
        equipment=[{"name": "cab", "mass": 3000.0, "mount": [1.0, 1.0], "footprint": [1.0, 1.0],
                    "cg_height": 1.0, "anchors": [[-0.4, -0.4], [0.4, -0.4], [0.4, 0.4],
                                                  [-0.4, 0.4]],
                    "capacity": {"tension": 5e3, "shear": 4e3}}],
        analysis={"cutoff_hz": 100.0},
        floor_spectra={"damping_percent": [5], "periods": {"min": 0.05, "max": 1.0,
                                                           "count": 8}}))
    dt = 0.01
    t = np.arange(300) * dt
    a = 4.0 * np.sin(2 * np.pi * 1.5 * t) * np.sin(np.pi * t / t[-1]) ** 2     # invented
    s = analyse(scen, motion=motion_from_arrays({"x": a, "y": 0.6 * a}, dt),
                progress=False, stresses=False).summary
    for b in s["equipment"]["cab"]["anchors"]:
        t_, v_ = b["peak_tension"] / 5e3, b["peak_shear"] / 4e3
        # (T/Tc)^(5/3) + (V/Vc)^(5/3) at any instant lies between either term at its own
        # peak and the sum of both peaks (ACI 318-19 R17.8 form, from memory)
        lo, hi = max(t_, v_) ** (5 / 3), t_ ** (5 / 3) + v_ ** (5 / 3)
        assert lo * (1 - 1e-12) <= b["interaction_ratio"] <= hi * (1 + 1e-12)
    w = s["worst_interaction"]
    assert w["value"] == max(b["interaction_ratio"] for b in s["equipment"]["cab"]["anchors"])
    assert "R17.8" in w["form"]
