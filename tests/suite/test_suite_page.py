"""suite.html at the report's standard: words not JSON paths, bolts numbered from 1,
engineering units, D/C statistics, cautions. Records here are INVENTED TEST DATA.

Sources: numpy's median and 84th percentile (linear interpolation, numpy's default) as
the independent statistic; 1 kN = 1000 N and 1 kip = 4448.2216152605 N (NIST SP 811,
App. B); the project's rule of issue 16 (bolts numbered from 1; names, not JSON paths);
html.parser (Python) as an independent parser.
"""
from __future__ import annotations

import html
import json
import re

import numpy as np
import pytest

from groundshake._errors import InputError
from groundshake.report import write_suite_page
from groundshake.report._suite_page import quantity_words, render_suite_page, suite_kind
from groundshake.results._schema import SUITE_FILES

STATS = {
    "peaks.base_shear.x": {"count": 3, "median": 2.0e5, "p16": 1.5e5, "p84": 2.6e5, "max": 3.0e5,
                           "lognormal_median": 1.9e5, "beta": 0.3},
    "equipment.pump.anchors[0].peak_tension": {"count": 3, "median": 4.0e4, "p16": 3e4,
                                               "p84": 5e4, "max": 6e4},
    "peaks.relative_displacement.x": {"count": 3, "median": 2e-4, "p16": 1e-4, "p84": 3e-4,
                                      "max": 4e-4},
}
DCS = [0.5, 0.9, 1.3]
RECORDS = [{"record": f"set {i}", "status": "ok", "files": {"x": f"a/b/r{i}.mseed"},
            "peaks": {"peaks": {"base_shear": {"x": 1e5 * (i + 1), "y": 5e4}}},
            "worst_dc": {"value": d, "equipment": "pump", "bolt": 2}, "warnings": ["w one"]}
           for i, d in enumerate(DCS)] + [{"record": "bad", "status": "failed",
                                           "error": "no such file"}]


def _text(page: str) -> str:
    return html.unescape(re.sub(r"<style>.*?</style>|<[^>]+>", " ", page, flags=re.S))


def test_words_not_paths_and_bolts_from_one():
    assert quantity_words("equipment.pump.anchors[0].peak_tension") == "pump, bolt 1: peak tension"
    assert suite_kind("equipment.pump.anchors[0].peak_tension") == "force"
    assert suite_kind("peaks.relative_displacement.x") == "displacement"
    page = render_suite_page(title="t", records=RECORDS, statistics=STATS)
    text = _text(page)
    assert "anchors[0]" not in text and "peak_tension" not in text and "base_shear" not in text
    assert "pump, bolt 1: peak tension" in text


def test_units_and_dc_statistics():
    page = render_suite_page(title="t", records=RECORDS, statistics=STATS)
    text = " ".join(_text(page).split())
    a = np.asarray(DCS)
    # median and 84th percentile of the records' worst D/C (numpy), 3 significant digits
    assert f"{np.median(a):.3g}" in text and f"{np.percentile(a, 84):.3g}" in text
    assert "above 1 in 1 of 3" in text
    assert "peak base shear x [kN]" in text or "kN" in text
    assert "200" in text                                        # 2.0e5 N = 200 kN
    assert "not a code check" in text and "licensed engineer" in text
    us = " ".join(_text(render_suite_page(title="t", records=RECORDS, statistics=STATS,
                                          units="us")).split())
    assert f"{2.0e5 / 4448.2216152605:.3g}" in us and "kip" in us   # NIST SP 811: 1 kip


def test_page_is_written_from_suite_json_through_the_contract(tmp_path):
    # the page reads the suite's folder by the output contract's file names (SUITE_FILES);
    # statistics keys are summary.json paths (list positions from 0) and bolt numbers
    # count from 1 as in a run's files (the contract's note on SUITE_FILES)
    with pytest.raises(InputError, match=SUITE_FILES["suite"]):
        write_suite_page(tmp_path)
    (tmp_path / SUITE_FILES["suite"]).write_text(json.dumps(
        {"title": "from the file", "records": RECORDS, "statistics": STATS}), encoding="utf-8")
    path = write_suite_page(tmp_path, units="si")
    assert path == tmp_path / SUITE_FILES["page"]
    text = " ".join(_text(path.read_text(encoding="utf-8")).split())
    assert "from the file — suite of 4 record sets" in text
    assert "pump, bolt 1: peak tension" in text and "(bolt 2)" in text
    assert "anchors[" not in text and "No spectra." in text
