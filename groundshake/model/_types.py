"""The block model's data types: sensors, equipment, base-reaction operators and the
frozen :class:`BlockModel` itself (data only; :func:`~groundshake.model.build_model`
makes one, ``groundshake.dynamics`` computes damping and modes from it)."""
from __future__ import annotations

import weakref
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
import scipy.sparse as sp

from .._constants import STANDARD_GRAVITY
from ..linalg import Factor, factorize
from ._cone import RotationCones
from ._mesh import GridMesh
from ._recovery import StressPoints
from ._supports import Impedance

if TYPE_CHECKING:  # pragma: no cover
    from ..scenario import AnchorCapacity, FpParameters

__all__ = ["G_STANDARD", "Point", "EquipmentModel", "ReactionOperators", "BlockModel"]

#: Standard gravity [m/s²] (the one value of groundshake._constants).
G_STANDARD = STANDARD_GRAVITY


@dataclass(frozen=True, eq=False)
class Point:
    """A sensor: ``operator`` (3, n) sparse gives its relative displacement [m] from u."""

    name: str
    position: np.ndarray
    operator: sp.csr_matrix


@dataclass(frozen=True, eq=False)
class EquipmentModel:
    """An equipment item as modelled.

    ``operator`` (6, n) sparse: CG translations [m] and rotations [rad] (relative).
    ``frequency_hz`` (3,) or None (rigid); ``damping`` ratio of its support.
    """

    name: str
    mass: float
    inertia: np.ndarray
    cg: np.ndarray
    mount: np.ndarray
    anchors: np.ndarray
    dead_load_factor: float
    capacity: AnchorCapacity | None
    fp: FpParameters | None
    operator: sp.csr_matrix
    frequency_hz: np.ndarray | None
    damping: float
    footprint: np.ndarray

    @property
    def weight(self) -> float:
        """Weight [N]."""
        return self.mass * G_STANDARD


@dataclass(frozen=True, eq=False)
class ReactionOperators:
    """Base resultants R(t) = K·u + C·u̇ + M·ü + G·a_g the structure exerts on its
    support, [Fx, Fy, Fz, Mx, My, Mz] [N, N·m] about the centre of the base face.
    ``K``, ``C``, ``M`` (6, n) dense, ``G`` (6, 3) dense."""

    K: np.ndarray
    C: np.ndarray
    M: np.ndarray
    G: np.ndarray


#: Factorizations of K, one a model, made on first use and dropped with the model.
_FACTORS: "weakref.WeakKeyDictionary[BlockModel, Factor]" = weakref.WeakKeyDictionary()


