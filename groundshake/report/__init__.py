"""The report of a run: one self-contained HTML file, its figures, and the cautions.

``write_report(out_dir)`` reads the files a run wrote (summary.json and the CSV
tables) and writes ``out_dir/report.html``.
"""
from .._cautions import CAUTIONS, SCREENING_NOTE
from ._load import OutputFolder, Table, load_output
from ._report import SECTIONS, render_report, write_report

__all__ = ["write_report", "render_report", "load_output", "OutputFolder", "Table",
           "SECTIONS", "CAUTIONS", "SCREENING_NOTE"]
