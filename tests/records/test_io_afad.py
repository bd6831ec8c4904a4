"""The AFAD/NSMN (Turkey) text reader.

Sources: the real file nsmn_us20009ynd_20170720223109_0921.txt
(tests/data/strong-motion/SOURCES.md) and its own header lines, quoted beside each
check; an independent parse of its data rows with numpy.loadtxt; the gal (1 cm/s²).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning, RecordError
from groundshake.records import read_record
from groundshake.records.io import afad

from _strong_motion import (assert_columns, assert_options_checked, data_file, round_trip,
                            round_trip_sac)

NAME = "nsmn_us20009ynd_20170720223109_0921.txt"


def test_bytes_that_are_not_its_text_are_not_claimed():
    # its own file is claimed by content (test_io_registry.py); these three bytes are not
    assert afad.is_format(data_file(NAME), b"\xff\xfe\x00") is False


def test_real_file_matches_its_header():
    recs = read_record(data_file(NAME))
    assert [r.component for r in recs] == ["N-S", "E-W", "U-D"]  # column line 18
    # "RAW PGA VALUES (gal)    : (N-S) 13.200332 (E-W) 12.163827 (U-D) 9.840572"
    for rec, pga in zip(recs, (13.200332, 12.163827, 9.840572)):
        assert np.max(np.abs(rec.acc)) == pytest.approx(pga * 0.01, rel=1e-3)
        assert rec.metadata["header_pga"] == pytest.approx(pga * 0.01, rel=1e-12)
        # "NUMBER OF DATA : 28683", "SAMPLING INTERVAL (sec) : 0.01"
        assert rec.n == 28683 and rec.dt == 0.01
    # "RECORD TIME : 20/07/2017 22:30:58.000000 (GMT)" (day/month/year)
    assert recs[0].start_time.startswith("2017-07-20T22:30:58")
    # "STATION ID : 0921"
    assert [r.name for r in recs] == ["0921 N-S", "0921 E-W", "0921 U-D"]
    assert [r.metadata["orientation"] for r in recs] == ["horizontal", "horizontal", "vertical"]
    assert recs[0].metadata["azimuth_deg"] == 0.0 and recs[1].metadata["azimuth_deg"] == 90.0
    # "EARTHQUAKE MAGNITUDE    : 6.5 Mw"
    assert recs[0].metadata["event_magnitude"] == 6.5


def test_real_file_equals_an_independent_parse():
    recs = read_record(data_file(NAME))
    table = np.loadtxt(data_file(NAME), skiprows=18, encoding="latin-1")  # 18 header lines
    assert_columns(recs, table, 0.01)  # gal


def test_round_trip_through_our_writers(tmp_path):
    records = read_record(data_file(NAME))
    round_trip(records, tmp_path)
    round_trip_sac(records, tmp_path)


def _synthetic(table: np.ndarray, dt: float, *, n_header: int | None = None,
               unit: str = "gal") -> str:
    n = table.shape[0] if n_header is None else n_header
    peaks = np.abs(table).max(axis=0)
    lines = ["STRONG GROUND MOTION RECORDS OF TURKIYE",
             "PLACE                   : TEST SITE",
             "EARTHQUAKE DATE         : 2001/02/03 04:05:06 (GMT)",
             "STATION ID              : 9999",
             "RECORD TIME             : 03/02/2001 04:05:00.500000 (GMT)",
             f"NUMBER OF DATA          : {n}",
             f"SAMPLING INTERVAL (sec) : {dt}",
             f"RAW PGA VALUES ({unit})    : (N-S) {peaks[0]:.6f} (E-W) {peaks[1]:.6f} "
             f"(U-D) {peaks[2]:.6f}",
             "       N-S          E-W          U-D"]
    lines += [f"{a:12.6f} {b:12.6f} {c:12.6f}" for a, b, c in table]
    return "\r\n".join(lines) + "\r\n"


def test_synthetic_file_of_other_numbers(tmp_path):
    rng = np.random.default_rng(3)
    table = np.round(rng.normal(0, 80, (150, 3)), 6)
    path = tmp_path / "mine.txt"
    path.write_text(_synthetic(table, 0.005), encoding="latin-1")
    recs = read_record(path)
    assert_columns(recs, table, 0.01, dt=0.005)  # our numbers, gal
    # day/month/year of RECORD TIME, read as 3 February 2001
    assert recs[0].start_time.startswith("2001-02-03T04:05:00.5")


def test_options_and_short_files(tmp_path):
    assert_options_checked(data_file(NAME), RecordError,
                           dt=(0.02, r"dt=0.02 s was given but the AFAD/NSMN text header says 0.01 s"),
                           units=("g", r"units g were given but the AFAD/NSMN text header says cm/s2"))
    table = np.ones((40, 3))
    path = tmp_path / "short.txt"
    path.write_text(_synthetic(table, 0.01, n_header=50))
    with pytest.raises(RecordError, match=r"^AFAD/NSMN text file .*: 40 data rows; NUMBER OF DATA "
                                          r"says 50 \(line 6"):
        read_record(path)
    path.write_text(_synthetic(table, 0.01, n_header=30))
    with pytest.warns(GroundshakeWarning, match="40 data rows but NUMBER OF DATA says 30"):
        recs = read_record(path)
    assert recs[0].n == 30
