"""Component recognition (vertical or horizontal, azimuth), record names and RotD pairing.

Sources: the SEED Reference Manual v2.4, appendix A (third letter of a channel code:
Z vertical, N and E north and east, 1/2/3 other orthogonal directions); NIED's K-NET
and KiK-net ASCII format ("Dir." E-W, N-S, U-D for K-NET; 1–3 for KiK-net, read by
ObsPy as NS1, EW1, UD1 — ObsPy's nied reader); quadrant bearings as surveyors write
them (N θ E = θ, N θ W = 360 − θ, S θ E = 180 − θ, S θ W = 180 + θ); the headers of
the real files in tests/data/strong-motion (quoted at each check).
"""
from __future__ import annotations

import json
import warnings
from pathlib import Path

import numpy as np
import pytest

from _strong_motion import DATA, data_file

from groundshake._errors import GroundshakeWarning, InputError
from groundshake.cli import main
from groundshake.records import Record, read_record
from groundshake.records._components import azimuth_deg, bearing_deg, describe, orientation

KIKNET = data_file("kiknet_usp000hzq8_NGNH311106302345.EW1")


@pytest.mark.parametrize("code", ["UD", "UP", "Up", "U", "Z", "V", "VERT", "U-D", "DOWN",
                                  "UD1", "UD2", "V2", "HNZ", "HLZ", "BHZ", "EHZ", "z"])
def test_vertical_codes(code):
    # SEED appendix A (…Z), K-NET/KiK-net (UD, UD1), COSMOS/CSMIP ("Up"), BHRC ("V2")
    assert orientation(code) == "vertical"
    assert azimuth_deg(code) is None


@pytest.mark.parametrize("code, az", [("E", 90.0), ("EW", 90.0), ("E-W", 90.0), ("EW1", 90.0),
                                      ("N", 0.0), ("NS", 0.0), ("N-S", 0.0), ("NS2", 0.0),
                                      ("HNE", 90.0), ("HNN", 0.0), ("BHE", 90.0),
                                      ("360", 0.0), ("90", 90.0), ("0", 0.0), ("270", 270.0),
                                      ("180 DEG", 180.0),
                                      ("N08W", 352.0), ("S45E", 135.0), ("N90E", 90.0),
                                      ("N00E", 0.0), ("S30W", 210.0), ("N28W", 332.0)])
def test_horizontal_codes_with_their_azimuth(code, az):
    # SEED appendix A (…N = 0°, …E = 90°); degrees as written; quadrant bearings
    assert describe(code) == ("horizontal", az)


@pytest.mark.parametrize("code", ["L", "T", "L1", "T3", "H1", "H2", "HN1", "HN2", "x", "y"])
def test_horizontal_codes_without_azimuth(code):
    # RENADIC/BHRC longitudinal/transverse, SEED …1/…2: direction only from a header
    assert describe(code) == ("horizontal", None)


def test_unknown_codes_and_headers_that_decide():
    assert describe("foo") == ("unknown", None)
    assert describe("") == ("unknown", None)
    assert describe("999") == ("unknown", None)  # not an angle
    # a header's azimuth gives the direction of an L/T channel (BHRC "Azimuth L 324")
    assert describe("L1", {"azimuth_deg": 324}) == ("horizontal", 324.0)
    # StationXML dip −90 / +90 is vertical, 0 horizontal (FDSN StationXML Dip)
    assert describe("HN1", {"dip_deg": -90.0}) == ("vertical", None)
    assert describe("HN3", {"dip_deg": 0.0, "azimuth_deg": 450.0}) == ("horizontal", 90.0)
    assert describe("X", {"orientation": "vertical"}).kind == "vertical"
    assert bearing_deg("N95E") is None  # a quadrant bearing stays within 90°


def _three_files() -> list[Path]:
    return [p for p in sorted(DATA.iterdir())
            if p.suffix.lower() not in (".md", ".xml", ".mseed")]


