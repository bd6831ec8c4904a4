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


# -- record readers: the units, dt, resample and inventory of a record --------------------------

def _names_option(run_cli, option: str, text: str, *argv) -> str:
    """The one-line refusal of ``argv`` (:func:`_one_line_refusal`) starts at ``option`` and
    holds ``text``."""
    line = _one_line_refusal(run_cli, *argv)
    assert line.startswith(f"groundshake: error: {option}: ") and text in line, line
    return line


def _rows(n: int = 40) -> str:
    """Rows of an invented two-column record (time [s], acceleration) at dt = 0.01 s."""
    return "\n".join(f"{0.01 * i!r},{0.1 * np.sin(i / 5.0):.5f}" for i in range(n)) + "\n"


@pytest.fixture
def no_units(tmp_path):
    """A two-column text record whose header states no units."""
    path = tmp_path / "bare.csv"
    path.write_text("t,a\n" + _rows())
    return path


def _scenario_with(tmp_path, motion: str) -> tuple:
    """A scenario file whose ``[motion]`` holds ``motion``; (path, text)."""
    text = BLOCK + "\n[processing]\nenabled = false\n\n[motion]\n" + motion + "\n"
    scen = tmp_path / "case.toml"
    scen.write_text(text, encoding="utf-8")
    return scen, text


def _motion_error(scen) -> ScenarioError:
    from groundshake.pipeline import build_motion

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(ScenarioError) as info:
            build_motion(load_scenario(scen))
    return info.value


def test_missing_units_named_by_parameter_key_and_option(no_units, tmp_path, run_cli):
    from groundshake.records import read_record

    with pytest.raises(RecordError, match=r"^units: .*bare\.csv: the file does not state its "
                                          r"units; give them: g, m/s2") as info:
        read_record(no_units)
    assert info.value.param == "units"
    _names_option(run_cli, "--units", "does not state its units", "info", no_units)
    # the scenario: the component's units key (not written: the line of its table)
    scen, text = _scenario_with(tmp_path, f'x = {{ file = "{no_units.name}" }}')
    e = _motion_error(scen)
    assert str(e).startswith(f"{scen}:{_line(text, 'x = {')}: motion.x.units: "), str(e)
    assert e.key == "motion.x.units" and isinstance(e, RecordError)   # still a record error
    refusal = _one_line_refusal(run_cli, "run", scen, "-o", tmp_path / "out", "--quiet")
    assert f"{scen}:{_line(text, 'x = {')}: motion.x.units: " in refusal


def test_units_against_the_file_named_by_key_and_option(record, tmp_path, run_cli):
    # the record fixture's file states m/s2 (groundshake's CSV header)
    _names_option(run_cli, "--units", "states units m/s2", "info", record, "--units", "g")
    _names_option(run_cli, "--units", "unknown units 'stone'", "info", record, "--units", "stone")
    scen, text = _scenario_with(tmp_path, f'x = {{ file = "{record.name}", units = "g" }}')
    e = _motion_error(scen)
    assert str(e).startswith(f"{scen}:{_line(text, 'units = ')}: motion.x.units: "), str(e)
    assert "states units m/s2 but g was given" in str(e)


def test_agency_file_without_units_names_the_option(tmp_path, run_cli):
    # a CWB file with its '#AmplitudeUnit:' line taken out
    src = (DATA / "cwb_us1000chhc_1-EAS.dat").read_text(encoding="utf-8", errors="replace")
    path = tmp_path / "cut.dat"
    path.write_text("".join(ln for ln in src.splitlines(keepends=True)
                            if not ln.startswith("#AmplitudeUnit")), encoding="utf-8")
    line = _one_line_refusal(run_cli, "info", path)
    assert line.startswith("groundshake: error: --units: CWB (Taiwan) text file "), line
    assert "no '#AmplitudeUnit:' line; give the units" in line
    # the file states gal (its '#AmplitudeUnit:  gal.' line): other units contradict it
    _names_option(run_cli, "--units", "drop them or fix",
                  "info", DATA / "cwb_us1000chhc_1-EAS.dat", "--units", "g")


def test_missing_time_step_named_by_key_and_option(tmp_path, run_cli):
    path = tmp_path / "one.txt"
    path.write_text("# units: g\n" + "\n".join(str(0.01 * i) for i in range(40)) + "\n")
    _names_option(run_cli, "--dt", "needs a time step", "info", path)
    _names_option(run_cli, "--dt", "allowed a finite time step > 0", "info", path, "--dt", "0")
    scen, text = _scenario_with(tmp_path, f'x = {{ file = "{path.name}" }}')
    e = _motion_error(scen)
    assert str(e).startswith(f"{scen}:{_line(text, 'x = {')}: motion.x.dt: "), str(e)


def test_uneven_steps_name_the_option(tmp_path, run_cli):
    path = tmp_path / "uneven.csv"
    path.write_text("t,a [g]\n" + _rows(20) + "0.2015,0.1\n"
                    + "".join(f"{0.2015 + 0.01 * k!r},0.05\n" for k in range(1, 20)))
    _names_option(run_cli, "--resample", "(more than 1 %)", "info", path)


