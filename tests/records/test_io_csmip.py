"""CSMIP/CDMG Volume 1, 2 and 3 readers.

Sources: the real files in tests/data/strong-motion/ (dmg_nc71734741_CE89146.V1/.V2/.V3,
station 89146; dmg_nc1091100_ce36456p_CE36456.V2, older upper-case CDMG layout) and their
own header lines: "Peak acceleration = 77.280 cm/sec/sec at 30.585 sec" and the real-header
value 77.280340 beside it; "Max = .079 g , at 30.590 sec" and real header .0791795 (V1);
"At equally-spaced intervals of .005 sec"; "Chan 1: 360 Deg"; "Start time: 2/13/12,
21:06:45.0 UTC". The V3 spectra are printed with 3 significant digits (E10.3), in inches
and seconds with Sa in g ("Units for spectra are inches and sec, except Sa is in fraction
of g"); 1 in = 0.0254 m exactly (1959), g = 9.80665 m/s² (CGPM 1901).
"""
from __future__ import annotations

import numpy as np
import pytest

from groundshake import InputError
from groundshake.records import read_record
from groundshake.records.io.csmip import read_csmip_spectra, read_csmip_v2_series
from groundshake.spectra import published_target, response_spectrum

from _strong_motion import DATA, assert_options_checked, round_trip

V1 = DATA / "dmg_nc71734741_CE89146.V1"
V2 = DATA / "dmg_nc71734741_CE89146.V2"
V3 = DATA / "dmg_nc71734741_CE89146.V3"
OLD = DATA / "dmg_nc1091100_ce36456p_CE36456.V2"
G = 9.80665  # CGPM 1901
INCH = 0.0254  # international inch, 1959


def _peak(rec):
    return float(np.max(np.abs(rec.acc)))


# header lines "Peak acceleration = ... cm/sec/sec at ... sec" of each channel (real header
# value 66 carries more digits: 77.280340, 20.529180, 44.200050)
V2_PEAKS = {"360": (77.280340, 30.585), "Up": (20.529180, 30.585), "90": (44.200050, 30.575)}


def test_v2_every_channel_against_its_header():
    recs = read_record(V2)
    assert [r.component for r in recs] == ["360", "Up", "90"]  # "Chan 1: 360 Deg", "Up", "90 Deg"
    for rec in recs:
        value, time = V2_PEAKS[rec.component]
        assert rec.n == 12000  # "12000 points of accel data"
        assert rec.dt == 0.005  # "equally spaced at .005 sec"
        assert _peak(rec) == pytest.approx(value * 0.01, rel=1e-3)  # header peak, cm/s² -> m/s²
        assert rec.metadata["header_pga"] == pytest.approx(value * 0.01, rel=1e-6)  # real header
        assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(time, abs=1e-9)  # "at ... sec"
        assert rec.start_time == "2012-02-13T21:06:45Z"  # "Start time: 2/13/12, 21:06:45.0 UTC"
        assert rec.metadata["station"] == "89146"  # "Station No. 89146"
        assert rec.metadata["station_name"] == "Willow Creek"
    az = {r.component: r.metadata.get("azimuth_deg") for r in recs}
    assert az == {"360": 0.0, "Up": None, "90": 90.0}  # 360 Deg = north, 90 Deg = east
    assert recs[1].metadata["orientation"] == "vertical"
    assert len({r.name for r in recs}) == 3  # names unique per file


def test_v2_velocity_and_displacement_series():
    series = read_csmip_v2_series(V2)
    s = series[0]
    # header of channel 1: "Peak velocity = 3.150 cm/sec at 30.650 sec" (real 3.1497670),
    # "Peak displacement = .165 cm at 30.765 sec" (real .1653718)
    assert np.max(np.abs(s.vel)) == pytest.approx(3.1497670e-2, rel=1e-3)
    assert np.max(np.abs(s.disp)) == pytest.approx(0.1653718e-2, rel=1e-3)
    assert np.argmax(np.abs(s.vel)) * s.dt == pytest.approx(30.65, abs=1e-9)
    assert s.vel.size == s.disp.size == s.acc.size == 12000  # three blocks of 12000 points
    # the velocity is the integral of the acceleration (trapezoid rule, as a check of
    # consistency: both are the agency's own series, the tolerance is 1 % of the peak)
    vel = np.concatenate([[0.0], np.cumsum((s.acc[1:] + s.acc[:-1]) / 2) * s.dt])
    assert np.max(np.abs(vel - s.vel)) < 0.01 * np.max(np.abs(s.vel))


