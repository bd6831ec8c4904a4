"""The report of a run: one self-contained HTML file, its figures, and the cautions.

``write_report(out_dir, units="si"|"us")`` reads the files a run wrote, through the
output contract of ``groundshake.results`` (file names, columns, quantity kinds), and
writes ``out_dir/report.html``; :func:`write_suite_page` writes a suite's suite.html from
its suite.json (:func:`render_suite_page` builds the text).
"""
from .._cautions import CAUTIONS, SCREENING_NOTE
from ._load import OutputFolder, Table, load_output
from ._report import SECTIONS, render_report, write_report
from ._suite_page import render_suite_page, write_suite_page

__all__ = ["write_report", "render_report", "load_output", "OutputFolder", "Table",
           "SECTIONS", "CAUTIONS", "SCREENING_NOTE", "render_suite_page", "write_suite_page"]
