"""GeoNet V1A/V2A reader.

Sources: the real file tests/data/strong-motion/geonet_us1000778i_20161113_110259_WTMC_20.V1A
and its text lines per component: "Number of points  65536", "Raw readings in units of
1.00 mm/s/s  at intervals of 0.005 s", "Component N28W" / "S62W" / "Up", "Acceleration:
Peak -11026.2 mm/s/s at  44.87 s" / "9229.6 ... 45.97 s" / "31541.5 ... 44.14 s"; compass
bearings N28W = 332° and S62W = 242° from north (common practice).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake import InputError
from groundshake.records import read_record

from _strong_motion import DATA, assert_options_checked, round_trip

FILE = DATA / "geonet_us1000778i_20161113_110259_WTMC_20.V1A"


def test_real_file_three_components_against_headers():
    recs = read_record(FILE)
    assert [r.component for r in recs] == ["N28W", "S62W", "Up"]  # "Component ..." lines
    peaks = {"N28W": (11026.2, 44.87), "S62W": (9229.6, 45.97), "Up": (31541.5, 44.14)}
    for rec in recs:
        assert rec.n == 65536 and rec.dt == 0.005  # "Number of points 65536", "intervals of 0.005 s"
        assert rec.units == "mm/s2"  # "in units of 1.00 mm/s/s"
        value, t = peaks[rec.component]  # "Acceleration: Peak ... mm/s/s at ... s"
        assert np.max(np.abs(rec.acc)) == pytest.approx(value * 1e-3, rel=1e-3)  # mm/s² -> m/s²
        assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(t, abs=1e-9)
        assert rec.metadata["header_pga"] == pytest.approx(value * 1e-3, rel=1e-12)
        assert rec.metadata["station"] == "WTMC"  # "Site WTMC"
    assert recs[0].metadata["azimuth_deg"] == 332.0  # N28W
    assert recs[1].metadata["azimuth_deg"] == 242.0  # S62W
    assert recs[2].metadata["orientation"] == "vertical"
    assert recs[0].metadata["event_magnitude"] == "Mw 7.82"  # "Epicentre ... Mw 7.82"
    assert len({r.name for r in recs}) == 3


def test_round_trip_through_our_writers(tmp_path):
    round_trip(read_record(FILE)[:1], tmp_path)


def test_contradicting_options():
    assert_options_checked(FILE, InputError,
                           dt=(0.01, r"dt=0\.01 s was given but its header says 0\.005 s"),
                           units=("gal", "states units mm/s2 but cm/s2 was given"))


def _component(comp, acc, vel, disp, dt):
    ints = np.zeros(40, dtype=int)
    ints[30:33] = (acc.size, vel.size, disp.size)  # points of acceleration, velocity, displacement
    k = int(np.argmax(np.abs(acc)))
    text = ["Corrected accelerogram TEST GNS Science", "Site TEST      0 00 00S  0 00 00E",
            "Test Site", "Instrument none", "Resolution: none", "Accelerogram TEST",
            "Nowhere", "2020 January 2  03:04:05 UT", "Epicentre invented  Mw 5.10",
            f"Number of points  {acc.size}", "", f"Corrected accelerations in units of mm/s/s "
            f"at intervals of {dt:.3f} s", "Data is filtered", f"Component {comp}",
            f"Acceleration:  Peak {acc[k]:.1f} mm/s/s at {k * dt:.2f} s", "Velocity: none"]
    out = text + ["".join(f"{v:8d}" for v in ints[i:i + 10]) for i in range(0, 40, 10)]
    out += ["".join(f"{0.0:8.2f}" for _ in range(10)) for _ in range(6)]
    for series in (acc, vel, disp):
        out += ["".join(f"{v:8.1f}" for v in series[i:i + 10]) for i in range(0, series.size, 10)]
    return out


def test_synthetic_v2a(tmp_path):
    rng = np.random.default_rng(21)
    a = [rng.normal(0, 500, 95) for _ in range(3)]
    lines = []
    for comp, acc in zip(("N45E", "S45E", "Up"), a):
        lines += _component(comp, acc, acc[:90] / 10, acc[:80] / 100, 0.01)
    p = tmp_path / "synthetic.V2A"
    p.write_text("\n".join(lines) + "\n")
    recs = read_record(p)
    assert [r.component for r in recs] == ["N45E", "S45E", "Up"]  # as written
    assert [r.metadata.get("azimuth_deg") for r in recs] == [45.0, 135.0, None]  # bearings
    for rec, acc in zip(recs, a):
        assert rec.n == 95 and rec.dt == 0.01
        np.testing.assert_allclose(rec.acc, np.round(acc, 1) * 1e-3, rtol=0, atol=1e-12)  # f8.1


def test_synthetic_broken_names_format_and_line(tmp_path):
    rng = np.random.default_rng(22)
    acc = rng.normal(0, 500, 40)
    lines = _component("N", acc, acc[:0], acc[:0], 0.01)
    lines[27] = "   oops " + lines[27][8:]
    p = tmp_path / "broken.V1A"
    p.write_text("\n".join(lines) + "\n")
    with pytest.raises(InputError) as e:
        read_record(p)
    assert str(e.value).startswith(f"GeoNet V1A/V2A file {p}") and "(line 28:" in str(e.value)
