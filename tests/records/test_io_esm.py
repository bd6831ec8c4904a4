"""ESM/ITACA ASCII reader, and the check of a contradicting --dt.

Sources: the real file tests/data/strong-motion/esm_us60004wsq_HI.ARS1..HNE...ACC.ASC and
its own header lines (``SAMPLING_INTERVAL_S: 0.005000``, ``NDATA: 19128``,
``UNITS: cm/s^2``, ``PGA_CM/S^2: 0.300022``, ``TIME_PGA_S: 20.670000``, ``STREAM: HNE``,
``DATE_TIME_FIRST_SAMPLE_YYYYMMDD_HHMMSS: 20190728_160919.870``); 1 Gal = 1 cm/s² = 0.01 m/s²
(CGS definition); the SEED channel convention (last letter E = east, 90° from north, Z =
vertical; common practice).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake import InputError
from groundshake.cli import main
from groundshake.records import read_record

from _strong_motion import DATA, round_trip

FILE = DATA / "esm_us60004wsq_HI.ARS1..HNE.D.20190728.160908.C.ACC.ASC"


def test_real_file_against_its_header():
    (rec,) = read_record(FILE)  # no --dt or --units needed
    assert rec.dt == 0.005  # SAMPLING_INTERVAL_S: 0.005000
    assert rec.n == 19128  # NDATA: 19128
    assert rec.units == "cm/s2"  # UNITS: cm/s^2
    pga = np.max(np.abs(rec.acc))
    assert pga == pytest.approx(0.300022e-2, rel=1e-3)  # PGA_CM/S^2: 0.300022, cm/s² -> m/s²
    assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(20.67, abs=rec.dt / 2)  # TIME_PGA_S
    assert rec.metadata["header_pga"] == pytest.approx(0.300022e-2, rel=1e-12)  # same header line
    assert rec.metadata["header_pga_time"] == 20.67  # TIME_PGA_S: 20.670000
    assert rec.start_time == "2019-07-28T16:09:19.87Z"  # DATE_TIME_FIRST_SAMPLE (UTC)


def test_real_file_station_event_orientation():
    (rec,) = read_record(FILE)
    assert rec.component == "HNE"  # STREAM: HNE
    assert rec.metadata["azimuth_deg"] == 90.0  # E = east (SEED convention)
    assert rec.metadata["orientation"] == "horizontal"
    assert rec.metadata["station"] == "ARS1" and rec.metadata["network"] == "HI"  # header
    assert rec.metadata["event_magnitude_ml"] == 4.6  # MAGNITUDE_L: 4.6
    assert rec.metadata["event_depth_km"] == 9.0  # EVENT_DEPTH_KM: 9.0
    assert rec.name == "ARS1 HNE"


def test_round_trip_through_our_writers(tmp_path):
    round_trip(read_record(FILE), tmp_path)


def test_contradicting_dt_is_an_error_naming_both_values(tmp_path):
    with pytest.raises(InputError) as e:
        read_record(FILE, dt=0.01)
    msg = str(e.value)
    assert str(FILE) in msg and "dt=0.01 s" in msg and "0.005 s" in msg  # both values named
    assert "SAMPLING_INTERVAL_S" in msg
    assert read_record(FILE, dt=0.005)[0].n == 19128  # an agreeing dt is accepted


def test_cli_refuses_contradicting_dt(capsys):
    assert main(["info", str(FILE), "--dt", "0.01"]) == 2  # bad input -> status 2 (house rule)
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "SAMPLING_INTERVAL_S" in err[0]  # one line naming the header key


def test_contradicting_units_is_an_error():
    with pytest.raises(InputError, match="states units cm/s2 but g was given"):
        read_record(FILE, units="g")


def _synthetic(tmp_path, *, n=120, dt=0.01, stream="HNZ", units="m/s^2", extra=""):
    """An ESM-style file written here with other numbers (invented test data)."""
    rng = np.random.default_rng(3)
    v = rng.normal(0, 0.2, n)
    k = int(np.argmax(np.abs(v)))
    head = (f"EVENT_NAME: SOMEWHERE\nEVENT_ID: TEST-1\nNETWORK: XX\nSTATION_CODE: ABC\n"
            f"DATE_TIME_FIRST_SAMPLE_YYYYMMDD_HHMMSS: 20200102_030405.500\n"
            f"SAMPLING_INTERVAL_S: {dt:.6f}\nNDATA: {n}\nSTREAM: {stream}\nUNITS: {units}\n"
            f"PGA_CM/S^2: {abs(v[k]) * 100:.6f}\nTIME_PGA_S: {k * dt:.6f}\n"
            f"DATA_TYPE: ACCELERATION\n{extra}USER5: \n")
    p = tmp_path / "synthetic.asc"
    p.write_text(head + "\n".join(f"{x:.6f}" for x in v) + "\n")
    return p, v, k


def test_synthetic_file(tmp_path):
    p, v, k = _synthetic(tmp_path)
    (rec,) = read_record(p)
    assert rec.dt == 0.01 and rec.n == 120  # as written
    np.testing.assert_allclose(rec.acc, np.round(v, 6), rtol=0, atol=1e-15)  # m/s², 6 decimals
    assert rec.metadata["orientation"] == "vertical"  # HNZ: Z = vertical (SEED)
    assert rec.metadata["header_pga"] == pytest.approx(np.max(np.abs(rec.acc)), rel=1e-3)  # written
    assert rec.start_time == "2020-01-02T03:04:05.5Z"


def test_synthetic_wrong_count_names_the_format_and_line(tmp_path):
    p, _, _ = _synthetic(tmp_path)
    p.write_text(p.read_text().replace("NDATA: 120", "NDATA: 125"))
    with pytest.raises(InputError, match=r"^ESM/ITACA ASCII file .*125 values were announced"):
        read_record(p)


def test_velocity_file_is_refused(tmp_path):
    p, _, _ = _synthetic(tmp_path)
    p.write_text(p.read_text().replace("DATA_TYPE: ACCELERATION", "DATA_TYPE: VELOCITY"))
    with pytest.raises(InputError, match=r"ESM/ITACA ASCII file .*DATA_TYPE VELOCITY.*header line 12"):
        read_record(p)
