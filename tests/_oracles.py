"""Independent reference solutions shared by the tests (scipy only, none of groundshake).

One home for each oracle, so a test does not re-implement it:

- ``sdof_foh`` / ``psa_foh``: a damped oscillator under base acceleration,
  x'' + 2ξωx' + ω²x = -a(t), by scipy's exact first-order-hold discretisation
  (``scipy.signal.cont2discrete(method="foh")``), exact for acceleration linear between
  samples; docs/references.md §1 [C] (agrees with Nigam & Jennings 1969 to 1e-13).
- ``foh_chain``: relative displacements of M ü + C u̇ + K u = −M ι a_g, the same
  first-order hold applied to the whole first-order system.
- ``asce7_psa``: the ASCE 7-16 §11.4.6 design spectrum (docs/references.md §5).

Units: SI (m, s, m/s²); ``omega`` in rad/s; damping as a ratio.
"""
from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from scipy import signal

STANDARD_GRAVITY = 9.80665  # m/s² per g (CGPM 1901, the conventional value)


def sdof_foh(acc, dt, omega, xi):
    """Response of one oscillator started from rest, by scipy's first-order hold.

    Parameters
    ----------
    acc : array_like, shape (n,)
        Base acceleration [m/s²].
    dt : float
        Time step [s].
    omega : float
        Circular frequency [rad/s].
    xi : float
        Damping ratio.

    Returns
    -------
    ndarray, shape (n, 3)
        Relative displacement [m], relative velocity [m/s] and absolute acceleration
        [m/s²] at each sample.

    Notes
    -----
    scipy's first-order-hold state is x − Γ₂u (see ``scipy.signal.cont2discrete``), so
    starting from rest means the state −Γ₂u₀, that is −D[:2]·u₀ since C starts with the identity. The response is the zero-state part
    (``lfilter`` of the transfer functions, a C loop) plus the free response from that
    state, written as the impulse response of (A, A x₀, C, C x₀).
    """
    acc = np.asarray(acc, dtype=float)
    a = np.array([[0.0, 1.0], [-omega ** 2, -2 * xi * omega]])
    b = np.array([[0.0], [-1.0]])
    c = np.array([[1.0, 0.0], [0.0, 1.0], [-omega ** 2, -2 * xi * omega]])
    ad, bd, cd, dd, _ = signal.cont2discrete((a, b, c, np.zeros((3, 1))), dt, method="foh")
    num, den = signal.ss2tf(ad, bd, cd, dd)
    y = np.stack([signal.lfilter(num[j], den, acc) for j in range(3)], axis=1)
    x0 = -dd[:2, 0] * acc[0]
    if x0.any():
        num0, den0 = signal.ss2tf(ad, (ad @ x0)[:, None], cd, (cd @ x0)[:, None])
        impulse = np.zeros_like(acc)
        impulse[0] = 1.0
        y += np.stack([signal.lfilter(num0[j], den0, impulse) for j in range(3)], axis=1)
    return y


def psa_foh(acc, dt, periods, xi):
    """Pseudo-spectral acceleration ω²·max|x| [m/s²] per period (shape of ``periods``)."""
    periods = np.asarray(periods, dtype=float)
    out = [(2 * np.pi / T) ** 2 * np.max(np.abs(sdof_foh(acc, dt, 2 * np.pi / T, xi)[:, 0]))
           for T in periods.ravel()]
    return np.asarray(out).reshape(periods.shape)


def foh_chain(K, M, C, iota, ag, dt):
    """Relative displacement (n, n_t) of M ü + C u̇ + K u = −M ι a_g, exact for linear a_g.

    ``K, M, C`` (n, n) dense or sparse [N/m, kg, N·s/m]; ``iota`` (n, 3) influence
    vectors; ``ag`` (3, n_t) ground acceleration [m/s²], starting at zero (the hold starts
    from a zero state).
    """
    K, M, C = (np.asarray(x.toarray() if sp.issparse(x) else x, float) for x in (K, M, C))
    n = K.shape[0]
    Mi = np.linalg.inv(M)
    A = np.block([[np.zeros((n, n)), np.eye(n)], [-Mi @ K, -Mi @ C]])
    B = np.vstack([np.zeros((n, 3)), -iota])
    Cm = np.hstack([np.eye(n), np.zeros((n, n))])
    sysd = signal.cont2discrete((A, B, Cm, np.zeros((n, 3))), dt, method="foh")
    _, y, _ = signal.dlsim(sysd[:4] + (dt,), np.asarray(ag).T)
    return y.T


def asce7_psa(T, sds=1.0, sd1=0.6, tl=8.0):
    """ASCE 7-16 §11.4.6 design spectrum [m/s²] (SDS, SD1 in g; T in s)."""
    T = np.asarray(T, dtype=float)
    t0, ts = 0.2 * sd1 / sds, sd1 / sds
    sa = np.where(T < t0, sds * (0.4 + 0.6 * T / t0),
                  np.where(T <= ts, sds, np.where(T <= tl, sd1 / T, sd1 * tl / T**2)))
    return sa * STANDARD_GRAVITY
