"""Adjustment wavelets and the response matrix of the corrective-wavelet method.

The wavelet is the improved tapered cosine of Al Atik & Abrahamson (2010):

    f_j(t) = cos(ω'_j τ) · exp(-(τ/γ_j)²),   τ = t - t_j + Δt_j,
    ω'_j = ω_j √(1 - β_j²),  Δt_j = atan(√(1 - β_j²)/β_j) / ω'_j,  γ_j = 1.178 f_j^-0.93,

with f_j [Hz] the oscillator's frequency, β_j its damping ratio and t_j the time of
its peak response (constants from memory of the paper). Its integral is
γ√π·exp(-ω'²γ²/4), of order 1e-5·γ over the usual band, so it adds almost no
velocity or displacement drift.

The response matrix C_ij (response of oscillator i at its peak time t_i to the unit
wavelet j placed at t_j) depends only on the lag t_i - t_j, so each wavelet is run
once through the shared oscillator kernel (:func:`groundshake.spectra.oscillator_history`;
see :class:`WaveletResponses`) and looked up by lag at each iteration; past its
window the response is the exact free vibration of the damped oscillator.
"""
from __future__ import annotations

import numpy as np

__all__ = ["wavelet_parameters", "wavelet_shapes", "add_wavelets", "response_matrix",
           "WaveletResponses", "HALF_WIDTH_GAMMAS"]

#: The wavelet is cut at this many γ either side of its centre (exp(-9) ≈ 1.2e-4).
HALF_WIDTH_GAMMAS = 3.0


