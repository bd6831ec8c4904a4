"""Correcting records (baseline, taper, pads, filters), resampling, integration and
intensity measures. SI units: acceleration m/s², time s."""
from ._correct import butterworth_sos, correct_record, cosine_taper, pad_samples, \
    remove_velocity_baseline
from ._integrate import integrate
from ._measures import SCALAR_MEASURES, FourierSpectrum, arias_intensity, bracketed_duration, \
    cumulative_absolute_velocity, fourier_amplitude, husid, intensity_measures, mean_period, \
    significant_duration, standardized_cav
from ._resample import SAMPLES_PER_PERIOD, ensure_sampling, resample
from ._settings import DEFAULT_PROCESSING, ProcessingSettings

__all__ = ["ProcessingSettings", "DEFAULT_PROCESSING", "correct_record", "integrate", "resample",
           "ensure_sampling", "SAMPLES_PER_PERIOD", "intensity_measures", "SCALAR_MEASURES",
           "fourier_amplitude", "FourierSpectrum", "arias_intensity", "husid",
           "cumulative_absolute_velocity", "standardized_cav", "significant_duration",
           "bracketed_duration", "mean_period", "butterworth_sos", "pad_samples", "cosine_taper",
           "remove_velocity_baseline"]