def test_every_real_file_says_which_way_its_channels_point():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        for path in _three_files():
            if path.suffix.lower() == ".v3":
                continue  # published spectra, not records
            try:
                recs = read_record(path)
            except InputError:
                continue  # formats without a unit in the file are checked elsewhere
            kinds = [orientation(r.component, r.metadata) for r in recs]
            assert "unknown" not in kinds, (path.name, [r.component for r in recs])
            if len(recs) == 3:  # each three-channel file holds one vertical (its header)
                assert kinds.count("vertical") == 1, (path.name, kinds)
            names = [r.name for r in recs]
            assert len(set(names)) == len(names), names  # unique within a file


def _kiknet_trio(tmp_path: Path) -> list[Path]:
    """The real KiK-net EW1 file and two copies whose "Dir." line says 1 (N-S) and 3 (U-D):
    a station trio in the real format (the copies are ours; the original stays untouched)."""
    text = KIKNET.read_text()
    assert "Dir.              2\n" in text  # KiK-net direction 2 = EW1 (ObsPy's nied reader)
    out = []
    for d, ext in ((2, "EW1"), (1, "NS1"), (3, "UD1")):
        p = tmp_path / f"NGNH311106302345.{ext}"
        p.write_text(text.replace("Dir.              2\n", f"Dir.              {d}\n"))
        out.append(p)
    return out


def test_kiknet_trio_has_unique_readable_names(tmp_path):
    recs = [r for p in _kiknet_trio(tmp_path) for r in read_record(p)]
    # "Station Code      NGNH31" and the channels ObsPy reads from "Dir."
    assert [r.name for r in recs] == ["NGNH31 EW1", "NGNH31 NS1", "NGNH31 UD1"]
    assert [r.metadata["orientation"] for r in recs] == ["horizontal", "horizontal", "vertical"]
    assert recs[0].metadata["azimuth_deg"] == 90.0 and recs[1].metadata["azimuth_deg"] == 0.0


