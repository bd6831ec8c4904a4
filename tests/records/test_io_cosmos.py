"""COSMOS V0/V1/V2 reader.

Sources: the real files tests/data/strong-motion/cosmos_ci14155260_Cosmos12TimeSeriesTest.v1
(a COSMOS test file; its text line 11 "Max = -161.962 cm/sec2 at 27.850 sec", data line
"7000 acceleration pts, approx 70 secs, units=cm/sec2(04)", real-header value 62 = 10.0 ms)
and cosmos_ftbragg_NP1795-n.305.v0c (raw counts, three channels; text lines "Uncor max =
985881 counts, at 45.290 sec" etc., real-header value 22 = 0.794729 µV/count, value 42 =
1.2 V/g, also in its comment "(3.43 g max 1.20 v/g)"); an independent parse of each data
block with numpy.fromstring; g = 9.80665 m/s² (CGPM 1901).
"""
from __future__ import annotations

import warnings

import numpy as np
import pytest

from groundshake import GroundshakeWarning, InputError
from groundshake.records import read_record

from _strong_motion import DATA, assert_options_checked, round_trip

V1 = DATA / "cosmos_ci14155260_Cosmos12TimeSeriesTest.v1"
V0 = DATA / "cosmos_ftbragg_NP1795-n.305.v0c"
G = 9.80665  # CGPM 1901


def test_v1_against_its_header():
    (rec,) = read_record(V1)
    assert rec.n == 7000  # "7000 acceleration pts"
    assert rec.dt == 0.01  # real header 62: 10.0 ms; 7000 pts x 0.01 s = "approx 70 secs"
    assert rec.units == "cm/s2"  # "units=cm/sec2(04)"
    assert np.max(np.abs(rec.acc)) == pytest.approx(1.61962, rel=1e-3)  # Max = -161.962 cm/sec2
    assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(27.85, abs=1e-9)  # at 27.850 sec
    assert rec.component == "340"  # "Sta Cha:  1: 340 deg"
    assert rec.metadata["azimuth_deg"] == 340.0
    assert rec.start_time == "2005-06-16T20:53:04.4Z"  # "Rcrd start time:06/16/2005, 20:53:04.400 UTC"
    assert rec.metadata["station"] == "CE-J2236"  # "Code:CE-J2236"


def test_v0_counts_through_lsb_and_sensitivity():
    with pytest.warns(GroundshakeWarning, match="raw counts"):
        recs = read_record(V0)
    assert [r.component for r in recs] == ["90", "360", "Up"]  # "Sta Chan ?: 90 Deg", "360 Deg", "Up"
    assert [r.metadata["channel"] for r in recs] == ["HNE", "HNN", "HNZ"]  # <SCNL> comments
    factor = 0.794729e-6 / 1.2 * G  # counts -> V (LSB) -> g (1.2 V/g) -> m/s², real header 22, 42
    lines = V0.read_text().splitlines()
    counts_max = {"90": (985881, 45.29), "360": (1341667, 74.365), "Up": (2378684, 46.31)}
    starts = [i for i, t in enumerate(lines) if "raw accel." in t]
    for rec, start in zip(recs, starts):
        independent = np.fromstring(" ".join(lines[start + 1:start + 2001]).replace("-", " -"),
                                    sep=" ")  # numpy's own parse of the 10I8 block
        assert independent.size == 20000 == rec.n  # "20000 raw accel. pts"
        np.testing.assert_allclose(rec.acc, independent * factor, rtol=1e-12)
        value, t = counts_max[rec.component]  # "Uncor max = ... counts, at ... sec."
        assert np.max(np.abs(rec.acc)) == pytest.approx(value * factor, rel=1e-3)
        assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(t, abs=1e-9)
        assert rec.dt == 0.005  # 20000 pts, "approx 100 secs"; real header 62 = 5.0 ms
    assert recs[2].metadata["orientation"] == "vertical"


def test_round_trip_through_our_writers(tmp_path):
    round_trip(read_record(V1), tmp_path)


