"""Response spectra: definitions, limits and interpolation, checked against outside facts.

Sources:
- Chopra, Dynamics of Structures, §6.6: PSV = ωn·D, PSA = ωn²·D; SA → PGA as Tn → 0
  (rigid oscillator), SD → PGD as Tn → ∞ is not tested (needs very long records).
- Phillips, Kottke, Hashash & Rathje (2012): ten samples per period or interpolate.
- Shannon sampling theorem (common practice): a band-limited signal is recovered
  between its samples by Fourier interpolation.
- Each record here is invented test data (sums of sines or seeded noise).
"""
import warnings

import numpy as np
import pytest

from groundshake import GroundshakeWarning, InputError, response_spectrum
from groundshake.spectra import default_periods, fourier_upsample, oscillator_peaks


def _smooth_record(dt, duration=20.0):
    """Invented test record: a few sines below 5 Hz under a smooth envelope [m/s²]."""
    t = np.arange(0, duration, dt)
    env = np.sin(np.pi * t / duration) ** 2
    return env * (1.2 * np.sin(2 * np.pi * 1.1 * t) + 0.7 * np.sin(2 * np.pi * 3.3 * t + 1)
                  + 0.3 * np.sin(2 * np.pi * 4.7 * t + 2))


def test_pseudo_spectra_are_omega_times_sd():
    dt = 0.01
    s = response_spectrum(_smooth_record(dt), dt, [0.05, 0.2, 1.0, 3.0], [0.0, 0.05, 0.2])
    w = 2 * np.pi / s.periods
    np.testing.assert_array_equal(s.psa, s.sd * w ** 2)   # Chopra §6.6: PSA = ωn² D exactly
    np.testing.assert_array_equal(s.psv, s.sd * w)        # Chopra §6.6: PSV = ωn D exactly
    assert s.psa.shape == (3, 4)                          # DESIGN.md: (n_damping, n_periods)


def test_sa_tends_to_pga_at_short_periods():
    dt = 0.005
    acc = _smooth_record(dt)
    s = response_spectrum(acc, dt, [0.01, 0.02], [0.02, 0.05])
    assert s.pga == pytest.approx(np.abs(acc).max())
    # Chopra §6.6: a rigid oscillator moves with the ground, SA → PGA; the record has
    # no content above 5 Hz, so at 100 Hz within 0.5 %
    np.testing.assert_allclose(s.sa[:, 0], s.pga, rtol=5e-3)
    # SA ≥ PSA: at the displacement peak u̇ = 0, so |ü^t| = ωn²|u| there (equation of
    # motion, Chopra §6.6); 0.1 % allowed because peaks are taken at samples
    assert np.all(s.sa >= s.psa * (1 - 1e-3))


def test_stacked_records_equal_one_at_a_time():
    dt = 0.01
    a = _smooth_record(dt, 8.0)
    b = np.roll(a, 100) * 0.5
    both = response_spectrum(np.stack([[a, b], [b, a]]), dt, [0.1, 0.5, 2.0], [0.02, 0.05])
    one = response_spectrum(b, dt, [0.1, 0.5, 2.0], [0.02, 0.05])
    assert both.sd.shape == (2, 2, 2, 3) and both.pga.shape == (2, 2)  # INTERNALS.md
    # linear systems, computed separately or together (common practice): same values
    np.testing.assert_allclose(both.sd[0, 1], one.sd, rtol=1e-12)
    np.testing.assert_allclose(both.sa[1, 0], one.sa, rtol=1e-12)
    # linearity (common practice): half the record, half the spectrum
    np.testing.assert_allclose(response_spectrum(a, dt, [0.5], 0.05).sd,
                               2 * response_spectrum(0.5 * a, dt, [0.5], 0.05).sd, rtol=1e-12)


def test_interpolation_recovers_the_finely_sampled_answer():
    # Phillips et al. 2012: at periods below 10·dt the sampled record misses peaks;
    # interpolation restores them. "Truth" = same band-limited motion sampled 20x finer.
    dt = 0.02
    fine = dt / 20
    t_f = np.arange(0, 10 + fine / 2, fine)
    f = 7.0
    acc_f = np.sin(np.pi * t_f / 10) ** 2 * np.sin(2 * np.pi * f * t_f)
    acc_c = acc_f[::20]
    periods = [0.04, 0.06, 0.1]
    truth = response_spectrum(acc_f, fine, periods, 0.05).sa
    interp = response_spectrum(acc_c, dt, periods, 0.05).sa
    raw = response_spectrum(acc_c, dt, periods, 0.05, interpolate=False).sa
    np.testing.assert_allclose(interp, truth, rtol=5e-3)   # Phillips et al. 2012
    assert np.max(np.abs(raw / truth - 1)) > 0.02          # without it the error is large


def test_fourier_upsample_recovers_a_band_limited_sine():
    # Shannon sampling theorem (common practice): exact between samples, away from ends
    dt, m = 0.01, 5
    t = np.arange(0, 5.0 + dt / 2, dt)
    x = np.sin(2 * np.pi * 3.0 * t + 0.3) + 0.5 * np.cos(2 * np.pi * 11.0 * t)
    y = fourier_upsample(x, m)
    tf = np.arange(y.size) * dt / m
    ref = np.sin(2 * np.pi * 3.0 * tf + 0.3) + 0.5 * np.cos(2 * np.pi * 11.0 * tf)
    inner = (tf > 0.5) & (tf < 4.5)
    assert np.abs(y - ref)[inner].max() < 2e-3       # sampling theorem, 0.2 % of amplitude
    np.testing.assert_allclose(y[::m], x, atol=1e-12)  # original samples kept


def test_default_period_grid():
    p = default_periods()
    # issue 3: about 100 log-spaced periods from 0.01 to 10 s
    assert p.size == 100 and p[0] == pytest.approx(0.01) and p[-1] == pytest.approx(10.0)
    assert np.allclose(np.diff(np.log(p)), np.log(1000) / 99)


def test_spectrum_agrees_with_the_kernel():
    # the spectrum is the kernel's peaks arranged (n_damping, n_periods) (INTERNALS.md);
    # the record as given (no refinement), so both see the same samples
    dt = 0.01
    acc = _smooth_record(dt, 5.0)
    s = response_spectrum(acc, dt, [0.2, 1.0], [0.02, 0.1], interpolate=False)
    k = oscillator_peaks(acc, dt, 2 * np.pi / np.array([0.2, 1.0, 0.2, 1.0]),
                         np.array([0.02, 0.02, 0.1, 0.1]))
    np.testing.assert_allclose(s.sd.ravel(), k.disp, rtol=1e-12)
    np.testing.assert_allclose(s.sv.ravel(), k.vel, rtol=1e-12)


@pytest.mark.parametrize("periods, damping, match", [
    ([0.0, 1.0], 0.05, "periods"),
    ([-0.5], 0.05, "periods"),
    ([np.nan], 0.05, "periods"),
    ([1.0], 1.0, "damping"),
    ([1.0], -0.01, "damping"),
    ([1.0], 5.0, "damping"),
])
def test_bad_periods_or_damping_raise(periods, damping, match):
    # issue 3: periods at or below 0 and damping outside [0, 1) are errors
    with pytest.raises(InputError, match=match):
        response_spectrum(np.zeros(10), 0.01, periods, damping)


def test_periods_longer_than_record_warn():
    with pytest.warns(GroundshakeWarning, match="exceed the record length"):
        response_spectrum(np.ones(101), 0.01, [0.5, 3.0], 0.05)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        response_spectrum(np.ones(1001), 0.01, [0.5, 3.0], 0.05)
