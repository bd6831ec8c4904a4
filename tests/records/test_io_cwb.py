"""The CWB (Taiwan) text reader.

Sources: the real file cwb_us1000chhc_1-EAS.dat (tests/data/strong-motion/SOURCES.md)
and its own header lines, quoted beside each check; an independent parse of its rows
with numpy.loadtxt; the gal (1 cm/s²); Taiwan time is UTC+8 (the header's "GMT+08").
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake._errors import RecordError
from groundshake.records import read_record

from _strong_motion import (assert_channels, assert_columns, assert_options_checked,
                            assert_text_refused, data_file, round_trip, round_trip_sac)

NAME = "cwb_us1000chhc_1-EAS.dat"


def test_real_file_matches_its_header():
    recs = read_record(data_file(NAME))
    # "#DataSequence: Time U(+); N(+); E(+)"
    assert_channels(recs, ["U", "N", "E"], ["vertical", "horizontal", "horizontal"],
                    {1: 0.0, 2: 90.0})
    # "#AmplitudeMAX. U:    0.658~   -0.837", "N:    1.256~   -2.273", "E:    1.017~   -0.778"
    # with "#AmplitudeUnit:  gal."
    for rec, pga in zip(recs, (0.837, 2.273, 1.017)):
        assert np.max(np.abs(rec.acc)) == pytest.approx(pga * 0.01, rel=1e-3)
        # "#SampleRate(Hz): 50", 6000 rows ("#RecordLength(sec): 120")
        assert rec.dt == 0.02 and rec.n == 6000
    # "#StationCode: EAS"
    assert [r.name for r in recs] == ["EAS U", "EAS N", "EAS E"]
    # "#StartTime(GMT+08): 2018/02/06-23:50:29.000" is 15:50:29 UTC
    assert recs[0].start_time == "2018-02-06T15:50:29.000Z"


def test_real_file_equals_an_independent_parse():
    recs = read_record(data_file(NAME))
    table = np.loadtxt(data_file(NAME), comments="#")
    for k, rec in enumerate(recs):
        np.testing.assert_allclose(rec.acc, table[:, k + 1] * 0.01, rtol=0, atol=1e-15)


def test_round_trip_through_our_writers(tmp_path):
    records = read_record(data_file(NAME))
    round_trip(records, tmp_path)
    round_trip_sac(records, tmp_path)


def _synthetic(table: np.ndarray, rate: float, unit="gal") -> str:
    n = table.shape[0]
    lines = ["#Earthquake Information", "#Origin Time(GMT+08): 2010/03/04-08:18:52",
             "#Magnitude(Ml): 6.4", "", "#Station Information", "#StationCode: TST",
             "#StartTime(GMT+08): 2010/03/04-08:18:40.500", f"#SampleRate(Hz): {rate:g}",
             f"#AmplitudeUnit:  {unit}. DCoffset(corr)"]
    for k, c in enumerate("UNE"):
        lines.append(f"#AmplitudeMAX. {c}: {table[:, k].max():8.3f}~ {table[:, k].min():8.3f}")
    lines += ["#DataSequence: Time U(+); N(+); E(+)", "#Data: 4F10.3"]
    t = np.arange(n) / rate
    lines += ["".join(f"{v:10.3f}" for v in (t[i], *table[i])) for i in range(n)]
    return "\r\n".join(lines) + "\r\n"


def test_synthetic_file_of_other_numbers(tmp_path):
    rng = np.random.default_rng(2)
    table = np.round(rng.normal(0, 40, (90, 3)), 3)
    path = tmp_path / "mine.dat"
    path.write_text(_synthetic(table, 200.0))
    recs = read_record(path)
    assert_columns(recs, table, 0.01, dt=0.005)  # our numbers, gal
    for k, rec in enumerate(recs):
        assert rec.metadata["header_pga"] == pytest.approx(np.abs(table[:, k]).max() * 0.01)
    assert recs[0].start_time == "2010-03-04T00:18:40.500Z"  # 08:18:40.5 at UTC+8


def test_options_and_broken_files(tmp_path):
    assert_options_checked(data_file(NAME), RecordError,
                           dt=(0.01, r"dt=0.01 s was given but the CWB \(Taiwan\) text header says 0.02 s"),
                           units=("g", r"units g were given but the CWB \(Taiwan\) text header says cm/s2"))
    text = _synthetic(np.zeros((30, 3)), 100.0).replace("#SampleRate(Hz): 100", "#SampleRate(Hz): 50")
    assert_text_refused(tmp_path / "bad.dat", text,
                        r"^CWB \(Taiwan\) text file .*: #SampleRate 50 Hz disagrees "
                        r"with the time column's step 0.01 s \(line 8\)")


def test_too_few_samples(tmp_path):
    path = tmp_path / "tiny.dat"
    path.write_text(_synthetic(np.zeros((10, 3)), 100.0))
    # the project's floor of 16 samples (records.MIN_SAMPLES)
    with pytest.raises(RecordError, match=r"^CWB \(Taiwan\) text file .*: channel 'U' holds 10 "
                                          r"samples; at least 16 are needed"):
        read_record(path)


def test_file_cut_short_is_refused(tmp_path):
    lines = data_file(NAME).read_bytes().splitlines(keepends=True)
    path = tmp_path / "cut.dat"
    path.write_bytes(b"".join(lines[:1000]))
    # "#RecordLength(sec): 120" at "#SampleRate(Hz): 50" is 6000 rows; 978 are left
    with pytest.raises(RecordError, match=r"^CWB \(Taiwan\) text file .*: 978 data rows; "
                                          r"#RecordLength 120 s at 50 Hz needs 6000 \(line 15\)"):
        read_record(path)
