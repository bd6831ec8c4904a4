"""One run of a scenario from its files: the motion is read here, the rest is the results
stage's :func:`groundshake.results.analyse`."""
from __future__ import annotations

import time
from typing import Mapping

from .._errors import InputError
from ..dynamics import Motion
from ..results import RunResults, analyse as analyse_motion
from ..scenario import Scenario
from ._motion import build_motion

__all__ = ["analyse"]


def analyse(scenario: Scenario | Mapping, *, motion: Motion | None = None,
            **options) -> RunResults:
    """Run a scenario: read its motion files (unless ``motion`` is given), then the model,
    modes, response and every result.

    Parameters
    ----------
    scenario : Scenario or dict
        From :func:`groundshake.load_scenario` (a dict is validated once by
        :meth:`Scenario.from_dict`); needs a ``[motion]`` section unless ``motion`` is
        given (the ``"spectrum"`` method reads only its target).
    motion : Motion, optional
        The base motion, when it does not come from the scenario's files.
    **options
        ``progress``, ``method``, ``model``, ``modes``, ``stresses``, ``residual``: as
        for :func:`groundshake.results.analyse`.

    Returns
    -------
    RunResults
        SI units; the time spent reading the motion is in
        ``summary["provenance"]["timings_s"]["motion"]`` [s] when it was read here.

    Raises
    ------
    InputError
        No ``[motion]`` and no ``motion``; any error of reading or correcting the records.
    """
    if isinstance(scenario, Mapping):
        scenario = Scenario.from_dict(scenario)
    read_s = None
    method = options.get("method") or scenario.analysis.method
    if motion is None and method != "spectrum":     # the spectrum method reads no records
        if scenario.motion is None:
            raise InputError(f"{scenario.source}: [motion]: missing; "
                             "allowed x, y, z = { file = ... } (at least one)")
        t0 = time.perf_counter()
        motion = build_motion(scenario)
        read_s = time.perf_counter() - t0
    out = analyse_motion(scenario, motion=motion, **options)
    if read_s is not None:
        timings = out.summary.get("provenance", {}).get("timings_s")
        if isinstance(timings, dict) and "motion" in timings:
            timings["motion"] = float(timings["motion"]) + read_s
    return out
