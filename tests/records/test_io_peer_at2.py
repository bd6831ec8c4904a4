"""PEER NGA ``.AT2`` reader.

Sources: the real file tests/data/strong-motion/peer_RSN763_LOMAP_GIL067.AT2 (its own
header lines 3-4: ``UNITS OF G``, ``NPTS=   7999, DT=   .0050 SEC``); the header states no
peak, so the PGA is checked against an independent parse of the data block with
numpy.fromstring; standard gravity 9.80665 m/s² (3rd CGPM, 1901).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake import InputError
from groundshake.records import read_record
from groundshake.records.io import detect

from _strong_motion import DATA, assert_options_checked, round_trip

FILE = DATA / "peer_RSN763_LOMAP_GIL067.AT2"
G = 9.80665  # m/s² per g, 3rd CGPM (1901)


def test_real_file_matches_an_independent_parse():
    (rec,) = read_record(FILE)
    block = " ".join(FILE.read_text().splitlines()[4:])
    independent = np.fromstring(block, sep=" ")  # numpy's own parse of the data block
    assert rec.n == 7999  # header line 4: NPTS=   7999
    assert rec.dt == 0.005  # header line 4: DT=   .0050 SEC
    assert independent.size == 7999  # the file holds NPTS values
    pga = np.max(np.abs(rec.acc))
    assert pga == pytest.approx(np.max(np.abs(independent)) * G, rel=1e-3)  # 0.1 %, numpy.fromstring
    np.testing.assert_allclose(rec.acc, independent * G, rtol=1e-12)  # same numbers, g -> m/s²
    assert rec.units == "g"  # header line 3: UNITS OF G


def test_real_file_header_fields():
    (rec,) = read_record(FILE)
    # header line 2: "Loma Prieta, 10/18/1989, Gilroy - Gavilan Coll., 67"
    assert rec.component == "67"
    assert rec.metadata["azimuth_deg"] == 67.0  # component 67 = 67 degrees from north
    assert rec.metadata["orientation"] == "horizontal"
    assert rec.metadata["station"] == "Gilroy - Gavilan Coll."
    assert rec.metadata["event_name"] == "Loma Prieta"
    assert rec.metadata["event_date"] == "10/18/1989"
    assert rec.name == "Gilroy - Gavilan Coll. 67"
    assert detect(FILE).FORMAT == "PEER NGA (.AT2)"


def test_round_trip_through_our_writers(tmp_path):
    round_trip(read_record(FILE), tmp_path)


def _synthetic(tmp_path, *, n=203, dt=0.01, units="G", comp="UP", line4=None, values=None):
    """A PEER file written here, with other numbers than the real one (invented test data)."""
    rng = np.random.default_rng(7)
    v = rng.normal(0, 0.05, n) if values is None else values
    rows = [v[i:i + 5] for i in range(0, len(v), 5)]
    body = "\n".join("".join(f"{x:15.7E}" for x in r) for r in rows)
    line4 = line4 or f"NPTS= {n:6d}, DT= {dt:8.4f} SEC,"
    text = ("PEER NGA STRONG MOTION DATABASE RECORD\n"
            f"Imaginary Event, 01/02/2003, Test Site, {comp}\n"
            f"ACCELERATION TIME SERIES IN UNITS OF {units}\n{line4}\n{body}\n")
    p = tmp_path / "synthetic.at2"
    p.write_text(text)
    return p, v


def test_synthetic_file_reads_back_what_was_written(tmp_path):
    p, v = _synthetic(tmp_path)
    (rec,) = read_record(p)
    assert rec.n == 203 and rec.dt == 0.01  # as written in the synthetic header
    written = np.array([float(f"{x:15.7E}") for x in v])  # the text as written above
    np.testing.assert_allclose(rec.acc, written * G, rtol=1e-15)  # g -> m/s², CGPM 1901
    assert rec.metadata["orientation"] == "vertical"  # component UP
    assert "azimuth_deg" not in rec.metadata


def test_older_peer_layout_npts_dt_line(tmp_path):
    p, v = _synthetic(tmp_path, n=40, dt=0.02, line4="    40    .0200    NPTS, DT")
    (rec,) = read_record(p)
    assert rec.n == 40 and rec.dt == 0.02  # the older "NPTS, DT" header line, as written


def test_contradicting_dt_and_units_are_errors(tmp_path):
    assert_options_checked(FILE, InputError,
                           dt=(0.01, r"dt=0\.01 s was given but its DT= header says 0\.005 s"),
                           units=("gal", "states units g but cm/s2"))
    assert read_record(FILE, dt=0.005, units="g")[0].n == 7999  # agreeing options are fine


def test_broken_file_names_the_format(tmp_path):
    p, _ = _synthetic(tmp_path, n=30)
    text = p.read_text().splitlines()
    text[7] = text[7] + "  1.0000000E-02"  # a data line with a sixth value
    p.write_text("\n".join(text) + "\n")
    with pytest.raises(InputError) as e:
        read_record(p)
    msg = str(e.value)
    assert msg.startswith(f"PEER NGA (.AT2) file {p}")  # names the format and the file
    assert "NPTS=30" in msg and "header line 4" in msg  # what is wrong and where


def test_velocity_file_is_refused_by_name(tmp_path):
    p, _ = _synthetic(tmp_path, n=30)
    p.write_text(p.read_text().replace("ACCELERATION TIME SERIES IN UNITS OF G",
                                       "VELOCITY TIME SERIES IN UNITS OF CM/S"))
    with pytest.raises(InputError, match=r"PEER NGA \(\.AT2\) file .*not an acceleration"):
        read_record(p)


def test_short_data_block_names_the_line(tmp_path):
    p, _ = _synthetic(tmp_path, n=30)
    p.write_text(p.read_text().replace("NPTS=     30", "NPTS=     40"))
    with pytest.raises(InputError, match=r"PEER NGA \(\.AT2\) file .*40 values were announced"):
        read_record(p)


def test_dt_before_npts(tmp_path):
    p, _ = _synthetic(tmp_path, n=25, dt=0.005, line4="DT=    .0050 SEC, NPTS=     25")
    (rec,) = read_record(p)
    assert rec.n == 25 and rec.dt == 0.005  # the same keys in the other order, as written
