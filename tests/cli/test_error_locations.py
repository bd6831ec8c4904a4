"""One library error, three places: a Python call names the parameter, a scenario the file,
line and key, the command line the option.

Sources: the project's contract for bad input (docs/DESIGN.md: one line naming the
file/line/key or option and what is allowed, exit status 2, no traceback); the sampling
theorem (a record of step dt carries nothing above its Nyquist frequency 1/(2·dt)); the
``pickle`` module's documented round trip of exceptions (standard library), which the suite
uses to send a worker's errors back; the header of tests/data/strong-motion/
dmg_nc71734741_CE89146.V2 ("Chan 1: 360 Deg", "Chan 2: Up", "Chan 3: 90 Deg", so traces
0..2).
"""
from __future__ import annotations

import pickle
import re
import shutil
import warnings

import numpy as np
import pytest

from groundshake._errors import InputError, RecordError, ScenarioError
from groundshake.processing import ProcessingSettings, correct_record
from groundshake.records._record import Record
from groundshake.records._write import write_record
from groundshake.scenario import load_scenario, parse_scenario_text

from _blocks import concrete_block
from _strong_motion import DATA

BLOCK = 'title = "Error locations (invented block)"\n' + concrete_block()


def _line(text: str, marker: str) -> int:
    """1-based line of the first line holding ``marker`` (found by hand, not by the loader)."""
    return next(i for i, ln in enumerate(text.splitlines(), 1) if marker in ln)


@pytest.fixture
def record(tmp_path):
    """An invented 20-s record at dt = 0.01 s: Nyquist frequency 1/(2·0.01) = 50 Hz."""
    path = tmp_path / "rec.csv"
    write_record(Record(acc=0.5 * np.sin(np.arange(2000) / 5.0), dt=0.01), path)
    return path


def _one_line_refusal(run_cli, *argv) -> str:
    """Run the command line; check the bad-input contract (status 2, one line on stderr,
    no traceback) and return that line."""
    res = run_cli(*argv)
    lines = [ln for ln in res.err.splitlines() if ln.strip()]
    assert res.status == 2 and len(lines) == 1 and "Traceback" not in res.err, res.err
    return lines[0]


# -- the error itself ------------------------------------------------------------------------

def test_message_is_neutral_and_the_location_goes_in_front():
    e = InputError("given -1; allowed a number > 0", param="highpass_hz", value=-1.0)
    assert str(e) == "highpass_hz: given -1; allowed a number > 0"       # Python: the parameter
    at_key = e.located("case.toml:7: processing.highpass_hz", cls=ScenarioError,
                       key="processing.highpass_hz", line=7, file="case.toml")
    assert str(at_key) == "case.toml:7: processing.highpass_hz: given -1; allowed a number > 0"
    assert isinstance(at_key, ScenarioError) and isinstance(at_key, ValueError)
    assert str(e.located("--highpass")) == "--highpass: given -1; allowed a number > 0"
    assert str(e) == "highpass_hz: given -1; allowed a number > 0"       # the original unchanged
    assert str(InputError("no location")) == "no location"


@pytest.mark.parametrize("err", [
    InputError("given 3; allowed 0..2", param="trace", value=3, where="motion.x.trace"),
    InputError("given 80; allowed < 47.5", param="lowpass_hz", value=80.0).located(
        "case.toml:9: processing.lowpass_hz", cls=ScenarioError, key="processing.lowpass_hz",
        line=9, file="case.toml"),
    RecordError("no samples", param="dt").located("--dt"),
    InputError("30 Pa is below any structural material", param="youngs_modulus", value=30.0,
               sep=" = ").located("case.toml:5: materials.concrete.youngs_modulus"),
], ids=["plain", "scenario", "record-option", "plausibility"])
def test_pickling_keeps_param_value_and_location(err):
    # pickle round trip (standard library), as a suite worker sends its errors back
    back = pickle.loads(pickle.dumps(err))
    assert type(back) is type(err) and str(back) == str(err)
    assert (back.param, back.value, back.where, back.sep) == (err.param, err.value, err.where,
                                                              err.sep)
    for attr in ("key", "line", "file"):
        assert getattr(back, attr, None) == getattr(err, attr, None)


# -- the same library error via Python, the scenario and the command line ----------------------

def test_corner_above_nyquist_named_by_parameter_key_and_option(record, tmp_path, run_cli):
    rec = Record(acc=np.sin(np.arange(2000) / 5.0), dt=0.01)
    # Python: the parameter (sampling theorem: Nyquist 1/(2·0.01 s) = 50 Hz)
    with pytest.raises(InputError, match=r"^lowpass_hz: low-pass corner 80 Hz must be below "
                                         r"0\.95 x the Nyquist frequency 50 Hz") as info:
        correct_record(rec, ProcessingSettings(lowpass_hz=80.0))
    assert info.value.param == "lowpass_hz" and info.value.value == 80.0

    # scenario: file, line and key
    from groundshake.pipeline import build_motion

    text = BLOCK + ('\n[processing]\nlowpass_hz = 80\n\n'
                    f'[motion]\nx = {{ file = "{record.name}" }}\n')
    scen = tmp_path / "case.toml"
    scen.write_text(text, encoding="utf-8")
    s = load_scenario(scen)
    with pytest.raises(ScenarioError) as info:
        build_motion(s)
    msg = str(info.value)
    assert msg.startswith(f"{scen}:{_line(text, 'lowpass_hz')}: processing.lowpass_hz: "
                          "low-pass corner 80 Hz must be below"), msg
    assert "Nyquist frequency 50 Hz" in msg and "\n" not in msg
    assert (info.value.key, info.value.line, info.value.param) == (
        "processing.lowpass_hz", _line(text, "lowpass_hz"), "lowpass_hz")

    # command line: the option, one line, status 2, no traceback
    line = _one_line_refusal(run_cli, "info", record, "--lowpass", "80")
    assert line.startswith("groundshake: error: --lowpass: low-pass corner 80 Hz must be "
                           "below 0.95 x the Nyquist frequency 50 Hz"), line
    assert str(record) in line                               # and the record it is about


