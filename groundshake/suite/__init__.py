"""Suites of records through one model: discovery, engines (serial, pool, Dask), statistics,
scaling to a target."""
from ._discover import COMPONENT_WORDS, RecordSet, discover_record_sets
from ._engine import EngineReport, SuiteStalled, run_tasks
from ._scale import SuiteScaling, scale_record_sets, set_spectrum
from ._stats import flatten_scalars, peak_statistics, scalar_statistics

__all__ = ["COMPONENT_WORDS", "RecordSet", "discover_record_sets", "run_tasks", "EngineReport",
           "SuiteStalled", "flatten_scalars", "peak_statistics", "scalar_statistics",
           "SuiteScaling", "scale_record_sets", "set_spectrum"]
