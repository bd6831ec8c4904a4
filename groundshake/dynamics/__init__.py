"""Dynamics of the block model: natural modes and participation.

Public names: :func:`compute_modes`, :class:`Modes`, :func:`lowest_modes`;
damping of a block model: :func:`rayleigh_coefficients`, :func:`damping_matrix`,
:func:`modal_damping`, :func:`modal_damping_matrix` (:class:`RayleighChoice`: the
Rayleigh coefficients, their anchor frequencies and why);
motion and response: :class:`Motion`, :func:`motion_from_arrays`,
:func:`modal_response`, :func:`residual_vectors`, :func:`coupled_response` (the whole
damping matrix on modes plus missing-mass vectors), :func:`direct_response`.
"""
from ._damping import (MODAL_DAMPING_CAP, RayleighChoice, damping_matrix, governing_frequencies,
                       modal_damping, modal_damping_matrix, rayleigh_coefficients)
from ._modes import Modes, compute_modes, lowest_modes
from ._direct import DirectResponse, direct_response, newmark_parameters, substeps_for
from ._modal import (ModalResponse, coupled_modal_response, modal_response, pruned_peak,
                     residual_vectors)
from ._motion import Motion, motion_from_arrays
from ._coupled import coupled_response, ritz_basis

__all__ = ["Modes", "compute_modes", "lowest_modes",
           "MODAL_DAMPING_CAP", "RayleighChoice", "damping_matrix", "governing_frequencies",
           "modal_damping", "modal_damping_matrix", "rayleigh_coefficients",
           "Motion", "motion_from_arrays",
           "ModalResponse", "modal_response", "coupled_modal_response", "residual_vectors",
           "pruned_peak", "coupled_response", "ritz_basis",
           "DirectResponse", "direct_response", "newmark_parameters", "substeps_for"]
