"""Scenario components picked from a multi-channel station file: by channel code, by
azimuth, or the whole file given once (vertical to z, horizontals to x and y).

Sources: the headers of the real files in tests/data/strong-motion/ (SOURCES.md):
- dmg_nc71734741_CE89146.V2 (CGS, Willow Creek): "Chan  1: 360 Deg", "Chan  2: Up",
  "Chan  3: 90 Deg", each with its "Peak acceleration = ..." line, which the reader stores
  as header_pga [m/s²];
- cwb_us1000chhc_1-EAS.dat (CWB): columns U, N, E.
Azimuths clockwise from north: 360 Deg is north (0°), 90 Deg east (surveyors' convention,
common practice).
"""
from __future__ import annotations

import shutil
import warnings

import numpy as np
import pytest

from groundshake import InputError
from groundshake._errors import ScenarioError
from groundshake.records import read_record
from groundshake.records._components import components_by_orientation, pick_component
from groundshake.scenario import parse_scenario_text

from _strong_motion import DATA
from _tables import block_scenario, part

V2 = DATA / "dmg_nc71734741_CE89146.V2"
CWB = DATA / "cwb_us1000chhc_1-EAS.dat"

BASE = block_scenario("Station file components (invented block)", [part("pad", (2, 2, 1))],
                      element_size=1.0) + "\n"


@pytest.fixture(scope="module")
def v2():
    return read_record(V2)


def test_pick_by_channel_azimuth_orientation_and_index(v2):
    # "Chan  1: 360 Deg", "Chan  2: Up", "Chan  3: 90 Deg"
    assert pick_component(v2, channel="360").component == "360"
    assert pick_component(v2, channel="up").component == "Up"      # case ignored
    assert pick_component(v2, channel="89146 90").component == "90"  # or the record's name
    assert pick_component(v2, azimuth=0.0).component == "360"       # 360 Deg is north, 0°
    assert pick_component(v2, azimuth=359.5).component == "360"     # within 1° across north
    assert pick_component(v2, azimuth=90.0).component == "90"       # 90 Deg is east
    assert pick_component(v2, orientation="vertical").component == "Up"
    assert pick_component(v2, trace=2).component == "90"            # the file's third channel
    assert pick_component(v2[:1]).component == "360"                # one channel: no choice


def test_unknown_or_doubtful_choices_list_the_files_channels(v2):
    listing = r"0: 360 \(horizontal, 0°\), 1: Up \(vertical\), 2: 90 \(horizontal, 90°\)"
    with pytest.raises(InputError, match=r"^motion.x.channel: given '270'; no channel matches; "
                                         r"the file holds " + listing + "$"):
        pick_component(v2, channel="270", where="motion.x")
    with pytest.raises(InputError, match=r"motion.y.azimuth: given 45.0; no channel matches"):
        pick_component(v2, azimuth=45.0, where="motion.y")
    with pytest.raises(InputError, match=r"motion.x.orientation: given 'horizontal'; 2 "
                                         r"channels match"):
        pick_component(v2, orientation="horizontal", where="motion.x")
    with pytest.raises(InputError, match=r"motion.x: the file holds 3 channels \(" + listing):
        pick_component(v2, where="motion.x")
    with pytest.raises(InputError, match=r"motion.x: channel and azimuth given together"):
        pick_component(v2, channel="360", azimuth=0.0, where="motion.x")
    with pytest.raises(InputError, match=r"motion.x.trace: given 3; allowed 0..2"):
        pick_component(v2, trace=3, where="motion.x")


def test_a_station_file_by_orientation(v2):
    picked = components_by_orientation(v2)
    # vertical to z; the horizontals to x and y in the file's order (360 then 90)
    assert {k: r.component for k, r in picked.items()} == {"x": "360", "y": "90", "z": "Up"}
    cwb = read_record(CWB)
    picked = components_by_orientation(cwb)
    # CWB columns U, N, E
    assert {k: r.component for k, r in picked.items()} == {"x": "N", "y": "E", "z": "U"}
    with pytest.raises(InputError, match=r"cannot tell x, y and z apart.*two horizontals"):
        components_by_orientation(v2 + v2[:1])       # three horizontals


def test_scenario_file_given_once_is_written_out_and_run(tmp_path):
    from groundshake.pipeline import build_motion

    shutil.copy(V2, tmp_path / "station.V2")
    text = BASE + '[motion]\nfile = "station.V2"\n'
    s = parse_scenario_text(text, source="case.toml", base_dir=tmp_path)
    m = s.motion
    assert m.file is None      # written out as x, y, z with their channels
    assert (m.x.channel, m.y.channel, m.z.channel) == ("360", "90", "Up")
    assert any("by orientation" in n for n in s.notes)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        motion = build_motion(s)
    # each axis carries its channel as read: peak equal to that channel's header
    # "Peak acceleration" (the reader's header_pga), to the 0.1 % of issue 17
    for axis, comp in (("x", "360"), ("y", "90"), ("z", "Up")):
        raw = motion.raw[axis]
        assert raw.component == comp
        assert np.max(np.abs(raw.acc)) == pytest.approx(raw.metadata["header_pga"], rel=1e-3)


def test_scenario_channel_and_azimuth_keys(tmp_path):
    from groundshake.pipeline import build_motion

    shutil.copy(V2, tmp_path / "station.V2")
    text = BASE + ('[motion]\nx = { file = "station.V2", azimuth = 90 }\n'
                   'y = { file = "station.V2", channel = "360" }\n')
    s = parse_scenario_text(text, source="case.toml", base_dir=tmp_path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        motion = build_motion(s)
    assert motion.raw["x"].component == "90"        # "Chan  3: 90 Deg"
    assert motion.raw["y"].component == "360"       # "Chan  1: 360 Deg"
    bad = BASE + '[motion]\nx = { file = "station.V2", channel = "270" }\n'
    s = parse_scenario_text(bad, source="case.toml", base_dir=tmp_path)
    with pytest.raises(InputError, match=r"motion.x.channel: given '270'.*1: Up \(vertical\)"):
        build_motion(s)


def test_scenario_file_and_components_together_is_an_error(tmp_path):
    shutil.copy(V2, tmp_path / "station.V2")
    text = BASE + '[motion]\nfile = "station.V2"\nx = { file = "station.V2", channel = "360" }\n'
    with pytest.raises(ScenarioError, match=r"motion.file: given a file together with x; "
                                            r"allowed either file"):
        parse_scenario_text(text, source="case.toml", base_dir=tmp_path)
