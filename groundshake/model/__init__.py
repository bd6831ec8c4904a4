"""The finite-element model of a foundation block and what stands on it.

Public names: :func:`build_model`, :class:`BlockModel`, :class:`Point`,
:class:`EquipmentModel`, :class:`ReactionOperators`, :func:`gazetas_rectangle`,
:func:`circle_stiffness`, :func:`brick_matrices`, :func:`mesh_boxes`, :class:`Box`,
:func:`embedment_factors`, :func:`dynamic_stiffness_coefficients`,
:func:`shear_modulus_ratio`; :func:`factorize`, :func:`estimate_memory` and kin are
re-exported from :mod:`groundshake.linalg`.
"""
from ..linalg import available_memory, estimate_memory, factorize, pardiso_available
from ._build import build_model
from ._elements import brick_matrices, elasticity_matrix
from ._impedance import (dynamic_stiffness_coefficients, embedment_factors,
                         shear_modulus_ratio)
from ._links import rigid_link
from ._mesh import Box, GridMesh, mesh_boxes
from ._supports import Impedance, circle_stiffness, distributed_bed, gazetas_rectangle
from ._types import G_STANDARD, BlockModel, EquipmentModel, Point, ReactionOperators

__all__ = ["G_STANDARD", "BlockModel", "EquipmentModel", "Point", "ReactionOperators",
           "build_model", "rigid_link", "brick_matrices", "elasticity_matrix", "factorize",
           "pardiso_available", "available_memory", "estimate_memory", "Box", "GridMesh",
           "mesh_boxes", "Impedance", "circle_stiffness", "distributed_bed",
           "gazetas_rectangle", "embedment_factors", "dynamic_stiffness_coefficients",
           "shear_modulus_ratio"]
