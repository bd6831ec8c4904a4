"""groundshake: seismic screening of foundation blocks and the equipment on them.

Top-level names are imported lazily so that ``groundshake --help`` stays fast.

Public API (SI units throughout: m, s, kg, N, Pa, m/s²):

- :func:`read_record` — read any ObsPy format or delimited text into ``Record`` objects
- :func:`response_spectrum` — exact piecewise-linear oscillator spectra
"""
from __future__ import annotations

import importlib
import logging

# A library logs and leaves the handlers to the program that uses it (Python's logging HOWTO,
# "Configuring Logging for a Library").
logging.getLogger("groundshake").addHandler(logging.NullHandler())

__version__ = "0.1.0"

# name -> module that defines it; extended as stages land.
_LAZY = {
    "Record": "groundshake.records",
    "read_record": "groundshake.records",
    "write_record": "groundshake.records",
    "correct_record": "groundshake.processing",
    "intensity_measures": "groundshake.processing",
    "ProcessingSettings": "groundshake.processing",
    "integrate": "groundshake.processing",
    "resample": "groundshake.processing",
    "Spectrum": "groundshake.spectra",
    "response_spectrum": "groundshake.spectra",
    "oscillator_peaks": "groundshake.spectra",
    "oscillator_history": "groundshake.spectra",
    "default_periods": "groundshake.spectra",
    "rotd": "groundshake.spectra",
    "parse_target": "groundshake.spectra",
    "spectrum_statistics": "groundshake.spectra",
    "match_spectrum": "groundshake.matching",
    "match_spectrum_report": "groundshake.matching",
    "load_scenario": "groundshake.scenario",
    "build_model": "groundshake.model",
    "BlockModel": "groundshake.model",
    "compute_modes": "groundshake.dynamics",
    "Modes": "groundshake.dynamics",
    "analyse": "groundshake.pipeline",
    "Scenario": "groundshake.scenario",
    "ScenarioError": "groundshake._errors",
    "CAUTIONS": "groundshake._cautions",
    "GroundshakeError": "groundshake._errors",
    "InputError": "groundshake._errors",
    "GroundshakeWarning": "groundshake._errors",
}

__all__ = ["__version__", *_LAZY]


def __getattr__(name: str):
    try:
        module = _LAZY[name]
    except KeyError:
        raise AttributeError(f"module 'groundshake' has no attribute {name!r}") from None
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_LAZY))
