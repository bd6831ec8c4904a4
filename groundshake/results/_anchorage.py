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

__all__ = ["BoltForces", "bolt_forces", "plate_loads", "fp_comparison", "bolt_interaction",
           "INTERACTION_FORMS", "SCREENING_WORDING", "worst_entries"]

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


#: Tension–shear interaction forms of :func:`bolt_interaction` and where each comes from.
INTERACTION_FORMS = {
    "5/3-power": "(T/Tc)^(5/3) + (V/Vc)^(5/3) <= 1 (ACI 318-19 commentary R17.8, "
                 "from memory)",
    "trilinear": "T/Tc alone when V/Vc <= 0.2, V/Vc alone when T/Tc <= 0.2, else "
                 "(T/Tc + V/Vc)/1.2 <= 1 (ACI 318-19 §17.8, from memory)",
}


def bolt_interaction(tension: np.ndarray, shear: np.ndarray, *, tension_capacity: float,
                     shear_capacity: float, form: str = "5/3-power") -> np.ndarray:
    """Tension–shear interaction ratio of bolts against user-entered capacities.

    A screening ratio (1 = on the interaction curve), never a code check: the
    capacities are the user's numbers and the form is one published shape.

    Parameters
    ----------
    tension : ndarray (..., n_t)
        Bolt axial force [N], tension positive (compression counts as zero).
    shear : ndarray (..., n_t)
        Bolt shear [N] (magnitude).
    tension_capacity, shear_capacity : float
        Tc, Vc per bolt [N], > 0.
    form : {"5/3-power", "trilinear"}
        ``"5/3-power"``: r = (T/Tc)^(5/3) + (V/Vc)^(5/3);
        ``"trilinear"``: r = T/Tc where V/Vc ≤ 0.2, V/Vc where T/Tc ≤ 0.2, otherwise
        (T/Tc + V/Vc)/1.2. See :data:`INTERACTION_FORMS` for the sources.

    Returns
    -------
    ndarray, the shape of ``tension``
        Interaction ratio (dimensionless).

    Raises
    ------
    ValueError
        For capacities ≤ 0 or an unknown form.

    Examples
    --------
    >>> float(bolt_interaction(np.array(50e3), np.array(0.0), tension_capacity=100e3,
    ...                        shear_capacity=80e3, form="trilinear"))
    0.5
    """
    if not (tension_capacity > 0 and shear_capacity > 0):
        raise ValueError(f"capacities must be > 0; given tension_capacity={tension_capacity!r}, "
                         f"shear_capacity={shear_capacity!r}")
    t = np.maximum(np.asarray(tension, dtype=float), 0.0) / float(tension_capacity)
    v = np.abs(np.asarray(shear, dtype=float)) / float(shear_capacity)
    if form == "5/3-power":
        return t ** (5.0 / 3.0) + v ** (5.0 / 3.0)
    if form == "trilinear":
        return np.where(v <= 0.2, t, np.where(t <= 0.2, v, (t + v) / 1.2))
    raise ValueError(f"form: given {form!r}; allowed one of {tuple(INTERACTION_FORMS)}")


def worst_entries(worst_dc, worst_ir) -> dict:
    """The summary's ``worst_dc`` and ``worst_interaction`` entries (None where absent).

    ``worst_dc`` is (ratio, equipment name, bolt number) and ``worst_ir`` is (ratio,
    equipment name, bolt number, interaction form key); both ratios are screening
    comparisons with user capacities, never a code check.
    """
    return {
        "worst_dc": None if worst_dc is None else
        {"value": worst_dc[0], "equipment": worst_dc[1], "bolt": worst_dc[2],
         "note": SCREENING_WORDING},
        "worst_interaction": None if worst_ir is None else
        {"value": worst_ir[0], "equipment": worst_ir[1], "bolt": worst_ir[2],
         "form": INTERACTION_FORMS[worst_ir[3]], "note": SCREENING_WORDING},
    }
