"""Response-spectrum analysis: correlation, combination rules, damping correction."""
import math

import numpy as np
import pytest

from groundshake._errors import InputError
from groundshake.dynamics._spectrum_analysis import (
    combine_directions, combine_modes, cqc_correlation, damping_factor, modal_spectrum,
    spectral_accelerations)
from groundshake.spectra import parse_target


def _equal_damping_rho(r, xi):
    # Der Kiureghian (1981), equal damping form: 8ξ²(1+r)r^1.5 / ((1−r²)² + 4ξ²r(1+r)²)
    return 8 * xi ** 2 * (1 + r) * r ** 1.5 / ((1 - r * r) ** 2 + 4 * xi ** 2 * r * (1 + r) ** 2)


@pytest.mark.parametrize("r", [0.3, 0.5, 0.8, 0.9, 0.95, 1.0, 1.1, 2.0])
@pytest.mark.parametrize("xi", [0.02, 0.05, 0.10])
def test_cqc_equal_damping_closed_form(r, xi):
    rho = cqc_correlation(np.array([10.0, 10.0 * r]), np.array([xi, xi]))
    # Der Kiureghian (1981) closed form for equal damping (docs/references.md §12)
    assert rho[0, 1] == pytest.approx(_equal_damping_rho(r, xi), rel=1e-12)
    assert rho[1, 0] == pytest.approx(rho[0, 1], rel=1e-12)   # symmetry of the form


def test_cqc_tabulated_values_at_5_percent():
    beta = np.array([1.0, 0.95, 0.9, 0.8, 0.5])
    rho = cqc_correlation(np.concatenate([[1.0], beta[1:]]), 0.05)[0]
    # docs/references.md §6: 5 % damping, β = 1, .95, .9, .8, .5 → 1.000, .7914, .4730, .1656, .0185
    np.testing.assert_allclose(rho, [1.0, 0.7914, 0.4730, 0.1656, 0.0185], atol=6e-5)


def test_cqc_unequal_damping_general_form():
    wi, wj, zi, zj = 12.0, 15.0, 0.02, 0.07
    r = wj / wi
    # Der Kiureghian (1981) general form, written out by hand here
    ref = (8 * math.sqrt(zi * zj) * (zi + r * zj) * r ** 1.5
           / ((1 - r * r) ** 2 + 4 * zi * zj * r * (1 + r * r) + 4 * (zi ** 2 + zj ** 2) * r * r))
    rho = cqc_correlation(np.array([wi, wj]), np.array([zi, zj]))
    # the same form with i and j exchanged (r → 1/r) gives the same number: ρ is symmetric
    ref_t = (8 * math.sqrt(zi * zj) * (zj + zi / r) * (1 / r) ** 1.5
             / ((1 - 1 / r ** 2) ** 2 + 4 * zi * zj / r * (1 + 1 / r ** 2)
                + 4 * (zi ** 2 + zj ** 2) / r ** 2))
    assert ref_t == pytest.approx(ref, rel=1e-12)
    assert rho[0, 1] == pytest.approx(ref, rel=1e-12)


def test_cqc_rho_one_at_equal_frequencies():
    rho = cqc_correlation(np.array([7.0, 7.0, 7.0]), np.array([0.02, 0.05, 0.1]))
    # closed form at r = 1 with equal damping: 8ξ²·2/(4ξ²·4) = 1 (Der Kiureghian 1981)
    assert rho[0, 0] == 1.0 and rho[1, 1] == 1.0
    assert rho[0, 0] == pytest.approx(_equal_damping_rho(1.0, 0.05))


def test_cqc_tends_to_srss_for_separated_modes():
    w = np.array([5.0, 50.0, 500.0])
    y = np.array([[3.0, -2.0, 1.0]])
    cqc = combine_modes(y, cqc_correlation(w, 0.05))
    # SRSS (common practice) is the limit of CQC for well-separated modes
    assert cqc[0] == pytest.approx(math.sqrt(14.0), rel=2e-3)


def test_combine_modes_adds_residual_by_srss():
    out = combine_modes(np.array([[3.0]]), np.eye(1), np.array([4.0]))
    # SRSS of modal 3 and rigid 4: 5 (RG 1.92 Rev. 3 combination, from memory)
    assert out[0] == pytest.approx(5.0)


def test_direction_rules():
    R = np.array([3.0, 4.0, 1.0])
    # SRSS: √(9 + 16 + 1) (common practice)
    assert combine_directions(R, "srss") == pytest.approx(math.sqrt(26.0))
    # 100-40-40 (RG 1.92 Rev. 3): max(3+1.6+0.4, 4+1.2+0.4, 1+1.2+1.6) = 5.6
    assert combine_directions(R, "100-40-40") == pytest.approx(5.6)
    with pytest.raises(InputError, match="direction_combination"):
        combine_directions(R, "abs")


def test_damping_factor_en1998():
    # EN 1998-1 §3.2.2.2: η = √(10/(5+ξ)) ≥ 0.55: 1 at 5 %, √(10/7) at 2 %, 0.55 floor at 30 %
    np.testing.assert_allclose(damping_factor([0.05, 0.02, 0.30]),
                               [1.0, math.sqrt(10 / 7), 0.55], rtol=1e-12)


