"""Direct integration (Newmark average acceleration, HHT-α) on small systems.

Sources: the independent reference is scipy.signal.cont2discrete(method="foh") of
the full state-space system (exact for ground acceleration linear between samples);
Newmark (1959) and Hilber, Hughes & Taylor (1977) for the scheme's parameters and
period error (docs/references.md §2).
"""
from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp

from _oracles import foh_chain

from groundshake._errors import InputError
from groundshake.dynamics._direct import direct_response, newmark_parameters, substeps_for




def chain(n=3, k=4.0e6, m=1.0e3):
    """A shear chain of n masses on springs (fixed at the bottom), x direction."""
    main = np.full(n, 2 * k)
    main[-1] = k
    K = sp.diags([main, -k * np.ones(n - 1), -k * np.ones(n - 1)], [0, 1, -1]).tocsr()
    M = sp.identity(n, format="csr") * m
    iota = np.zeros((n, 3))
    iota[:, 0] = 1.0
    return K, M, iota


def pulse(n_t=800, dt=0.005, f=3.0):
    t = np.arange(n_t) * dt
    ag = np.zeros((3, n_t))
    ag[0] = 2.0 * np.sin(2 * np.pi * f * t) * np.exp(-((t - 1.0) / 0.5) ** 2)
    return ag


def test_newmark_sdof_matches_exact_foh():
    K, M, iota = chain(1, k=(2 * np.pi * 2.0) ** 2 * 1e3)
    C = sp.csr_matrix(2 * 0.05 * (2 * np.pi * 2.0) * M.toarray())
    dt = 0.0025                                       # T/200
    ag = pulse(1200, dt)
    res = direct_response(K, M, C, iota, ag, dt, output=sp.identity(1, format="csr"))
    ref = foh_chain(K, M, C, iota, ag, dt)
    # scipy cont2discrete foh is exact; Newmark period error (Ω/2)/atan(Ω/2) − 1 ≈ 8e-5
    # at T/200 (Newmark 1959, docs/references.md §2), so 0.5 % on the peak is ample.
    assert np.max(np.abs(res.disp)) == pytest.approx(np.max(np.abs(ref)), rel=5e-3)
    np.testing.assert_allclose(res.disp[0], ref[0], atol=5e-3 * np.max(np.abs(ref)))


def test_non_classical_damping_chain_matches_foh():
    K, M, iota = chain(3)
    C = sp.csr_matrix(np.diag([3.0e4, 0.0, 0.0]))     # one dashpot at the bottom: non-classical
    dt = 0.002
    ag = pulse(1500, dt)
    res = direct_response(K, M, C, iota, ag, dt, output=sp.identity(3, format="csr"))
    ref = foh_chain(K, M, C, iota, ag, dt)
    # exact state-space reference (scipy cont2discrete foh); full damping matrix kept
    for i in range(3):
        assert np.max(np.abs(res.disp[i])) == pytest.approx(np.max(np.abs(ref[i])), rel=1e-2)
    # dof peaks tracked on the fly agree with the stored history (same solution)
    np.testing.assert_allclose(res.dof_peak, np.max(np.abs(res.disp), axis=1), rtol=1e-12)


def test_substeps_recover_accuracy_on_coarse_record():
    K, M, iota = chain(1, k=(2 * np.pi * 15.0) ** 2 * 1e3)    # 15 Hz oscillator
    C = sp.csr_matrix(2 * 0.02 * (2 * np.pi * 15.0) * M.toarray())
    dt = 0.01                                                # T/6.7: too coarse for Newmark
    ag = pulse(600, dt, f=12.0)
    ref = foh_chain(K, M, C, iota, ag, dt)
    n_sub = substeps_for(dt, 15.0)
    assert n_sub == 2                                        # ceil(0.01 / (1/150))
    one = direct_response(K, M, C, iota, ag, dt, output=sp.identity(1, format="csr"))
    many = direct_response(K, M, C, iota, ag, dt, output=sp.identity(1, format="csr"),
                           substeps=8)
    e1 = abs(np.max(np.abs(one.disp)) / np.max(np.abs(ref)) - 1)
    e8 = abs(np.max(np.abs(many.disp)) / np.max(np.abs(ref)) - 1)
    # both discretise the same piecewise-linear input (foh reference is exact for it);
    # Newmark's error falls as h² (second-order accuracy, Newmark 1959)
    assert e8 < 1e-2
    assert e8 < e1 / 5


def test_hht_parameters_and_low_frequency_accuracy():
    # Hilber, Hughes & Taylor (1977): γ = 1/2 − α, β = (1 − α)²/4
    a, b, g = newmark_parameters(-0.1)
    assert (a, b, g) == pytest.approx((-0.1, 1.21 / 4, 0.6), rel=1e-12)
    assert newmark_parameters(0.0) == pytest.approx((0.0, 0.25, 0.5))   # Newmark average acc.
    with pytest.raises(InputError):
        newmark_parameters(-0.5)
    with pytest.raises(InputError):
        newmark_parameters(0.1)
    K, M, iota = chain(1, k=(2 * np.pi * 2.0) ** 2 * 1e3)
    C = sp.csr_matrix(2 * 0.05 * (2 * np.pi * 2.0) * M.toarray())
    dt = 0.0025
    ag = pulse(1200, dt)
    res = direct_response(K, M, C, iota, ag, dt, output=sp.identity(1, format="csr"),
                          hht_alpha=-0.1)
    ref = foh_chain(K, M, C, iota, ag, dt)
    # HHT-α damps only high frequencies; at T/200 the response is within 1 % (HHT 1977)
    assert np.max(np.abs(res.disp)) == pytest.approx(np.max(np.abs(ref)), rel=1e-2)


def test_hht_spectral_radius_at_high_frequency():
    # free vibration of a stiff undamped oscillator stepped far beyond its period: each step
    # multiplies the amplitude by about the spectral radius (1 + α)/(1 − α) (HHT 1977, §2 of
    # docs/references.md); start it with a ground step and watch the decay
    w = 2 * np.pi * 200.0
    K, M, iota = chain(1, k=w * w * 1.0, m=1.0)
    dt = 0.01                                             # ωΔt ≈ 12.6
    ag = np.zeros((3, 80))
    ag[0, 1:] = 1.0
    alpha = -0.2
    res = direct_response(K, M, None, iota, ag, dt, output=sp.identity(1, format="csr"),
                          hht_alpha=alpha)
    u = res.disp[0] - (-1.0 / w ** 2)                    # oscillation about the static offset
    amp = np.abs(u[20:60])
    ratio = (amp[-1] / amp[0]) ** (1 / 40)
    rho_inf = (1 + alpha) / (1 - alpha)
    assert ratio == pytest.approx(rho_inf, rel=0.05)
