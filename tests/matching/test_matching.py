"""Spectral matching by corrective wavelets.

Sources of the expected values:
- scipy.signal.cont2discrete(method="foh"): the exact discretisation of
  x'' + 2ξωx' + ω²x = -a(t) for piecewise-linear a(t), used as an independent
  reference for every response and spectrum below (no groundshake kernel involved).
- ASCE 7-16 §11.4.6 (design response spectrum shape) and EN 1998-1:2004 §3.2.2.2
  (elastic response spectrum, type 1, ground C), evaluated here in closed form.
- Gaussian integral ∫cos(ωt)exp(-t²/γ²)dt = γ√π·exp(-ω²γ²/4) (Abramowitz & Stegun 7.4.6).
- Al Atik & Abrahamson (2010), Earthquake Spectra 26(3): the tapered-cosine wavelet
  adds (almost) no velocity or displacement.
- USNRC SRP 3.7.1 acceptance limits (10 % below, 30 % above, 9 adjacent points), from
  memory; "near zero" end velocity/displacement is common practice.
- Real record: ObsPy's bundled K-NET test file (AKT013, E-W, 100 Hz).
"""
from __future__ import annotations

import os
import warnings

import numpy as np
import pytest
from scipy.integrate import trapezoid

from _oracles import asce7_psa, psa_foh, sdof_foh

from groundshake._errors import GroundshakeWarning, InputError
from groundshake.records import STANDARD_GRAVITY as G
from groundshake.records import Record

spectra = pytest.importorskip("groundshake.spectra")
if not hasattr(spectra, "oscillator_history"):
    pytest.skip("the spectra kernel is not exported yet", allow_module_level=True)

from groundshake.matching import (AcceptanceCriteria, acceptance_checks, husid,  # noqa: E402
                                  match_spectrum, match_spectrum_report)
from groundshake.matching._wavelets import (add_wavelets, response_matrix,  # noqa: E402
                                            wavelet_parameters, wavelet_shapes)


# -- independent reference (scipy only) -------------------------------------------------






def en1998_psa(T, ag=0.3, damping_percent=5.0):
    """EN 1998-1 §3.2.2.2 type 1, ground C (S=1.15, TB=0.2, TC=0.6, TD=2.0) [m/s²]."""
    S, tb, tc, td = 1.15, 0.2, 0.6, 2.0
    eta = max(np.sqrt(10 / (5 + damping_percent)), 0.55)
    T = np.asarray(T, dtype=float)
    se = np.where(T <= tb, ag * S * (1 + T / tb * (2.5 * eta - 1)),
                  np.where(T <= tc, 2.5 * ag * S * eta,
                           np.where(T <= td, 2.5 * ag * S * eta * tc / T,
                                    2.5 * ag * S * eta * tc * td / T**2)))
    return se * G


@pytest.fixture(scope="module")
def knet():
    """ObsPy's bundled K-NET record, corrected with the project's own processing."""
    obspy = pytest.importorskip("obspy")
    from groundshake.processing import correct_record
    from groundshake.records import read_record
    path = os.path.join(os.path.dirname(obspy.__file__), "io", "nied", "tests", "data",
                        "test.knet")
    rec = read_record(path)[0]
    # Keep the test fast: the strong part only (first 30 s), then the usual correction.
    rec = rec.replace(acc=rec.acc[:3000])
    return correct_record(rec)


# -- the wavelet ------------------------------------------------------------------------
def test_wavelet_integrates_to_almost_zero():
    omega = 2 * np.pi / np.array([0.05, 0.3, 1.0, 4.0])
    zeta = np.full(4, 0.05)
    dt = 0.001
    wd, _, gamma = wavelet_parameters(omega, zeta)
    shapes = wavelet_shapes(omega, zeta, dt)
    for f, w, g in zip(shapes, wd, gamma):
        # Gaussian integral (Abramowitz & Stegun 7.4.6); the cut at ±3γ adds < 1e-4·γ.
        exact = g * np.sqrt(np.pi) * np.exp(-(w * g) ** 2 / 4)
        assert trapezoid(f, dx=dt) == pytest.approx(exact, abs=2e-4 * g)
        # Al Atik & Abrahamson (2010): negligible velocity, |∫f| ≪ ∫|f|.
        assert abs(trapezoid(f, dx=dt)) < 1e-3 * trapezoid(np.abs(f), dx=dt)


