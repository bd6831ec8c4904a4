"""What a run produced (``RunResults``) and small helpers shared by the run's methods."""
from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from ..dynamics._motion import Motion
from ._stress import StressPeaks

if TYPE_CHECKING:  # pragma: no cover
    from ..dynamics import Modes
    from ..model import BlockModel

__all__ = ["RunResults"]


@dataclass
class RunResults:
    """Everything a run produced.

    Attributes
    ----------
    summary : dict
        The summary (as written to summary.json), SI units.
    motion : Motion
    model : BlockModel
    modes : Modes
    time : ndarray (n_t,) [s]
    histories : dict str -> ndarray (n_t,)
        Named time histories (column name with unit → values).
    ground_spectra : dict
        ``periods``, ``damping``, ``psa`` (3, n_d, n_p) of the ground motion.
    floor : dict
        Output of :func:`floor_spectra` plus ``points`` (names).
    stress : StressPeaks
        Per element: the largest peaks of its corner stress points (NaN for an element
        with no corner on the surface).
    target_psa : ndarray (n_p,) or None
        The scenario's target [m/s²] at ``ground_spectra["periods"]``; ``target_damping``
        the damping ratio it is for.
    """

    summary: dict
    motion: Motion
    model: BlockModel
    modes: Modes
    time: np.ndarray
    histories: dict
    ground_spectra: dict
    floor: dict
    stress: StressPeaks | None
    target_psa: np.ndarray | None = None
    target_damping: float | None = None      # the damping ratio target_psa is for
    inputs: dict = field(default_factory=dict)
    base: np.ndarray | None = None


def _sha256(path: Path) -> str | None:
    try:
        h = hashlib.sha256()
        with open(path, "rb") as fh:
            for chunk in iter(lambda: fh.read(1 << 20), b""):
                h.update(chunk)
        return h.hexdigest()
    except OSError:
        return None
