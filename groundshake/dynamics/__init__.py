"""Dynamics of the block model: natural modes and participation.

Public names: :func:`compute_modes`, :class:`Modes`, :func:`lowest_modes`.
"""
from ._modes import Modes, compute_modes, lowest_modes

__all__ = ["Modes", "compute_modes", "lowest_modes"]