def test_counts_without_an_inventory_named_by_key_and_option(tmp_path, run_cli):
    mseed = DATA / "fdsn_ci38457511_CI.CLC..HNE.mseed"
    _names_option(run_cli, "--inventory", "raw counts", "info", mseed, "--units", "m/s2")
    _names_option(run_cli, "--inventory", "holds accelerations",
                  "info", DATA / "cwb_us1000chhc_1-EAS.dat", "--inventory",
                  DATA / "fdsn_ci38457511_CI.CLC.xml")
    # the scenario: [motion] inventory, the key of the table that encloses motion.x
    scen, text = _scenario_with(tmp_path, f'x = {{ file = "{mseed.as_posix()}" }}')
    e = _motion_error(scen)
    assert str(e).startswith(f"{scen}:{_line(text, '[motion]')}: motion.inventory: "), str(e)


# -- scaling, the demo folder, the suite's engine ------------------------------------------------

def test_scaling_rule_named_by_parameter():
    from groundshake.spectra._scaling import scale_to_target

    with pytest.raises(InputError, match=r"^rule: given 'nz1170'; allowed 'asce7-16'"):
        scale_to_target(np.ones((1, 6)), np.geomspace(0.1, 2, 6), np.ones(6), period=1.0,
                        rule="nz1170")
    with pytest.raises(InputError, match=r"^period: given -1.0; allowed a number > 0"):
        scale_to_target(np.ones((1, 6)), np.geomspace(0.1, 2, 6), np.ones(6), period=-1.0)


def test_suite_scaling_settings_are_the_options_and_keys():
    from groundshake.cli import build_parser
    from groundshake.cli._common import option_table
    from groundshake.pipeline import SuiteScaling
    from groundshake.pipeline._set_scaling import SCALING_OPTIONS, scale_record_sets
    from groundshake.scenario._spec import table_keys

    sub = next(a for a in build_parser()._actions if a.dest == "command")
    table = option_table(sub.choices["suite"])
    assert {k: table[k] for k in SCALING_OPTIONS} == SCALING_OPTIONS     # one name, two places
    assert set(SCALING_OPTIONS) == set(table_keys(("suite",)))           # the [suite] keys
    with pytest.raises(InputError) as info:
        SuiteScaling(target="asce7:sds=1.0,sd1=0.6,tl=8", limits=(4.0, 0.25))
    assert str(info.value) == "--scale-range: given 4,0.25; allowed two numbers LOW,HIGH with " \
                              "0 < LOW < HIGH"
    assert (info.value.param, info.value.value) == ("scale_range", (4.0, 0.25))
    from types import SimpleNamespace

    matched = SimpleNamespace(motion=SimpleNamespace(match_target=True))
    with pytest.raises(InputError, match=r"^--scale-to: \[motion\] match_target = true"):
        scale_record_sets(matched, [], SuiteScaling(target="asce7:sds=1.0,sd1=0.6,tl=8"))


def test_suite_scale_range_named_by_option(record, tmp_path, run_cli):
    scen, _ = _scenario_with(tmp_path, f'x = {{ file = "{record.name}" }}')
    line = _one_line_refusal(run_cli, "suite", scen, "--records", record, "-o", tmp_path / "o",
                             "--scale-to", "asce7:sds=1.0,sd1=0.6,tl=8", "--scale-range", "4,0.25")
    assert line.startswith("groundshake: error: --scale-range: given 4,0.25; allowed"), line


def test_demo_folder_errors_name_the_options(tmp_path, run_cli):
    f = tmp_path / "afile"
    f.write_text("x")
    line = _one_line_refusal(run_cli, "demo", "-o", f, "--quiet")
    assert line.startswith(f"groundshake: error: --output: {f} exists and is not a folder"), line
    d = tmp_path / "full"
    d.mkdir()
    (d / "keep.txt").write_text("x")
    line = _one_line_refusal(run_cli, "demo", "-o", d, "--quiet")
    assert line.startswith(f"groundshake: error: --force: {d} already exists; give it"), line


def test_suite_engine_errors_name_the_parameter():
    from groundshake.cli import build_parser
    from groundshake.cli._common import option_table
    from groundshake.suite._engine import run_tasks
    from groundshake.suite._run import _set_limits

    with pytest.raises(InputError) as info:
        list(run_tasks(lambda shared, item: item, {}, [{"name": "a"}, {"name": "b"}], workers=0))
    assert str(info.value) == "workers: given 0; allowed an integer >= 1"
    with pytest.raises(InputError, match=r"^set_timeout: given -1; allowed seconds > 0"):
        _set_limits([], {}, None, None, -1)
    # the command line's options of the same names
    sub = next(a for a in build_parser()._actions if a.dest == "command")
    table = option_table(sub.choices["suite"])
    assert (table["workers"], table["scheduler"], table["set_timeout"]) == (
        "--workers", "--scheduler", "--set-timeout")


@pytest.mark.parametrize("argv, option, text", [
    (["--band", "0.001,0.01"], "--band", "at or below the Nyquist period"),
    (["--periods", "9,10", "--band", "0.05,4"], "--periods", "none fall in the band 0.05-4 s"),
])
def test_match_band_and_periods_name_the_option(record, run_cli, argv, option, text):
    line = _one_line_refusal(run_cli, "match", record, "--target", "asce7:sds=1,sd1=0.6,tl=8",
                             "--quiet", *argv)
    assert line.startswith(f"groundshake: error: {option}: ") and text in line, line
