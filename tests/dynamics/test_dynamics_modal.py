"""Modal time history and the pruned peak search.

Sources: for a classically damped chain, modal superposition of all modes equals the
exact state-space solution (scipy.signal.cont2discrete foh of the full system, an
independent reference); the pruned peak must equal numpy's brute-force max |A·Z|.
"""
from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg as sla
from _oracles import foh_chain

from groundshake.dynamics import modal_response, pruned_peak


def test_all_modes_equal_state_space_solution():
    k, m, n = 4.0e6, 1.0e3, 3
    K = np.diag(np.r_[np.full(n - 1, 2 * k), k]) - k * (np.eye(n, k=1) + np.eye(n, k=-1))
    M = m * np.eye(n)
    w2, phi = sla.eigh(K, M)
    w = np.sqrt(w2)
    a, b = 2 * 0.05 * w[0] * w[2] / (w[0] + w[2]), 2 * 0.05 / (w[0] + w[2])
    C = a * M + b * K                                    # Rayleigh: classical
    zeta = a / (2 * w) + b * w / 2
    iota = np.zeros((n, 3)); iota[:, 0] = 1
    dt = 0.004
    t = np.arange(1000) * dt
    ag = np.zeros((3, t.size)); ag[0] = np.sin(2 * np.pi * 3 * t) * np.exp(-((t - 1.5) / 0.6) ** 2)
    r = modal_response(phi, w, zeta, phi.T @ M @ iota, ag, dt)
    u = r.recover(np.eye(n))[0]
    ref = foh_chain(K, M, C, iota, ag, dt)               # scipy foh, exact for linear input
    np.testing.assert_allclose(u, ref, atol=1e-8 * np.max(np.abs(ref)))


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_pruned_peak_equals_brute_force(seed):
    rng = np.random.default_rng(seed)
    A = rng.normal(size=(3000, 8)) * rng.random((3000, 1))
    t = np.arange(4000) * 0.005
    env = (t / 4) ** 2 * np.exp(-t / 4 + 2)
    Z = np.vstack([env * np.sin(2 * np.pi * (1 + k) * t + k) * 10.0 ** (k % 3) for k in range(8)])
    row, val, col = pruned_peak(A, Z)
    X = np.abs(A @ Z)                                    # numpy brute force
    i, j = np.unravel_index(np.argmax(X), X.shape)
    assert (row, col) == (i, j) and val == pytest.approx(X[i, j], rel=1e-12)


def test_pruned_peak_on_a_smooth_field_of_near_equal_rows():
    # a block moving almost rigidly: thousands of rows within 1 % of each other
    rng = np.random.default_rng(7)
    base = rng.normal(size=6)
    A = base[None, :] * (1 + 0.01 * rng.random((4000, 1))) + 0.002 * rng.normal(size=(4000, 6))
    t = np.arange(5000) * 0.005
    Z = np.vstack([np.exp(-((t - 8) / 3) ** 2) * np.sin(2 * np.pi * (0.7 + k) * t) for k in range(6)])
    row, val, col = pruned_peak(A, Z)
    X = np.abs(A @ Z)                                    # numpy brute force
    i, j = np.unravel_index(np.argmax(X), X.shape)
    assert (row, col) == (i, j) and val == pytest.approx(X[i, j], rel=1e-12)
