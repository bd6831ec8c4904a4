"""One model for many motions: the model, its modes and the missing-mass shapes, once."""
from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .._constants import DIRECTIONS
from .._errors import GroundshakeWarning
from ..dynamics import Modes, compute_modes, residual_vectors
from ..model import BlockModel, build_model
from ..scenario import Scenario

__all__ = ["PreparedModel", "prepare_model"]


@dataclass(frozen=True)
class PreparedModel:
    """``model`` (BlockModel), ``modes`` (Modes) and, for the modal method, ``residual``
    (n, 3): the missing-mass shapes of the three ground directions, else None."""

    model: BlockModel
    modes: Modes
    residual: np.ndarray | None


def prepare_model(scenario: Scenario | dict, *, method: str | None = None) -> PreparedModel:
    """Build the scenario's model, its modes and (modal) the missing-mass shapes once.

    Modes are kept up to ``analysis.cutoff_hz`` (or the ``analysis.modes`` count), with
    the mass warnings judged for the directions the scenario's motion shakes (all three
    without a motion); the modes' warnings are left to each run. The missing-mass shapes
    depend on the model only: one static solve with the model's factorization, so runs
    over many records never factorize K again.

    Parameters
    ----------
    scenario : Scenario or dict
        A dict of the scenario's keys is validated into a Scenario first.
    method : {"auto", "modal", "coupled", "direct"}, optional
        Overrides ``analysis.method``; no missing-mass shapes for "direct".
    """
    if isinstance(scenario, dict):
        scenario = Scenario.from_dict(scenario)
    model = build_model(scenario)
    analysis = scenario.analysis
    n_req = analysis.modes
    comps = tuple(scenario.motion.components()) if scenario.motion is not None else DIRECTIONS
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        modes = compute_modes(model, cutoff_hz=None if n_req else analysis.cutoff_hz,
                              n_modes=n_req, excited=tuple(d in comps for d in DIRECTIONS),
                              warn=False)
    residual = None
    if (method or analysis.method) in ("auto", "modal", "coupled"):
        residual = residual_vectors(model.M, model.influence, np.asarray(modes.shapes),
                                    np.asarray(modes.participation), model.factor().solve,
                                    load=model.ground_load)
    return PreparedModel(model, modes, residual)
