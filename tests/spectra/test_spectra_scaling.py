"""Scaling a record set to a target: factors against a hand calculation.

Sources: the rule of each standard as written in groundshake/spectra/_scaling.py (from
memory: ASCE 7-16 §16.2.3 0.2T–2.0T and 90 %; EN 1998-1 §3.2.3.1.2 0.2T1–2T1 and 90 %);
the arithmetic below is done by hand in the comments. The spectra are invented.
"""
import numpy as np
import pytest

from groundshake._errors import InputError
from groundshake.spectra._scaling import scale_to_target, set_statistic

T = np.array([0.1, 0.2, 0.5, 1.0, 2.0, 4.0])


def test_set_factor_of_two_flat_spectra():
    psa = np.array([[0.5] * 6, [1.0] * 6])
    r = scale_to_target(psa, T, np.ones(6), period=1.0, rule="asce7-16", mode="set")
    # mean 0.75; the least f with f·0.75 ≥ 0.9·1.0 is 1.2 (by hand)
    assert r.set_factor == pytest.approx(1.2)
    np.testing.assert_allclose(r.factors, [1.2, 1.2])
    assert r.band == pytest.approx((0.2, 2.0))          # 0.2T to 2.0T with T = 1 s
    assert r.least_ratio == pytest.approx(0.9)


def test_each_record_fitted_then_the_set():
    # record 1 = half the target, record 2 = target × (1 at 0.2-0.5 s, 2 at 1-2 s)
    tgt = np.array([1.0, 1.0, 1.0, 0.5, 0.25, 0.1])
    psa = np.array([0.5 * tgt, tgt * np.array([1, 1, 1, 2, 2, 2.0])])
    r = scale_to_target(psa, T, tgt, period=1.0, rule="asce7-16", mode="each")
    # band 0.2–2 s holds T = 0.2, 0.5, 1, 2: own factors exp(mean log(target/record)):
    # record 1: exp(log 2) = 2; record 2: exp((0 + 0 − log 2 − log 2)/4) = 2^(−1/2)
    np.testing.assert_allclose(r.own, [2.0, 2 ** -0.5], rtol=1e-12)
    # scaled mean / target over the band: (1 + 0.7071)/2 at 0.2, 0.5 s; (1 + 1.4142)/2 at
    # 1, 2 s; the least, 0.85355, must reach 0.9 → set factor 0.9/0.85355 = 1.05442
    assert r.set_factor == pytest.approx(0.9 / ((1 + 2 ** -0.5) / 2), rel=1e-12)
    np.testing.assert_allclose(r.factors, r.own * r.set_factor)


def test_en1998_band_and_limits():
    psa = np.array([[0.1] * 6])
    r = scale_to_target(psa, T, np.ones(6), period=0.5, rule="en1998", mode="set")
    # EN 1998-1 §3.2.3.1.2: 0.2T1 to 2T1 = 0.1 to 1.0 s; 0.9/0.1 = 9 (by hand), outside 0.25–4
    assert r.band == pytest.approx((0.1, 1.0))
    assert r.set_factor == pytest.approx(9.0)
    assert r.warnings and "9" in r.warnings[0]


def test_bad_inputs():
    with pytest.raises(InputError, match="rule"):
        scale_to_target(np.ones((1, 6)), T, np.ones(6), period=1.0, rule="nz1170")
    with pytest.raises(InputError, match="no period"):
        scale_to_target(np.ones((1, 6)), T, np.ones(6), period=100.0)


def test_averaging_rule():
    # 7 or more records: mean; fewer: maximum (EN 1998-1 §4.3.3.4.3, from memory)
    assert set_statistic(7)[0] == "mean" and set_statistic(6)[0] == "max"
