"""The application layer: the one place that knows every stage.

It strings the stages together for a whole job: the motion from the scenario's files
(:func:`build_motion`), a run (:func:`analyse`), one model for many motions
(:func:`prepare_model`), writing a run's folder with its report
(:func:`write_run`) and the bundled demo (:func:`run_demo`). The stages below never
import this package (docs/architecture.md). :func:`kernel_threads` tells layers above
(the suite's workers) how many threads the oscillator kernel will use.
"""
from ..spectra._kernel import kernel_threads
from ._demo import DEMO_SCENARIO, DemoRun, example_scenario_text, run_demo
from ._motion import build_motion
from ._prepare import PreparedModel, prepare_model
from ._run import analyse
from ._write import write_run

__all__ = ["analyse", "build_motion", "prepare_model", "PreparedModel", "write_run",
           "DEMO_SCENARIO", "DemoRun", "example_scenario_text", "run_demo", "kernel_threads"]
