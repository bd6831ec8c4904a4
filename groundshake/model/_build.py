"""Build the block model from a scenario: mesh, matrices, supports, equipment, sensors.

DOFs. The grid's node DOFs (3 per node, interleaved x, y, z) plus a few master DOFs:
the rigid base on soil springs (6, at the centre of the base face), one rigid mount per
equipment item (6, at the centre of its footprint on the top face) and, for equipment
on a flexible support, its three CG translations. Fixed base DOFs are removed; the
nodes of the base face (soil, lumped springs) and of each footprint are slaved to their
master, u = u_m + θ_m × (x − x_m) (model/_links.py). The reduced DOFs are
[free node DOFs, masters]. All displacements are relative to the ground.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np
import scipy.sparse as sp

from .._errors import ScenarioError
from ..linalg import check_memory
from ..scenario import Scenario
from ._assembly import assemble, element_keys
from ._base import (BaseFace, SupportMatrices, base_cones, base_face, base_reactions,
                    place_support, support_matrices)
from ._elements import brick_matrices
from ._equipment import EquipmentMatrices, equipment_matrices, place_mounts
from ._inertia import ground_load, inertia_reaction, influence
from ._links import Links, Reduction
from ._mesh import Box, count_grid, mesh_boxes
from ._recovery import surface_stress_points
from ._sensors import place_sensors
from ._types import G_STANDARD, BlockModel

__all__ = ["build_model"]


@dataclass(frozen=True, eq=False)
class _Grid:
    """The meshed parts and their node matrices (3·n_nodes, 3·n_nodes) ``Kn`` [N/m] and
    ``Mn`` [kg], with what stress recovery needs (``key_grid``, ``mats``, ``kmat``)."""

    boxes: list
    mesh: object
    key_grid: np.ndarray
    mats: object
    kmat: np.ndarray
    Kn: sp.csr_matrix
    Mn: sp.csr_matrix
    materials: dict


def _boxes(scenario: Scenario) -> list[Box]:
    names = list(scenario.materials)
    boxes = []
    for i, p in enumerate(scenario.parts):
        if p.material not in names:
            raise ScenarioError(f"parts[{i}].material: given {p.material!r}; allowed one of "
                                f"{names}")
        boxes.append(Box(name=str(p.name), origin=tuple(float(v) for v in p.origin),
                         size=tuple(float(v) for v in p.size),
                         material=names.index(p.material)))
    return boxes


def _grid_lines_at(scenario: Scenario):
    """Coordinates [m] the grid lines also pass through: footprint edges and centres,
    sensors."""
    soft = ([], [], [])
    for e in scenario.equipment:
        mx, my = (float(v) for v in e.mount)
        bx, by = (float(v) for v in e.footprint)
        soft[0].extend([mx - bx / 2, mx, mx + bx / 2])
        soft[1].extend([my - by / 2, my, my + by / 2])
    for s in scenario.sensors:
        for a, v in enumerate(s.at):
            soft[a].append(float(v))
    return soft


def _grid(scenario: Scenario, check_memory_first: bool) -> _Grid:
    """Mesh the parts and assemble K and M of the grid's nodes (after the memory check)."""
    boxes = _boxes(scenario)
    h = float(scenario.mesh.element_size)
    soft = _grid_lines_at(scenario)
    if check_memory_first:
        n_nodes_est, _ = count_grid(boxes, h, soft)
        check_memory(n_nodes_est, h)
    mesh = mesh_boxes(boxes, h, soft)
    key_grid, sizes, kmat = element_keys(mesh, [b.material for b in boxes])
    props = np.array([(float(m.youngs_modulus), float(m.poisson_ratio), float(m.density))
                      for m in scenario.materials.values()])
    materials = {nm: {"youngs_modulus": p[0], "poisson_ratio": p[1], "density": p[2]}
                 for nm, p in zip(scenario.materials, props.tolist())}
    props = props[kmat]
    mats = brick_matrices(sizes, props[:, 0], props[:, 1], props[:, 2],
                          element=scenario.mesh.element)
    Kn, Mn = assemble(mesh, key_grid, mats, mass=scenario.mesh.mass)
    return _Grid(boxes, mesh, key_grid, mats, kmat, Kn, Mn, materials)


def _reduced_matrices(grid: _Grid, red: Reduction, soil: SupportMatrices,
                      eq: EquipmentMatrices):
    """K and M (n, n) sparse: the grid's reduced, the soil's springs and the equipment's
    masses and springs added; the discrete dashpots (n, n) or None (no master DOFs)."""
    K, M = red.reduce(grid.Kn), red.reduce(grid.Mn)
    if soil.K_bed is not None:
        K = K + soil.K_bed
    dash = None
    if red.n_extra:
        K = sp.csr_matrix(K + red.extra(soil.Kx + eq.Kx))
        M = sp.csr_matrix(M + red.extra(eq.Mx))
        dash = red.extra(soil.Cx + eq.Cx)
    K.sort_indices()
    M.sort_indices()
    return K, M, dash


def _stress_points(grid: _Grid, red: Reduction, face: BaseFace):
    """The surface stress points, nodes held by the base (1) or a mount (2) marked."""
    held = red.status.reshape(-1, 3).max(axis=1)            # 1 fixed, 2 slaved
    constraint = np.where(held > 0, 2, 0)
    constraint[face.nodes[held[face.nodes] > 0]] = 1          # fixed or rigid base
    return surface_stress_points(grid.mesh, grid.key_grid, grid.mats, grid.kmat,
                                 constrained=constraint)


