"""The RENADIC (Chile) Volume-1 reader.

Sources: the real file renadic_usp000h401_cuya0911131.v1 (tests/data/strong-motion/
SOURCES.md) and its own header lines, quoted beside each check; an independent parse of
its (time, value) pairs with numpy, line numbers counted in the file by hand; g/10 is a
tenth of the CGPM's standard gravity (9.80665 m/s²). The header prints its maxima to
0.001 g, so the comparison with it is to that printed resolution and the 0.1 % check is
against the independent parse.
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake._errors import RecordError
from groundshake.records import read_record

from _strong_motion import (assert_channels, assert_options_checked, data_file, round_trip,
                            round_trip_sac)

NAME = "renadic_usp000h401_cuya0911131.v1"
G = 9.80665


def test_real_file_matches_its_header():
    recs = read_record(data_file(NAME))
    # "CHAN  1: L", "CHAN  2: V", "CHAN  3: T" (lines 7, 1166, 2325)
    assert_channels(recs, ["L", "V", "T"], ["horizontal", "vertical", "horizontal"])
    # "UNITS OF UNCOR ACCEL ARE SEC AND G/10.     MAX  =  0.132 G, AT  11.895 SEC" (and
    # 0.064 G at 12.665 s, 0.129 G at 12.190 s for channels 2 and 3)
    for rec, (pga, at) in zip(recs, ((0.132, 11.895), (0.064, 12.665), (0.129, 12.190))):
        peak = np.max(np.abs(rec.acc))
        assert abs(peak / G - pga) <= 0.0005 + 1e-12
        # the header's time is one of the samples holding the peak (ties happen at 0.001 g/10)
        times = np.flatnonzero(np.abs(rec.acc) == peak) * rec.dt
        assert np.min(np.abs(times - at)) < 1e-9
        # "NO. OF POINTS =   5652  RECORD LENGTH = 28.260 SEC"; the time column steps 0.005 s
        assert rec.n == 5652 and rec.dt == 0.005
    # station line 6: "CUYA S/N 4561"
    assert [r.name for r in recs] == ["CUYA L", "CUYA V", "CUYA T"]


def test_real_file_equals_an_independent_parse():
    recs = read_record(data_file(NAME))
    lines = data_file(NAME).read_text(encoding="latin-1").splitlines()
    # channel blocks: data on lines 28..1158, 1187..2317, 2346..3476 (5 pairs a line)
    for rec, first in zip(recs, (27, 1186, 2345)):
        pairs = np.array(" ".join(lines[first:first + 1131]).split(), dtype=float).reshape(-1, 2)
        assert pairs.shape == (5652, 2)
        np.testing.assert_allclose(rec.acc, pairs[:, 1] * 0.1 * G, rtol=0, atol=1e-15)
        assert np.max(np.abs(rec.acc)) == pytest.approx(np.max(np.abs(pairs[:, 1])) * 0.1 * G,
                                                        rel=1e-3)


def test_round_trip_through_our_writers(tmp_path):
    records = read_record(data_file(NAME))
    round_trip(records, tmp_path)
    round_trip_sac(records, tmp_path)


def _channel(k: int, comp: str, values: np.ndarray, dt: float) -> list[str]:
    n = values.size
    peak = np.max(np.abs(values)) / 10
    text = ["UNCORRECTED ACCELEROGRAM DATA              PROCESSED: 01/02/2003",
            "TEST001", "02/03/2004 5:06:07 (GMT)                (ORIGIN: 02/03/2004 5:06:00 GMT)",
            "                                   TRIGGER TIME: 2/3/2004 5:06:07.000 GMT",
            "STATION NO.          0.000N    0.000E  SMA-1     S/N  999 (3  CHNS OF 3  AT STA)",
            "TEST S/N 9999", f"CHAN  {k}: {comp:<8} (STA CHN:  {k})",
            "UNIVERSIDAD DE CHILE - RENADIC", "HYPOCENTER:   0.000N    0.000E  H=   0.0KM   ML= 0.00",
            "INSTR PERIOD = 0.0400 SEC,  DAMPING =0.6000,  SENSITIVITY =1.000 VDC/G",
            f"NO. OF POINTS = {n:6d}  RECORD LENGTH = {n * dt:6.3f} SEC",
            f"UNITS OF UNCOR ACCEL ARE SEC AND G/10.     MAX  = {peak:6.3f} G, AT   1.000 SEC",
            "RMS ACCEL OF COMPLETE RECORD = 0.010 G"]
    ints = [" ".join(f"{0:4d}" for _ in range(16))] * 6 + ["    0    0    0    0"]
    reals = [" ".join(f"{0.0:9.3f}" for _ in range(8))] * 6 + ["     0.000     0.000"]
    pairs = np.column_stack([np.arange(n) * dt, values]).ravel()
    data = [" ".join(f"{v:6.3f}" for v in pairs[j:j + 10]) for j in range(0, pairs.size, 10)]
    return text + ints + reals + data + [f"/&  ----------  END OF DATA FOR CHANNEL {k}  ----------"]


def test_synthetic_file_of_other_numbers(tmp_path):
    rng = np.random.default_rng(5)
    chans = [np.round(rng.normal(0, 1, 73), 3) for _ in range(2)]
    lines = _channel(1, "N", chans[0], 0.01) + _channel(2, "Z", chans[1], 0.01)
    path = tmp_path / "test.v1"
    path.write_text("\r\n".join(lines) + "\r\n")
    recs = read_record(path)
    assert [r.component for r in recs] == ["N", "Z"]
    for rec, values in zip(recs, chans):
        np.testing.assert_allclose(rec.acc, values * 0.1 * G, atol=1e-15)  # our numbers, g/10
        assert rec.n == 73 and rec.dt == 0.01
    assert recs[0].metadata["azimuth_deg"] == 0.0 and recs[1].metadata["orientation"] == "vertical"
    # TRIGGER TIME month/day/year
    assert recs[0].start_time == "2004-02-03T05:06:07.000Z"


def test_options_and_broken_files(tmp_path):
    # g/10 has no name among the units options: any units given contradict the header
    assert_options_checked(data_file(NAME), RecordError,
                           dt=(0.01, r"dt=0.01 s was given but the RENADIC .* header says 0.005 s"),
                           units=("g", r"units g were given but the RENADIC .* header says g/10"))
    lines = _channel(1, "L", np.zeros(40), 0.01)
    del lines[-3]  # one data line less than NO. OF POINTS needs
    path = tmp_path / "short.v1"
    path.write_text("\n".join(lines) + "\n")
    with pytest.raises(RecordError, match=r"^RENADIC \(Chile\) Volume 1 file .*: the data block holds 70 values; the header announces 80"
                                          r""):
        read_record(path)
