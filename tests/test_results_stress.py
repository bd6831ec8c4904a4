"""Stress recovery: principal stresses, von Mises and chunked peaks.

Sources: numpy.linalg.eigvalsh as an independent eigen-solver for the principal
stresses; von Mises σ_vm = √(3 J₂) = √(½[(σ1−σ2)² + (σ2−σ3)² + (σ3−σ1)²]) (any
mechanics of materials text, e.g. Timoshenko & Goodier); the chunked tracker is
checked against a brute-force evaluation with numpy.
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake.results._stress import (StressPeaks, modal_stress_peaks, principal_stresses,
                                         von_mises)


def tensors(s):
    sxx, syy, szz, tyz, txz, txy = s
    return np.stack([np.stack([sxx, txy, txz], -1), np.stack([txy, syy, tyz], -1),
                     np.stack([txz, tyz, szz], -1)], -2)


def test_principal_and_von_mises_match_eigvalsh():
    rng = np.random.default_rng(1)
    s = rng.normal(size=(6, 500)) * 1e6
    s[:, 0] = [1e6, 1e6, 1e6, 0, 0, 0]                 # hydrostatic: repeated roots
    s[:, 1] = [2e6, 0, 0, 0, 0, 0]                     # uniaxial
    hi, lo = principal_stresses(s)
    ev = np.linalg.eigvalsh(tensors(s))                # independent reference (numpy LAPACK)
    np.testing.assert_allclose(hi, ev[:, 2], rtol=0, atol=1e-6 * 1e6)
    np.testing.assert_allclose(lo, ev[:, 0], rtol=0, atol=1e-6 * 1e6)
    vm_ref = np.sqrt(0.5 * ((ev[:, 0] - ev[:, 1]) ** 2 + (ev[:, 1] - ev[:, 2]) ** 2
                            + (ev[:, 2] - ev[:, 0]) ** 2))       # von Mises from principals
    np.testing.assert_allclose(von_mises(s), vm_ref, rtol=1e-10, atol=1e-6)
    assert von_mises(s)[1] == pytest.approx(2e6, rel=1e-12)       # uniaxial: σ_vm = σ


@pytest.mark.parametrize("engine,prune,n_t", [("numba", False, 300), ("numpy", False, 300),
                                               ("numba", True, 3000), ("numpy", True, 3000)])
def test_chunked_modal_peaks_equal_brute_force(engine, prune, n_t):
    rng = np.random.default_rng(2)
    n_el, r = 37, 5
    A = rng.normal(size=(6 * n_el, r)) * 1e5
    t = np.arange(n_t) * 0.01
    env = np.exp(-((t - 0.4 * t[-1]) / (0.2 * t[-1])) ** 2)       # a strong part, as in records
    Z = np.vstack([env * np.sin((k + 1) * 3.1 * t + k) for k in range(r)])
    peaks = modal_stress_peaks(A, Z, n_el, max_values=6 * 4 * 64,   # small blocks
                               engine=engine, prune=prune)
    sig = (A @ Z).reshape(n_el, 6, n_t).transpose(1, 0, 2)           # brute force with numpy
    ev = np.linalg.eigvalsh(tensors(sig))                            # (n_el, n_t, 3)
    # peaks are clipped at zero: "no tension" reads 0 (definition of the output)
    np.testing.assert_allclose(peaks.tension, np.maximum(ev[..., 2].max(axis=1), 0), rtol=1e-9)
    np.testing.assert_allclose(peaks.compression, np.minimum(ev[..., 0].min(axis=1), 0), rtol=1e-9)
    np.testing.assert_array_equal(peaks.tension_step, ev[..., 2].argmax(axis=1))
    vm = von_mises(sig)
    np.testing.assert_allclose(peaks.von_mises, vm.max(axis=1), rtol=1e-12)
    np.testing.assert_array_equal(peaks.von_mises_step, vm.argmax(axis=1))
    gov = peaks.governing(0.01)
    assert gov["von_mises"]["value"] == pytest.approx(vm.max(), rel=1e-12)
    assert gov["von_mises"]["time"] == pytest.approx(0.01 * np.unravel_index(vm.argmax(), vm.shape)[1])


@pytest.mark.parametrize("engine", ["numba", "numpy"])
def test_time_blocks_fold_like_one_pass(engine):
    rng = np.random.default_rng(3)
    sig = rng.normal(size=(6, 10, 90))
    el_major = np.ascontiguousarray(sig.transpose(1, 0, 2))
    one = StressPeaks.empty(10)
    one.update(0, el_major, np.arange(90), engine=engine)
    blocks = StressPeaks.empty(10)
    for s in range(0, 90, 16):                                       # direct-style time blocks
        blocks.update(0, el_major[:, :, s:s + 16], np.arange(s, min(s + 16, 90)), engine=engine)
    ev = np.linalg.eigvalsh(tensors(sig))                            # numpy reference
    np.testing.assert_allclose(blocks.tension, np.maximum(ev[..., 2].max(axis=1), 0), rtol=1e-9)
    np.testing.assert_allclose(blocks.von_mises, one.von_mises, rtol=0)
    np.testing.assert_array_equal(blocks.compression_step, one.compression_step)