def as_scenario(scenario: Scenario | dict) -> Scenario:
    """A :class:`~groundshake.scenario.Scenario` as it is, or one validated from a dict of
    the scenario's keys (ScenarioError as for a scenario file)."""
    return Scenario.from_dict(scenario) if isinstance(scenario, dict) else scenario


def build_model(scenario: Scenario | dict, *,
                solver: Literal["auto", "scipy", "pardiso"] | None = None,
                check_memory_first: bool = True, soil_frequency_hz=None,
                cones: bool = False) -> BlockModel:
    """Build the :class:`BlockModel` of a scenario.

    Parameters
    ----------
    scenario : Scenario or dict
        A ``groundshake.scenario.Scenario``; a dict of the scenario's keys is validated
        into one first (:meth:`Scenario.from_dict`).
    solver : factorization for :meth:`BlockModel.factor` (default from
        ``analysis.solver``).
    soil_frequency_hz : array (6,), optional
        On soil: the frequency [Hz] at which each base spring x, y, z, rx, ry, t is
        evaluated (frequency-dependent impedance, model/_impedance.py); None = static.
    cones : bool
        On soil with lumped springs: also fit rotational cones (Wolf 1994) to the static
        rocking and torsion springs, for step-by-step runs (``BlockModel.cones``; see
        :func:`groundshake.model._cone.with_cones`). Modal runs do not use them.

    Raises
    ------
    ScenarioError for geometry that cannot be modelled; ModelTooLargeError (quickly,
    before assembly) when the estimate exceeds the available memory.
    """
    scenario = as_scenario(scenario)
    kind, ratio = scenario.support.kind, scenario.damping.ratio
    grid = _grid(scenario, check_memory_first)
    mesh, nodes = grid.mesh, grid.mesh.nodes
    notes: list[str] = []
    face = base_face(mesh, kind, notes)
    links = Links(3 * mesh.n_nodes)
    support = place_support(mesh, face, scenario.support, links, notes, soil_frequency_hz)
    mounts = place_mounts(mesh, scenario.equipment, links)
    red = links.reduce()

    soil = support_matrices(support, face, red)
    eq = equipment_matrices(mounts, ratio, red)
    K, M, dash = _reduced_matrices(grid, red, soil, eq)

    # the ground's load, the masses, the reactions on the support
    rigid_base = [] if support.master is None else [support.master]
    iota = influence(red, rigid_base + [mt.master for mt in mounts]
                     + [mt.cg_master for mt in mounts if mt.cg_master is not None])
    gl = ground_load(M, grid.Mn, iota, red, fixed=kind == "fixed", mass_kind=scenario.mesh.mass)
    if gl.note:
        notes.append(gl.note)
    equipment = eq.items
    weight = G_STANDARD * (float(grid.Mn.sum() / 3.0) + sum(e.mass for e in equipment))
    reaction = base_reactions(support, face, red, soil, grid.Kn, grid.Mn, mesh)
    inertia = inertia_reaction(
        M, gl.load, red, nodes, face.centre, rigid_base,
        [(mt.master, mt.point, True) for mt in mounts]
        + [(mt.cg_master, item.cg, False) for mt, item in zip(mounts, equipment)
           if mt.cg_master is not None],
        reaction if kind == "fixed" else None)

    stress_points = _stress_points(grid, red, face)
    cone_model = rotation_dofs = None
    if kind == "soil":
        notes.extend(support.impedance.notes)
        if cones:
            cone_model, rotation_dofs = base_cones(support, face, red, notes)
    rayleigh = scenario.damping.rayleigh_hz
    return BlockModel(
        nodes=nodes, elements=mesh.elements, element_centres=mesh.element_centres,
        element_part=mesh.element_part, K=K, M=M, influence=iota, total_mass=gl.total_mass,
        ground_load=gl.load, rigid_mass=gl.rigid_mass, weight=weight,
        sensors=place_sensors(mesh, red.P, scenario.sensors), equipment=tuple(equipment),
        reaction=reaction, stress=sp.csr_matrix(stress_points.operator @ red.P),
        stress_points=stress_points, base=face.info, damping_ratio=ratio,
        rayleigh_hz=None if rayleigh is None else (float(rayleigh[0]), float(rayleigh[1])),
        support_kind=kind, element_kind=scenario.mesh.element, mass_kind=scenario.mesh.mass,
        part_names=tuple(b.name for b in grid.boxes), materials=grid.materials,
        node_map=red.P, impedance=support.impedance,
        solver=solver or scenario.analysis.solver or "auto",
        cutoff_hz=scenario.analysis.cutoff_hz,
        _stiff_parts=tuple(([(None, soil.stiffness)] if soil.stiffness is not None else [])
                           + eq.parts),
        _dashpots=dash, _radiation=soil.radiation, notes=tuple(notes), mesh=mesh,
        inertia_reaction=inertia, _radiation_lowrank=soil.lowrank,
        _equipment_mass=red.extra(eq.M_flexible) if red.n_extra else None,
        cones=cone_model, base_rotation_dofs=rotation_dofs)
