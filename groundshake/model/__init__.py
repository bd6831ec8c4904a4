"""The finite-element model of a foundation block and what stands on it.

Public names: :func:`build_model`, :class:`BlockModel`, :class:`Point`,
:class:`EquipmentModel`, :class:`ReactionOperators`, :func:`gazetas_rectangle`,
:func:`circle_stiffness`, :func:`brick_matrices`, :func:`mesh_boxes`, :class:`Box`,
:func:`factorize`, :func:`estimate_memory`, :func:`embedment_factors`,
:func:`dynamic_stiffness_coefficients`, :func:`shear_modulus_ratio`.
"""
from ._build import (G_STANDARD, BlockModel, EquipmentModel, Point, ReactionOperators,
                     build_model, rigid_link)
from ._elements import brick_matrices, elasticity_matrix
from ._factor import factorize, pardiso_available
from ._impedance import (dynamic_stiffness_coefficients, embedment_factors,
                         shear_modulus_ratio)
from ._memory import available_memory, estimate_memory
from ._mesh import Box, GridMesh, mesh_boxes
from ._supports import Impedance, circle_stiffness, distributed_bed, gazetas_rectangle

__all__ = ["G_STANDARD", "BlockModel", "EquipmentModel", "Point", "ReactionOperators",
           "build_model", "rigid_link", "brick_matrices", "elasticity_matrix", "factorize",
           "pardiso_available", "available_memory", "estimate_memory", "Box", "GridMesh",
           "mesh_boxes", "Impedance", "circle_stiffness", "distributed_bed",
           "gazetas_rectangle", "embedment_factors", "dynamic_stiffness_coefficients",
           "shear_modulus_ratio"]
