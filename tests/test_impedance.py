"""Embedment factors, dynamic stiffness coefficients and strain-compatible modulus.

Sources: Gazetas (1991), J. Geotech. Eng. ASCE 117(9), Table 1 (dynamic stiffness
coefficients of a surface rectangle) and Table 2 (embedded foundations) — written from
memory (REFERENCES.md §11 marks them [S] for the paper, the numbers here [M]); ASCE 7-16
Table 19.2-1 effective shear modulus ratios — from memory, verify.
"""
import math
import warnings

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning
from groundshake.model._impedance import (dynamic_stiffness_coefficients, embedment_dashpots,
                                          embedment_factors, shear_modulus_ratio,
                                          to_model_axes)


def test_surface_has_no_embedment_effect():
    np.testing.assert_array_equal(embedment_factors(3.0, 2.0, depth=0.0, contact_depth=0.0),
                                  np.ones(6))               # D = 0 is the surface case (paper)


def test_embedment_factors_by_hand():
    L, B, D, d = 3.0, 2.0, 1.0, 0.6
    f = embedment_factors(L, B, depth=D, contact_depth=d)
    chi, aw, ab, h = B / L, 4 * d * (L + B), 4 * L * B, D - d / 2
    # Gazetas (1991) Table 2 (from memory — verify), evaluated by hand:
    assert f[2] == pytest.approx((1 + D / (21 * B) * (1 + 1.3 * chi))
                                 * (1 + 0.2 * (aw / ab) ** (2 / 3)), rel=1e-12)
    assert f[1] == pytest.approx((1 + 0.15 * math.sqrt(D / B))
                                 * (1 + 0.52 * (h * aw / (B * L ** 2)) ** 0.4), rel=1e-12)
    assert f[0] == pytest.approx((1 + 0.15 * math.sqrt(D / L))
                                 * (1 + 0.52 * (h * aw / (L * B ** 2)) ** 0.4), rel=1e-12)
    assert f[3] == pytest.approx(1 + 1.26 * (d / B) * (1 + (d / B) * (d / D) ** -0.2
                                                       * math.sqrt(B / L)), rel=1e-12)
    assert f[4] == pytest.approx(1 + 0.92 * (d / L) ** 0.6
                                 * (1.5 + (d / L) ** 1.9 * (d / D) ** -0.6), rel=1e-12)
    assert f[5] == pytest.approx(1 + 1.4 * (1 + B / L) * (d / B) ** 0.9, rel=1e-12)


def test_embedment_stiffens_with_wall_contact():
    # more sidewall contact can only stiffen the base (physics of the paper's Table 2)
    fs = np.array([embedment_factors(2.0, 1.5, depth=1.2, contact_depth=d)
                   for d in (0.0, 0.3, 0.6, 1.2)])
    assert np.all(np.diff(fs, axis=0) >= 0) and np.all(fs[-1] > 1)
    # a trench without wall contact: rocking and torsion unchanged (paper: factors in d only)
    np.testing.assert_array_equal(fs[0, 3:], 1.0)


def test_embedment_input_errors():
    with pytest.raises(ValueError, match="contact_depth"):
        embedment_factors(2.0, 1.0, depth=0.5, contact_depth=0.8)
    with pytest.raises(ValueError, match="L >= B"):
        embedment_factors(1.0, 2.0, depth=0.5, contact_depth=0.5)


def test_sidewall_dashpots():
    L, B, d, rho, vs, nu = 2.0, 1.0, 0.5, 1800.0, 200.0, 1 / 3
    c = embedment_dashpots(L, B, contact_depth=d, shear_wave_velocity=vs, poisson_ratio=nu,
                           density=rho)
    vla = 3.4 * vs / (math.pi * (1 - nu))              # Lysmer's analog velocity (Gazetas 1991)
    assert c[0] == pytest.approx(rho * vs * 4 * L * d + rho * vla * 4 * B * d, rel=1e-12)
    assert c[1] == pytest.approx(rho * vs * 4 * B * d + rho * vla * 4 * L * d, rel=1e-12)
    assert c[2] == pytest.approx(rho * vs * 4 * d * (L + B), rel=1e-12)
    assert np.all(c[3:] == 0)


def test_dynamic_coefficients():
    k = dynamic_stiffness_coefficients(np.array([0.0, 1.0, 1.5]), L=2.0, B=1.0,
                                       poisson_ratio=0.33)
    np.testing.assert_allclose(k[0], 1.0)               # a0 = 0: the static stiffness
    # Gazetas (1991) Table 1 (from memory): k_rx = 1 − 0.20a0, k_ry = 1 − 0.26a0,
    # k_t = 1 − 0.14a0, k_x ≃ 1
    np.testing.assert_allclose(k[1], [1, 1, 1, 0.80, 0.74, 0.86], rtol=1e-12)
    np.testing.assert_allclose(k[2, 3:], [0.70, 0.61, 0.79], rtol=1e-12)


def test_dynamic_coefficients_range_warning():
    with pytest.warns(GroundshakeWarning, match="a0"):
        k = dynamic_stiffness_coefficients(3.0, L=1.0, B=1.0, poisson_ratio=0.3)
    assert k[4] == pytest.approx(1 - 0.26 * 2.0)        # clipped to the charts' range a0 ≤ 2
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        dynamic_stiffness_coefficients(1.0, L=1.0, B=1.0, poisson_ratio=0.3)


def test_axes_swap():
    v = np.arange(6.0)
    np.testing.assert_array_equal(to_model_axes(v, True), [1, 0, 2, 4, 3, 5])
    np.testing.assert_array_equal(to_model_axes(v, False), v)


@pytest.mark.parametrize("cls, g, expect", [
    ("D", 0.4, 0.50), ("C", 0.8, 0.60), ("B", 0.0, 1.0), ("D", 1.2, 0.10),
    ("D", 0.25, 0.70),       # linear between 0.90 at 0.1 g and 0.50 at 0.4 g
])
def test_shear_modulus_ratio(cls, g, expect):
    # ASCE 7-16 Table 19.2-1 (from memory — verify), linear interpolation between columns
    assert shear_modulus_ratio(cls, g) == pytest.approx(expect, rel=1e-12)


def test_shear_modulus_ratio_needs_site_study():
    with pytest.raises(ValueError, match="site-specific"):
        shear_modulus_ratio("E", 0.6)
    with pytest.raises(ValueError, match="site_class"):
        shear_modulus_ratio("F", 0.1)