def test_response_matrix_matches_scipy_reference():
    dt, n_t = 0.01, 4000
    periods = np.array([0.1, 0.25, 0.6, 1.5])
    omega, zeta = 2 * np.pi / periods, np.array([0.05, 0.05, 0.02, 0.05])
    anchors = np.array([1500, 2100, 1800, 2500])  # wavelets whole inside the record
    C = response_matrix(dt, omega, zeta, anchors)
    for j in range(4):
        amp = np.zeros(4)
        amp[j] = 1.0
        acc = add_wavelets(n_t, dt, omega, zeta, anchors, amp)
        for i in range(4):
            ref = sdof_foh(acc, dt, 2 * np.pi / periods[i], zeta[i])[:, 0][anchors[i]]
            # scipy cont2discrete foh reference, 1e-9 of the column's largest term
            # (measured 3e-12).
            assert C[i, j] == pytest.approx(ref, abs=1e-9 * np.max(np.abs(C[:, j])) + 1e-15)


# -- matching ---------------------------------------------------------------------------
def test_record_already_on_target_is_unchanged(knet):
    periods = np.geomspace(0.1, 2.0, 12)
    target = psa_foh(knet.acc, knet.dt, periods, 0.05)  # scipy foh reference spectrum
    res = match_spectrum_report(knet, target, 0.05, periods, tolerance=0.02)
    assert res.converged and res.status == "converged"
    assert len(res.iterations) == 1  # nothing to do: iteration 0 only
    n_pad = int(round(res.pad_s / knet.dt))
    core = res.record.acc[n_pad:n_pad + knet.n]
    # Unchanged apart from the pads: the only change allowed is the pre-scale, which is
    # 1 to within the kernel-vs-scipy agreement (1e-9 asked, scipy foh reference;
    # measured 3e-13).
    assert res.scale_factor == pytest.approx(1.0, abs=1e-9)
    np.testing.assert_allclose(core, knet.acc, rtol=0, atol=1e-9 * np.max(np.abs(knet.acc)))
    assert np.all(res.record.acc[:n_pad] == 0) and np.all(res.record.acc[n_pad + knet.n:] == 0)


@pytest.mark.parametrize("shape", ["asce7", "en1998"])
def test_real_record_matches_code_shape(knet, shape):
    periods = np.geomspace(0.15, 2.0, 20)  # ≥ 15 samples per period at dt = 0.01 s
    target = asce7_psa(periods) if shape == "asce7" else en1998_psa(periods)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        res = match_spectrum_report(knet, target, 0.05, periods, tolerance=0.05)
    assert res.converged, res.iterations[-1]
    # Convergence is reported per iteration, and the final max misfit is the last entry.
    assert res.iterations[-1]["max_misfit"] <= 0.05
    assert res.iterations[0]["max_misfit"] > res.iterations[-1]["max_misfit"]
    # Independent check: the scipy foh reference spectrum of the result meets the target
    # within the 5 % tolerance (+0.1 % for peak sampling differences).
    psa = psa_foh(res.record.acc, res.record.dt, periods, 0.05)
    assert np.max(np.abs(psa / target - 1)) <= 0.051
    # Baseline integrity (common practice: final velocity and displacement near zero).
    from groundshake.processing import integrate
    vel, disp = integrate(res.record.acc, res.record.dt)
    assert abs(vel[-1]) <= 0.01 * np.max(np.abs(vel))
    assert abs(disp[-1]) <= 0.05 * np.max(np.abs(disp))
    # The acceptance report carries the SRP 3.7.1-style figures (from memory).
    acc = res.acceptance
    assert acc["largest_shortfall"] <= 0.10 and acc["largest_excess"] <= 0.30
    for key in ("pga", "pgv", "pgd", "arias_intensity", "d5_95"):
        assert acc["measures"]["before"][key] > 0 and acc["measures"]["after"][key] > 0
    assert 0 <= acc["husid_max_change"] <= 1  # difference of two curves from 0 to 1


def test_two_damping_values_at_once(knet):
    periods = np.geomspace(0.15, 1.5, 10)
    damping = [0.02, 0.05]
    # EN 1998-1 §3.2.2.2: the 2 % spectrum is the 5 % one times η = √(10/7).
    target = np.vstack([en1998_psa(periods, damping_percent=2), en1998_psa(periods)])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        res = match_spectrum_report(knet, target, damping, periods, tolerance=0.05)
    assert res.psa_after.shape == (2, periods.size)
    assert res.converged, res.iterations[-1]
    for k, z in enumerate(damping):  # scipy foh reference at each damping
        psa = psa_foh(res.record.acc, res.record.dt, periods, z)
        assert np.max(np.abs(psa / target[k] - 1)) <= 0.051


