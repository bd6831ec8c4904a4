"""Results of a run: peaks, stresses, base reactions, anchorage, floor spectra, outputs.

Public names: :func:`analyse`, :class:`RunResults`, :func:`write_outputs`,
:func:`bolt_forces`, :func:`fp_comparison`, :func:`broaden`, :func:`floor_spectra`,
:class:`StressPeaks`, :func:`principal_stresses`, :func:`von_mises`,
:func:`bolt_interaction`, :func:`stability_histories`, :func:`no_tension_pressure`,
:func:`soil_cases`.
"""
from ._anchorage import BoltForces, bolt_forces, bolt_interaction, fp_comparison, plate_loads
from ._cases import soil_cases
from ._floor import broaden, floor_spectra
from ._outputs import OUTPUT_FILES, write_outputs
from ._run import RunResults, analyse, base_resultants, respond
from ._stability import Stability, no_tension_pressure, stability_histories
from ._stress import StressPeaks, modal_stress_peaks, principal_stresses, von_mises

__all__ = ["analyse", "RunResults", "respond", "base_resultants", "write_outputs", "OUTPUT_FILES", "BoltForces",
           "bolt_forces", "plate_loads", "fp_comparison", "broaden", "floor_spectra",
           "StressPeaks", "modal_stress_peaks", "principal_stresses", "von_mises",
           "bolt_interaction", "Stability", "stability_histories", "no_tension_pressure",
           "soil_cases"]
