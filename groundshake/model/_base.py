"""The base face of the block and its support: fixed, six soil springs at a rigid base
(lumped) or a consistent spring bed (distributed); the springs' and dashpots' matrices and
the base-reaction operators.

Soil springs: Gazetas (1991) for a rigid rectangle (model/_supports.py) with embedment,
frequency dependence and the strain-compatible modulus (model/_impedance.py); the
rotational cones of Wolf (1994) for step-by-step runs (model/_cone.py).
"""
from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .._errors import GroundshakeWarning, ScenarioError
from ..scenario import SupportSettings
from ._cone import rotation_cones
from ._impedance import adjust_impedance, modulus_ratio_of
from ._links import Links, Reduction, resultant_rows
from ._supports import Impedance, distributed_bed, gazetas_rectangle
from ._types import ReactionOperators

__all__ = ["BaseFace", "BaseSupport", "SupportMatrices", "base_face", "place_support",
           "support_matrices", "base_reactions", "base_cones"]

#: What the summary says of the rotational cones.
_CONE_NOTE = ("time-domain soil impedance: rocking and torsion as rotational cones "
              "(Wolf 1994, from memory), each the static spring plus an extra "
              "rotation of inertia rho*I*z0 hung on the base by the dashpot "
              "rho*c*I, fitted to the static springs; translations keep their "
              "springs and dashpots")


@dataclass(frozen=True, eq=False)
class BaseFace:
    """The bottom face of the block: ``nodes`` (nb,) and their ``dofs`` (3nb,), ``centre``
    (3,) [m] of its enclosing rectangle ``lx`` × ``ly`` [m], ``area`` [m²], and ``info``
    (the summary's ``base`` entry)."""

    nodes: np.ndarray
    dofs: np.ndarray
    centre: np.ndarray
    area: float
    lx: float
    ly: float
    info: dict


def base_face(mesh, kind: str, notes: list) -> BaseFace:
    """The base face of ``mesh``; a note (and on soil a warning) when it is not a rectangle."""
    nodes = mesh.nodes
    xs, ys, zs = mesh.lines
    zmin = zs[0]
    base_nodes = np.flatnonzero(np.abs(nodes[:, 2] - zmin) <= 1e-9 * max(1.0, zs[-1] - zmin))
    bottom = mesh.filled[0]
    dxs, dys = np.diff(xs), np.diff(ys)
    area = float((bottom * dys[:, None] * dxs[None, :]).sum())
    bx0, bx1 = nodes[base_nodes, 0].min(), nodes[base_nodes, 0].max()
    by0, by1 = nodes[base_nodes, 1].min(), nodes[base_nodes, 1].max()
    lx, ly = bx1 - bx0, by1 - by0
    centre = np.array([(bx0 + bx1) / 2, (by0 + by1) / 2, zmin])
    info = {"area": area, "lx": float(lx), "ly": float(ly), "centre": centre, "z": float(zmin)}
    if abs(area - lx * ly) > 0.01 * lx * ly:
        msg = (f"base face is not a rectangle (area {area:.4g} m² vs {lx:g} × {ly:g} m); "
               "soil springs use the enclosing rectangle")
        notes.append(msg)
        if kind == "soil":
            warnings.warn(msg, GroundshakeWarning, stacklevel=3)
    return BaseFace(nodes=base_nodes, dofs=(3 * base_nodes[:, None] + np.arange(3)).ravel(),
                    centre=centre, area=area, lx=lx, ly=ly, info=info)


@dataclass(frozen=True, eq=False)
class BaseSupport:
    """The support as placed: ``kind`` fixed or soil; on soil the ``impedance``, the
    effective soil ``vs`` [m/s], ``nu``, ``rho`` [kg/m³], and either ``master`` (offset of
    the rigid base's six master DOFs, lumped springs) or the bed (``bed`` (nn, nn) the
    consistent ∫N_A N_B dA, ``tributary`` (nn,) ∫N_A dA [m²], ``k_area`` (3,) [N/m³])."""

    kind: str
    impedance: Impedance | None = None
    master: int | None = None
    vs: float = 0.0
    nu: float = 0.0
    rho: float = 0.0
    bed: sp.csr_matrix | None = None
    tributary: np.ndarray | None = None
    k_area: np.ndarray | None = None


