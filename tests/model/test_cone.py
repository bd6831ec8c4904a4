"""Rotational cones (model/_cone.py): the lumped network against the cone's closed form,
the static spring against the disc's, and the network stepped in time against its
steady state.

Sources:
- Wolf, J. P. (1994), Foundation Vibration Analysis Using Simple Physical Models,
  rotational cone (from memory): S(ω) = K[1 − (1/3)b0²/(1 + b0²)] + i·K·b0·(1/3)b0²/(1 + b0²),
  b0 = ωz0/c; aspect ratio of the rocking cone z0/r0 = (9π/32)(1 − ν)(c/Vs)², torsion
  z0/r0 = 9π/32; c = Vp for ν ≤ 1/3, 2Vs and ΔMθ = 1.2(ν − 1/3)ρIz0 above;
- rigid disc on a half-space: K_rocking = 8Gr³/(3(1 − ν)), K_torsion = 16Gr³/3 (closed
  forms, e.g. Gazetas 1991 Table 1 / Richart, Hall & Woods 1970, from memory);
- a linear system under a harmonic load settles to amplitude |F / (S(ω) − ω²J)|
  (steady state; Chopra, Dynamics of Structures ch. 3).
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.sparse as sp

from groundshake.dynamics._direct import direct_response
from groundshake.model._cone import (cone_network_stiffness, cone_stiffness, rotation_cones,
                                     with_cones)

VS, RHO = 200.0, 1900.0
G = RHO * VS ** 2


def _cones(nu, lx=6.0, ly=4.0, scale=1.0):
    ix, iy = lx * ly ** 3 / 12, ly * lx ** 3 / 12
    # any positive springs will do for the network/closed-form comparison
    k = scale * np.array([3.0, 5.0, 4.0]) * G * np.array([ix, iy, ix + iy]) ** 0.75
    return rotation_cones(lx, ly, k, shear_wave_velocity=VS, poisson_ratio=nu, density=RHO)


@pytest.mark.parametrize("nu", [0.25, 0.33, 0.45])
def test_network_is_the_cone(nu):
    cones = _cones(nu)
    w = np.linspace(0.0, 400.0, 81)
    # Wolf (1994) closed form of the rotational cone, with the trapped inertia for ν > 1/3
    np.testing.assert_allclose(cone_network_stiffness(cones, w), cone_stiffness(cones, w),
                               rtol=1e-12, atol=1e-9 * cones.stiffness.max())
    s = cone_stiffness(cones, np.array([0.0, 1e7]))
    np.testing.assert_allclose(s[0].real, cones.stiffness, rtol=1e-14)     # static: K
    # high frequency: imaginary part → ωρcI (the dashpot), real part → (2/3)K − ω²ΔMθ
    np.testing.assert_allclose(s[1].imag / 1e7, RHO * cones.wave_velocity
                               * cones.second_moment, rtol=1e-6)
    if nu <= 1 / 3:
        np.testing.assert_allclose(s[1].real, 2 / 3 * cones.stiffness, rtol=1e-6)


def test_velocities_and_trapped_inertia():
    low, high = _cones(0.25), _cones(0.45)
    vp = VS * math.sqrt(2 * (1 - 0.25) / (1 - 2 * 0.25))    # dilatational velocity
    assert low.wave_velocity == pytest.approx([vp, vp, VS], rel=1e-14)
    assert np.all(low.trapped_inertia == 0.0)               # ν ≤ 1/3: no trapped mass
    assert high.wave_velocity == pytest.approx([2 * VS, 2 * VS, VS], rel=1e-14)   # ν > 1/3
    expect = 1.2 * (0.45 - 1 / 3) * RHO * high.second_moment[:2] * high.apex_height[:2]
    assert high.trapped_inertia[:2] == pytest.approx(expect, rel=1e-12)
    assert high.trapped_inertia[2] == 0.0                    # torsion traps none
    # the extra rotation's inertia ρ·I·z0
    assert high.internal_inertia == pytest.approx(RHO * high.second_moment * high.apex_height,
                                                  rel=1e-14)


@pytest.mark.parametrize("nu", [0.2, 0.3])
def test_disc_spring_gives_wolfs_aspect_ratios(nu):
    # a square base, and the disc of the same second moment: r = (4I/π)^(1/4) (Wolf 1994)
    a = 3.0
    i = a ** 4 / 12
    r = (4 * i / math.pi) ** 0.25
    k_rock = 8 * G * r ** 3 / (3 * (1 - nu))        # rigid disc, rocking
    k_tors = 16 * G * ((2 * 2 * i / math.pi) ** 0.25) ** 3 / 3   # disc of the same J = 2I
    cones = rotation_cones(a, a, [k_rock, k_rock, k_tors], shear_wave_velocity=VS,
                           poisson_ratio=nu, density=RHO)
    c = cones.wave_velocity[0]
    assert cones.apex_height[0] / r == pytest.approx(9 * math.pi / 32 * (1 - nu) * (c / VS) ** 2,
                                                     rel=1e-12)
    r_t = (2 * 2 * i / math.pi) ** 0.25
    assert cones.apex_height[2] / r_t == pytest.approx(9 * math.pi / 32, rel=1e-12)


def test_stepped_in_time_the_network_settles_to_the_cones_steady_state():
    """A rigid block rocking on the network, moment M0·sin ωt: Newmark average acceleration
    with the extra rotations appended settles to |M0 / (S(ω) − ω²J)|."""
    cones = _cones(0.3)
    J = 4.0e5                               # block's rotary inertia about x, y, z [kg·m²]
    n = 3
    K = sp.diags(cones.stiffness)
    M = sp.diags(np.full(n, J))
    zero = np.zeros((n, 3))
    K2, M2, C2, iota2, load2 = with_cones(K, M, None, zero, zero, [0, 1, 2], cones)
    assert K2.shape == (6, 6) and load2.shape == (6, 3)
    w = 0.7 * math.sqrt(cones.stiffness[0] / J)    # below the undamped rocking frequency
    dt = 2 * math.pi / w / 400                      # 400 steps a period: period error ~1e-5
    t = np.arange(int(60 * 2 * math.pi / w / dt)) * dt
    m0 = 1.0e6
    # load L (6, 3) with p = −L a_g: a unit "ground" history stands for the moment on x, y, z
    load = load2.copy()
    load[:3] = -np.eye(3) * m0
    ground = np.tile(np.sin(w * t), (3, 1))
    res = direct_response(K2, M2, C2, iota2, ground, dt, output=sp.eye(6, format="csr")[:3],
                          load=load)
    s = cone_stiffness(cones, w)
    amp = m0 / np.abs(s - w ** 2 * J)               # steady state of each rotation
    last = t > t[-1] - 4 * 2 * math.pi / w          # the last four periods
    got = np.abs(res.disp[:, last]).max(axis=1)
    # Newmark's period error at 400 steps a period (~(ωh)²/12 ≈ 2e-5) and the discrete
    # peak of a sampled sine (1 − cos(π/400) ≈ 3e-5): 1e-3 is ample, the transient having
    # decayed (the cone's radiation damps it within a few periods)
    np.testing.assert_allclose(got, amp, rtol=1e-3)
    # with the static spring alone, the amplitude would be M0/(K − ω²J): the cone differs
    static = m0 / np.abs(cones.stiffness - w ** 2 * J)
    assert np.all(np.abs(got / static - 1) > 0.05)


@pytest.mark.filterwarnings("ignore::groundshake._errors.GroundshakeWarning")
def test_direct_run_of_a_block_on_cones_meets_the_frequency_domain_steady_state():
    """A near-rigid block on soil (frequency_dependent = true, method direct) under a
    harmonic ground motion in x: its base and top sway settle to the steady state of the
    rigid body on the same springs, dashpots and cones solved in the frequency domain."""
    from groundshake.dynamics._motion import motion_from_arrays
    from groundshake.results import analyse
    from groundshake.scenario import Scenario

    lx, ly, H = 3.0, 2.0, 3.0
    scen = Scenario.from_dict({
        # E a hundred thousand times concrete's: the block moves as a rigid body
        "materials": {"c": {"youngs_modulus": 30e14, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [lx, ly, H]}],
        "mesh": {"element_size": 1.0}, "damping": {"ratio_percent": 0.0},
        "support": {"kind": "soil", "shear_wave_velocity": 150.0, "poisson_ratio": 0.3,
                    "density": 1900.0, "frequency_dependent": True},
        "sensors": [{"name": "base", "at": [lx / 2, ly / 2, 0.0]},
                    {"name": "top", "at": [lx / 2, ly / 2, H]}],
        "analysis": {"method": "direct"}})
    from groundshake.model import build_model
    model = build_model(scen, cones=True)
    # rigid-body mass about the base centre: ∫ρ TᵀT dV with T(r) = [I, −[r]×], by 2-point
    # Gauss in each direction (exact for the quadratic integrand)
    g = np.array([-1.0, 1.0]) / math.sqrt(3.0)
    m = 2400.0 * lx * ly * H
    Mrb = np.zeros((6, 6))
    for r in [np.array([lx / 2 * a, ly / 2 * b, H / 2 * (1 + c)]) for a in g for b in g
              for c in g]:
        T = np.hstack([np.eye(3), -np.array([[0, -r[2], r[1]], [r[2], 0, -r[0]],
                                             [-r[1], r[0], 0]])])
        Mrb += m / 8 * T.T @ T

    def steady(w, cones=True):
        S = np.diag(model.impedance.stiffness + 1j * w * model.impedance.damping)
        if cones:
            S[3:, 3:] = np.diag(cone_stiffness(model.cones, w))
        return np.linalg.solve(-w ** 2 * Mrb + S, -Mrb @ np.array([1.0, 0, 0, 0, 0, 0]))

    ws = np.linspace(1.0, 200.0, 400)
    w_peak = ws[np.argmax([abs(steady(w)[0] + steady(w)[4] * H) for w in ws])]
    w = 0.7 * w_peak                      # below the sway-rocking resonance
    dt = 0.002
    t = np.arange(int(40.0 / dt)) * dt
    res = analyse(scen, motion=motion_from_arrays({"x": np.sin(w * t)}, dt), progress=False,
                  stresses=False, method="direct")
    assert res.summary["soil_cases"][0]["frequency_dependent"]["method"].startswith(
        "rotational cones")
    last = t > t[-1] - 4 * 2 * math.pi / w
    top = np.abs(res.histories["top rel disp x [m]"][last]).max()
    base = np.abs(res.histories["base rel disp x [m]"][last]).max()
    q, q_static = steady(w), steady(w, cones=False)
    # u_top = u0 + θ × r, r = (0, 0, H): x is u0x + θy·H. Tolerance: Newmark's period error
    # (ωh)²/12 ≈ 4e-4 amplified ~2× at 0.7 of resonance, and the sampled peak of a sine
    # (1 − cos(ωh/2) ≈ 6e-4): 3e-3 (measured 3e-4)
    assert top == pytest.approx(abs(q[0] + q[4] * H), rel=3e-3)
    assert base == pytest.approx(abs(q[0]), rel=3e-3)
    # static springs alone would answer differently (by some 7 % at the top here)
    assert abs(top / abs(q_static[0] + q_static[4] * H) - 1) > 0.03
