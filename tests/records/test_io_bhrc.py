"""The BHRC (Iran) Volume-1 reader.

Sources: the real file bhrc_usp000jq5p_5522-1.V1 (tests/data/strong-motion/SOURCES.md)
and its own header lines, quoted beside each check. Its header states no peak, so the
PGA is checked against an independent parse of the data lines with numpy (line numbers
counted in the file by hand); g/10 is a tenth of the CGPM's standard gravity
(9.80665 m/s²).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake._errors import RecordError
from groundshake.records import read_record

from _strong_motion import (assert_channels, assert_options_checked, data_file, round_trip,
                            round_trip_sac)

NAME = "bhrc_usp000jq5p_5522-1.V1"
G = 9.80665


def test_real_file_matches_its_header():
    recs = read_record(data_file(NAME))
    # "COMP L1", "COMP V2", "COMP T3" (lines 7, 1034, 2061)
    # station line: "Ajab Shir  Station ... Azimuth L 324   T 54"
    assert_channels(recs, ["L1", "V2", "T3"], ["horizontal", "vertical", "horizontal"],
                    {0: 324.0, 2: 54.0})
    assert "azimuth_deg" not in recs[1].metadata
    assert [r.name for r in recs] == ["Ajab Shir L1", "Ajab Shir V2", "Ajab Shir T3"]
    for rec in recs:
        # "NO. OF POINTS =   9984      DURATION =  49.920": 49.920 s / 9984 = 0.005 s
        assert rec.n == 9984 and rec.dt == 0.005
    # "Epicenter ... Mw6.1", "Origin Time : 2012/08/11   12:23:16"
    assert recs[0].metadata["event_magnitude"] == 6.1
    assert recs[0].metadata["event_time"] == "2012-08-11T12:23:16"


def test_real_file_equals_an_independent_parse():
    recs = read_record(data_file(NAME))
    lines = data_file(NAME).read_text(encoding="latin-1").splitlines()
    # data lines 28..1026, 1055..2053, 2082..3080 (ten values a line, then "/&")
    for rec, first in zip(recs, (27, 1054, 2081)):
        assert lines[first + 999].startswith("/&")
        values = np.array(" ".join(lines[first:first + 999]).split(), dtype=float)
        assert values.size == 9984
        # "UNITS ARE SECONDS AND G/10"
        np.testing.assert_allclose(rec.acc, values * 0.1 * G, rtol=0, atol=1e-15)
        assert np.max(np.abs(rec.acc)) == pytest.approx(np.max(np.abs(values)) * 0.1 * G, rel=1e-3)


def test_round_trip_through_our_writers(tmp_path):
    records = read_record(data_file(NAME))
    round_trip(records, tmp_path)
    round_trip_sac(records, tmp_path)


def _channel(comp: str, values: np.ndarray, dt: float, azimuths="Azimuth N 10  E 100") -> list[str]:
    n = values.size
    text = ["* VOL1DS FILE:  0001/01", "Inst Type = SSA-2", "Origin Time : 2005/06/07   08:09:10",
            "", comp[0], "", f"COMP {comp}",
            f"Test Town                 Station   35.000 N 51.000 E   Altitude 1000m   {azimuths}",
            "Epicenter 35.100 N 51.100 E   FD 10 Km mb      Ms      Mw5.5   M        ML   (BHRC   )",
            "INSTR PERIOD =  .020 SEC   DAMPING =  .600",
            f"NO. OF POINTS = {n:6d}      DURATION = {n * dt:7.3f}",
            "UNITS ARE SECONDS AND G/10", ""]
    ints = [" ".join(f"{0:4d}" for _ in range(14))] * 6 + ["    0    0    0    0"]
    reals = ["  .200000E-01  .600000E+00  .000000E+00  .000000E+00  .100000E+00  .00"] * 7
    data = ["".join(f"{v:13.6E}" for v in values[j:j + 10]) for j in range(0, n, 10)]
    return text + ints + reals + data + ["/&"]


def test_synthetic_file_of_other_numbers(tmp_path):
    rng = np.random.default_rng(9)
    chans = [rng.normal(0, 0.3, 57) for _ in range(2)]
    path = tmp_path / "test.V1"
    path.write_text("\r\n".join(_channel("N1", chans[0], 0.01) + _channel("UP2", chans[1], 0.01))
                    + "\r\n")
    recs = read_record(path)
    for rec, values in zip(recs, chans):
        # 13.6E keeps 7 significant digits of our numbers
        np.testing.assert_allclose(rec.acc, values * 0.1 * G, rtol=1e-6, atol=1e-12)
        assert rec.n == 57 and rec.dt == 0.01
    # "Azimuth N 10": the header's angle wins over the letter's own 0°
    assert recs[0].metadata["azimuth_deg"] == 10.0
    assert recs[1].metadata["orientation"] == "vertical"
    assert [r.name for r in recs] == ["Test Town N1", "Test Town UP2"]


def test_options_and_broken_files(tmp_path):
    assert_options_checked(data_file(NAME), RecordError,
                           dt=(0.01, r"dt=0.01 s was given but the BHRC .* header says 0.005 s"),
                           units=("gal", r"units cm/s2 were given but the BHRC .* header says g/10"))
    lines = _channel("L1", np.zeros(40), 0.01)
    del lines[-2]  # the last data line
    path = tmp_path / "short.V1"
    path.write_text("\n".join(lines) + "\n")
    with pytest.raises(RecordError, match=r"^BHRC \(Iran\) Volume 1 file .*: the data block holds 30 "
                                          r"values; the header announces 40 \(line 28"):
        read_record(path)
