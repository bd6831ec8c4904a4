"""The USC strong-motion reader.

Sources: the real file usc_ci3144585_017m30bt.s0a (tests/data/strong-motion/SOURCES.md)
and its own header lines, quoted beside each check; an independent parse of its data
block with numpy (line numbers counted in the file by hand); the gal (1 cm/s²) and the
CGPM's standard gravity (9.80665 m/s²).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake._errors import RecordError
from groundshake.records import read_record
from groundshake.records.io import usc

from _strong_motion import assert_options_checked, data_file, head, round_trip, round_trip_sac

NAME = "usc_ci3144585_017m30bt.s0a"


def test_is_format_never_raises():
    assert usc.is_format(data_file(NAME), b"\x00\xff" * 100) is False
    assert usc.is_format(data_file(NAME), b"") is False


def test_real_file_matches_its_header():
    (rec,) = read_record(data_file(NAME))
    # header line 18: "PEAK ACCELERATION =  -242.39450  CMS/SEC/SEC AT    4.580   SEC."
    assert np.max(np.abs(rec.acc)) == pytest.approx(2.4239450, rel=1e-3)
    assert rec.metadata["header_pga"] == pytest.approx(2.4239450, rel=1e-9)
    assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(4.580, abs=1e-9)
    # line 46: "1887 POINTS OF ACC DATA EQUALLY SPACED AT   .020 SEC.  IN UNITS CM/SEC/SEC"
    assert rec.n == 1887 and rec.dt == 0.02
    # header line 8: "COMP N08W" is the bearing 8° west of north: azimuth 352°
    assert rec.component == "N08W"
    assert rec.metadata["orientation"] == "horizontal"
    assert rec.metadata["azimuth_deg"] == pytest.approx(352.0)
    # header line 6: "STATION USC# 0061"
    assert rec.name == "USC0061 N08W"
    # header line 23: "MAGNITUDE =  6.7    EPICENTRAL DISTANCE =  29.76 KM"
    assert rec.metadata["event_magnitude"] == 6.7
    # header line 19: "PEAK   VELOCITY   =    12.05681    CMS/SEC   AT    4.500   SEC."
    assert rec.metadata["header_pgv"] == pytest.approx(0.1205681, rel=1e-9)


def test_real_file_equals_an_independent_parse():
    (rec,) = read_record(data_file(NAME))
    lines = data_file(NAME).read_text(encoding="latin-1").splitlines()
    # lines 47..282 hold the 1887 accelerations in cm/s², 8 a line (counted in the file)
    values = np.array(" ".join(lines[46:282]).split(), dtype=float)
    assert values.size == 1887
    np.testing.assert_allclose(rec.acc, values * 0.01, rtol=0, atol=1e-15)  # gal → m/s²


def test_round_trip_through_our_writers(tmp_path):
    records = read_record(data_file(NAME))
    round_trip(records, tmp_path)
    round_trip_sac(records, tmp_path)


def _synthetic(values, dt=0.01, units="CM/SEC/SEC", comp="S30E", peak=None) -> str:
    """A USC file of our own numbers, in the layout of the real one (text, integer and real
    headers, then ACC, VEL and DIS blocks, 8F10.3)."""
    n = len(values)
    text = ["CORRECTED ACCELEROGRAM  ITEST01  00.000.0 COMP " + comp,
            "FILE     0 OF UNCORRECTED ACCELEROGRAM DATA OF VOLUME I:",
            "TEST EARTHQUAKE", "JAN 01, 2000 -0000 GMT", "ITEST01", "STATION USC# 0999   34 00 00N, 118 00 00W",
            "A TEST STATION", f"COMP {comp}", "TEST EARTHQUAKE   JAN 01, 2000 -0000 GMT",
            "EPICENTER -   34 00 00N, 118 00 00W",
            "INSTR PERIOD =  .040 SEC  DAMPING =   .600  SENSITIVITY =   1.90CM/G",
            f"NO. OF POINTS = {n:6d}      DURATION = {n * dt:7.3f} SEC",
            "UNITS ARE SEC AND G/10", "RMS ACCLN. OF COMPLETE RECORD =     .100 G/10",
            "ACCELEROGRAM IS BAND-PASS FILTERED BETWEEN  .100- .200 AND 25.00-27.00 HZ.",
            f"{n:6d}  INSTRUMENT AND BASELINE CORRECTED DATA",
            f"AT EQUALLY-SPACED INTERVALS OF {dt:7.3f}  SEC.",
            f"PEAK ACCELERATION = {peak if peak is not None else 0:11.5f}  {units} AT    1.000   SEC.",
            "PEAK   VELOCITY   =     1.00000    CMS/SEC   AT    1.000   SEC.",
            "PEAK DISPLACEMENT =     1.00000      CMS     AT    1.000   SEC.",
            "INITIAL VELOCITY  =      .0000  CMS/SEC;  INITIAL DISPLACEMENT =     .0000  CMS",
            "TEST EARTHQUAKE", "MAGNITUDE =  5.0    EPICENTRAL DISTANCE =  10.00 KM", "ITEST01", ""]
    ints = [" ".join(f"{0:4d}" for _ in range(16))] * 6 + ["    0    0    0    0"]
    reals = [" ".join(f"{0.0:9.3f}" for _ in range(8))] * 12 + ["      .000      .000"]

    def block(kind, unit, vals):
        rows = [f"{n:6d} POINTS OF {kind} DATA EQUALLY SPACED AT {dt:6.3f} SEC.  IN UNITS {unit}"]
        for k in range(0, n, 8):
            rows.append("".join(f"{v:10.3f}" for v in vals[k:k + 8]))
        return rows

    body = block("ACC", units, values) + block("VEL", "CM/SEC", np.cumsum(values) * dt) + \
        block("DIS", "CM", np.zeros(n))
    return "\r\n".join(text + ints + reals + body) + "\r\n"


def test_synthetic_file_of_other_numbers(tmp_path):
    rng = np.random.default_rng(7)
    values = np.round(rng.normal(0, 50, 203), 3)
    values[117] = -412.125  # our own peak [cm/s²]
    path = tmp_path / "mine.s0a"
    path.write_text(_synthetic(values, dt=0.01, peak=-412.125))
    assert usc.is_format(path, head(path))
    (rec,) = read_record(path)
    np.testing.assert_allclose(rec.acc, values * 0.01, atol=1e-15)  # the numbers written, gal → m/s²
    assert rec.n == 203 and rec.dt == 0.01
    # S30E: 30° east of south = azimuth 150° (quadrant bearing)
    assert rec.metadata["azimuth_deg"] == pytest.approx(150.0)
    assert rec.name == "USC0999 S30E"


def test_units_and_dt_options_that_contradict_the_header(tmp_path):
    assert_options_checked(data_file(NAME), RecordError,
                           dt=(0.01, r"dt=0.01 s was given but the USC strong-motion header says 0.02 s"),
                           units=("g", r"units g were given but the USC strong-motion header says cm/s2"))
    (rec,) = read_record(data_file(NAME), units="gal", dt=0.02)  # agreeing options are fine
    assert rec.n == 1887


def test_truncated_file_names_the_format(tmp_path):
    lines = data_file(NAME).read_text(encoding="latin-1").splitlines()
    path = tmp_path / "short.s0a"
    path.write_text("\n".join(lines[:100]) + "\n")
    with pytest.raises(RecordError, match=r"^USC strong-motion file .*short.s0a: the data block "
                                          r"holds \d+ values; the header announces 1887 \(line 47\)"):
        read_record(path)
    path.write_text("\n".join(lines[:40]) + "\n")
    with pytest.raises(RecordError, match=r"^USC strong-motion file .*: no acceleration block"):
        read_record(path)
