"""Suites of records through one model: discovery, engines (serial, pool, Dask), retries and
the output folder, over the application layer (which reads, scales and runs each set and
takes the statistics; its names for sets, scaling and statistics are offered here too)."""
from ..pipeline import (COMPONENT_WORDS, RecordSet, SuiteScaling, flatten_scalars,
                        peak_statistics, scalar_statistics, scale_record_sets, set_spectrum)
from ._discover import discover_record_sets
from ._engine import EngineReport, SuiteStalled, run_tasks

__all__ = ["COMPONENT_WORDS", "RecordSet", "discover_record_sets", "run_tasks", "EngineReport",
           "SuiteStalled", "flatten_scalars", "peak_statistics", "scalar_statistics",
           "SuiteScaling", "scale_record_sets", "set_spectrum"]