@pytest.mark.parametrize("argv, option, allowed", [
    (["--highpass", "-1"], "--highpass", "allowed a number > 0"),
    (["--order", "0"], "--order", "allowed an integer 1-12"),
    (["--taper", "40"], "--taper", "allowed a number >= 0 and <= 25"),
    (["--pre-event", "0"], "--pre-event", "allowed a pre-event length > 0 s"),
    (["--highpass", "1", "--lowpass", "0.5"], "--lowpass", "above the high-pass corner 1"),
])
def test_settings_errors_name_the_option(record, run_cli, argv, option, allowed):
    line = _one_line_refusal(run_cli, "info", record, *argv)
    assert line.startswith(f"groundshake: error: {option}: given "), line
    assert allowed in line
    assert "processing." not in line                         # no scenario key on the command line


def test_settings_error_in_python_names_the_setting():
    with pytest.raises(InputError) as info:
        ProcessingSettings(filter_order=0)
    assert str(info.value) == "processing.filter_order: given 0; allowed an integer 1-12"
    assert info.value.param == "filter_order" and info.value.value == 0


# -- a wrong trace names the scenario file and key --------------------------------------------

def test_wrong_trace_names_scenario_file_line_and_key(tmp_path, run_cli):
    from groundshake.pipeline import build_motion

    shutil.copy(DATA / "dmg_nc71734741_CE89146.V2", tmp_path / "station.V2")
    text = BLOCK + '\n[motion]\nx = { file = "station.V2", trace = 5 }\n'
    scen = tmp_path / "case.toml"
    scen.write_text(text, encoding="utf-8")
    line = _line(text, "trace = 5")
    s = load_scenario(scen)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(ScenarioError) as info:
            build_motion(s)
    # the file's header lists three channels: traces 0..2
    assert str(info.value).startswith(f"{scen}:{line}: motion.x.trace: given 5; allowed 0..2 ")
    assert (info.value.file, info.value.line, info.value.key) == (str(scen), line,
                                                                  "motion.x.trace")
    # from text in memory too (the loader keeps the lines of the keys)
    s = parse_scenario_text(text, source="mem.toml", base_dir=tmp_path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(ScenarioError, match=rf"^mem\.toml:{line}: motion\.x\.trace: given 5"):
            build_motion(s)
    # a suite's copy with another motion: that motion has no line in the file
    moved = load_scenario(scen).with_motion(x={"file": str(tmp_path / "station.V2"),
                                               "trace": 7})
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(ScenarioError, match=rf"^{re.escape(str(scen))}: motion\.x\.trace: "
                                                r"given 7; allowed 0\.\.2"):
            build_motion(moved)
    # the command line: one line, status 2, no traceback
    refusal = _one_line_refusal(run_cli, "run", scen, "-o", tmp_path / "out", "--quiet",
                                "--no-report")
    assert f"{scen}:{line}: motion.x.trace: given 5; allowed 0..2" in refusal


# -- model errors met during a command name the scenario key ------------------------------------

def test_overlapping_footprints_name_scenario_file_line_and_key(tmp_path, run_cli):
    def equipment(name, mount):
        return (f'\n[[equipment]]\nname = "{name}"\nmass = 100.0\nmount = {mount}\n'
                'footprint = [1.0, 1.0]\ncg_height = 0.3\nanchors = [[-0.4, -0.4]]\n')

    # two 1 × 1 m footprints whose centres are 0.2 m apart overlap (geometry, by hand)
    text = BLOCK + equipment("a", "[1.0, 1.0]") + equipment("b", "[1.2, 1.2]")
    scen = tmp_path / "case.toml"
    scen.write_text(text, encoding="utf-8")
    line = _line(text, 'name = "b"') - 1                     # the second [[equipment]] header
    refusal = _one_line_refusal(run_cli, "modes", scen, "--quiet")
    assert refusal.startswith(f"groundshake: error: {scen}:{line}: equipment[1]: footprint of "
                              "'b' overlaps"), refusal


def test_spectrum_command_names_the_option(record, run_cli):
    line = _one_line_refusal(run_cli, "spectrum", record, "--lowpass", "80")
    assert line.startswith("groundshake: error: --lowpass: low-pass corner 80 Hz"), line


def test_option_table_is_read_from_the_parser():
    from groundshake.cli import build_parser
    from groundshake.cli._common import option_table

    sub = next(a for a in build_parser()._actions if a.dest == "command")
    table = option_table(sub.choices["correct"])
    assert table["highpass_hz"] == "--highpass" and table["pre_event_s"] == "--pre-event"
    assert table["output"] == "--output" and "record" not in table   # positionals have none