def _bed(mesh, face: BaseFace, impedance: Impedance, notes: list):
    """Consistent Winkler bed: ∫N_A N_B dA over the bottom faces of the bottom cells."""
    nodes, nn = mesh.nodes, mesh.n_nodes
    xs, ys, _ = mesh.lines
    dxs, dys = np.diff(xs), np.diff(ys)
    jj, ii = np.nonzero(mesh.filled[0])
    quad = np.stack([mesh.node_id[0, jj, ii], mesh.node_id[0, jj, ii + 1],
                     mesh.node_id[0, jj + 1, ii + 1], mesh.node_id[0, jj + 1, ii]], 1)
    q4 = np.array([[4, 2, 1, 2], [2, 4, 2, 1], [1, 2, 4, 2], [2, 1, 2, 4]]) / 36.0
    vals = (dxs[ii] * dys[jj])[:, None, None] * q4[None]
    Qn = sp.csr_matrix((vals.ravel(), (np.repeat(quad, 4, axis=1).ravel(),
                                       np.tile(quad, (1, 4)).ravel())), shape=(nn, nn))
    wq = np.asarray(Qn.sum(axis=1)).ravel()           # ∫N_A dA, tributary areas
    xc, yc = nodes[:, 0] - face.centre[0], nodes[:, 1] - face.centre[1]
    ix_b, iy_b = float(wq @ (yc * yc)), float(wq @ (xc * xc))  # exact for bilinear N
    k_area, note = distributed_bed(face.area, (ix_b, iy_b), impedance.stiffness)
    notes.append(note)
    notes.append("distributed bed: radiation dashpots Cx, Cy, Cz act on the base's "
                 "area-averaged translations, so rocking and torsion carry no "
                 "radiation damping, as with lumped springs")
    return Qn, wq, k_area


def place_support(mesh, face: BaseFace, support: SupportSettings, links: Links, notes: list,
                  frequency_hz=None) -> BaseSupport:
    """Lay down the support's constraints on ``links`` and compute its soil springs.

    ``frequency_hz`` (6,) [Hz], optional: the frequency of each soil spring (x, y, z, rx,
    ry, t); None = static."""
    kind = support.kind
    if kind == "fixed":
        links.fix(face.dofs)
        return BaseSupport(kind)
    if kind != "soil":
        raise ScenarioError(f"given {kind!r}; allowed 'fixed', 'soil'", param="support.kind",
                            value=kind)
    # strain-compatible modulus G = (G/G0)·ρVs², as an effective Vs (model/_impedance.py)
    vs = float(support.shear_wave_velocity) * math.sqrt(modulus_ratio_of(support)[0])
    nu, rho = float(support.poisson_ratio), float(support.density)
    impedance = gazetas_rectangle(face.lx, face.ly, shear_wave_velocity=vs, poisson_ratio=nu,
                                  density=rho, radiation_damping=bool(support.radiation_damping))
    # embedment and frequency dependence (model/_impedance.py)
    impedance = adjust_impedance(impedance, face.lx, face.ly, support=support,
                                 frequency_hz=frequency_hz)
    if support.springs == "distributed":
        Qn, wq, k_area = _bed(mesh, face, impedance, notes)
        return BaseSupport(kind, impedance, vs=vs, nu=nu, rho=rho, bed=Qn, tributary=wq,
                           k_area=k_area)
    master = links.link(face.dofs, mesh.nodes[face.nodes] - face.centre)
    return BaseSupport(kind, impedance, master=master, vs=vs, nu=nu, rho=rho)


@dataclass(frozen=True, eq=False)
class SupportMatrices:
    """The soil's matrices in the reduced DOFs: ``Kx``, ``Cx`` (n_extra, n_extra) springs
    and dashpots on the rigid base's masters (lumped), ``K_bed`` (n, n) the bed's springs,
    ``radiation`` (n, n) the lumped radiation dashpots, ``lowrank`` (U (n, 3), c (3,)) the
    bed's dashpots on the mean base translation, and ``stiffness`` (n, n) the soil springs
    (for the strain-energy split of modal damping)."""

    Kx: np.ndarray
    Cx: np.ndarray
    K_bed: sp.csr_matrix | None = None
    radiation: sp.csr_matrix | None = None
    lowrank: tuple | None = None
    stiffness: sp.csr_matrix | None = None


def _on_master(red: Reduction, master: int, diagonal: np.ndarray) -> np.ndarray:
    D = np.zeros((red.n_extra, red.n_extra))
    D[master:master + 6, master:master + 6] = np.diag(diagonal)
    return D


