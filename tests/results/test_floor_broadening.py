"""Peak broadening of floor spectra.

Source: ASCE 4 / USNRC RG 1.122 — a spectral peak is widened by ±15 % in
frequency, its full value held from 0.85 f₀ to 1.15 f₀ and joined to the
unbroadened curve. Checked against a direct evaluation of that definition on a
dense grid (numpy), and on a single-peak (triangular) spectrum by hand.
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake.results._floor import broaden


def test_single_peak_held_over_plus_minus_15_percent_in_frequency():
    T = np.geomspace(0.02, 5.0, 400)
    f0 = 8.0
    S = np.where(np.isclose(T, T[np.argmin(abs(T - 1 / f0))]), 10.0, 1.0)   # a single spike
    T0 = T[np.argmax(S)]
    B = broaden(T, S, fraction=0.15)
    f = 1.0 / T
    inside = (f >= 0.85 / T0 * (1 + 1e-9)) & (f <= 1.15 / T0 * (1 - 1e-9))
    # RG 1.122: the full peak value over 0.85 f0 .. 1.15 f0
    assert np.all(B[inside] == pytest.approx(10.0))
    far = (f < 0.8 / T0) | (f > 1.25 / T0)
    # away from the band the unbroadened curve is kept (spike joined linearly in log T)
    assert np.all(B[far] == pytest.approx(1.0))
    assert np.all(B >= S - 1e-12)                       # an envelope never lowers the curve


def test_matches_definition_on_dense_grid():
    T = np.geomspace(0.02, 5.0, 120)
    rng = np.random.default_rng(0)
    S = np.abs(rng.normal(size=(2, 3, 120))) + np.exp(-((np.log(T / 0.2)) ** 2) / 0.1)
    B = broaden(T, S, fraction=0.15)
    # definition: max of S (log-linear between points, held at the ends) over [0.85T, 1.15T]
    for i in (0, 17, 60, 119):
        tq = np.geomspace(0.85 * T[i], 1.15 * T[i], 4001)
        tq = np.clip(np.concatenate([tq, T[(T >= tq[0]) & (T <= tq[-1])]]), T[0], T[-1])
        dense = np.array([[np.interp(np.log(tq), np.log(T), S[a, b]) for b in range(3)]
                          for a in range(2)])
        np.testing.assert_allclose(B[..., i], dense.max(axis=-1), rtol=1e-12)


def test_zero_fraction_is_identity():
    T = np.geomspace(0.05, 2, 30)
    S = np.sin(T)
    np.testing.assert_array_equal(broaden(T, S, fraction=0.0), S)   # definition: no widening