def test_spectrum_rotd_pairs_the_horizontals_and_leaves_the_vertical_out(tmp_path, capsys):
    ew, ns, ud = (str(p) for p in _kiknet_trio(tmp_path))
    assert main(["spectrum", ew, ns, ud, "--rotd", "50,100", "--periods", "0.1,1", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert [r["records"] for r in doc["rotd"]] == [["NGNH31 EW1", "NGNH31 NS1"]]
    assert doc["rotd_left_out"] == ["NGNH31 UD1"]
    assert main(["spectrum", ew, ns, ud, "--rotd", "50", "--periods", "0.1,1"]) == 0
    out = capsys.readouterr().out
    assert "RotD: left out NGNH31 UD1 (vertical)" in out
    assert "RotD pair: NGNH31 EW1 with NGNH31 NS1" in out


def test_knet_trio_from_obspys_test_file(tmp_path, capsys):
    import obspy

    src = Path(obspy.__file__).parent / "io" / "nied" / "tests" / "data" / "test.knet"
    if not src.exists():
        pytest.skip("ObsPy's K-NET test file is not installed")
    text = src.read_text()
    assert "Dir.              E-W\n" in text
    paths = []
    for d in ("E-W", "N-S", "U-D"):  # K-NET directions (NIED format)
        p = tmp_path / f"AKT0139608110312.{d.replace('-', '')}"
        p.write_text(text.replace("Dir.              E-W\n", f"Dir.              {d}\n"))
        paths.append(str(p))
    assert main(["spectrum", *paths, "--rotd", "50", "--periods", "0.2", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert [r["name"] for r in doc["records"]] == ["AKT013 EW", "AKT013 NS", "AKT013 UD"]
    assert [r["records"] for r in doc["rotd"]] == [["AKT013 EW", "AKT013 NS"]]
    assert doc["rotd_left_out"] == ["AKT013 UD"]


def _rec(name, comp, station, seed=0, n=300):
    acc = np.random.default_rng(seed).standard_normal(n)
    return Record(acc=acc, dt=0.01, name=name, component=comp, metadata={"station": station})


def test_pairs_by_station_when_every_record_names_one():
    from groundshake.cli.spectrum import _horizontal_pairs

    recs = [_rec("A E", "E", "A"), _rec("B E", "E", "B"), _rec("A Z", "Z", "A"),
            _rec("A N", "N", "A"), _rec("B N", "N", "B")]
    pairs, left = _horizontal_pairs(recs)
    assert [(a.name, b.name) for a, b, _ in pairs] == [("A E", "A N"), ("B E", "B N")]
    assert left == ["A Z"]


def test_skewed_pair_warns():
    from groundshake.cli.spectrum import _horizontal_pairs

    with pytest.warns(GroundshakeWarning, match="not at right angles"):
        _horizontal_pairs([_rec("A 0", "0", "A"), _rec("A 45", "45", "A")])
    with warnings.catch_warnings():
        warnings.simplefilter("error", GroundshakeWarning)
        _horizontal_pairs([_rec("G 340", "340", "G"), _rec("G 250", "250", "G")])  # 90° apart


def test_same_station_and_channel_from_two_files_get_told_apart(tmp_path, capsys):
    a = tmp_path / "event1.EW1"
    b = tmp_path / "event2.EW1"
    a.write_bytes(KIKNET.read_bytes())
    b.write_bytes(KIKNET.read_bytes())
    assert main(["info", str(a), str(b), "--raw", "--json"]) == 0
    names = [r["name"] for r in json.loads(capsys.readouterr().out)["records"]]
    # station and channel from the header ("NGNH31", "EW1"), then the file to tell them apart
    assert names == ["NGNH31 EW1 (event1.EW1)", "NGNH31 EW1 (event2.EW1)"]


def test_sac_component_headers_fill_what_the_code_leaves_open(tmp_path):
    # SAC header: cmpaz = azimuth from north, cmpinc = incidence from up (0 up, 90
    # horizontal) — the SAC file format's component orientation fields
    import obspy

    def sac(channel, inc, az):
        tr = obspy.Trace(np.linspace(-1, 1, 64).astype("f4"),
                         header={"station": "S", "channel": channel, "sampling_rate": 100.0})
        tr.stats.sac = {"cmpinc": inc, "cmpaz": az, "kuser0": "m/s2"}
        p = tmp_path / f"{channel}.sac"
        tr.write(str(p), format="SAC")
        (rec,) = read_record(p)
        return rec.metadata.get("orientation"), rec.metadata.get("azimuth_deg")

    assert sac("HN1", 90.0, 30.0) == ("horizontal", 30.0)  # SEED "1": direction from cmpaz
    assert sac("HNE", 90.0, 0.0) == ("horizontal", 90.0)  # SEED "E" wins over a zero cmpaz
    assert sac("Q", 0.0, 0.0) == ("vertical", None)  # an unknown code: cmpinc 0 is up


@pytest.mark.parametrize("ext", ["mseed", "sac"])
@pytest.mark.parametrize("component, kind, azimuth", [
    ("N90E", "horizontal", 90.0),    # quadrant bearings (surveyors' convention): N90E = east
    ("N28W", "horizontal", 332.0),   # N a W = 360 − a (GeoNet's WTMC "Component N28W")
    ("S62W", "horizontal", 242.0),   # S a W = 180 + a
    ("U-D", "vertical", None),       # AFAD/NSMN's vertical column
    ("360", "horizontal", 0.0),      # CSMIP "Chan 1: 360 Deg"
])
def test_written_records_keep_their_orientation(tmp_path, ext, component, kind, azimuth):
    # a MiniSEED channel holds 3 characters (SEED manual), a SAC kcmpnm 8: a bearing
    # cut to "N90" would read back as north; what is written must read back the same way
    from groundshake.records import Record, write_record

    rec = Record(acc=np.sin(np.linspace(0, 20, 400)), dt=0.01, name=f"STA {component}",
                 component=component, source="test", units="m/s2",
                 metadata={"station": "STA"})
    path = tmp_path / f"r.{ext}"
    write_record(rec, path)
    (back,) = read_record(path, units="m/s2" if ext == "mseed" else None)
    assert back.metadata.get("orientation") == kind
    if azimuth is None:
        assert back.metadata.get("azimuth_deg") is None
    else:
        assert back.metadata.get("azimuth_deg") == pytest.approx(azimuth, abs=1e-9)