def support_matrices(sup: BaseSupport, face: BaseFace, red: Reduction) -> SupportMatrices:
    """The springs and dashpots of ``sup`` in the reduced DOFs of ``red``."""
    m = red.n_extra
    if sup.kind != "soil":
        return SupportMatrices(np.zeros((m, m)), np.zeros((m, m)))
    imp = sup.impedance
    if sup.master is not None:
        Cr = _on_master(red, sup.master, imp.damping)
        return SupportMatrices(_on_master(red, sup.master, imp.stiffness), Cr,
                               radiation=red.extra(Cr),
                               stiffness=red.extra(_on_master(red, sup.master, imp.stiffness)))
    n, red_of, nodes = red.n, red.red_of, face.nodes
    Qc = sup.bed.tocoo()
    Ks_sp = sp.csr_matrix(sum(
        sp.csr_matrix((sup.k_area[d] * Qc.data, (red_of[3 * Qc.row + d],
                                                 red_of[3 * Qc.col + d])), shape=(n, n))
        for d in range(3)))
    # dashpots on the mean translation ū_d = Σ (w_A/A) u_Ad: C = U diag(c) Uᵀ
    U = sp.csr_matrix((np.tile(sup.tributary[nodes] / face.area, 3),
                       (np.concatenate([red_of[3 * nodes + d] for d in range(3)]),
                        np.repeat(np.arange(3), nodes.size))), shape=(n, 3))
    return SupportMatrices(np.zeros((m, m)), np.zeros((m, m)), K_bed=Ks_sp,
                           lowrank=(U, imp.damping[:3].copy()), stiffness=Ks_sp)


def base_reactions(sup: BaseSupport, face: BaseFace, red: Reduction, mats: SupportMatrices,
                   Kn: sp.spmatrix, Mn: sp.spmatrix, mesh) -> ReactionOperators:
    """What the structure exerts on its support, from the reduced u, u̇, ü and a_g: on a
    fixed base the base nodes' elastic and inertia forces (damping forces there are not
    included), on soil the springs and dashpots."""
    n, P = red.n, red.P
    offsets = mesh.nodes[face.nodes] - face.centre
    if sup.kind == "fixed":
        n_node_dof = P.shape[0]
        iota_nodes = sp.csr_matrix((np.ones(n_node_dof), (np.arange(n_node_dof),
                                                          np.arange(n_node_dof) % 3)),
                                   shape=(n_node_dof, 3))
        Sres = sp.csr_matrix(resultant_rows(offsets))  # (6, 3nb)
        KR = -(Sres @ (Kn[face.dofs] @ P)).toarray()
        MR = -(Sres @ (Mn[face.dofs] @ P)).toarray()
        GR = -(Sres @ (Mn[face.dofs] @ iota_nodes)).toarray()
        return ReactionOperators(K=KR, C=np.zeros_like(KR), M=MR, G=GR)
    KR = np.zeros((6, n))
    CR = np.zeros((6, n))
    if sup.master is not None:
        cols = slice(red.nf + sup.master, red.nf + sup.master + 6)
        KR[:, cols] = np.diag(sup.impedance.stiffness)
        CR[:, cols] = np.diag(sup.impedance.damping)
    else:
        Sres = resultant_rows(offsets)
        bd = red.red_of[face.dofs]
        KR = (sp.csr_matrix(Sres) @ mats.K_bed[bd]).toarray()
        Ul, cl = mats.lowrank
        CR = ((Sres @ Ul[bd].toarray()) * cl[None, :]) @ Ul.T.toarray()
    return ReactionOperators(K=KR, C=CR, M=np.zeros((6, n)), G=np.zeros((6, 3)))


def base_cones(sup: BaseSupport, face: BaseFace, red: Reduction, notes: list):
    """Rotational cones of a lumped soil base (Wolf 1994) and the reduced DOFs of the base
    rotations they hang on, or (None, None) with a note when the bed is distributed."""
    if sup.master is None:
        notes.append("time-domain soil impedance: rotational cones need lumped springs; "
                     "the distributed bed keeps its static springs")
        return None, None
    cones = rotation_cones(face.lx, face.ly, sup.impedance.stiffness[3:],
                           shear_wave_velocity=sup.vs, poisson_ratio=sup.nu, density=sup.rho)
    notes.append(_CONE_NOTE)
    return cones, red.nf + sup.master + np.arange(3, 6)

