"""Anchor-bolt demands of equipment on a rigid base plate (elastic bolt group).

Screening against numbers the user enters: never a code capacity check.

Method (common practice for rigid base plates): the equipment is a rigid body of
mass m and rotary inertia I about its centre of gravity, a height h above the
base plate. From the absolute acceleration of its CG (translations a, rotations
α) the foundation must apply, at the plate centre,

    F = m a + (0, 0, f_d·m·g),      M = I α + h ẑ × (m a),

where f_d is the ``dead_load_factor`` (the share of the weight counted as
resisting uplift; default 0.9, the 0.9·D of the combination with E in ASCE 7-16
§2.3.6, from memory). Moved to the bolt-group centroid, F_z and the overturning
moments are shared by the bolts in proportion to their distance from the
centroid (rigid plate, equal elastic bolts), and the horizontal forces equally
plus the torsion in proportion to the polar distance. Compression is assumed to
be carried by the bolts as well (no bearing or prying); tension = positive.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..records import STANDARD_GRAVITY

__all__ = ["BoltForces", "bolt_forces", "plate_loads", "fp_comparison", "SCREENING_WORDING"]

SCREENING_WORDING = "screening comparison, not a code capacity check"


@dataclass
class BoltForces:
    """Per-bolt demands.

    Attributes
    ----------
    tension : ndarray (k, n_t)
        Axial force [N], tension positive.
    shear : ndarray (k, n_t)
        Resultant horizontal force [N] (≥ 0).
    plate : ndarray (6, n_t)
        [Fx, Fy, Fz, Mx, My, Mz] applied by the foundation to the equipment at
        the plate centre [N, N·m] (Fz includes f_d·m·g).
    """

    tension: np.ndarray
    shear: np.ndarray
    plate: np.ndarray


def plate_loads(acc6: np.ndarray, *, mass: float, inertia, cg_height: float,
                dead_load_factor: float = 0.9, g: float = STANDARD_GRAVITY) -> np.ndarray:
    """Forces and moments the foundation applies to the equipment at its plate centre.

    Parameters
    ----------
    acc6 : ndarray (6, n_t)
        Absolute CG acceleration: ax, ay, az [m/s²], αx, αy, αz [rad/s²].
    mass : float
        [kg].
    inertia : array (3,)
        Rotary inertia about the CG axes x, y, z [kg·m²].
    cg_height : float
        CG height above the plate [m].
    dead_load_factor : float
        Share of the weight counted as resisting uplift.

    Returns
    -------
    ndarray (6, n_t)
        [Fx, Fy, Fz, Mx, My, Mz] [N, N·m].
    """
    a = np.asarray(acc6, dtype=float)
    inertia = np.broadcast_to(np.asarray(inertia, dtype=float), (3,))
    F = mass * a[:3]
    out = np.empty_like(a)
    out[0] = F[0]
    out[1] = F[1]
    out[2] = F[2] + dead_load_factor * mass * g
    out[3] = inertia[0] * a[3] - cg_height * F[1]       # h ẑ × F = (−h Fy, h Fx, 0)
    out[4] = inertia[1] * a[4] + cg_height * F[0]
    out[5] = inertia[2] * a[5]
    return out


def bolt_forces(acc6: np.ndarray, anchors: np.ndarray, *, mass: float, inertia,
                cg_height: float, dead_load_factor: float = 0.9,
                g: float = STANDARD_GRAVITY) -> BoltForces:
    """Per-bolt tension and shear histories (rigid plate, elastic bolt group).

    Parameters
    ----------
    acc6 : ndarray (6, n_t)
        Absolute CG acceleration [m/s², rad/s²] (translations, rotations).
    anchors : ndarray (k, 2)
        Bolt positions [m] from the plate centre (x, y).
    mass, inertia, cg_height, dead_load_factor, g
        See :func:`plate_loads`.

    Returns
    -------
    BoltForces
    """
    xy = np.asarray(anchors, dtype=float).reshape(-1, 2)
    k = xy.shape[0]
    plate = plate_loads(acc6, mass=mass, inertia=inertia, cg_height=cg_height,
                        dead_load_factor=dead_load_factor, g=g)
    n_t = plate.shape[1]
    if k == 0:
        return BoltForces(np.zeros((0, n_t)), np.zeros((0, n_t)), plate)
    Fx, Fy, Fz, Mx, My, Mz = plate
    c = xy.mean(axis=0)
    d = xy - c                                            # (k, 2)
    # moments about the centroid: M_c = M − c × F with c = (cx, cy, 0)
    Mcx = Mx - c[1] * Fz
    Mcy = My + c[0] * Fz
    Mcz = Mz - (c[0] * Fy - c[1] * Fx)
    Ixx = np.array([[np.sum(d[:, 0] ** 2), np.sum(d[:, 0] * d[:, 1])],
                    [np.sum(d[:, 0] * d[:, 1]), np.sum(d[:, 1] ** 2)]])
    # bolt forces on the equipment (up = +): Σ dx f = −Mcy, Σ dy f = Mcx
    rhs = np.vstack([-Mcy, Mcx])                          # (2, n_t)
    if k >= 3 and np.linalg.matrix_rank(Ixx) == 2:
        w = np.linalg.solve(Ixx, rhs)
    else:                                                 # collinear bolts: least squares
        w = np.linalg.pinv(Ixx) @ rhs
    f_up = Fz[None, :] / k + d @ w
    J = float(np.sum(d ** 2))
    tz = Mcz / J if J > 0 else np.zeros_like(Mcz)
    vx = Fx[None, :] / k - d[:, 1:2] * tz[None, :]
    vy = Fy[None, :] / k + d[:, 0:1] * tz[None, :]
    return BoltForces(tension=-f_up, shear=np.hypot(vx, vy), plate=plate)


def fp_comparison(*, weight: float, sds: float, ap: float, rp: float, ip: float,
                  z_over_h: float, anchors: np.ndarray, mass: float, cg_height: float,
                  dead_load_factor: float = 0.9, g: float = STANDARD_GRAVITY) -> dict:
    """Static equivalent-force demands for a side-by-side screening comparison.

    ASCE 7-16 §13.3.1: Fp = 0.4 ap SDS Wp (1 + 2 z/h)/(Rp/Ip), bounded by
    0.3 SDS Ip Wp ≤ Fp ≤ 1.6 SDS Ip Wp; vertical ±0.2 SDS Wp. The horizontal
    force is applied at the CG in x and in y in turn, with the vertical force
    upward (reducing the weight that resists uplift); the worst bolt is given.

    Parameters
    ----------
    weight : float
        Wp [N].
    sds : float
        SDS [g].
    ap, rp, ip, z_over_h : float
        As in the standard (entered by the user).

    Returns
    -------
    dict
        ``fp`` [N], ``fp_over_weight``, ``fv`` [N], ``peak_tension``, ``peak_shear`` [N],
        and ``note``.
    """
    raw = 0.4 * ap * sds * weight * (1.0 + 2.0 * z_over_h) / (rp / ip)
    lo, hi = 0.3 * sds * ip * weight, 1.6 * sds * ip * weight
    fp = float(min(max(raw, lo), hi))
    fv = 0.2 * sds * weight
    ah, av = fp / mass, fv / mass
    cases = np.array([[ah, 0.0, -av, 0, 0, 0], [0.0, ah, -av, 0, 0, 0],
                      [-ah, 0.0, -av, 0, 0, 0], [0.0, -ah, -av, 0, 0, 0]]).T   # (6, 4)
    bf = bolt_forces(cases, anchors, mass=mass, inertia=np.zeros(3), cg_height=cg_height,
                     dead_load_factor=dead_load_factor, g=g)
    return {"fp": fp, "fp_unbounded": float(raw), "fp_over_weight": fp / weight, "fv": float(fv),
            "peak_tension": float(max(0.0, bf.tension.max())) if bf.tension.size else 0.0,
            "peak_shear": float(bf.shear.max()) if bf.shear.size else 0.0,
            "source": "ASCE 7-16 §13.3.1 (parameters as entered)",
            "note": SCREENING_WORDING}
