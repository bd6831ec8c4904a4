"""Equipment on the top face: each footprint slaved to a rigid mount (six master DOFs at
the footprint's centre), the item's mass and rotary inertia at its CG on the mount, and
for a flexible support three CG translations on springs and dashpots of its own.

Support springs k = m(2πf)² and dashpots c = 2ξm(2πf) per direction (SDOF, Chopra §2.1
and §2.2).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .._errors import ScenarioError
from ..scenario import Equipment, box_rotary_inertia
from ._links import Links, Reduction, rigid_link
from ._types import EquipmentModel

__all__ = ["Mount", "EquipmentMatrices", "place_mounts", "equipment_matrices"]


@dataclass(frozen=True, eq=False)
class Mount:
    """Where an equipment item ``spec`` (its index ``index``) stands: ``point`` (3,) [m]
    the footprint's centre on the top face, ``master`` the offset of its six mount DOFs,
    ``cg_master`` the offset of its three CG translations (flexible support) or None."""

    index: int
    spec: Equipment
    point: np.ndarray
    master: int
    cg_master: int | None


def _footprint_nodes(mesh, q: int, e: Equipment, status: np.ndarray):
    """The top-face height [m] and nodes of the footprint of item ``q``; ScenarioError when
    it is not wholly on one flat top face or overlaps another constraint."""
    nodes = mesh.nodes
    xs, ys, zs = mesh.lines
    top_tol = 1e-9 * max(1.0, zs[-1] - zs[0])
    name = e.name
    mx, my = (float(v) for v in e.mount)
    bxf, byf = (float(v) for v in e.footprint)
    x0, x1, y0, y1 = mx - bxf / 2, mx + bxf / 2, my - byf / 2, my + byf / 2
    ci = np.flatnonzero(((xs[:-1] + xs[1:]) / 2 > x0) & ((xs[:-1] + xs[1:]) / 2 < x1))
    cj = np.flatnonzero(((ys[:-1] + ys[1:]) / 2 > y0) & ((ys[:-1] + ys[1:]) / 2 < y1))
    if ci.size == 0 or cj.size == 0:
        raise ScenarioError(f"footprint of {name!r}, {bxf:g} × {byf:g} m at mount "
                            f"[{mx:g}, {my:g}] covers no element; allowed a footprint on the "
                            "block's top face", param=f"equipment[{q}]")
    col = mesh.filled[:, cj[:, None], ci[None, :]]  # (nez, nj, ni)
    has = col.any(axis=0)
    topk = np.where(has, col.shape[0] - 1 - np.argmax(col[::-1], axis=0), -1)
    if not has.all() or np.unique(topk).size != 1:
        raise ScenarioError(f"footprint of {name!r} at mount [{mx:g}, {my:g}] does not lie on "
                            "one flat top face of the block; allowed a footprint within a "
                            "single top surface", param=f"equipment[{q}]")
    k_top = int(topk.flat[0]) + 1
    ztop = zs[k_top]
    if k_top < len(zs) - 1 and mesh.filled[k_top:, cj[:, None], ci[None, :]].any():
        raise ScenarioError(f"footprint of {name!r} is not on a top face",
                            param=f"equipment[{q}]")
    sel = ((np.abs(nodes[:, 2] - ztop) <= top_tol)
           & (nodes[:, 0] >= x0 - 1e-9) & (nodes[:, 0] <= x1 + 1e-9)
           & (nodes[:, 1] >= y0 - 1e-9) & (nodes[:, 1] <= y1 + 1e-9))
    fp_nodes = np.flatnonzero(sel)
    if np.any(status[(3 * fp_nodes[:, None] + np.arange(3)).ravel()] != 0):
        raise ScenarioError(f"footprint of {name!r} overlaps the base or another equipment "
                            "footprint; allowed separate footprints on the top face",
                            param=f"equipment[{q}]")
    return ztop, fp_nodes


def place_mounts(mesh, equipment, links: Links) -> list[Mount]:
    """Slave each item's footprint nodes to a rigid mount on ``links`` (after the base)."""
    mounts = []
    for q, e in enumerate(equipment):
        ztop, fp_nodes = _footprint_nodes(mesh, q, e, links.status)
        point = np.array([float(e.mount[0]), float(e.mount[1]), ztop])
        master = links.link((3 * fp_nodes[:, None] + np.arange(3)).ravel(),
                            mesh.nodes[fp_nodes] - point)
        cg_master = links.masters(3) if e.frequency_hz is not None else None
        mounts.append(Mount(q, e, point, master, cg_master))
    return mounts


