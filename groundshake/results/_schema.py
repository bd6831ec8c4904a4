"""The output contract: what a run's folder holds, for the writers and for every reader.

The writers (``_outputs.py``) and the report (``groundshake.report``) import these names
instead of spelling file names of their own; the report reads a run only through the
files listed here. Column names follow ``words [unit]`` with SI units; the generated page
docs/reference/outputs.md lists every column and summary key of the demo's run.
"""
from __future__ import annotations

__all__ = ["SCHEMA_VERSION", "SUMMARY_FILE", "CSV_FILES", "OUTPUT_FILES", "REPORT_FILE"]

#: Version of this contract, written into summary.json as ``schema_version``; raise it
#: when a file, a column name or a summary key changes meaning or disappears.
SCHEMA_VERSION = 1

#: The run's summary (JSON): peaks, sensors, equipment, modes, warnings, cautions,
#: the scenario with every default, provenance.
SUMMARY_FILE = "summary.json"

#: The tables (CSV, one header row, ``words [unit]`` columns), by stem, in writing order.
CSV_FILES = ("histories", "records", "ground_spectra", "floor_spectra", "modes",
             "element_peaks", "mode_shapes")

#: Every file the result writers put in a run's folder.
OUTPUT_FILES = (SUMMARY_FILE, *(f"{stem}.csv" for stem in CSV_FILES))

#: The HTML report written beside them by the application layer.
REPORT_FILE = "report.html"