def test_contradicting_options():
    assert_options_checked(V1, InputError,
                           dt=(0.005, r"dt=0\.005 s was given but its real header \(value 62\) says 0\.01 s"),
                           units=("g", "states units cm/s2 but g was given"))


def _synthetic(tmp_path, acc, *, dt_ms=20.0, units="g", code=2, name="synthetic.v2", comp="45"):
    """A one-channel COSMOS V2 written here (invented numbers; same layout)."""
    ints = np.full(100, -999)
    ints[:3] = (3, 1, code)  # processing stage, acceleration, units code
    reals = np.full(100, -999.0)
    k = int(np.argmax(np.abs(acc)))
    reals[61], reals[63], reals[64] = dt_ms, acc[k], k * dt_ms / 1000
    text = [f"Corrected acceleration    (Format v01.20 with 13 text lines) Src: test",
            "Imaginary Earthquake                   January 2, 2020", "Hypocenter: invented",
            "Origin: 01/02/2020, 03:04:00.0 UTC", "Statn No: 01-00001  Code:XX-TEST  Test Site",
            "Coords: 0 0", "Recorder: none", "Rcrd start time:01/02/2020, 03:04:05.250 UTC (Q=1)",
            f"Sta Cha:  1: {comp} deg (Rcrdr Chan  1) Location: free field", "", "", "",
            "Values used when parameter or data value is unknown/unspecified:   -999, -999.0"]
    out = text + [" 100 Integer-header values follow on  10 lines, Format= (10I8)"]
    out += ["".join(f"{v:8d}" for v in ints[i:i + 10]) for i in range(0, 100, 10)]
    out += [" 100 Real-header values follow on  17 lines, Format= (6F13.6)"]
    out += ["".join(f"{v:13.6f}" for v in reals[i:i + 6]) for i in range(0, 100, 6)]
    out += ["  1 Comment line(s) follow, each starting with a \"|\":", " | invented for a test"]
    out += [f"{acc.size:7d}  acceleration pts, approx {acc.size * dt_ms / 1000:4.0f} secs, "
            f"units={units}({code:02d}),Format=(5E13.5)"]
    out += ["".join(f"{v:13.5E}" for v in acc[i:i + 5]) for i in range(0, acc.size, 5)]
    out += ["End-of-data for Chan  1 acceleration"]
    p = tmp_path / name
    p.write_text("\n".join(out) + "\n")
    return p


def test_synthetic_v2(tmp_path):
    acc = np.random.default_rng(5).normal(0, 0.1, 333)
    p = _synthetic(tmp_path, acc)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # consistent file: no warning
        (rec,) = read_record(p)
    assert rec.dt == 0.02 and rec.n == 333  # real header 62 = 20 ms, as written
    written = np.array([float(f"{v:13.5E}") for v in acc])
    np.testing.assert_allclose(rec.acc, written * G, rtol=1e-15)  # g -> m/s²
    assert rec.metadata["header_pga"] == pytest.approx(np.max(np.abs(rec.acc)), rel=1e-3)
    assert rec.metadata["azimuth_deg"] == 45.0 and rec.component == "45"
    assert rec.start_time == "2020-01-02T03:04:05.25Z"


def test_synthetic_broken_header_names_format_and_line(tmp_path):
    acc = np.random.default_rng(6).normal(0, 0.1, 50)
    p = _synthetic(tmp_path, acc)
    text = p.read_text().splitlines()
    text[20] = text[20][:8] + "    x   " + text[20][16:]  # a broken integer-header field
    p.write_text("\n".join(text) + "\n")
    with pytest.raises(InputError) as e:
        read_record(p)
    msg = str(e.value)
    assert msg.startswith(f"COSMOS V0/V1/V2 file {p}") and "(line 21:" in msg  # format and line


def test_velocity_only_file_is_refused(tmp_path):
    acc = np.random.default_rng(6).normal(0, 0.1, 50)
    p = _synthetic(tmp_path, acc)
    text = p.read_text().splitlines()
    text[14] = f"{3:8d}{2:8d}" + text[14][16:]  # integer header 2: 2 = velocity
    p.write_text("\n".join(text) + "\n")
    with pytest.raises(InputError, match="no acceleration channel"):
        read_record(p)