@dataclass(frozen=True, eq=False)
class EquipmentMatrices:
    """The equipment's part of the master DOFs' matrices (n_extra, n_extra): ``Mx`` mass
    and rotary inertia, ``Kx`` and ``Cx`` the flexible supports' springs and dashpots,
    ``M_flexible`` the masses on flexible supports; ``parts`` [(ratio, K_support (n, n))]
    and the modelled ``items``."""

    Mx: np.ndarray
    Kx: np.ndarray
    Cx: np.ndarray
    M_flexible: np.ndarray
    parts: list
    items: list


def _inertia(e: Equipment) -> np.ndarray:
    """Rotary inertia (3,) [kg·m²] about the CG; a solid box when the scenario has none."""
    inertia = e.rotary_inertia
    if inertia is None:
        inertia = box_rotary_inertia(float(e.mass), e.footprint, float(e.cg_height))
    return np.broadcast_to(np.asarray(inertia, float), (3,)).copy()


def equipment_matrices(mounts: list[Mount], block_ratio: float,
                       red: Reduction) -> EquipmentMatrices:
    """Masses, springs and dashpots of the mounted items in the reduced DOFs of ``red``;
    a support's damping ratio is its own or else ``block_ratio``."""
    m_x, n, nf = red.n_extra, red.n, red.nf
    Mx, Kx, Cx, Meq = (np.zeros((m_x, m_x)) for _ in range(4))
    parts, items = [], []
    for mt in mounts:
        e, mo, eo = mt.spec, mt.master, mt.cg_master
        m, hcg = float(e.mass), float(e.cg_height)
        inertia = _inertia(e)
        cg = mt.point + np.array([0.0, 0.0, hcg])
        Tcg = rigid_link(cg - mt.point)  # (3, 6)
        zeta = block_ratio if e.damping_ratio is None else e.damping_ratio
        Mx[mo + 3:mo + 6, mo + 3:mo + 6] += np.diag(inertia)
        op = np.zeros((6, n))
        op[3:, nf + mo + 3:nf + mo + 6] = np.eye(3)
        if eo is None:
            Mx[mo:mo + 6, mo:mo + 6] += m * Tcg.T @ Tcg
            op[:3, nf + mo:nf + mo + 6] = Tcg
            fz = None
        else:
            fz = np.broadcast_to(np.asarray(e.frequency_hz, float), (3,)).copy()
            kk = m * (2 * np.pi * fz) ** 2
            cc = 2 * zeta * m * (2 * np.pi * fz)
            Mx[eo:eo + 3, eo:eo + 3] += m * np.eye(3)
            Meq[eo:eo + 3, eo:eo + 3] += m * np.eye(3)
            L = np.zeros((3, m_x))
            L[:, eo:eo + 3] = np.eye(3)
            L[:, mo:mo + 6] -= Tcg
            Kq = L.T @ np.diag(kk) @ L
            Kx += Kq
            Cx += L.T @ np.diag(cc) @ L
            parts.append((zeta, red.extra(Kq)))
            op[:3, nf + eo:nf + eo + 3] = np.eye(3)
        items.append(EquipmentModel(
            name=e.name, mass=m, inertia=inertia, cg=cg, mount=mt.point,
            anchors=np.asarray(e.anchors or [], float).reshape(-1, 2),
            dead_load_factor=float(e.dead_load_factor), capacity=e.capacity, fp=e.fp,
            operator=sp.csr_matrix(op), frequency_hz=fz, damping=zeta,
            footprint=np.array([float(v) for v in e.footprint])))
    return EquipmentMatrices(Mx, Kx, Cx, Meq, parts, items)
