"""USGS SMC reader.

Sources: the real file tests/data/strong-motion/smc_nc216859_0111a.smc and its header:
text line 6 "component=    360", line 7 "pk     =    104.4", integer-header value 17 = 6001
samples, real-header value 2 = 0.2000000E+03 samples a second, values 29-30 =
0.1017000E+02 s and 0.1044078E+03 (time and value of the peak, cm/s²); an independent
parse of the 8E10.4 data block written in the test; 1 cm/s² = 0.01 m/s².
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake import InputError
from groundshake.records import read_record

from _strong_motion import DATA, assert_options_checked, round_trip

FILE = DATA / "smc_nc216859_0111a.smc"


def test_real_file_against_its_header():
    (rec,) = read_record(FILE)
    assert rec.n == 6001  # integer header 17
    assert rec.dt == 1 / 200  # real header 2: 200 samples a second
    assert rec.units == "cm/s2"  # SMC acceleration is in cm/s²
    assert np.max(np.abs(rec.acc)) == pytest.approx(104.4078e-2, rel=1e-3)  # real header 30
    assert np.max(np.abs(rec.acc)) == pytest.approx(104.4e-2, rel=1e-3)  # text line 7 "pk = 104.4"
    assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(10.17, abs=1e-9)  # real header 29
    assert rec.component == "360" and rec.metadata["azimuth_deg"] == 0.0  # "component= 360"
    assert rec.metadata["station"] == "SAF0A"  # text line 3
    assert rec.metadata["event_name"] == "Loma Prieta, CA"  # text line 4


def test_independent_parse_of_the_data_block():
    (rec,) = read_record(FILE)
    lines = FILE.read_text().splitlines()
    first = max(i for i, t in enumerate(lines) if t.startswith("|")) + 1
    block = "".join(t.ljust(80) for t in lines[first:])
    values = [float(block[k:k + 10]) for k in range(0, 10 * 6001, 10)]  # 8E10.4, by hand
    np.testing.assert_allclose(rec.acc, np.array(values) * 0.01, rtol=1e-15)


def test_round_trip_through_our_writers(tmp_path):
    round_trip(read_record(FILE), tmp_path)


def test_contradicting_options():
    assert_options_checked(FILE, InputError,
                           dt=(0.01, r"dt=0\.01 s was given but its sample rate"),
                           units=("g", "states units cm/s2 but g was given"))


def _e10(v: float) -> str:
    """A value as the SMC data block writes it: 10 characters, one-digit exponent."""
    mant, exp = f"{v:.4E}".split("E")
    return f"{mant}E{int(exp):+d}".rjust(10)


def _synthetic(tmp_path, acc, rate=100.0, comp="UP", kind="2 CORRECTED ACCELEROGRAM"):
    ints = np.full(48, -32768)
    ints[15], ints[16] = 2, acc.size  # comment lines, samples
    reals = np.full(50, 1.7e38)
    k = int(np.argmax(np.abs(acc)))
    reals[1], reals[28], reals[29] = rate, k / rate, acc[k]
    text = [kind, "*", "TEST", "     2020   1   2    0304 Nowhere, XX", "Ml=      5.0",
            f"station = Test Site component=    {comp}", "pk     =    1.0", "inst type=none",
            "*", "*", "*"]
    out = text + ["".join(f"{v:10d}" for v in ints[i:i + 8]) for i in range(0, 48, 8)]
    out += ["".join(f"{v:15.7E}" for v in reals[i:i + 5]) for i in range(0, 50, 5)]
    out += ["|invented for a test", "|"]
    out += ["".join(_e10(v) for v in acc[i:i + 8]) for i in range(0, acc.size, 8)]
    p = tmp_path / "synthetic.smc"
    p.write_text("\n".join(out) + "\n")
    return p


def test_synthetic_file(tmp_path):
    acc = np.random.default_rng(9).normal(0, 50, 77)
    p = _synthetic(tmp_path, acc)
    (rec,) = read_record(p)
    assert rec.n == 77 and rec.dt == 0.01  # as written: 77 samples at 100 a second
    written = np.array([float(_e10(v)) for v in acc])
    np.testing.assert_allclose(rec.acc, written * 0.01, rtol=1e-15)
    assert rec.metadata["orientation"] == "vertical"  # component UP
    assert rec.metadata["header_pga"] == pytest.approx(np.max(np.abs(rec.acc)), rel=1e-3)


def test_velocity_file_and_broken_file(tmp_path):
    acc = np.random.default_rng(10).normal(0, 50, 40)
    p = _synthetic(tmp_path, acc, kind="3 VELOCITY")
    with pytest.raises(InputError, match=r"^USGS SMC file .*only acceleration files"):
        read_record(p)
    p = _synthetic(tmp_path, acc)
    lines = p.read_text().splitlines()
    lines[31] = "   bad    " + lines[31][10:]
    p.write_text("\n".join(lines) + "\n")
    with pytest.raises(InputError, match=r"^USGS SMC file .*\(line 32:"):
        read_record(p)