def test_asce7_target_scaled_to_mode_damping():
    tgt = parse_target("asce7:sds=1.0,sd1=0.6,tl=8")
    sa, notes = spectral_accelerations(tgt, np.array([0.3, 1.2]), np.array([0.02, 0.05]))
    g = 9.80665
    # ASCE 7-16 §11.4.6: Sa(0.3) = SDS = 1.0 g, Sa(1.2) = SD1/T = 0.5 g (docs/references.md §5);
    # the 2 % mode times η(2 %) = √(10/7) (EN 1998-1 §3.2.2.2)
    np.testing.assert_allclose(sa, [1.0 * g * math.sqrt(10 / 7), 0.5 * g], rtol=1e-12)
    assert notes


def test_en1998_target_evaluated_at_mode_damping():
    tgt = parse_target("en1998:type=1,ground=C,ag=0.3")
    sa, _ = spectral_accelerations(tgt, np.array([0.4]), np.array([0.02]))
    # EN 1998-1 §3.2.2.2 plateau 2.5·ag·S·η, S = 1.15 for type 1 ground C, η = √(10/7)
    assert sa[0] == pytest.approx(2.5 * 0.3 * 1.15 * math.sqrt(10 / 7) * 9.80665, rel=1e-12)


def test_single_mode_reads_the_target():
    tgt = parse_target("asce7:sds=1.0,sd1=0.6,tl=8")
    w = 2 * math.pi / 1.2
    ms = modal_spectrum(np.ones((1, 1)), np.array([w]), np.array([0.05]),
                        np.array([[1.0, 0.0, 0.0]]), (tgt, None, None))
    # ASCE 7-16 §11.4.6: Sa(1.2 s) = SD1/T = 0.5 g; Sd = Sa/ω² (pseudo-spectral relation)
    disp = ms.peak(np.ones((1, 1)), kind="displacement")
    assert disp[0] == pytest.approx(0.5 * 9.80665 / w ** 2, rel=1e-12)


@pytest.mark.parametrize("xi", [0.02, 0.10, 0.20])
def test_asce7_rising_branch_corrected_in_the_en1998_form(xi):
    tgt = parse_target("asce7:sds=1.0,sd1=0.6,tl=8")
    T = np.array([0.0, 0.03, 0.06, 0.1199])
    sa, _ = spectral_accelerations(tgt, T, np.full(T.size, xi))
    t0, eta = 0.12, math.sqrt(10.0 / (5.0 + 100 * xi))
    # ASCE 7-16 §11.4.6: Sa = 0.4·SDS(1 + 1.5 T/T0) below T0 is EN 1998-1 eq. (3.2)'s
    # ag·S(1 + T/TB(2.5η − 1)) at η = 1 with ag·S = 0.4 SDS, TB = T0; at another damping
    # EN 1998-1 §3.2.2.2 gives 0.4·SDS(1 + T/T0(2.5η − 1)), the ZPA unchanged at T = 0
    ref = 0.4 * (1 + T / t0 * (2.5 * eta - 1)) * 9.80665
    np.testing.assert_allclose(sa, ref, rtol=1e-9)


def test_ellipsoid_of_one_mode_is_its_segment():
    from groundshake.dynamics._spectrum_analysis import VON_MISES_FORM, ellipsoid_quadratic_max
    from groundshake.results._stress import von_mises
    y = np.array([3.0, -1.0, 0.5, 2.0, -0.7, 1.2])
    vm = np.sqrt(ellipsoid_quadratic_max(np.outer(y, y)[None], VON_MISES_FORM))
    # a rank-one covariance: the ellipsoid is the segment ±y (Menun & Der Kiureghian 2000),
    # so its largest von Mises is that of y itself, √(3 J2) (textbook invariant)
    assert vm[0] == pytest.approx(float(von_mises(y[:, None])[0]), rel=1e-9)


def test_ellipsoid_of_two_uncorrelated_components():
    from groundshake.dynamics._spectrum_analysis import VON_MISES_FORM, ellipsoid_quadratic_max
    a, b = 4.0, 3.0
    cov = np.zeros((1, 6, 6))
    cov[0, 0, 0], cov[0, 5, 5] = a * a, b * b        # σxx and τxy, uncorrelated
    vm2 = ellipsoid_quadratic_max(cov, VON_MISES_FORM)[0]
    # max of σ² + 3τ² on the ellipse (σ/a)² + (τ/b)² ≤ 1 is max(a², 3b²) (Lagrange, by hand)
    assert vm2 == pytest.approx(max(a * a, 3 * b * b), rel=1e-12)


def test_stress_envelope_never_exceeds_the_sign_bound():
    from groundshake.results._spectrum_run import stress_bounds, stress_envelope
    rng = np.random.default_rng(3)
    Y = rng.normal(size=(50, 6, 4))                  # 50 points, 4 modes (invented numbers)
    cov = np.einsum("pim,pjm->pij", Y, Y)            # SRSS of the modes
    peaks = np.sqrt(np.einsum("pii->pi", cov)).T
    vm, t1, _ = stress_envelope(peaks, cov)
    vm_box, t_box, _ = stress_bounds(peaks)
    # the ellipsoid lies inside the box of the component peaks (its axis extents are the
    # peaks), so its maxima cannot exceed the box's (common sense of the construction)
    assert np.all(vm <= vm_box * (1 + 1e-12)) and np.all(t1 <= t_box * (1 + 1e-12))
    # and each mode's own state lies inside it: von Mises at least each mode's (Y[:, :, m])
    from groundshake.results._stress import von_mises
    per_mode = np.max(von_mises(np.transpose(Y, (1, 0, 2))), axis=1)
    assert np.all(vm >= per_mode * (1 - 1e-9))
