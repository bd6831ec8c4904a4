"""The page of a suite: the report's ``suite.html``, with the target spectrum drawn over the
ground-spectra bands."""
from __future__ import annotations

import os
from pathlib import Path
from typing import Any, Mapping

import numpy as np

from ..report import write_suite_page
from ..scenario import Scenario
from ..spectra import parse_target

__all__ = ["write_suite_report"]


def write_suite_report(out_dir: str | os.PathLike, scenario: Scenario, *,
                       spectra: Mapping[str, Any] | None = None, target: str | None = None,
                       units: str | None = None,
                       provenance: Mapping[str, Any] | None = None) -> Path:
    """Write ``suite.html`` into a suite's output folder, which holds its ``suite.json``.

    Parameters
    ----------
    out_dir : path
        The suite's output folder.
    scenario : Scenario
        Gives the default target (``motion.target``), the display units
        (``[report] units``) and the folder of a relative target table.
    spectra : mapping, optional
        :func:`groundshake.pipeline.spectra_statistics` of the sets that ran.
    target : str, optional
        A target spectrum spec (see :func:`groundshake.spectra.parse_target`) drawn
        over the ground-spectra bands; the scenario's ``motion.target`` if not given.
    units : {"si", "us"}, optional
        Display units; default the scenario's ``[report] units``, else SI.
    provenance : mapping, optional
        Items shown at the end of the page.

    Returns
    -------
    Path
        The page written (:func:`groundshake.report.write_suite_page`).
    """
    units = units or scenario.report.units
    if not target and scenario.motion is not None:
        target = scenario.motion.target
    target_psa = None
    if spectra and target:
        target_psa = np.asarray(parse_target(target, base_dir=scenario.base_dir)
                                .psa(np.asarray(spectra["periods"], dtype=float)))
    return write_suite_page(out_dir, spectra=spectra, target_psa=target_psa, units=units,
                            provenance=provenance)