@dataclass(frozen=True, eq=False)
class BlockModel:
    """The finite-element model of a block and what stands on it (see docs/INTERNALS.md).

    Frozen and data only: the functions of ``groundshake.dynamics`` and
    ``groundshake.results`` read it and return what they compute.

    Matrices are in the reduced DOFs (n,) of relative displacement: ``K`` [N/m],
    ``M`` [kg] sparse CSR (n, n), the consistent (or lumped) mass exactly as assembled;
    ``influence`` (n, 3) ι, the rigid translation of each reduced DOF under a unit ground
    displacement; ``ground_load`` (n, 3) [kg], L = M_ff ι_f + M_fb ι_b, so that the load of
    the ground acceleration a_g is −L·a_g (equal to M ι unless the base is fixed);
    ``total_mass`` (3,) [kg], every mass of the model including the fixed base nodes';
    ``rigid_mass`` (3,) [kg], m − Lᵀ M⁻¹ L, the mass that moves rigidly with the ground
    (the base nodes' share on a fixed base; zero on soil).
    """

    nodes: np.ndarray
    elements: np.ndarray
    element_centres: np.ndarray
    element_part: np.ndarray
    K: sp.csr_matrix
    M: sp.csr_matrix
    influence: np.ndarray
    total_mass: np.ndarray
    ground_load: np.ndarray
    rigid_mass: np.ndarray
    weight: float
    sensors: tuple[Point, ...]
    equipment: tuple[EquipmentModel, ...]
    reaction: ReactionOperators
    stress: sp.csr_matrix
    base: dict
    damping_ratio: float
    rayleigh_hz: tuple[float, float] | None
    support_kind: str
    element_kind: str
    mass_kind: str
    part_names: tuple[str, ...]
    materials: dict
    node_map: sp.csr_matrix
    impedance: Impedance | None = None
    solver: str = "auto"
    cutoff_hz: float | None = None
    _stiff_parts: tuple = ()                           # (ratio, K_part (n, n))
    _dashpots: sp.csr_matrix | None = None             # discrete dashpots (n, n)
    _radiation: sp.csr_matrix | None = None            # soil radiation part of them
    notes: tuple[str, ...] = ()
    mesh: GridMesh | None = None  # the grid, for plots and the mesh description
    inertia_reaction: ReactionOperators | None = None
    _equipment_mass: sp.csr_matrix | None = None       # masses on flexible supports (n, n)
    _radiation_lowrank: tuple | None = None            # (U (n, r), d (r,))
    stress_points: StressPoints | None = None  # where the rows of ``stress`` sit
    #: rotational cones of a lumped soil base for step-by-step runs (model/_cone.py) and
    #: the reduced DOFs of the base's rotations about x, y, z they hang on
    cones: RotationCones | None = None
    base_rotation_dofs: np.ndarray | None = None

    @property
    def n_dof(self) -> int:
        return self.K.shape[0]

    @property
    def is_classically_damped(self) -> bool:
        """False when discrete dashpots (soil radiation, equipment supports) are present."""
        return ((self._dashpots is None or self._dashpots.nnz == 0)
                and self._radiation_lowrank is None)

    def factor(self) -> Factor:
        """The factorization of K, made on first use and reused (``.solve(B)`` gives K⁻¹B).

        It is kept beside the model, not in it, and released with the model."""
        f = _FACTORS.get(self)
        if f is None:
            f = _FACTORS[self] = factorize(self.K, solver=self.solver)
        return f

    @property
    def _factor(self) -> Factor | None:
        """The factorization made by :meth:`factor`, or None before its first use."""
        return _FACTORS.get(self)

    def block_mass_matrix(self) -> sp.csr_matrix:
        """M (n, n) [kg] without the masses on flexible equipment supports: the block, its
        rigidly attached equipment and the equipment's rotary inertia on its mount."""
        if self._equipment_mass is None or self._equipment_mass.nnz == 0:
            return self.M
        return sp.csr_matrix(self.M - self._equipment_mass)

    def damping_update(self):
        """Low-rank damping (U (n, r), d (r,)) added to :meth:`damping_matrix`: C += U·diag(d)·Uᵀ
        [N·s/m] (radiation dashpots on the area-averaged translations of a distributed bed),
        or None."""
        return self._radiation_lowrank

    def _block_stiffness(self):
        K = self.K
        for ratio, Kp in self._stiff_parts:
            if ratio is not None:
                K = K - Kp
        return K

    def describe(self) -> dict:
        """Plain dict for summary.json: mesh counts, element, supports, materials."""
        d = {
            "element": self.element_kind,
            "mass": self.mass_kind,
            "n_nodes": int(self.nodes.shape[0]),
            "n_elements": int(self.elements.shape[0]),
            "n_dof": int(self.n_dof),
            "parts": list(self.part_names),
            "materials": self.materials,
            "total_mass": [float(v) for v in self.total_mass],
            "rigid_mass": [float(v) for v in self.rigid_mass],
            "weight": float(self.weight),
            "support": {"kind": self.support_kind},
            "base": {k: (v.tolist() if isinstance(v, np.ndarray) else v)
                     for k, v in self.base.items()},
            "damping": {"ratio": self.damping_ratio,
                        "rayleigh_hz": list(self.rayleigh_hz) if self.rayleigh_hz else None,
                        "classical": self.is_classically_damped},
            "equipment": [{"name": e.name, "mass": e.mass, "cg": e.cg.tolist(),
                           "support": "rigid" if e.frequency_hz is None else "flexible",
                           "frequency_hz": None if e.frequency_hz is None
                           else e.frequency_hz.tolist(),
                           "damping": e.damping} for e in self.equipment],
            "sensors": [{"name": s.name, "at": s.position.tolist()} for s in self.sensors],
            "equipment_link": "footprint nodes slaved to a rigid mount (master-slave)",
            "notes": list(self.notes),
        }
        if self.impedance is not None:
            d["support"].update(self.impedance.to_dict())
        return d
