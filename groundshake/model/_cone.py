"""Cone models: the frequency dependence of a rigid base's rocking and torsion, in time.

A static spring at every frequency overstates a base's rocking stiffness at the
frequencies of soil modes and has no radiation damping; a plain dashpot ρcI beside it
damps the slow rocking far too much. The rotational cone of Wolf (1994) does both
right with one extra degree of freedom a rotation: the spring K from the base to the
ground, and a rotational mass Mθ = ρ·I·z0 hung on the base by the dashpot C = ρ·c·I
(nothing ties that mass to the ground). Its dynamic stiffness is exactly the cone's

    S(ω) = K [1 − (1/3)·b0²/(1 + b0²)] + i·ω·C·b0²/(1 + b0²),   b0 = ω·z0/c,

so K at ω = 0, (2/3)K and the full dashpot ρcI at high frequency.

Wolf, J. P. (1994), Foundation Vibration Analysis Using Simple Physical Models,
Prentice Hall: cone apex height z0 from the static stiffness (here K of the
rectangle, Gazetas 1991, with its embedment factors, so that static and modal runs
see the same spring), c = Vs for torsion, the dilatational velocity Vp for rocking
with ν ≤ 1/3, and 2·Vs with a trapped rotational mass ΔMθ = 1.2(ν − 1/3)·ρ·I·z0 for
1/3 < ν < 1/2 — written from memory; verify against the book before relying on them.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

__all__ = ["RotationCones", "rotation_cones", "cone_network_stiffness", "cone_stiffness",
           "with_cones", "cone_run"]


@dataclass(frozen=True)
class RotationCones:
    """Rotational cones of a rigid base about its x, y and vertical axes (model axes).

    Attributes
    ----------
    stiffness : ndarray (3,)
        Static springs K [N·m/rad] (rx, ry, torsion), as fitted.
    dashpot : ndarray (3,)
        C = ρ·c·I [N·m·s/rad], the high-frequency radiation of each cone.
    internal_inertia : ndarray (3,)
        Mθ = ρ·I·z0 [kg·m²] of the extra rotation hung on the base by ``dashpot``.
    trapped_inertia : ndarray (3,)
        ΔMθ [kg·m²] added to the base itself (nearly incompressible soil; 0 otherwise).
    apex_height : ndarray (3,)
        z0 [m], the cone's apex above the base.
    wave_velocity : ndarray (3,)
        c [m/s].
    second_moment : ndarray (3,)
        I [m⁴] of the base about each axis (polar for torsion).
    """

    stiffness: np.ndarray
    dashpot: np.ndarray
    internal_inertia: np.ndarray
    trapped_inertia: np.ndarray
    apex_height: np.ndarray
    wave_velocity: np.ndarray
    second_moment: np.ndarray

    def to_dict(self) -> dict:
        names = ("rx", "ry", "rz")
        return {f"{key}_{n}": float(v) for key, arr in (
            ("k", self.stiffness), ("c", self.dashpot), ("internal_inertia", self.internal_inertia),
            ("trapped_inertia", self.trapped_inertia), ("apex_height", self.apex_height))
            for n, v in zip(names, arr)}


def rotation_cones(lx: float, ly: float, stiffness, *, shear_wave_velocity: float,
                   poisson_ratio: float, density: float) -> RotationCones:
    """Cones fitted to the static rocking and torsion springs of a rectangular base.

    Parameters
    ----------
    lx, ly : float
        Plan lengths of the base along x and y [m].
    stiffness : array (3,)
        Static springs [N·m/rad] about x, y and the vertical (e.g. Gazetas 1991, with
        embedment factors), > 0.
    shear_wave_velocity : float
        Vs [m/s] of the soil (strain-compatible if so reduced).
    poisson_ratio : float
        ν of the soil, in [0, 0.5).
    density : float
        ρ [kg/m³].

    Returns
    -------
    RotationCones

    Notes
    -----
    I_x = lx·ly³/12, I_y = ly·lx³/12, J = I_x + I_y. Rocking: c = Vp = Vs·√(2(1−ν)/(1−2ν))
    for ν ≤ 1/3, else c = 2·Vs with ΔMθ = 1.2(ν − 1/3)·ρ·I·z0; torsion: c = Vs. The apex
    height reproduces the static spring, K = 3ρc²I/z0; then C = ρcI and Mθ = ρ·I·z0
    (Wolf 1994, from memory).
    """
    k = np.asarray(stiffness, dtype=float).reshape(3)
    if not (lx > 0 and ly > 0 and np.all(k > 0) and shear_wave_velocity > 0 and density > 0
            and 0 <= poisson_ratio < 0.5):
        raise ValueError(f"rotation_cones: lx={lx!r}, ly={ly!r}, stiffness={k.tolist()!r}, "
                         f"Vs={shear_wave_velocity!r}, nu={poisson_ratio!r}, "
                         f"rho={density!r}; need positive sizes, springs, Vs, rho and "
                         "0 <= nu < 0.5")
    vs, nu, rho = float(shear_wave_velocity), float(poisson_ratio), float(density)
    ix, iy = lx * ly ** 3 / 12.0, ly * lx ** 3 / 12.0
    inertia = np.array([ix, iy, ix + iy])
    if nu <= 1.0 / 3.0:
        c_rock, trapped = vs * math.sqrt(2 * (1 - nu) / (1 - 2 * nu)), 0.0
    else:
        c_rock, trapped = 2.0 * vs, 1.2 * (nu - 1.0 / 3.0)
    c = np.array([c_rock, c_rock, vs])
    z0 = 3.0 * rho * c ** 2 * inertia / k
    return RotationCones(stiffness=k, dashpot=rho * c * inertia,
                         internal_inertia=rho * inertia * z0,
                         trapped_inertia=np.array([trapped, trapped, 0.0]) * rho * inertia * z0,
                         apex_height=z0, wave_velocity=c, second_moment=inertia)


def cone_stiffness(cones: RotationCones, omega) -> np.ndarray:
    """The rotational cone's dynamic stiffness, closed form (Wolf 1994, from memory).

    Parameters
    ----------
    cones : RotationCones
    omega : float or array (m,)
        Circular frequency [rad/s].

    Returns
    -------
    ndarray complex, shape (m, 3) (or (3,) for a scalar ``omega``) [N·m/rad]
        K[1 − (1/3)b0²/(1 + b0²)] − ω²ΔMθ + i·K·b0·(1/3)·b0²/(1 + b0²), b0 = ωz0/c.
    """
    w = np.asarray(omega, dtype=float)
    b0 = w[..., None] * cones.apex_height / cones.wave_velocity
    frac = b0 ** 2 / (1.0 + b0 ** 2)
    k = cones.stiffness
    return (k * (1.0 - frac / 3.0) - w[..., None] ** 2 * cones.trapped_inertia
            + 1j * k * b0 * frac / 3.0)


def cone_network_stiffness(cones: RotationCones, omega) -> np.ndarray:
    """Dynamic stiffness of the spring-dashpot-mass network that stands for each cone:
    the same arguments and the same result, complex (m, 3) or (3,) [N·m/rad], as
    :func:`cone_stiffness`, whose closed form it reproduces.

    The base rotation θ0 carries the spring K and the trapped inertia ΔMθ; the extra
    rotation θ1 (inertia Mθ) is tied to θ0 by the dashpot C only:
    Mθ·θ̈1 = C(θ̇0 − θ̇1). Eliminating θ1 at frequency ω:
    S = K − ω²ΔMθ + iωC·(ωMθ)/(ωMθ − iC).
    """
    w = np.asarray(omega, dtype=float)[..., None]
    wm = w * cones.internal_inertia
    return (cones.stiffness - w ** 2 * cones.trapped_inertia
            + 1j * w * cones.dashpot * wm / (wm - 1j * cones.dashpot))


def with_cones(K, M, C, influence, load, base_rotations, cones: RotationCones):
    """Matrices of a model with each cone's extra rotation appended (for step-by-step runs).

    Parameters
    ----------
    K, M : sparse (n, n)
        Stiffness and mass of the model [N/m, kg]; the base's rotational springs stay
        in K as they are (the static K of the cones).
    C : sparse (n, n) or None
        Damping [N·s/m].
    influence, load : ndarray (n, 3)
        ι and the ground load L [kg]; the extra rotations get zeros (the ground
        translates, the soil's cone mass is not driven by it).
    base_rotations : array of int (3,)
        Reduced DOF numbers of the rigid base's rotations about x, y, z.
    cones : RotationCones

    Returns
    -------
    K2, M2, C2 : sparse (n + 3, n + 3)
        With Mθ on the extra rotations, ΔMθ on the base rotations and the dashpots C
        between each base rotation and its extra rotation.
    influence2, load2 : ndarray (n + 3, 3)
    """
    K = sp.csr_matrix(K)
    n = K.shape[0]
    r = np.asarray(base_rotations, dtype=np.int64).reshape(3)
    e = n + np.arange(3)
    rows = np.concatenate([r, e, r, e])
    cols = np.concatenate([r, e, e, r])
    cd = cones.dashpot
    Cc = sp.csr_matrix((np.concatenate([cd, cd, -cd, -cd]), (rows, cols)), shape=(n + 3, n + 3))
    Mc = sp.csr_matrix((np.concatenate([cones.trapped_inertia, cones.internal_inertia]),
                        (np.concatenate([r, e]), np.concatenate([r, e]))), shape=(n + 3, n + 3))

    def grow(A):
        return sp.block_diag([sp.csr_matrix(A), sp.csr_matrix((3, 3))], format="csr")

    K2 = grow(K)
    M2 = (grow(M) + Mc).tocsr()
    C2 = (grow(C) + Cc).tocsr() if C is not None else Cc
    pad = np.zeros((3, 3))
    return (K2, M2, C2, np.vstack([np.asarray(influence, float), pad]),
            np.vstack([np.asarray(load, float), pad]))


def cone_run(model, C, output, peak_operator, on_block, damping_update):
    """The inputs of a step-by-step run of ``model`` with its cones' extra rotations.

    Parameters
    ----------
    model : BlockModel
        With ``cones`` and ``base_rotation_dofs`` (``build_model(..., cones=True)``).
    C : sparse (n, n) or None
        The model's damping matrix [N·s/m].
    output, peak_operator : sparse or ndarray (k, n) or None
        Rows kept by the run; given zero columns for the extra rotations.
    on_block : callable or None
        Receives blocks of displacements; the extra rotations are cut off first.
    damping_update : (U (n, r), d (r,)) or None
        A low-rank damping part; U gets zero rows for the extra rotations.

    Returns
    -------
    tuple
        ``K, M, C, influence, load, output, peak_operator, on_block, damping_update`` for
        :func:`groundshake.dynamics._direct.direct_response`, with n + 3 DOFs.
    """
    n = model.K.shape[0]
    K, M, C, iota, load = with_cones(model.K, model.M, C, model.influence, model.ground_load,
                                     model.base_rotation_dofs, model.cones)

    def pad(A):
        if A is None:
            return None
        if sp.issparse(A):
            return sp.hstack([A, sp.csr_matrix((A.shape[0], 3))], format="csr")
        return np.hstack([np.asarray(A), np.zeros((np.shape(A)[0], 3))])

    block = None if on_block is None else (lambda ub, steps: on_block(ub[:n], steps))
    update = None
    if damping_update is not None:
        U, d = damping_update
        U = U.toarray() if sp.issparse(U) else np.asarray(U)
        update = (np.vstack([U, np.zeros((3, U.shape[1]))]), d)
    return K, M, C, iota, load, pad(output), pad(peak_operator), block, update
