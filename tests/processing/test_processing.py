"""Correction, integration, resampling and intensity measures against outside sources.

Sources named beside each check: closed forms of integrals of sines (calculus), the
Arias intensity / CAV closed forms of docs/references.md §3 (Arias 1970; EPRI 1988, 1991),
the Husid-curve definition of significant duration (Trifunac & Brady 1975), Rathje et
al. (1998) mean period, Butterworth's definition (half power, -3.01 dB, at the corner;
|H|² = 1/(1 + (f/fc)^±2n)), forward-backward filtering squares the gain and has zero
phase (common practice; scipy.signal.sosfiltfilt documentation), Boore (2005) pad
length 1.5·n/fc, Boore & Bommer (2005) velocity-baseline correction, the sampling
theorem (band-limited periodic signals are recovered exactly by Fourier
interpolation), Phillips et al. (2012) ten samples per period, scipy.integrate and
obspy.signal.konnoohmachismoothing as independent implementations.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate as spint
from scipy import signal

from groundshake import InputError
from groundshake.processing import (ProcessingSettings, arias_intensity, butterworth_sos,
                                    correct_record, cumulative_absolute_velocity, ensure_sampling,
                                    fourier_amplitude, integrate, intensity_measures, mean_period,
                                    pad_samples, resample, significant_duration, standardized_cav)
from groundshake.records import STANDARD_GRAVITY, Record

G = 9.80665  # CGPM 1901


def _sine(amplitude=1.0, f=2.0, duration=10.0, dt=0.001):
    t = np.arange(int(round(duration / dt)) + 1) * dt
    return t, amplitude * np.sin(2 * np.pi * f * t)


# -- closed forms for a whole-cycle sine (docs/references.md §3) ------------------------------

def test_arias_and_cav_of_a_sine():
    A, D = 3.0, 10.0
    t, a = _sine(A, 2.0, D)
    ia = arias_intensity(a, 0.001)
    cav = cumulative_absolute_velocity(a, 0.001)
    # Ia = π A² D / (4 g) (Arias 1970 with ∫sin² over whole cycles = D/2); 1 % asked, 1e-4 held
    assert ia == pytest.approx(math.pi * A ** 2 * D / (4 * G), rel=1e-4)
    # CAV = 2 A D / π (EPRI 1988 with the mean of |sin| = 2/π); 1 % asked, 1e-4 held
    assert cav == pytest.approx(2 * A * D / math.pi, rel=1e-4)


def test_durations_of_a_uniform_sine():
    D = 10.0
    t, a = _sine(1.0, 2.0, D)
    # Husid curve of a uniform sine is t/D up to a ripple of 1/(2ω) in time (calculus),
    # so D5-95 = 0.9 D and D5-75 = 0.7 D (Trifunac & Brady 1975 definition), ±0.05 s
    assert significant_duration(a, 0.001, 0.05, 0.95) == pytest.approx(0.9 * D, abs=0.05)
    assert significant_duration(a, 0.001, 0.05, 0.75) == pytest.approx(0.7 * D, abs=0.05)


def test_peaks_and_bracketed_duration_of_a_sine():
    A, f, D, dt = 0.1 * G, 2.0, 10.0, 0.001
    t, a = _sine(A, f, D, dt)
    m = intensity_measures(Record(acc=a, dt=dt))
    w = 2 * math.pi * f
    assert m["pga"] == pytest.approx(A, rel=1e-5)  # peak of A sin ωt
    # crests of |sin| at T/4 + k·T/2 (all equal: any of them), within a step
    phase = (m["pga_time"] - 1 / (4 * f)) % (1 / (2 * f))
    assert min(phase, 1 / (2 * f) - phase) <= dt
    # v = A/ω (1 - cos ωt): peak 2A/ω first at t = T/2 (calculus)
    assert m["pgv"] == pytest.approx(2 * A / w, rel=1e-4)  # 1e-4: sampling at ωΔt = 0.013
    phase = (m["pgv_time"] - 1 / (2 * f)) % (1 / f)  # at T/2 + k·T
    assert min(phase, 1 / f - phase) <= dt
    # u = A/ω (t - sin ωt / ω): largest at the end, A D / ω (calculus)
    assert m["pgd"] == pytest.approx(A * D / w, rel=1e-4)
    # |a| ≥ 0.05 g first where sin = 1/2 (t = T/12) and last T/12 before the end
    assert m["bracketed_duration"] == pytest.approx(D - 1 / (6 * f), abs=2 * dt)


def test_standardized_cav_windows():
    dt, f = 0.001, 2.0
    t, s = _sine(1.0, f, 10.0, dt)
    strong = np.where(t < 5.0, 0.03 * G, 0.02 * G) * s  # 0.03 g for 5 s, then 0.02 g
    # EPRI (1991): only 1-s windows with a peak above 0.025 g count; there the
    # integral is the sine's 2AD/π over the first 5 s (calculus), 1 %
    assert standardized_cav(strong, dt) == pytest.approx(2 * 0.03 * G * 5.0 / math.pi, rel=0.01)
    assert standardized_cav(0.02 * G * s, dt) == 0.0  # never above 0.025 g (EPRI 1991)
    # every window above the threshold: standardized CAV equals CAV (definition)
    assert standardized_cav(0.05 * G * s, dt) == pytest.approx(
        cumulative_absolute_velocity(0.05 * G * s, dt), rel=1e-12)


def test_mean_period_of_two_tones():
    dt, n = 0.005, 4096  # tones on exact FFT bins: no leakage
    f1 = 20 / (n * dt)
    t = np.arange(n) * dt
    a = np.sin(2 * np.pi * f1 * t) + 0.5 * np.sin(2 * np.pi * 4 * f1 * t)
    # Rathje et al. (1998): Tm = Σ C² (1/f) / Σ C²; C ∝ amplitudes 1 and 0.5, so
    # Tm = (1/f1)(1 + 0.25/4)/(1 + 0.25) = 0.85/f1 (closed form), 1e-9
    assert mean_period(a, dt) == pytest.approx(0.85 / f1, rel=1e-9)


# -- integration ------------------------------------------------------------------------

def test_integrate_exact_for_linear_acceleration():
    dt, a0, b = 0.01, 0.3, -0.7
    t = np.arange(501) * dt
    vel, disp = integrate(a0 + b * t, dt)
    # v = a0 t + b t²/2, u = a0 t²/2 + b t³/6 (calculus); exact to round-off
    np.testing.assert_allclose(vel, a0 * t + b * t ** 2 / 2, atol=1e-12)
    np.testing.assert_allclose(disp, a0 * t ** 2 / 2 + b * t ** 3 / 6, atol=1e-12)


def test_integrate_matches_scipy_and_broadcasts():
    rng = np.random.default_rng(3)
    a = rng.standard_normal((2, 3, 300))
    vel, disp = integrate(a, 0.02)
    # scipy's cumulative trapezoid is exact for piecewise-linear acceleration
    np.testing.assert_allclose(vel, spint.cumulative_trapezoid(a, dx=0.02, axis=-1, initial=0),
                               atol=1e-12)
    # displacement of piecewise-linear acceleration: the exact integral of the velocity,
    # a cubic between samples — Simpson's rule on each step is exact for cubics (scipy-free
    # closed form: u' = v, so Δu = dt (v0 + v1)/2 - dt² (a1 - a0)/12)
    du = 0.02 * (vel[..., :-1] + vel[..., 1:]) / 2 - 0.02 ** 2 * (a[..., 1:] - a[..., :-1]) / 12
    np.testing.assert_allclose(disp[..., 1:], np.cumsum(du, axis=-1), atol=1e-12)
    v1, d1 = integrate(a[1, 2], 0.02)
    np.testing.assert_array_equal(v1, vel[1, 2])  # (..., n) handled row by row


# -- correction -------------------------------------------------------------------------

def _burst(dt=0.01, duration=60.0):
    """A windowed two-tone burst whose velocity and displacement return to zero."""
    t = np.arange(int(round(duration / dt)) + 1) * dt
    env = np.exp(-((t - 20.0) / 4.0) ** 2)
    return t, env * (np.sin(2 * np.pi * 1.5 * t) + 0.5 * np.sin(2 * np.pi * 4.0 * t))


def test_polynomial_drift_is_removed():
    dt = 0.01
    t, clean = _burst(dt)
    drift = 0.02 - 0.0008 * t  # acceleration drift: velocity drift 0.02 t - 0.0004 t²
    rec = Record(acc=clean + drift, dt=dt)
    v_raw, u_raw = integrate(rec.acc, dt)
    out = correct_record(rec, ProcessingSettings(baseline_order=2, highpass_hz=0.05))
    vel, disp = integrate(out.acc, dt)
    v_clean, u_clean = integrate(clean, dt)
    pgv = np.abs(v_clean).max()
    pgd = np.abs(u_clean).max()
    assert abs(v_raw[-1]) > 0.5 * pgv  # the drift is large before correction
    # Boore & Bommer (2005): after the baseline and low-cut filter, velocity and
    # displacement return near zero at the end of the (padded) record
    assert abs(vel[-1]) < 1e-3 * pgv
    assert abs(disp[-1]) < 1e-2 * pgd
    # and the motion itself is kept: peak velocity within 5 % of the clean record's
    assert np.abs(vel).max() == pytest.approx(pgv, rel=0.05)


def test_pre_event_mean():
    dt = 0.01
    t, clean = _burst(dt)
    rec = Record(acc=clean + 0.37, dt=dt)  # the burst is ~0 before 5 s
    out = correct_record(rec, ProcessingSettings(mean_removal="pre-event", pre_event_s=4.0,
                                                 baseline_order=None, highpass_hz=None,
                                                 taper_percent=0.0))
    # subtracting the pre-event mean of a constant offset restores the clean record
    np.testing.assert_allclose(out.acc, clean, atol=1e-6)


def test_butterworth_minus_3db_at_corner():
    dt, n = 0.005, 4
    for kw, corners in (({"highpass_hz": 0.2}, [0.2]), ({"lowpass_hz": 25.0}, [25.0]),
                        ({"highpass_hz": 0.1, "lowpass_hz": 30.0}, [0.1, 30.0])):
        sos = butterworth_sos(dt, order=n, **kw)
        _, h = signal.sosfreqz(sos, worN=np.array(corners), fs=1 / dt)
        # Butterworth's definition: one pass has |H| = 1/√2 (-3.01 dB) at each corner;
        # held to 1 % of the magnitude (the tolerance), 1e-6 in fact
        np.testing.assert_allclose(np.abs(h), 2 ** -0.5, rtol=1e-6)
        # forward-backward (acausal) squares it: one half, -6.02 dB
        np.testing.assert_allclose(np.abs(h) ** 2, 0.5, rtol=1e-6)
    sos = butterworth_sos(dt, highpass_hz=0.2, order=n)
    _, h = signal.sosfreqz(sos, worN=np.array([0.1]), fs=1 / dt)
    # Butterworth high-pass: |H|² = 1/(1 + (fc/f)^(2n)) → at fc/2, 1/(1 + 2^8) (closed form)
    assert abs(h[0]) ** 2 == pytest.approx(1 / (1 + 2 ** 8), rel=1e-4)


def test_acausal_filter_halves_a_sine_at_the_corner_without_phase_shift():
    dt, fc = 0.01, 0.5
    t = np.arange(40001) * dt  # 400 s of a steady sine at the corner
    a = np.sin(2 * np.pi * fc * t)
    out = correct_record(Record(acc=a, dt=dt), ProcessingSettings(
        highpass_hz=fc, baseline_order=None, taper_percent=0.0, pad=False))
    mid = slice(10000, 30000)
    basis = np.column_stack([np.sin(2 * np.pi * fc * t[mid]), np.cos(2 * np.pi * fc * t[mid])])
    (s, c), *_ = np.linalg.lstsq(basis, out.acc[mid], rcond=None)
    # forward-backward Butterworth: gain |H(fc)|² = 1/2 (Butterworth's definition), 1 %
    assert math.hypot(s, c) == pytest.approx(0.5, rel=0.01)
    # zero phase (forward-backward filtering, scipy sosfiltfilt docs): 0.01 rad
    assert abs(math.atan2(c, s)) < 0.01


def test_pads_are_kept_and_sized_per_boore_2005():
    dt = 0.01
    t, clean = _burst(dt)
    rec = Record(acc=clean, dt=dt)
    for fc, n in ((0.1, 4), (0.05, 2)):
        out = correct_record(rec, ProcessingSettings(highpass_hz=fc, filter_order=n))
        total = (out.n - rec.n) * dt
        # Boore (2005): pads of about 1.5·n/fc in total; we round each half up to a sample
        assert 1.5 * n / fc <= total <= 1.5 * n / fc + 2 * dt
        assert out.metadata["pad_before_s"] == pytest.approx(total / 2)
        assert pad_samples(dt, fc, n) * 2 * dt == pytest.approx(total)
        # the pads are kept: the padded record is returned (Boore 2005)
        assert out.n > rec.n and len(out.history) == 5


def test_defaults_and_history():
    s = ProcessingSettings()
    # defaults as published practice (Boore & Bommer 2005 style low-cut, order 4)
    assert (s.highpass_hz, s.filter_order, s.baseline_order, s.taper_percent, s.pad) == \
        (0.1, 4, 1, 5.0, True)
    assert "Boore" in s.describe()
    t, a = _burst()
    out = correct_record(Record(acc=a + 0.1, dt=0.01))
    assert [h.split()[0] for h in out.history] == ["removed", "removed", "cosine", "zero",
                                                   "acausal"]
    raw = correct_record(Record(acc=a, dt=0.01), ProcessingSettings(enabled=False))
    np.testing.assert_array_equal(raw.acc, a)  # --raw: exactly as read


@pytest.mark.parametrize("kw, key", [
    ({"baseline_order": 7}, "baseline_order"), ({"highpass_hz": -1.0}, "highpass_hz"),
    ({"highpass_hz": 1.0, "lowpass_hz": 0.5}, "lowpass_hz"), ({"filter_order": 0}, "filter_order"),
    ({"taper_percent": 60.0}, "taper_percent"), ({"mean_removal": "median"}, "mean_removal"),
    ({"mean_removal": "pre-event"}, "pre_event_s"), ({"pad": "yes"}, "pad"),
])
def test_settings_validation_names_the_key(kw, key):
    with pytest.raises(InputError, match=f"processing.{key}"):
        ProcessingSettings(**kw)


def test_settings_from_dict_rejects_unknown_keys():
    with pytest.raises(InputError, match="highpass_hz"):
        ProcessingSettings.from_dict({"high_pass": 0.1})
    assert ProcessingSettings.from_dict({"highpass_hz": 0.2}).highpass_hz == 0.2


def test_corner_above_nyquist_refused():
    with pytest.raises(InputError, match="Nyquist"):
        correct_record(Record(acc=np.ones(100), dt=0.02), ProcessingSettings(lowpass_hz=30.0))


# -- resampling -------------------------------------------------------------------------

def test_fourier_resampling_is_exact_for_band_limited_periodic_signal():
    dt = 0.02
    t = np.arange(500) * dt  # 10 s: whole cycles of 3 Hz and 7 Hz (periodic)
    a = np.sin(2 * np.pi * 3 * t) + 0.3 * np.cos(2 * np.pi * 7 * t)
    out = resample(Record(acc=a, dt=dt), 0.005)
    tt = out.time
    # sampling theorem: below Nyquist (25 Hz) the periodic signal is recovered exactly
    np.testing.assert_allclose(out.acc, np.sin(2 * np.pi * 3 * tt) + 0.3 * np.cos(2 * np.pi * 7 * tt),
                               atol=1e-10)
    assert out.dt == 0.005 and out.n == 2000


def test_ensure_sampling_ten_per_period():
    rec = Record(acc=np.sin(np.arange(400) / 3.0), dt=0.02)
    # Phillips et al. (2012): at least 10 samples per shortest period
    out = ensure_sampling(rec, 0.05)
    assert out.dt == pytest.approx(0.005) and out.dt <= 0.05 / 10
    assert ensure_sampling(rec, 0.5) is rec  # already fine enough


# -- Fourier amplitude spectrum ------------------------------------------------------------

def test_konno_ohmachi_matches_obspy():
    from obspy.signal.konnoohmachismoothing import konno_ohmachi_smoothing

    rng = np.random.default_rng(5)
    a = rng.standard_normal(1500)
    raw = fourier_amplitude(a, 0.01)
    fs = fourier_amplitude(a, 0.01, centres=raw.frequency, bandwidth=30.0)
    ref = konno_ohmachi_smoothing(raw.amplitude, raw.frequency, bandwidth=30.0, normalize=True)
    # ObsPy's implementation (independent code), to round-off
    np.testing.assert_allclose(fs.smoothed, ref, rtol=1e-10)


def test_fourier_amplitude_of_a_sine():
    dt, A, f, D = 0.01, 2.0, 5.0, 20.0
    t = np.arange(int(D / dt)) * dt
    fa = fourier_amplitude(A * np.sin(2 * np.pi * f * t), dt)
    k = int(np.argmax(fa.amplitude))
    # continuous Fourier transform of a whole-cycle sine: |X(f0)| = A·D/2 (calculus), 1 %
    assert fa.frequency[k] == pytest.approx(f)
    assert fa.amplitude[k] == pytest.approx(A * D / 2, rel=0.01)


def test_standard_gravity_used_for_g_thresholds():
    dt = 0.001
    # 0.05 g bracket uses g = 9.80665 m/s² (CGPM 1901): a plateau just above / below it
    just_above = np.r_[np.zeros(50), np.full(100, 0.05 * 9.80665 * (1 + 1e-9)), np.zeros(50)]
    just_below = np.r_[np.zeros(50), np.full(100, 0.05 * 9.80665 * (1 - 1e-6)), np.zeros(50)]
    assert intensity_measures(Record(acc=just_above, dt=dt))["bracketed_duration"] == \
        pytest.approx(99 * dt)
    assert intensity_measures(Record(acc=just_below, dt=dt))["bracketed_duration"] == 0.0
    assert STANDARD_GRAVITY == G
