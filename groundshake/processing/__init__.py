"""Correcting records (baseline, taper, pads, filters), resampling, integration and
intensity measures. SI units: acceleration m/s², time s.

The settings load at once; the computing functions (scipy) on first use, so that the
scenario, whose ``[processing]`` table is :class:`ProcessingSettings`, loads without them.
"""
from __future__ import annotations

import importlib

from ._settings import DEFAULT_PROCESSING, ProcessingSettings

#: name -> the submodule that defines it, imported on first use
_LAZY = {
    **dict.fromkeys(("butterworth_sos", "correct_record", "cosine_taper", "pad_samples",
                     "remove_velocity_baseline"), "_correct"),
    "integrate": "_integrate",
    **dict.fromkeys(("SCALAR_MEASURES", "FourierSpectrum", "arias_intensity",
                     "bracketed_duration", "cumulative_absolute_velocity", "fourier_amplitude",
                     "husid", "intensity_measures", "mean_period", "significant_duration",
                     "standardized_cav"), "_measures"),
    **dict.fromkeys(("SAMPLES_PER_PERIOD", "ensure_sampling", "resample"), "_resample"),
}

__all__ = ["ProcessingSettings", "DEFAULT_PROCESSING", "correct_record", "integrate", "resample",
           "ensure_sampling", "SAMPLES_PER_PERIOD", "intensity_measures", "SCALAR_MEASURES",
           "fourier_amplitude", "FourierSpectrum", "arias_intensity", "husid",
           "cumulative_absolute_velocity", "standardized_cav", "significant_duration",
           "bracketed_duration", "mean_period", "butterworth_sos", "pad_samples", "cosine_taper",
           "remove_velocity_baseline"]


def __getattr__(name: str):
    if name not in _LAZY:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{_LAZY[name]}"), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_LAZY))