def test_v1_every_channel_against_its_header():
    recs = read_record(V1)
    # "Max = .079 g , at 30.590 sec" with real-header values .0791795, .0210549, -.0452896 g (value 7 of each channel)
    expected = {"360": (0.0791795, 30.59), "Up": (0.0210549, 30.59), "90": (0.0452896, 30.575)}
    assert [r.component for r in recs] == ["360", "Up", "90"]
    for rec in recs:
        g_peak, t = expected[rec.component]
        assert rec.n == 13200 and rec.dt == 0.005  # "13200 Accelerogram points at 200 pts/sec"
        assert rec.units == "g"  # "in units of g"
        assert _peak(rec) == pytest.approx(g_peak * G, rel=1e-3)  # header maximum, 0.1 %
        assert np.argmax(np.abs(rec.acc)) * rec.dt == pytest.approx(t, abs=1e-9)


def test_old_upper_case_cdmg_v2():
    recs = read_record(OLD)
    # "PEAK ACCELERATION = -267.957 CM/SEC/SEC AT 10.940 SEC" (channel 1, 90 DEG) etc.
    assert [r.component for r in recs] == ["90", "UP", "0"]
    assert [r.n for r in recs] == [3251, 3250, 3250]  # "3251 POINTS OF ACCEL DATA" ...
    assert all(r.dt == 0.02 for r in recs)  # "EQUALLY SPACED AT .020 SEC"
    assert _peak(recs[0]) == pytest.approx(2.67957, rel=1e-3)  # -267.957 cm/s²
    assert np.argmax(np.abs(recs[0].acc)) * 0.02 == pytest.approx(10.94, abs=1e-9)
    for rec in recs:
        assert _peak(rec) == pytest.approx(rec.metadata["header_pga"], rel=1e-3)
    # "TRIGGER TIME: 05/02/83, 16:42:48.2 PDT" -> local time, 7 h behind UTC
    assert recs[0].start_time == "1983-05-02T16:42:48.2-07:00"
    assert recs[0].metadata["event_name"] == "COALINGA EARTHQUAKE"
    assert recs[2].metadata["azimuth_deg"] == 0.0  # "CHAN 3: 0 DEG"


def test_v3_spectra_reproduced_from_the_v2_record():
    """Our response_spectrum of the V2 acceleration gives the V3's published spectra.

    Over periods >= 10·dt (0.05 s to 6 s, 74 of the 78 periods), 5 % damping: the
    published values carry 3 significant digits, so each may be off by half a unit in
    the third digit; beyond that we allow 0.05 % (measured: at most 0.025 % on Sa,
    none on Sd, Sv, PSV).
    """
    spectra = read_csmip_spectra(V3)
    recs = read_record(V2)
    assert [s.component for s in spectra] == [r.component for r in recs]
    for rec, sp in zip(recs, spectra):
        assert sp.periods.size == 78  # "(78 periods, .04 - 6.0 sec)"
        assert sp.periods[0] == 0.04 and sp.periods[-1] == 6.0
        assert list(sp.damping) == [0.05]  # "Damping = .05."
        keep = sp.periods >= 10 * rec.dt
        # the agency computes on the samples as given, joined by straight lines: the
        # same convention is interpolate=False (our default reads the record as
        # band-limited and is up to 2.5 % higher here at 0.05-0.2 s, docs/guide/spectra.md "Coarse
        # records")
        ours = response_spectrum(rec.acc, rec.dt, sp.periods[keep], 0.05, interpolate=False)
        for name, unit in (("sa", G), ("sd", INCH), ("sv", INCH), ("psv", INCH)):
            pub = getattr(sp, name)[0][keep]
            calc = getattr(ours, name)[0]
            half_digit = 0.5 * 10.0 ** (np.floor(np.log10(pub / unit)) - 2) * unit
            assert np.all(np.abs(calc - pub) <= half_digit + 5e-4 * pub), (rec.component, name)


def test_v3_as_target():
    (sp, *_) = read_csmip_spectra(V3)
    target = published_target(sp, 0.05)
    t = sp.periods[10:20]
    # at the published periods the target is the published PSA = (2π/T)·PSV
    np.testing.assert_allclose(target.psa(t), sp.psv[0][10:20] * 2 * np.pi / t, rtol=1e-12)
    assert np.isnan(target.psa(np.array([10.0])))[0]  # undefined beyond the table
    with pytest.raises(InputError, match="no 2 % damping"):
        published_target(sp, 0.02)