def test_impossible_target_is_reported(knet):
    # Neighbouring periods 1.5 % apart respond almost alike (the spectrum is a smooth
    # function of period; Chopra, Dynamics of Structures, ch. 6), so a target that
    # alternates by a factor of 3 between them cannot be met.
    periods = np.geomspace(0.3, 0.35, 10)
    target = asce7_psa(periods) * np.where(np.arange(10) % 2, 3.0, 1.0)
    with pytest.warns(GroundshakeWarning, match="not converged|stalled"):
        res = match_spectrum_report(knet, target, 0.05, periods, max_iterations=4)
    assert not res.converged
    assert res.status in ("not converged", "stalled")
    assert res.max_misfit > 0.05
    assert any("not converged" in h or "stalled" in h for h in res.record.history)
    # match_spectrum keeps the same contract: a Record, and the warning is not hidden.
    with pytest.warns(GroundshakeWarning):
        out = match_spectrum(knet, target, 0.05, periods, max_iterations=2)
    assert isinstance(out, Record)


@pytest.mark.parametrize("kwargs, message", [
    ({"band": (2.0, 0.1)}, "band"),
    ({"damping": 5.0}, "damping"),
    ({"tolerance": 0.0}, "tolerance"),
    ({"periods": [0.01, 0.5]}, "Nyquist"),
])
def test_bad_options_raise_input_error(knet, kwargs, message):
    damping = kwargs.pop("damping", 0.05)
    periods = kwargs.pop("periods", [0.2, 0.5])
    with pytest.raises(InputError, match=message):
        match_spectrum_report(knet, lambda T: asce7_psa(T), damping, periods, **kwargs)


def test_target_shape_mismatch_is_input_error(knet):
    with pytest.raises(InputError, match="target"):
        match_spectrum_report(knet, np.ones(3), 0.05, [0.2, 0.5])
    with pytest.raises(InputError, match="one target per damping"):
        match_spectrum_report(knet, lambda T: asce7_psa(T), [0.02, 0.05], [0.2, 0.5])


# -- acceptance figures -----------------------------------------------------------------
def test_acceptance_figures_by_hand():
    target = np.ones((1, 12))
    psa = np.array([[1.0, 0.95, 0.97, 0.99, 1.1, 1.2, 0.85, 1.0, 1.35, 0.9, 0.99, 1.0]])
    dt = 0.01
    t = np.arange(1000) * dt
    acc = np.sin(2 * np.pi * t)
    out = acceptance_checks(psa=psa, target_psa=target, acc_before=acc, acc_after=acc, dt=dt)
    # Counted by hand from the ratios above.
    assert out["largest_shortfall"] == pytest.approx(0.15)
    assert out["largest_excess"] == pytest.approx(0.35)
    assert out["points_below"] == 6
    assert out["longest_run_below"] == 3
    assert out["husid_max_change"] == 0.0
    # SRP 3.7.1 limits (from memory): 15 % below and 35 % above both fail; 3 ≤ 9 passes.
    assert out["checks"] == {"shortfall": False, "excess": False, "adjacent_below": True,
                             "husid_change": True}
    assert not out["passed"]
    loose = AcceptanceCriteria(max_shortfall=0.2, max_excess=0.4)
    assert acceptance_checks(psa=psa, target_psa=target, acc_before=acc, acc_after=acc,
                             dt=dt, criteria=loose)["passed"]


def test_husid_of_a_sine_is_linear():
    # ∫₀ᵗ sin²(2πτ)dτ = t/2 - sin(4πt)/(8π): at whole and half cycles H = t/T exactly
    # (closed form).
    dt = 0.001
    t = np.arange(10001) * dt  # 10 s, 10 cycles
    h = husid(np.sin(2 * np.pi * t), dt)
    for k in (1000, 2500, 5000, 7500):
        assert h[k] == pytest.approx(t[k] / 10.0, abs=1e-6)


def test_drifting_input_gets_a_recorded_baseline_correction():
    obspy = pytest.importorskip("obspy")
    from groundshake.processing import integrate
    from groundshake.records import read_record
    path = os.path.join(os.path.dirname(obspy.__file__), "io", "nied", "tests", "data",
                        "test.knet")
    rec = read_record(path)[0]
    rec = rec.replace(acc=rec.acc[:3000] - np.mean(rec.acc[:3000]))  # mean removed only
    periods = np.geomspace(0.2, 1.5, 8)
    with pytest.warns(GroundshakeWarning, match="correct the record"):
        res = match_spectrum_report(rec, asce7_psa(periods), 0.05, periods, tolerance=0.1)
    # Common practice: a motion must end at rest; the drift is corrected and recorded.
    assert res.baseline_corrected
    assert any("baseline correction" in h for h in res.record.history)
    assert res.iterations[-1]["iteration"] == "baseline"
    vel, disp = integrate(res.record.acc, res.record.dt)
    # The correction solves a 2×2 system for zero final velocity and displacement under
    # exact piecewise-linear integration (closed form): round-off, 1e-9 of the peaks.
    assert abs(vel[-1]) <= 1e-9 * np.max(np.abs(vel))
    assert abs(disp[-1]) <= 1e-9 * np.max(np.abs(disp))
