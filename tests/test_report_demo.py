"""``groundshake demo`` and the packaged example: the demo must work from an installed
package, so the example scenario ships as package data and the demo records are
regenerated from their fixed seed.

Sources: the packaged files must equal the repository's (byte equality; common practice
for vendored data); the demo records are deterministic from a fixed seed (the records
stage's own contract, checked here against the shipped files read by ObsPy, an
independent reader); CLI exit status 0 on success and 2 on refused input (common
practice for Unix tools); the report sections listed in issue 6.
"""
from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from _report_fixture import demo_run, make_output_folder

ROOT = Path(__file__).resolve().parents[1]


def test_packaged_example_equals_the_repository_example():
    from groundshake.report._demo import DEMO_SCENARIO, example_scenario_text

    repo = (ROOT / "examples" / DEMO_SCENARIO).read_text(encoding="utf-8")
    assert example_scenario_text() == repo                      # byte-for-byte copy
    packaged = ROOT / "groundshake" / "data" / "examples" / DEMO_SCENARIO
    assert packaged.is_file()


def test_regenerated_demo_records_equal_the_shipped_ones(tmp_path):
    obspy = pytest.importorskip("obspy")
    from groundshake.records.synthetic import make_demo_records

    paths = make_demo_records(tmp_path)
    names = sorted(p.name for p in paths)
    assert names == sorted(f"demo-{c}.{e}" for c in ("h1", "h2", "up") for e in ("mseed", "csv"))
    for name in names:
        shipped = ROOT / "records" / name
        if name.endswith(".csv"):
            assert (tmp_path / name).read_bytes() == shipped.read_bytes()
        else:
            a = obspy.read(str(tmp_path / name))[0]              # ObsPy as independent reader
            b = obspy.read(str(shipped))[0]
            assert a.stats.delta == b.stats.delta and a.stats.npts == b.stats.npts
            np.testing.assert_array_equal(a.data, b.data)


def test_demo_writes_the_report_and_says_where():
    status, out, folder = demo_run()
    assert status == 0                                          # Unix convention: success
    report = folder / "results" / "report.html"
    assert report.is_file()
    assert f"report: {report}" in out
    text = report.read_text(encoding="utf-8")
    ids = re.findall(r'<section id="([^"]+)"', text)
    assert ids == ["inputs", "model", "modes", "results", "anchorage", "floor-spectra",
                   "warnings", "cautions", "provenance"]       # issue 6 sections
    assert "invented" in text.lower()                           # the site is labelled invented
    # the demo's inputs sit beside the results, so the run can be repeated by hand
    assert (folder / "examples" / "transformer-pad.toml").is_file()
    assert (folder / "records" / "demo-h1.mseed").is_file()
    # nothing the report fetched or left: no temporary folders beside the results
    assert not [p for p in folder.iterdir() if p.name.startswith(".")]


def test_demo_refuses_an_existing_folder_without_force(capsys):
    from groundshake.cli import main

    status, _, folder = demo_run()
    assert status == 0
    assert main(["demo", "-o", str(folder)]) == 2               # refused input: status 2
    err = capsys.readouterr().err
    assert "already exists" in err and "--force" in err and "Traceback" not in err


def test_demo_into_a_file_is_refused(tmp_path, capsys):
    from groundshake.cli import main

    f = tmp_path / "afile"
    f.write_text("x")
    assert main(["demo", "-o", str(f)]) == 2
    assert "not a folder" in capsys.readouterr().err
    assert f.read_text() == "x"                                 # inputs are never modified


def test_report_command_refuses_to_overwrite_without_force(tmp_path, capsys):
    from groundshake.cli import main

    out = make_output_folder(tmp_path / "run", files=())
    assert main(["report", str(out), "--quiet"]) == 0
    assert (out / "report.html").is_file()
    assert main(["report", str(out)]) == 2
    assert "already exists" in capsys.readouterr().err
    assert main(["report", str(out), "--force", "--quiet"]) == 0


def test_demo_force_replaces_the_demo(tmp_path, monkeypatch, capsys):
    """The demo's own steps with the analysis stubbed by an invented output folder
    (INVENTED TEST DATA), so --force can be checked without a full run."""
    import groundshake.results as results
    from groundshake.cli import main
    from groundshake.report import write_report

    class Fake:
        summary = {"title": "stub", "warnings": [], "provenance": {}}

    def fake_write(res, out, *, overwrite=False, **kw):
        make_output_folder(out, files=())
        write_report(out, progress=False)
        return out

    monkeypatch.setattr(results, "analyse", lambda scenario, **kw: Fake())
    monkeypatch.setattr(results, "write_outputs", fake_write)
    folder = tmp_path / "demo"
    assert main(["demo", "-o", str(folder), "--quiet"]) == 0    # Unix convention: success
    assert (folder / "results" / "report.html").is_file()
    assert main(["demo", "-o", str(folder), "--quiet"]) == 2    # refused without --force
    (folder / "records" / "demo-h1.csv").write_text("damaged")
    assert main(["demo", "-o", str(folder), "--force", "--quiet"]) == 0
    # --force regenerates the inputs: the shipped record again, byte for byte
    assert (folder / "records" / "demo-h1.csv").read_bytes() == \
        (ROOT / "records" / "demo-h1.csv").read_bytes()
    out = capsys.readouterr().out
    assert f"report: {folder / 'results' / 'report.html'}" in out