def test_v3_is_not_a_record():
    with pytest.raises(InputError, match="Volume 3 .*response spectra.*read_csmip_spectra"):
        read_record(V3)


def test_round_trip_through_our_writers(tmp_path):
    round_trip(read_record(V2), tmp_path)


def test_contradicting_options():
    assert_options_checked(V2, InputError,
                           dt=(0.01, r"dt=0\.01 s was given but its data block says 0\.005 s"),
                           units=("g", "states units cm/s2 but g was given"))


# -- a synthetic Volume 2 written here (invented numbers, same layout) -----------------

def _channel(k, orient, acc, dt):
    ints = "\n".join("".join(f"{i:5d}" for i in range(16)) for _ in range(6)) + \
        "\n" + "".join(f"{0:5d}" for _ in range(4))
    reals = "\n".join("".join(f"{0.0:10.3f}" for _ in range(8)) for _ in range(12)) + \
        "\n" + "".join(f"{0.0:10.3f}" for _ in range(4))
    vel = np.cumsum(acc) * dt
    disp = np.cumsum(vel) * dt

    def block(v, what, unit):
        rows = ["".join(f"{x:10.4f}" for x in v[i:i + 8]) for i in range(0, len(v), 8)]
        return (f"{len(v):6d} points of {what} data equally spaced at {dt:.3f} sec, in {unit}. "
                f"(8f10.4)\n" + "\n".join(rows))

    peak = int(np.argmax(np.abs(acc)))
    header = [f"Corrected accelerogram   12345-TEST-00000.00       Chan  {k}: {orient}     from",
              "Uncorrected Accelerogram Data             Processed: 01/01/20, TEST",
              "Imaginary Earthquake",
              "12345-TEST-00000.00                 Start time:  1/2/20, 03:04:05.0 UTC (GPS)",
              "Station No. 12345   10.000N, 120.000W      Test  s/n 1  (2 Chns of  2 at Sta)",
              "Test Site                                 TEST",
              f"Chan  {k}: {orient}",
              "Hypocenter:  Invented.                      ML:  5.0",
              f"Peak acceleration =  {abs(acc[peak]):8.4f}    cm/sec/sec  at {peak * dt:8.3f}   sec."]
    return ("\n".join(header) + "\n" + ints + "\n" + reals + "\n" +
            block(acc, "accel", "cm/sec2") + "\n" + block(vel, "veloc", "cm/sec") + "\n" +
            block(disp, "displ", "cm") + f"\n/&  ----------  End of data for channel  {k}  ----------\n")


def test_synthetic_v2(tmp_path):
    rng = np.random.default_rng(11)
    a1, a2 = rng.normal(0, 30, 101), rng.normal(0, 10, 101)
    p = tmp_path / "synthetic.v2"
    p.write_text(_channel(1, "270 Deg", a1, 0.01) + _channel(2, " Up", a2, 0.01))
    recs = read_record(p)
    assert [r.component for r in recs] == ["270", "Up"]
    assert recs[0].metadata["azimuth_deg"] == 270.0  # written as 270 Deg
    assert all(r.dt == 0.01 and r.n == 101 for r in recs)  # as written
    np.testing.assert_allclose(recs[0].acc, np.round(a1, 4) * 0.01, rtol=0, atol=1e-12)  # 4 decimals
    assert recs[0].metadata["header_pga"] == pytest.approx(_peak(recs[0]), rel=1e-3)
    assert recs[0].start_time == "2020-01-02T03:04:05Z"
    series = read_csmip_v2_series(p)
    np.testing.assert_allclose(series[1].vel, np.round(np.cumsum(a2) * 0.01, 4) * 0.01, atol=1e-12)


def test_synthetic_v2_broken_data_names_format_and_line(tmp_path):
    rng = np.random.default_rng(12)
    p = tmp_path / "broken.v2"
    text = _channel(1, "0 Deg", rng.normal(0, 5, 64), 0.01).splitlines()
    data_line = next(i for i, t in enumerate(text) if "points of accel" in t)
    text[data_line + 3] = text[data_line + 3][:10] + "   abc    " + text[data_line + 3][20:]
    p.write_text("\n".join(text) + "\n")
    with pytest.raises(InputError) as e:
        read_record(p)
    msg = str(e.value)
    assert msg.startswith(f"CSMIP/CDMG Volume 1/2 (and Volume 3 spectra) file {p}")
    assert f"line {data_line + 4}" in msg and "abc" in msg  # the line at fault, 1-based
