"""``groundshake demo`` and the packaged example: the demo must work from an installed
package, so the example scenario ships as package data and the demo records are
regenerated from their fixed seed.

Sources: the packaged files must equal the repository's (byte equality; common practice
for vendored data); the demo records are deterministic from a fixed seed (the records
stage's own contract, checked here against the shipped files read by ObsPy, an
independent reader) to a stated tolerance, since another numpy/BLAS may differ in the
last of the 17 digits written; CLI exit status 0 on success and 2 on refused input (common
practice for Unix tools); the report sections listed in issue 6.
"""
from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from _report_fixture import demo_run, make_output_folder

ROOT = Path(__file__).resolve().parents[2]


def test_packaged_example_equals_the_repository_example():
    from groundshake.pipeline import DEMO_SCENARIO, example_scenario_text

    repo = (ROOT / "examples" / DEMO_SCENARIO).read_text(encoding="utf-8")
    assert example_scenario_text() == repo                      # byte-for-byte copy
    packaged = ROOT / "groundshake" / "data" / "examples" / DEMO_SCENARIO
    assert packaged.is_file()


# Regenerated demo records must equal the shipped ones to within this share of their peak
# (and times to within this many seconds). Another numpy or BLAS changes float64 results in
# the last digits (about 1e-15 relative, a little more after filtering a long record);
# 1e-9 is a common-practice margin far above that and far below the 3-4 significant
# digits any output of the tool shows.
REL_TOL = 1e-9


def _numbers(path: Path) -> tuple[list[str], np.ndarray]:
    """A text record's header lines and its table of numbers (read by numpy, not by us)."""
    lines = path.read_text(encoding="utf-8").splitlines()
    first = next(i for i, line in enumerate(lines) if line[:1].isdigit() or line[:1] == "-")
    table = np.loadtxt(lines[first:], delimiter=",", ndmin=2)
    return lines[:first], table


def assert_same_text_record(got: Path, want: Path) -> None:
    head_got, got_t = _numbers(got)
    head_want, want_t = _numbers(want)
    assert head_got == head_want                                # same header lines, verbatim
    assert got_t.shape == want_t.shape
    np.testing.assert_allclose(got_t[:, 0], want_t[:, 0], rtol=0, atol=REL_TOL)  # times [s]
    peak = np.abs(want_t[:, 1:]).max()
    np.testing.assert_allclose(got_t[:, 1:], want_t[:, 1:], rtol=0, atol=REL_TOL * peak)


def test_regenerated_demo_records_equal_the_shipped_ones(tmp_path):
    obspy = pytest.importorskip("obspy")
    from groundshake.records.synthetic import make_demo_records

    paths = make_demo_records(tmp_path)
    names = sorted(p.name for p in paths)
    assert names == sorted(f"demo-{c}.{e}" for c in ("h1", "h2", "up") for e in ("mseed", "csv"))
    for name in names:
        shipped = ROOT / "records" / name
        if name.endswith(".csv"):
            assert_same_text_record(tmp_path / name, shipped)  # tolerance: REL_TOL above
        else:
            a = obspy.read(str(tmp_path / name))[0]              # ObsPy as independent reader
            b = obspy.read(str(shipped))[0]
            assert a.stats.delta == b.stats.delta and a.stats.npts == b.stats.npts
            np.testing.assert_allclose(a.data, b.data, rtol=0,
                                       atol=REL_TOL * np.abs(b.data).max())  # REL_TOL above


def test_demo_writes_the_report_and_says_where():
    status, out, folder = demo_run()
    assert status == 0                                          # Unix convention: success
    report = folder / "results" / "report.html"
    assert report.is_file()
    assert f"report: {report}" in out
    text = report.read_text(encoding="utf-8")
    ids = re.findall(r'<section id="([^"]+)"', text)
    assert ids == ["summary", "model", "modes", "response", "anchorage", "floor-spectra",
                   "motion", "inputs", "provenance"]          # issue 16: answers first
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
    import groundshake.pipeline._demo as demo
    from groundshake.cli import main
    from groundshake.report import write_report

    class Fake:
        summary = {"title": "stub", "warnings": [], "provenance": {}}

    def fake_write(res, out, *, overwrite=False, **kw):
        make_output_folder(out, files=())
        write_report(out, progress=False)
        return out

    monkeypatch.setattr(demo, "analyse", lambda scenario, **kw: Fake())
    monkeypatch.setattr(demo, "write_run", fake_write)
    folder = tmp_path / "demo"
    assert main(["demo", "-o", str(folder), "--quiet"]) == 0    # Unix convention: success
    assert (folder / "results" / "report.html").is_file()
    assert main(["demo", "-o", str(folder), "--quiet"]) == 2    # refused without --force
    (folder / "records" / "demo-h1.csv").write_text("damaged")
    assert main(["demo", "-o", str(folder), "--force", "--quiet"]) == 0
    # --force regenerates the inputs: the shipped record again (to REL_TOL above)
    assert_same_text_record(folder / "records" / "demo-h1.csv", ROOT / "records" / "demo-h1.csv")
    out = capsys.readouterr().out
    assert f"report: {folder / 'results' / 'report.html'}" in out