def wavelet_parameters(omega: np.ndarray, damping: np.ndarray
                       ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Damped frequency ω' [rad/s], time shift Δt [s] and width γ [s], each (n_osc,),
    for oscillators ``omega`` [rad/s] (n_osc,) with damping ratios ``damping`` (n_osc,)."""
    omega = np.asarray(omega, dtype=float)
    beta = np.asarray(damping, dtype=float)
    root = np.sqrt(1.0 - beta**2)
    omega_d = omega * root
    shift = np.arctan2(root, beta) / omega_d
    gamma = 1.178 * (omega / (2.0 * np.pi)) ** -0.93
    return omega_d, shift, gamma


def _window_samples(shift: np.ndarray, gamma: np.ndarray, dt: float
                    ) -> tuple[np.ndarray, np.ndarray]:
    """Samples before (a) and after (w) the anchor time t_j that the cut wavelet spans."""
    before = np.ceil((shift + HALF_WIDTH_GAMMAS * gamma) / dt).astype(np.int64)
    after = np.maximum(np.ceil((HALF_WIDTH_GAMMAS * gamma - shift) / dt), 0).astype(np.int64)
    return before, after


def _ragged(omega, damping, dt: float):
    """All cut wavelets at once: (values, owner, offset) flat arrays over Σ_j (a_j + w_j + 1).

    ``owner`` is the wavelet index j of each value, ``offset`` its sample relative to t_j.
    """
    omega_d, shift, gamma = wavelet_parameters(omega, damping)
    before, after = _window_samples(shift, gamma, dt)
    length = before + after + 1
    owner = np.repeat(np.arange(length.size), length)
    first = np.cumsum(length) - length
    offset = np.arange(owner.size) - first[owner] - before[owner]
    tau = offset * dt + shift[owner]
    values = np.cos(omega_d[owner] * tau) * np.exp(-(tau / gamma[owner]) ** 2)
    return values, owner, offset


def wavelet_shapes(omega, damping, dt: float) -> list[np.ndarray]:
    """Each unit wavelet sampled on its own window (list of (a_j + w_j + 1,) arrays).

    Sample ``a_j`` of wavelet j falls on its anchor time t_j.
    """
    values, owner, _ = _ragged(omega, damping, dt)
    return np.split(values, np.flatnonzero(np.diff(owner)) + 1)


def add_wavelets(n_t: int, dt: float, omega, damping, anchors: np.ndarray,
                 amplitudes: np.ndarray, *, ragged=None) -> np.ndarray:
    """Σ_j b_j f_j(t) on the record's grid, shape (n_t,) [m/s²].

    ``anchors`` (n_osc,) are sample indices t_j/dt; parts outside the record are cut.
    ``ragged`` may pass the sampled wavelets of :attr:`WaveletResponses.ragged`.
    """
    values, owner, offset = _ragged(omega, damping, dt) if ragged is None else ragged
    index = np.asarray(anchors, dtype=np.int64)[owner] + offset
    keep = (index >= 0) & (index < n_t)
    weights = values[keep] * np.asarray(amplitudes, dtype=float)[owner[keep]]
    return np.bincount(index[keep], weights=weights, minlength=n_t)


def _free_vibration(x0, v0, omega, zeta, tau):
    """Exact free vibration of x'' + 2ζωx' + ω²x = 0 from (x0, v0) after time tau ≥ 0:
    returns (x, v) (Chopra, Dynamics of Structures, eq. 2.2.4 and its derivative)."""
    wd = omega * np.sqrt(1.0 - zeta**2)
    zw = zeta * omega
    e = np.exp(-zw * tau)
    c = np.cos(wd * tau)
    s = np.sin(wd * tau)
    b = (v0 + zw * x0) / wd
    return e * (x0 * c + b * s), e * ((wd * b - zw * x0) * c - (zw * b + wd * x0) * s)


class WaveletResponses:
    """Responses of every oscillator to every unit wavelet, for building C_ij fast.

    The wavelets never change during a match, only where they are placed, so the
    kernel runs once and each iteration only looks up lags. The wavelets of a block
    are laid end to end, each after a zero sample, and the block drives all n
    oscillators in one kernel call (n step coefficients, not n²); the response to
    wavelet j alone is the total response minus the exact free vibration from the
    state at wavelet j's leading zero (superposition). Past its window the response
    is the free vibration from the window's end. When the stored responses would
    exceed ``store_limit`` values (float32) they are recomputed at each lookup.

    Parameters
    ----------
    dt : float
        Time step [s].
    omega, damping : ndarray, shape (n_osc,)
        Oscillators (and so wavelets) [rad/s], ratios.
    budget : int
        Oscillator-samples per kernel call (memory ~ 32·budget bytes).
    store_limit : int
        Most response values kept between iterations.
    """

    def __init__(self, dt: float, omega, damping, *, budget: int = 2_000_000,
                 store_limit: int = 40_000_000):
        self.dt = float(dt)
        self.omega = np.asarray(omega, dtype=float)
        self.zeta = np.asarray(damping, dtype=float)
        n = self.omega.size
        _, shift, gamma = wavelet_parameters(self.omega, self.zeta)
        self.before, after = _window_samples(shift, gamma, self.dt)
        self.length = self.before + after + 1
        self.ragged = _ragged(self.omega, self.zeta, self.dt)
        order = np.argsort(self.length)
        self.blocks = []
        start = 0
        while start < n:
            stop = start + 1
            while stop < n and n * (self.length[order[start:stop + 1]] + 1).sum() <= budget:
                stop += 1
            self.blocks.append(order[start:stop])
            start = stop
        self.stored = n * int((self.length + 1).sum()) <= store_limit
        self._cache = [self._run(b) for b in self.blocks] if self.stored else None

    def _run(self, block):
        """Responses to the wavelets of ``block``, side by side: (n, Σ(L_j + 1)), and the
        end states x, v (n, |block|) at each window's trailing zero."""
        from ..spectra import oscillator_history  # the one shared oscillator kernel

        n = self.omega.size
        values, owner, offset = self.ragged
        lengths = self.length[block] + 1  # window samples + the trailing zero
        first = np.concatenate([[0], np.cumsum(lengths)])  # leading zero of each
        exc = np.zeros(int(first[-1]) + 1)
        slot = np.full(n, -1)
        slot[block] = np.arange(block.size)
        sel = slot[owner] >= 0
        exc[first[slot[owner[sel]]] + 1 + offset[sel] + self.before[owner[sel]]] = values[sel]
        disp, vel, _ = oscillator_history(exc, self.dt, self.omega, self.zeta)
        seg = np.repeat(np.arange(block.size), lengths)           # wavelet of each column
        col = np.arange(seg.size) + 1                             # sample in the signal
        q = first[:-1][seg]                                       # its leading zero
        # Free vibration from the state at each leading zero, from tables of
        # exp(-ζωτ)·cos(ω_d τ) and ·sin(ω_d τ) over the lags (no trig per sample).
        lag = col - q
        tau = np.arange(int(lengths.max()) + 1) * self.dt
        wd = (self.omega * np.sqrt(1.0 - self.zeta**2))[:, None]
        zw = (self.zeta * self.omega)[:, None]
        e = np.exp(-zw * tau[None, :])
        ec, es = e * np.cos(wd * tau[None, :]), e * np.sin(wd * tau[None, :])
        x0, v0 = disp[:, q], vel[:, q]
        b0 = (v0 + zw * x0) / wd
        c, s = ec[:, lag], es[:, lag]
        resp = disp[:, col] - (x0 * c + b0 * s)
        last = first[1:] - 1                                      # trailing zero columns
        end_x = resp[:, last]
        fv = (wd * b0[:, last] - zw * x0[:, last]) * c[:, last] \
            - (zw * b0[:, last] + wd * x0[:, last]) * s[:, last]
        end_v = vel[:, last + 1] - fv
        return (resp.astype(np.float32) if self.stored else resp), end_x, end_v

    def matrix(self, anchors: np.ndarray) -> np.ndarray:
        """C_ij for wavelets anchored at samples ``anchors`` (n_osc,) [m per m/s²]."""
        anchors = np.asarray(anchors, dtype=np.int64)
        n = self.omega.size
        C = np.zeros((n, n))
        for kb, block in enumerate(self.blocks):
            resp, end_x, end_v = self._cache[kb] if self.stored else self._run(block)
            m = self.length[block] + 1                                    # (b,)
            off = np.concatenate([[0], np.cumsum(m)[:-1]])                # (b,)
            pos = anchors[:, None] - anchors[block][None, :] + self.before[block][None, :]
            ii, kk = np.nonzero((pos >= 0) & (pos < m[None, :]))
            C[ii, block[kk]] = resp[ii, off[kk] + pos[ii, kk]]
            ii, kk = np.nonzero(pos >= m[None, :])
            tau = (pos[ii, kk] - (m[kk] - 1)) * self.dt
            C[ii, block[kk]] = _free_vibration(end_x[ii, kk], end_v[ii, kk], self.omega[ii],
                                               self.zeta[ii], tau)[0]
        return C


def response_matrix(dt: float, omega: np.ndarray, damping: np.ndarray, anchors: np.ndarray,
                    *, budget: int = 4_000_000) -> np.ndarray:
    """C_ij: relative displacement of oscillator i at sample ``anchors[i]`` due to the unit
    wavelet j anchored at sample ``anchors[j]`` [m per m/s²], shape (n_osc, n_osc).

    One-off form of :class:`WaveletResponses` (nothing stored).
    """
    return WaveletResponses(dt, omega, damping, budget=budget, store_limit=0).matrix(anchors)
