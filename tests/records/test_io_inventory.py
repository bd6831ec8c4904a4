"""MiniSEED in raw counts with a StationXML inventory (and refused without one).

Sources: the real files fdsn_ci38457511_CI.CLC..HNE.mseed and fdsn_ci38457511_CI.CLC.xml
(tests/data/strong-motion/SOURCES.md). The sensitivity (213945 counts per m/s² on HNE,
input units M/S**2) is read from the XML with the standard library's ElementTree, the
counts with ObsPy (an independent reader), and the expected acceleration is their
quotient. The shared folder's SOURCES.md states "PGA about 0.343 g once the sensitivity
is applied" — a peak of the record with its mean (the digitiser's offset) removed.
"""
from __future__ import annotations

import json
import xml.etree.ElementTree as ET

import numpy as np
import pytest

from _blocks import concrete_block
from _strong_motion import data_file

from groundshake._errors import RecordError
from groundshake.cli import main
from groundshake.records import read_record, write_record

MSEED = data_file("fdsn_ci38457511_CI.CLC..HNE.mseed")
XML = data_file("fdsn_ci38457511_CI.CLC.xml")
G = 9.80665  # CGPM 1901


def _sensitivity_from_xml(channel: str) -> tuple[float, str]:
    """The channel's InstrumentSensitivity Value and InputUnits, parsed without ObsPy."""
    ns = {"s": "http://www.fdsn.org/xml/station/1"}
    root = ET.parse(XML).getroot()
    for ch in root.iterfind(".//s:Channel", ns):
        if ch.get("code") == channel:
            sens = ch.find("s:Response/s:InstrumentSensitivity", ns)
            return (float(sens.find("s:Value", ns).text),
                    sens.find("s:InputUnits/s:Name", ns).text)
    raise AssertionError(f"{channel} not in the XML")


def _counts() -> np.ndarray:
    import obspy

    return obspy.read(str(MSEED))[0].data


def test_sensitivity_in_the_xml_is_the_one_sources_state():
    value, units = _sensitivity_from_xml("HNE")
    assert value == 213945.0  # shared SOURCES.md: "213945 counts per m/s² on HNE"
    assert units.upper() == "M/S**2"


def test_counts_divided_by_the_sensitivity():
    (rec,) = read_record(MSEED, inventory=XML)
    counts = _counts()
    assert counts.dtype.kind == "i"  # raw counts (Steim-compressed integers)
    value, _ = _sensitivity_from_xml("HNE")
    np.testing.assert_allclose(rec.acc, counts / value, rtol=1e-15, atol=0)
    # PGA as read = max|counts| / 213945
    assert np.max(np.abs(rec.acc)) == pytest.approx(np.max(np.abs(counts)) / 213945.0, rel=1e-12)
    # shared SOURCES.md: "PGA about 0.343 g" (offset removed)
    assert np.max(np.abs(rec.acc - rec.acc.mean())) / G == pytest.approx(0.343, abs=5e-4)
    assert rec.units == "m/s2" and "213945" in rec.metadata["units_from"]
    # the XML's Channel HNE: azimuth 90, dip 0
    assert rec.metadata["orientation"] == "horizontal" and rec.metadata["azimuth_deg"] == 90.0
    assert rec.name == "CLC HNE"


def test_counts_without_an_inventory_are_an_error():
    with pytest.raises(RecordError, match=r"fdsn_ci38457511_CI.CLC..HNE.mseed: integer samples "
                                          r"peaking at 7.\d+e\+04 g when read as m/s2: these look "
                                          r"like raw counts; give the station's inventory "
                                          r"\(StationXML\)") as info:
        read_record(MSEED, units="m/s2")
    assert info.value.param == "inventory"         # the command line names --inventory
    with pytest.raises(RecordError, match=r"^inventory: .*integer samples and no units in the "
                                          r"file: raw counts.*inventory") as info:
        read_record(MSEED)
    assert info.value.param == "inventory"


def test_integer_samples_of_plausible_size_are_accepted(tmp_path):
    # accelerations stored as whole mm/s² (peak 0.2 g): not counts
    import obspy

    acc = np.round(0.2 * G * 1000 * np.sin(np.linspace(0, 20, 500))).astype(np.int32)
    obspy.Stream([obspy.Trace(acc, header={"station": "MM", "channel": "HNN",
                                           "sampling_rate": 100.0})]).write(
        str(tmp_path / "mm.mseed"), format="MSEED", encoding="INT32")
    (rec,) = read_record(tmp_path / "mm.mseed", units="mm/s2")
    np.testing.assert_allclose(rec.acc, acc * 1e-3)  # mm → m


