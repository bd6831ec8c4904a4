"""The application layer: the one place that knows every stage.

It strings the stages together for a whole job — today writing a run's folder with its
report (:func:`write_run`) and the bundled demo (:func:`run_demo`); motion assembly from files, the run and its provenance move here from
the stages (see docs/architecture.md). The stages below never import this package.
"""
from ._demo import DEMO_SCENARIO, DemoRun, example_scenario_text, run_demo
from ._write import write_run

__all__ = ["DEMO_SCENARIO", "DemoRun", "example_scenario_text", "run_demo", "write_run"]
