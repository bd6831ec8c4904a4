"""Response spectra and the damped-oscillator kernel behind them.

The kernel (:func:`oscillator_peaks`, :func:`oscillator_history`) is exact for
piecewise-linear excitation and serves the ground spectra, the modal time histories
and the floor spectra alike. SI units: acc [m/s²], dt [s], omega [rad/s], periods [s];
damping as a ratio.
"""
from ._kernel import OscillatorPeaks, kernel_engine, oscillator_history, oscillator_peaks
from ._rotd import ANGLES, RotD, rotated_peak, rotd
from ._statistics import spectrum_statistics
from ._targets import (EN1998_GROUND, TargetSpectrum, asce7_spectrum, en1998_spectrum,
                       parse_target, published_target, table_spectrum, target_ratio,
                       volume3_target)
from ._spectrum import (MAX_REFINEMENT, SAMPLES_PER_PERIOD, Spectrum, default_periods,
                        fourier_upsample, refinement_factors, response_spectrum)

__all__ = ["OscillatorPeaks", "oscillator_peaks", "oscillator_history", "kernel_engine",
           "Spectrum", "response_spectrum", "default_periods", "fourier_upsample",
           "SAMPLES_PER_PERIOD", "MAX_REFINEMENT", "refinement_factors", "RotD", "rotd",
           "rotated_peak", "ANGLES",
           "spectrum_statistics", "TargetSpectrum", "parse_target", "asce7_spectrum",
           "en1998_spectrum", "table_spectrum", "published_target", "volume3_target",
           "target_ratio", "EN1998_GROUND"]
