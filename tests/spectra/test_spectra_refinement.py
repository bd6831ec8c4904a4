"""Refinement of coarse records: each period the same whatever else is asked, no step.

Sources:
- Shannon sampling theorem (common practice): a sampled record is read as the
  band-limited signal through its samples; that signal is the reference here.
- Independent band-limited reference: scipy.signal.resample (FFT) to 64 times the
  rate, then each oscillator by scipy.signal.cont2discrete(method="foh") (exact for
  a piecewise-linear input, docs/references.md §1) run with scipy.signal.lfilter.
- Issue 14 acceptance: continuous at 10·dt within 0.5 %, independent of the period
  set within 0.1 %.
- The record is invented test data (seeded noise with content up to the Nyquist
  frequency, under a smooth envelope, zero at both ends), like a coarse 50-Hz record.
"""
import numpy as np
import pytest
from scipy import signal

from groundshake import response_spectrum
from groundshake.spectra import refinement_factors

DT = 0.02
FINE = 64


def _coarse_record(seed=3, n=1501):
    """Invented 50-Hz test record [m/s²]: white noise, so content up to Nyquist."""
    rng = np.random.default_rng(seed)
    t = np.arange(n) * DT
    env = np.sin(np.pi * t / t[-1]) ** 4
    return env * rng.standard_normal(n)


def _band_limited_sa(acc, periods, xi=0.05):
    """Peak absolute acceleration of each oscillator under the band-limited record."""
    n = acc.size
    fine = signal.resample(acc, n * FINE)          # periodic FFT interpolation (ends are 0)
    h = DT / FINE
    out = []
    for T in periods:
        w = 2 * np.pi / T
        A = np.array([[0.0, 1.0], [-w * w, -2 * xi * w]])
        B = np.array([[0.0], [-1.0]])
        C = np.array([[-w * w, -2 * xi * w]])          # absolute acceleration
        Ad, Bd, Cd, Dd, _ = signal.cont2discrete((A, B, C, np.zeros((1, 1))), h, method="foh")
        b, a = signal.ss2tf(Ad, Bd, Cd, Dd)
        out.append(np.abs(signal.lfilter(b[0], a, fine)).max())
    return np.array(out), np.abs(fine).max()


def test_each_period_is_the_same_whatever_else_is_asked():
    acc = _coarse_record()
    alone = response_spectrum(acc, DT, [0.1], 0.05).sa[0, 0]
    with_short = response_spectrum(acc, DT, [0.04, 0.1], 0.05).sa[0, 1]
    with_many = response_spectrum(acc, DT, [0.011, 0.03, 0.1, 0.5, 3.0], 0.05).sa[0, 2]
    # issue 14: independent of the period set within 0.1 %
    assert with_short == pytest.approx(alone, rel=1e-3)
    assert with_many == pytest.approx(alone, rel=1e-3)


def test_no_step_at_ten_samples_per_period_or_where_the_factor_changes():
    acc = _coarse_record()
    # just below and above every change of factor (40·dt / m), 10·dt among them
    edges = [40 * DT / m for m in (1, 2, 4, 8)]
    assert 10 * DT in edges
    periods = np.sort(np.concatenate([[e * 0.995, e * 1.005] for e in edges]))
    assert len(set(refinement_factors(periods, DT).tolist())) == 5   # each change crossed
    ours = response_spectrum(acc, DT, periods, 0.05).sa[0]
    ref, _ = _band_limited_sa(acc, periods)
    # issue 14: within 0.5 % of the band-limited reference on both sides of each edge, so
    # the spectrum is continuous there within 0.5 % (the reference is continuous in T)
    np.testing.assert_allclose(ours, ref, rtol=5e-3)
    below, above = ours[0::2], ours[1::2]
    ref_below, ref_above = ref[0::2], ref[1::2]
    np.testing.assert_allclose(below / above, ref_below / ref_above, rtol=5e-3)


def test_without_refinement_the_step_is_real():
    # Phillips et al. 2012: under 10 samples a period the samples alone miss peaks; the
    # band-limited reference says how much (more than the 0.5 % allowed above)
    acc = _coarse_record()
    periods = np.array([0.1, 0.2])
    raw = response_spectrum(acc, DT, periods, 0.05, interpolate=False).sa[0]
    ref, _ = _band_limited_sa(acc, periods)
    assert np.max(np.abs(raw / ref - 1)) > 5e-3


def test_zero_period_value_is_the_band_limited_pga():
    acc = _coarse_record()
    s = response_spectrum(acc, DT, [0.002, 0.005], 0.05)
    _, pga_bl = _band_limited_sa(acc, [1.0])
    assert s.pga == np.abs(acc).max()                    # sample PGA: the samples' peak
    # Shannon (common practice): the band-limited peak, from scipy's 64-fold resampling;
    # 16-fold refinement: within 1 − cos(π/32) ≈ 0.5 % for content at the Nyquist frequency
    assert s.zero_period == pytest.approx(pga_bl, rel=5e-3)
    assert s.zero_period >= s.pga
    # Chopra §6.6: SA → PGA as T → 0, here the band-limited one (same refined record)
    assert s.sa[0, 0] == pytest.approx(s.zero_period, rel=5e-3)
    raw = response_spectrum(acc, DT, [0.002], 0.05, interpolate=False)
    assert raw.zero_period == raw.pga                    # as given: the sample PGA
    assert raw.sa[0, 0] == pytest.approx(raw.pga, rel=5e-3)  # Chopra §6.6


def test_refinement_factors_follow_the_rule():
    # the rule stated in docs/guide/spectra.md: smallest power of two giving 40 samples a period,
    # at most 16 (40·dt/T = 40, 4.0, 1.0, 0.4 and 2000 samples short)
    f = refinement_factors([DT, 10 * DT, 40 * DT, 100 * DT, 0.02 * DT], DT)
    assert f.tolist() == [16, 4, 1, 1, 16]


def test_rotd_short_period_limit_is_its_band_limited_pga():
    from groundshake.spectra import rotd

    a1, a2 = _coarse_record(seed=4), _coarse_record(seed=5)
    r = rotd(a1, a2, DT, [0.002, 0.1], 0.05, (50, 100))
    # Chopra §6.6 at every angle: a rigid oscillator follows the ground, so RotDnn of SA
    # (PSA ≈ SA there) tends to RotDnn of the PGA of the same (band-limited) record
    np.testing.assert_allclose(r.psa[:, 0, 0], r.zero_period, rtol=5e-3)
    assert np.all(r.zero_period >= r.pga * (1 - 1e-12))   # the samples lie on the signal
    # issue 14: a period's value does not depend on the other periods (0.1 %)
    alone = rotd(a1, a2, DT, [0.1], 0.05, (50, 100)).psa[:, 0, 0]
    np.testing.assert_allclose(r.psa[:, 0, 1], alone, rtol=1e-3)
