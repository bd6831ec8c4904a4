"""The ground's load on the block model and its inertia: the influence vectors ι, the
ground load L, the total and rigidly moving masses, and the d'Alembert base reactions.

Effective-force method (Clough & Penzien, support excitation): relative displacements
u, load −L·a_g with L = M_ff ι_f + M_fb ι_b; on a fixed base the coupling of the first
layer of nodes to the moving base nodes is part of the load.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ..linalg import mass_solve
from ._links import Reduction, rigid_link
from ._types import ReactionOperators

__all__ = ["GroundLoad", "influence", "ground_load", "inertia_reaction"]


def influence(red: Reduction, masters: list[int]) -> np.ndarray:
    """ι (n, 3): the rigid translation of each reduced DOF under a unit ground
    displacement; ``masters`` the offsets of the master DOFs whose first three are
    translations (rigid base, mounts, CG translations)."""
    iota = np.zeros((red.n, 3))
    iota[np.arange(red.nf), red.free_dofs % 3] = 1.0
    for mo in masters:
        iota[red.nf + mo + np.arange(3), np.arange(3)] = 1.0
    return iota


@dataclass(frozen=True, eq=False)
class GroundLoad:
    """``load`` (n, 3) [kg] L, ``total_mass`` (3,) [kg] and ``rigid_mass`` (3,) [kg]
    (m − Lᵀ M⁻¹ L, the mass moving rigidly with the ground), with a ``note`` or None."""

    load: np.ndarray
    total_mass: np.ndarray
    rigid_mass: np.ndarray
    note: str | None


def ground_load(M: sp.csr_matrix, Mn: sp.spmatrix, iota: np.ndarray, red: Reduction, *,
                fixed: bool, mass_kind: str) -> GroundLoad:
    """L = M_ff ι_f + M_fb ι_b (the consistent mass stays as assembled) and the masses,
    from the reduced M (n, n) and the node mass Mn (3·n_nodes, 3·n_nodes) [kg]."""
    Mi = np.asarray(M @ iota)
    if not fixed:
        return GroundLoad(Mi, np.einsum("ia,ia->a", iota, Mi), np.zeros(3), None)
    P = red.P
    n_node_dof = P.shape[0]
    iota_b = np.zeros((n_node_dof, 3))
    fixed_dofs = np.flatnonzero(red.status == 1)
    iota_b[fixed_dofs, fixed_dofs % 3] = 1.0
    Mnb = np.asarray(Mn @ iota_b)
    load = Mi + np.asarray(P.T @ Mnb)
    total_mass = (np.einsum("ia,ia->a", iota, Mi)
                  + 2 * np.einsum("ia,ia->a", iota, np.asarray(P.T @ Mnb))
                  + np.einsum("ia,ia->a", iota_b, Mnb))
    moving = np.einsum("ia,ia->a", load, mass_solve(M, load))
    rigid_mass = np.maximum(total_mass - moving, 0.0)
    note = (f"fixed base: {mass_kind} mass kept as assembled; ground load "
            "L = M_ff·ι_f + M_fb·ι_b; mass moving rigidly with the ground "
            f"(m − Lᵀ M_ff⁻¹ L) {rigid_mass[0]:.4g} kg of {total_mass[0]:.4g} kg; "
            "base reactions include the base nodes' inertia and M_bf·ü_f")
    return GroundLoad(load, total_mass, rigid_mass, note)


def inertia_reaction(M: sp.csr_matrix, load: np.ndarray, red: Reduction, nodes: np.ndarray,
                     centre: np.ndarray, rigid: list, points: list,
                     base: ReactionOperators | None) -> ReactionOperators:
    """d'Alembert: the structure exerts −Σ m ü_abs on its support (moments about the
    centre (3,) [m] of the base face). T (n, 6) is a rigid motion about that centre in the
    reduced DOFs: node DOFs by their positions, ``rigid`` the offsets of six-DOF masters
    moving as the base does (the rigid base), ``points`` (offset, position (3,) [m], with
    rotations) for mounts (True) and CG translations (False). ``base`` (fixed base): the
    base nodes' own inertia and their coupling M_bf ü_f, added."""
    nf, free = red.nf, red.free_dofs
    T = np.zeros((red.n, 6))
    T[:nf] = rigid_link(nodes[free // 3] - centre).reshape(-1, 3, 6)[np.arange(nf), free % 3]
    for mo in rigid:
        T[nf + mo:nf + mo + 6] = np.eye(6)
    for mo, at, rotations in points:
        T[nf + mo:nf + mo + 3] = rigid_link(at - centre)
        if rotations:
            T[nf + mo + 3:nf + mo + 6, 3:] = np.eye(3)
    MT = -np.asarray((M @ T).T)
    GT = -T.T @ load
    if base is not None:
        MT = MT + base.M
        GT = GT + base.G
    return ReactionOperators(K=np.zeros((6, red.n)), C=np.zeros((6, red.n)), M=MT, G=GT)