def test_wrong_inventory_files(tmp_path):
    with pytest.raises(RecordError, match=r"no such inventory file"):
        read_record(MSEED, inventory=tmp_path / "none.xml")
    with pytest.raises(RecordError, match=r"not a station inventory ObsPy can read"):
        read_record(MSEED, inventory=data_file("cwb_us1000chhc_1-EAS.dat"))
    with pytest.raises(RecordError, match=r"an inventory was given but this CWB \(Taiwan\) text "
                                          r"file holds accelerations already"):
        read_record(data_file("cwb_us1000chhc_1-EAS.dat"), inventory=XML)
    # a trace of another station: no response for it in the XML
    import obspy

    tr = obspy.read(str(MSEED))[0]
    tr.stats.station = "XYZ"
    tr.write(str(tmp_path / "other.mseed"), format="MSEED")
    with pytest.raises(RecordError, match=r"trace CI.XYZ..HNE has no response in .*CLC.xml"):
        read_record(tmp_path / "other.mseed", inventory=XML)


def test_cli_inventory_option(capsys):
    assert main(["info", str(MSEED), "--inventory", str(XML), "--raw", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    (r,) = doc["records"]
    assert r["name"] == "CLC HNE"
    assert r["pga"] == pytest.approx(np.max(np.abs(_counts())) / 213945.0, rel=1e-9)
    # without it: one line, exit 2, naming the file and the option
    assert main(["info", str(MSEED), "--units", "m/s2"]) == 2
    err = capsys.readouterr().err
    assert "fdsn_ci38457511_CI.CLC..HNE.mseed" in err and "--inventory" in err


def test_scenario_inventory(tmp_path):
    from groundshake.pipeline import build_motion
    from groundshake.scenario import parse_scenario_text

    text = f"""title = "inventory test (invented block)"
[motion]
x = {{ file = "{MSEED.as_posix()}" }}
inventory = "{XML.as_posix()}"
[processing]
enabled = false
""" + concrete_block()
    scen = parse_scenario_text(text, source=str(tmp_path / "s.toml"), base_dir=tmp_path)
    motion = build_motion(scen)
    np.testing.assert_allclose(motion.raw["x"].acc, _counts() / 213945.0, rtol=1e-15)
    # the suite swaps records but keeps the station's inventory
    other = scen.with_motion(x=MSEED)
    assert other.motion.inventory == scen.motion.inventory
    no_inv = parse_scenario_text(text.replace(f'inventory = "{XML.as_posix()}"\n', ""),
                                 source=str(tmp_path / "s.toml"), base_dir=tmp_path)
    with pytest.raises(RecordError, match="look like raw counts|raw counts, most likely"):
        build_motion(no_inv)
    from groundshake.cli.run import _with_inventory

    assert _with_inventory(no_inv, XML).motion.inventory == XML.resolve()


def test_counts_round_trip_through_our_writers(tmp_path):
    (rec,) = read_record(MSEED, inventory=XML)
    write_record(rec, tmp_path / "a.mseed")  # written as float64 m/s²: no inventory needed
    (back,) = read_record(tmp_path / "a.mseed", units="m/s2")
    np.testing.assert_array_equal(back.acc, rec.acc)


def test_velocity_sensor_gets_its_full_response_removed(tmp_path):
    # A velocity sensor of our own (invented): two zeros at 0, two poles at a 0.0059-Hz
    # corner, gain 1.5e9 counts per m/s. A 2-Hz sine of 1e5 counts lies in its flat band,
    # so the ground velocity is 1e5 / 1.5e9 m/s and the acceleration amplitude
    # 2π·2·1e5/1.5e9 m/s² (a sine's derivative; flat band: within 0.1 %).
    import obspy
    from obspy.core.inventory import Channel, Inventory, Network, Station
    from obspy.core.inventory.response import Response

    gain, f, amp = 1.5e9, 2.0, 1e5
    resp = Response.from_paz(zeros=[0j, 0j], poles=[-0.037 + 0.037j, -0.037 - 0.037j],
                             stage_gain=gain, input_units="M/S", output_units="COUNTS",
                             normalization_frequency=1.0)
    resp.recalculate_overall_sensitivity(1.0)
    chan = Channel("HHE", "", 0, 0, 0, 0, azimuth=90, dip=0, sample_rate=100, response=resp)
    inv = Inventory(networks=[Network("XX", stations=[Station("S", 0, 0, 0, channels=[chan])])],
                    source="test")
    inv.write(str(tmp_path / "v.xml"), format="STATIONXML")
    t = np.arange(6000) / 100.0
    tr = obspy.Trace((amp * np.sin(2 * np.pi * f * t)).astype(np.int32),
                     header={"network": "XX", "station": "S", "channel": "HHE",
                             "sampling_rate": 100.0})
    tr.write(str(tmp_path / "v.mseed"), format="MSEED")
    (rec,) = read_record(tmp_path / "v.mseed", inventory=tmp_path / "v.xml")
    assert "full instrument response removed" in rec.metadata["units_from"]
    middle = rec.acc[1500:4500]  # away from the tapers at the ends
    assert np.max(np.abs(middle)) == pytest.approx(2 * np.pi * f * amp / gain, rel=1e-3)
