"""Stability of a rigid base block: sliding, overturning and bearing histories.

Screening comparisons with numbers the user enters (friction coefficient, passive
resistance, allowable bearing pressure): never a code check.

Sign conventions (our axes, z up). The inputs are the resultants the structure
exerts on its support about the centre of the base rectangle, at the base plane:
horizontal shears ``vx``, ``vy`` [N], the normal force ``n`` [N] (positive in
compression: the weight of block and equipment with the vertical inertia of the
motion) and the moments ``mx``, ``my`` [N·m]. A downward contact pressure q(x, y)
on the soil gives Mx = −∫y q dA and My = ∫x q dA, so the linear (full-contact)
distribution is

    q(x, y) = N/A + My·x/Iy − Mx·y/Ix,     Ix = L·B³/12, Iy = B·L³/12,

with L the length along x and B along y. The edges are named by the side they lie
on: ``+x`` (x = L/2), ``-x``, ``+y`` (y = B/2), ``-y``.

Methods (statics of a rigid block, common practice):

- sliding: FS(t) = (μ·N(t) + P) / |V(t)|, |V| = √(Vx² + Vy²), P the passive
  resistance the user enters (zero unless given); FS = 0 where N ≤ 0;
- overturning about each edge: stabilising over overturning moment,
  FS = N·(L/2)/My about +x, N·(L/2)/(−My) about −x, N·(B/2)/(−Mx) about +y,
  N·(B/2)/Mx about −y (infinite where the moment does not tip the block that way);
  tipping about a corner under biaxial moments is not treated separately;
- bearing: the peak of the linear distribution while the whole base is in
  contact; where the linear distribution would pull (contact lost) the
  no-tension pressure of a rigid base, q = max(0, a + b·x + c·y), with a, b, c
  solved from the three equilibrium equations by Newton's method, exact along the
  larger eccentricity with 64 strips across it (the biaxial rigid-base solution; for
  one-way eccentricity e > L/6 it is the triangle q_max = 2N / (3·B·(L/2 − e)), for
  contact at a corner the pyramid q_max = 6N/(s·t)). When the resultant falls outside the
  base (FS against overturning < 1) no contact pressure can balance it and the
  pressure is reported as infinite.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario import SupportSettings

__all__ = ["Stability", "stability_histories", "base_stability", "no_tension_pressure", "EDGES",
           "STABILITY_WORDING"]

#: Names of the four base edges, in the order of :attr:`Stability.overturning`.
EDGES = ("+x", "-x", "+y", "-y")

STABILITY_WORDING = ("screening comparison with user-entered values (rigid-block statics), "
                     "not a code check")

_GRID = 64           # strips of the base for the no-tension solution
_CHUNK = 4096        # time steps solved together (memory: a few × _GRID × _CHUNK floats)


@dataclass
class Stability:
    """Stability histories of a rigid base.

    Attributes
    ----------
    sliding : ndarray (n_t,)
        Safety factor against sliding (inf where there is no shear).
    overturning : ndarray (4, n_t)
        Safety factor against overturning about the edges :data:`EDGES`.
    pressure_linear_max, pressure_linear_min : ndarray (n_t,)
        Largest and least corner pressure of the linear distribution [Pa].
    pressure_peak : ndarray (n_t,)
        Peak contact pressure [Pa]: linear where the whole base is in contact,
        no-tension rigid-base value where contact is lost (inf where the resultant
        leaves the base).
    pressure_edge : ndarray (n_t,) of int
        Index into :data:`EDGES` of the edge with the peak pressure (the larger of
        the two edges meeting at the peak corner).
    contact_ratio : ndarray (n_t,)
        Share of the base area in contact (1 with full contact).
    lx, ly : float
        Base lengths along x and y [m].
    friction_coefficient : float or None
        μ as entered (None: sliding not evaluated, ``sliding`` all NaN).
    passive_resistance : float
        P [N] as entered (0 by default).
    allowable_bearing_pressure : float or None
        [Pa] as entered.
    """

    sliding: np.ndarray
    overturning: np.ndarray
    pressure_linear_max: np.ndarray
    pressure_linear_min: np.ndarray
    pressure_peak: np.ndarray
    pressure_edge: np.ndarray
    contact_ratio: np.ndarray
    lx: float
    ly: float
    friction_coefficient: float | None = None
    passive_resistance: float = 0.0
    allowable_bearing_pressure: float | None = None

    def summary(self, dt: float, *, t0: float = 0.0) -> dict:
        """Minima, maxima and their times (for summary.json; SI units).

        Parameters
        ----------
        dt : float
            Time step of the histories [s].
        t0 : float
            Time of the first sample [s].

        Returns
        -------
        dict
            ``sliding``, ``overturning``, ``bearing`` (see the README's "Stability").
        """
        out: dict = {"note": STABILITY_WORDING,
                     "base": {"lx": float(self.lx), "ly": float(self.ly)}}
        sl: dict = {"friction_coefficient": self.friction_coefficient,
                    "passive_resistance": float(self.passive_resistance),
                    "formula": "FS = (mu*N + P)/|V|, |V| = sqrt(Vx^2 + Vy^2)"}
        if self.friction_coefficient is None or self.sliding.size == 0:
            sl.update(min_safety_factor=None, time=None,
                      note="friction_coefficient not given: sliding not evaluated")
        else:
            i = int(np.argmin(self.sliding))
            sl.update(min_safety_factor=_num(self.sliding[i]), time=t0 + i * dt)
        out["sliding"] = sl
        ot: dict = {"formula": "FS = N*(L/2)/M_edge about each base edge (stabilising over "
                              "overturning moment)", "edges": {}}
        if self.overturning.size:
            for k, e in enumerate(EDGES):
                i = int(np.argmin(self.overturning[k]))
                ot["edges"][e] = {"min_safety_factor": _num(self.overturning[k, i]),
                                  "time": t0 + i * dt}
            k, i = np.unravel_index(int(np.argmin(self.overturning)), self.overturning.shape)
            ot.update(min_safety_factor=_num(self.overturning[k, i]), time=t0 + int(i) * dt,
                      edge=EDGES[int(k)])
        else:
            ot.update(min_safety_factor=None, time=None, edge=None)
        out["overturning"] = ot
        br: dict = {"method": "linear distribution with full contact; where contact is lost, "
                              "the no-tension pressure of a rigid base (biaxial, solved "
                              "numerically; triangular for one-way eccentricity)",
                    "allowable_bearing_pressure": self.allowable_bearing_pressure}
        if self.pressure_peak.size:
            i = int(np.argmax(self.pressure_peak))
            j = int(np.argmin(self.pressure_linear_min))
            br.update(peak_pressure=_num(self.pressure_peak[i]), time=t0 + i * dt,
                      edge=EDGES[int(self.pressure_edge[i])],
                      peak_linear_pressure=_num(self.pressure_linear_max.max()),
                      min_linear_pressure=_num(self.pressure_linear_min[j]),
                      time_of_min_linear_pressure=t0 + j * dt,
                      min_contact_ratio=float(self.contact_ratio.min()),
                      contact_lost=bool(self.contact_ratio.min() < 1.0))
            if self.allowable_bearing_pressure:
                br["ratio_to_allowable"] = _num(self.pressure_peak[i]
                                                / self.allowable_bearing_pressure)
        else:
            br.update(peak_pressure=None, time=None, edge=None)
        out["bearing"] = br
        return out


def _num(v) -> float | None:
    """JSON-safe float: inf and NaN become None."""
    v = float(v)
    return v if np.isfinite(v) else None


def stability_histories(vx, vy, n, mx, my, *, lx: float, ly: float,
                        friction_coefficient: float | None = None,
                        passive_resistance: float = 0.0,
                        allowable_bearing_pressure: float | None = None) -> Stability:
    """Sliding, overturning and bearing histories of a rigid rectangular base.

    Parameters
    ----------
    vx, vy : ndarray (n_t,)
        Horizontal shears the structure exerts on its support [N].
    n : ndarray (n_t,)
        Normal force [N], positive in compression (weights included).
    mx, my : ndarray (n_t,)
        Moments about the base centre [N·m] (see the module notes for the signs).
    lx, ly : float
        Base lengths along x and y [m].
    friction_coefficient : float, optional
        μ between base and soil, as entered (no default: without it sliding is
        not evaluated).
    passive_resistance : float
        Horizontal resistance P added to friction [N] (0 unless the user gives it).
    allowable_bearing_pressure : float, optional
        [Pa], for the screening ratio only.

    Returns
    -------
    Stability

    Raises
    ------
    ValueError
        For histories of different lengths or non-positive base lengths.

    Examples
    --------
    A 10 kN block on a 2 m × 1 m base under 3 kN of shear (μ = 0.6) slides with
    FS = 0.6·10/3 = 2:

    >>> s = stability_histories([3e3], [0.], [1e4], [0.], [0.], lx=2., ly=1.,
    ...                         friction_coefficient=0.6)
    >>> float(s.sliding[0])
    2.0
    """
    vx, vy, n, mx, my = (np.atleast_1d(np.asarray(a, dtype=float)) for a in (vx, vy, n, mx, my))
    shapes = {a.shape for a in (vx, vy, n, mx, my)}
    if len(shapes) != 1 or vx.ndim != 1:
        raise ValueError(f"vx, vy, n, mx, my must be 1-D of one length; given shapes {shapes}")
    if not (lx > 0 and ly > 0):
        raise ValueError(f"base lengths must be > 0; given lx={lx!r}, ly={ly!r}")
    lx, ly = float(lx), float(ly)
    v = np.hypot(vx, vy)
    npos = np.maximum(n, 0.0)
    if friction_coefficient is None:
        sliding = np.full_like(v, np.nan)
    else:
        res = float(friction_coefficient) * npos + float(passive_resistance)
        res = np.where(n > 0, res, 0.0)
        with np.errstate(divide="ignore", invalid="ignore"):
            sliding = np.where(v > 0, res / np.where(v > 0, v, 1.0), np.inf)
    # overturning moment about each edge (positive: tips the block about that edge)
    tip = np.stack([my, -my, -mx, mx])                           # (4, n_t)
    arm = np.array([lx / 2, lx / 2, ly / 2, ly / 2])[:, None]
    stab = npos[None, :] * arm
    with np.errstate(divide="ignore", invalid="ignore"):
        over = np.where(tip > 0, stab / np.where(tip > 0, tip, 1.0), np.inf)
    area = lx * ly
    ix, iy = lx * ly ** 3 / 12.0, ly * lx ** 3 / 12.0
    mean = n / area
    swing = np.abs(my) * (lx / 2) / iy + np.abs(mx) * (ly / 2) / ix
    qmax, qmin = mean + swing, mean - swing
    peak = qmax.copy()
    contact = np.ones_like(qmax)
    lost = qmin < 0
    if np.any(lost):
        idx = np.flatnonzero(lost)
        qp, cr = no_tension_pressure(n[idx], mx[idx], my[idx], lx=lx, ly=ly)
        peak[idx] = qp
        contact[idx] = cr
    # edge of the peak corner: the edge whose side carries the larger moment term
    ex_term = np.abs(my) * (lx / 2) / iy
    ey_term = np.abs(mx) * (ly / 2) / ix
    edge = np.where(ex_term >= ey_term, np.where(my >= 0, 0, 1), np.where(mx <= 0, 2, 3))
    return Stability(sliding=sliding, overturning=over, pressure_linear_max=qmax,
                     pressure_linear_min=qmin, pressure_peak=peak,
                     pressure_edge=edge.astype(int), contact_ratio=contact, lx=lx, ly=ly,
                     friction_coefficient=None if friction_coefficient is None
                     else float(friction_coefficient),
                     passive_resistance=float(passive_resistance),
                     allowable_bearing_pressure=None if allowable_bearing_pressure is None
                     else float(allowable_bearing_pressure))


def _row_integrals(alpha, b):
    """Exact integrals over ξ ∈ [−1, 1] of p⁺ = max(0, α + bξ) and of its contact set.

    Returns (∫p⁺, ∫ξp⁺, ∫H, ∫ξH, ∫ξ²H), each shaped like ``alpha`` (H = 1 where p > 0).
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        root = np.where(b != 0, -alpha / np.where(b != 0, b, 1.0), 0.0)
    lo = np.where(b > 0, np.clip(root, -1.0, 1.0), -1.0)
    hi = np.where(b < 0, np.clip(root, -1.0, 1.0), 1.0)
    flat = b == 0
    lo = np.where(flat & (alpha <= 0), 1.0, lo)          # no contact on a flat negative row
    hi = np.where(flat & (alpha <= 0), 1.0, hi)
    d1 = hi - lo
    d2 = (hi ** 2 - lo ** 2) / 2.0
    d3 = (hi ** 3 - lo ** 3) / 3.0
    return alpha * d1 + b * d2, alpha * d2 + b * d3, d1, d2, d3


def no_tension_pressure(n, mx, my, *, lx: float, ly: float, rows: int = _GRID,
                        max_iter: int = 60, rtol: float = 1e-10):
    """Peak pressure under a rigid base that cannot pull on the soil.

    Solves q(x, y) = max(0, a + b·x + c·y) with ∫q dA = N, ∫x q dA = My,
    −∫y q dA = Mx by Newton's method, all time steps at once (in chunks). Along the
    direction of the larger relative eccentricity the integrals are exact (the base is
    cut into ``rows`` strips across it, midpoint rule), so one-way eccentricity is
    solved exactly.

    Parameters
    ----------
    n, mx, my : ndarray (m,)
        Normal force [N] (compression positive) and moments [N·m] about the centre.
    lx, ly : float
        Base lengths [m].
    rows : int
        Strips across the direction of the larger eccentricity: at 64 the biaxial peak
        is within about 0.1 % of the converged value.

    Returns
    -------
    peak : ndarray (m,)
        Peak pressure [Pa] (at a corner); inf where N ≤ 0 or the resultant lies
        outside the base.
    contact : ndarray (m,)
        Share of the base area in contact.

    Notes
    -----
    For one-way eccentricity e = M/N > L/6 the result is the triangle
    q_max = 2N/(3·B·(L/2 − e)) over a contact length 3(L/2 − e) (statics). The Newton
    Jacobian is ∫[1, ξ, η]ᵀ[1, ξ, η] over the contact area (the derivative of the
    integrals of q⁺; the moving edge of contact adds nothing since q = 0 there).
    """
    n, mx, my = (np.atleast_1d(np.asarray(a, dtype=float)) for a in (n, mx, my))
    m = n.size
    peak = np.full(m, np.inf)
    contact = np.zeros(m)
    with np.errstate(divide="ignore", invalid="ignore"):
        ex = np.where(n > 0, my / n, np.inf)
        ey = np.where(n > 0, -mx / n, np.inf)
    ok = (n > 0) & (np.abs(ex) < lx / 2) & (np.abs(ey) < ly / 2)
    # normalised coordinates ξ = x/(lx/2), η = y/(ly/2); u = 2ex/lx, v = 2ey/ly; q' = q/p̄
    u = np.where(ok, 2.0 * ex / lx, 0.0)
    v = np.where(ok, 2.0 * ey / ly, 0.0)
    swap = np.abs(v) > np.abs(u)                 # integrate exactly along the larger one
    u, v = np.where(swap, v, u), np.where(swap, u, v)
    eta = (np.arange(rows) + 0.5) / rows * 2.0 - 1.0
    w = 2.0 / rows
    for start in range(0, m, _CHUNK):
        sel = np.flatnonzero(ok[start:start + _CHUNK]) + start
        if sel.size == 0:
            continue
        target = np.stack([np.full(sel.size, 4.0), 4.0 * u[sel], 4.0 * v[sel]])   # (3, k)
        coef = np.stack([np.ones(sel.size), 3.0 * u[sel], 3.0 * v[sel]])           # linear
        active = np.ones(sel.size, dtype=bool)
        for _ in range(max_iter):
            ia = np.flatnonzero(active)
            if ia.size == 0:
                break
            a0, b0, c0 = coef[:, ia]
            alpha = a0[:, None] + c0[:, None] * eta[None, :]            # (k, rows)
            p0, p1, h0, h1, h2 = _row_integrals(alpha, np.broadcast_to(b0[:, None],
                                                                       alpha.shape))
            r = np.stack([w * p0.sum(1), w * p1.sum(1), w * (p0 * eta).sum(1)]) \
                - target[:, ia]
            done = np.max(np.abs(r), axis=0) < rtol * 4.0
            active[ia[done]] = False
            if np.all(done):
                break
            jac = w * np.stack([
                np.stack([h0.sum(1), h1.sum(1), (h0 * eta).sum(1)], -1),
                np.stack([h1.sum(1), h2.sum(1), (h1 * eta).sum(1)], -1),
                np.stack([(h0 * eta).sum(1), (h1 * eta).sum(1), (h0 * eta ** 2).sum(1)], -1),
            ], 1)                                                           # (k, 3, 3)
            step = np.linalg.solve(jac + 1e-14 * np.eye(3), -r.T[:, :, None])[:, :, 0].T
            coef[:, ia] = coef[:, ia] + np.where(done[None, :], 0.0, step)
        a0, b0, c0 = coef
        pbar = n[sel] / (lx * ly)
        peak[sel] = pbar * (a0 + np.abs(b0) + np.abs(c0))                # the highest corner
        alpha = a0[:, None] + c0[:, None] * eta[None, :]
        h0 = _row_integrals(alpha, np.broadcast_to(b0[:, None], alpha.shape))[2]
        contact[sel] = w * h0.sum(1) / 4.0
    return peak, contact


def base_stability(base: np.ndarray, *, weight: float, lx: float, ly: float,
                   support: SupportSettings) -> Stability:
    """:func:`stability_histories` from a run's base resultants and its scenario support.

    Parameters
    ----------
    base : ndarray (6, n_t)
        [Fx, Fy, Fz, Mx, My, Mz] the structure exerts on its support about the base
        centre [N, N·m], dynamic part (Fz positive upward), as in ``histories.csv``.
    weight : float
        Weight of block and equipment [N]; N(t) = weight − Fz(t).
    lx, ly : float
        Base lengths [m].
    support : SupportSettings
        Gives ``friction_coefficient``, ``passive_resistance`` and
        ``allowable_bearing_pressure``.

    Returns
    -------
    Stability
    """
    b = np.asarray(base, dtype=float)
    return stability_histories(b[0], b[1], float(weight) - b[2], b[3], b[4], lx=lx, ly=ly,
                               friction_coefficient=support.friction_coefficient,
                               passive_resistance=float(support.passive_resistance),
                               allowable_bearing_pressure=support.allowable_bearing_pressure)
