"""The application layer: the one place that knows every stage.

It strings the stages together for a whole job: the motion from the scenario's files
(:func:`build_motion`), a run (:func:`analyse`), one model for many motions
(:func:`prepare_model`), writing a run's folder with its report
(:func:`write_run`) and the bundled demo (:func:`run_demo`). For suites it knows what a
record set is to the stages (:class:`RecordSet`: its components by file name, one run of
it as plain data), scales sets to a target, takes statistics over them and writes the
suite's page through the report (:func:`write_suite_report`); ``SUITE_FILES`` names the
suite's files (the output contract). The stages below never import this package
(docs/architecture.md). :func:`kernel_threads` tells layers above (the suite's workers)
how many threads the oscillator kernel will use.
"""
from ..results._schema import SUITE_FILES
from ..spectra._kernel import kernel_threads
from ._demo import DEMO_SCENARIO, DemoRun, example_scenario_text, run_demo
from ._motion import build_motion
from ._prepare import PreparedModel, prepare_model
from ._run import analyse
from ._set_report import write_suite_report
from ._set_scaling import SuiteScaling, combine_by_rule, scale_record_sets, set_spectrum
from ._set_statistics import (flatten_scalars, peak_statistics, scalar_statistics,
                              spectra_statistics)
from ._sets import (COMPONENT_WORDS, RecordSet, group_by_component, is_record_file_name,
                    file_stem, record_set_samples, run_set, scenario_from_plain, set_failure)
from ._write import write_run

__all__ = ["analyse", "build_motion", "prepare_model", "PreparedModel", "write_run",
           "DEMO_SCENARIO", "DemoRun", "example_scenario_text", "run_demo", "kernel_threads",
           "RecordSet", "COMPONENT_WORDS", "group_by_component", "is_record_file_name",
           "file_stem", "set_failure",
           "record_set_samples", "run_set", "scenario_from_plain", "SuiteScaling",
           "scale_record_sets", "set_spectrum", "combine_by_rule",
           "flatten_scalars", "scalar_statistics", "peak_statistics", "spectra_statistics",
           "write_suite_report", "SUITE_FILES"]
