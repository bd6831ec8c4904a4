"""Reading and writing records.

Sources named beside each check: the CGPM's 1901 standard gravity (9.80665 m/s²);
the international foot and inch of 1959 (0.3048 m, 0.0254 m exactly); the SAC file
format (samples and delta stored as 32-bit IEEE floats); the K-NET ASCII header of
ObsPy's bundled test file (its stated "Max. Acc. (gal)", the peak of the record with
its mean removed — NIED's K-NET format description, from memory); the Kinemetrics EVT
header's own peak counts (maxpeak/minpeak fields of the same file); ObsPy as an
independent reader (obspy.read).
"""
from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

import groundshake
from groundshake.records import STANDARD_GRAVITY, Record, read_record, write_record
from groundshake.records import canonical_units, UNITS



def _obspy_file(*parts) -> Path:
    import obspy

    p = Path(obspy.__file__).parent.joinpath(*parts)
    if not p.exists():
        pytest.skip(f"ObsPy test file {p.name} not installed")
    return p


def _record(n=400, dt=0.01, seed=1, **kw) -> Record:
    rng = np.random.default_rng(seed)
    return Record(acc=rng.standard_normal(n), dt=dt, **kw)


# -- units ---------------------------------------------------------------------------

def test_standard_gravity_is_cgpm_1901():
    assert STANDARD_GRAVITY == 9.80665  # 3rd CGPM (1901): standard acceleration of gravity
    assert UNITS["g"] == 9.80665  # same constant used for "g" records


@pytest.mark.parametrize("spelling, canon, factor", [
    ("g", "g", 9.80665),             # CGPM 1901
    ("G", "g", 9.80665),             # CGPM 1901
    ("m/s^2", "m/s2", 1.0),          # SI
    ("m/s²", "m/s2", 1.0),           # SI
    ("gal", "cm/s2", 0.01),          # 1 Gal = 1 cm/s² (CGS unit, common practice)
    ("cm/s/s", "cm/s2", 0.01),       # CGS
    ("mm/s2", "mm/s2", 0.001),       # SI prefix
    ("ft/s2", "ft/s2", 0.3048),      # international foot, 1959
    ("in/s**2", "in/s2", 0.0254),    # international inch, 1959
])
def test_units_and_factors(spelling, canon, factor):
    assert canonical_units(spelling) == canon
    assert UNITS[canon] == pytest.approx(factor, rel=1e-15)  # exact definitions


def test_text_in_g_is_scaled_by_standard_gravity(tmp_path):
    p = tmp_path / "a.txt"
    vals = np.linspace(-0.3, 0.3, 20).tolist()
    p.write_text("acc [g]\n" + "\n".join(f"{v!r}" for v in vals) + "\n")
    (rec,) = read_record(p, dt=0.02)
    # 1 g = 9.80665 m/s² (CGPM 1901); tolerance: round-off
    np.testing.assert_allclose(rec.acc, np.array(vals) * 9.80665, rtol=1e-15)
    assert rec.units == "g"


# -- round trips -------------------------------------------------------------------------

def test_round_trip_mseed_exact(tmp_path):
    rec = _record(component="HNE", start_time="2001-02-03T04:05:06.250000")
    write_record(rec, tmp_path / "r.mseed")
    (back,) = read_record(tmp_path / "r.mseed", units="m/s2")
    # MiniSEED with FLOAT64 encoding stores IEEE doubles (SEED manual): nothing lost
    np.testing.assert_array_equal(back.acc, rec.acc)
    assert back.dt == rec.dt
    assert back.component == "HNE"
    assert back.start_time.startswith("2001-02-03T04:05:06.25")
    # ObsPy itself (an independent reader) sees the same samples
    import obspy
    np.testing.assert_array_equal(obspy.read(str(tmp_path / "r.mseed"))[0].data, rec.acc)


def test_round_trip_sac_float32(tmp_path):
    rec = _record(dt=0.005, component="HN1")
    write_record(rec, tmp_path / "r.sac")
    (back,) = read_record(tmp_path / "r.sac")  # units stated in the header (kuser0)
    # SAC stores samples as 32-bit floats (SAC file format): exact to float32 rounding
    np.testing.assert_array_equal(back.acc, rec.acc.astype(np.float32).astype(float))
    np.testing.assert_allclose(back.acc, rec.acc, rtol=1e-7, atol=1e-7 * np.abs(rec.acc).max())
    assert back.dt == 0.005  # delta is float32 in SAC; its shortest decimal is 0.005
    assert back.units == "m/s2"
    assert back.component == "HN1"


def test_round_trip_csv_exact_and_several_columns(tmp_path):
    recs = [_record(seed=s, dt=0.004, component=c, name=f"r{s}") for s, c in ((1, "x"), (2, "y"))]
    write_record(recs, tmp_path / "r.csv")
    back = read_record(tmp_path / "r.csv")
    assert [b.component for b in back] == ["x", "y"]
    for a, b in zip(recs, back):
        # repr() of a float is its shortest exact decimal (Python float repr): nothing lost
        np.testing.assert_array_equal(b.acc, a.acc)
        assert b.dt == 0.004
        assert b.units == "m/s2"


def test_round_trip_of_demo_files_matches_generator(tmp_path):
    from groundshake.records.synthetic import make_demo_records

    paths = make_demo_records(tmp_path)
    assert [p.name for p in paths] == ["demo-h1.mseed", "demo-h2.mseed", "demo-up.mseed",
                                       "demo-h1.csv", "demo-h2.csv", "demo-up.csv"]
    repo = Path(__file__).resolve().parents[2] / "records"
    for comp in ("h1", "h2", "up"):
        fresh = read_record(tmp_path / f"demo-{comp}.mseed", units="m/s2")[0]
        shipped = read_record(repo / f"demo-{comp}.mseed", units="m/s2")[0]
        csv = read_record(repo / f"demo-{comp}.csv")[0]
        # deterministic from the seed (numpy Generator); CSV holds the same doubles
        np.testing.assert_allclose(fresh.acc, shipped.acc, rtol=0, atol=1e-12)
        np.testing.assert_array_equal(csv.acc, shipped.acc)
        assert shipped.dt == 0.005 and shipped.n == 8001


def test_write_refuses_unknown_extension_and_many_in_sac(tmp_path):
    with pytest.raises(groundshake.InputError, match="unknown output format"):
        write_record(_record(), tmp_path / "r.xyz")
    with pytest.raises(groundshake.InputError, match="one record"):
        write_record([_record(), _record(seed=2)], tmp_path / "r.sac")
    assert not list(tmp_path.iterdir())  # nothing half-written (atomic writers)


# -- delimited text ------------------------------------------------------------------------

def test_text_variants(tmp_path):
    t = (np.arange(20) * 0.01).tolist()
    a = np.sin(2 * np.pi * 3 * np.array(t)).tolist()
    variants = {
        "ws.txt": "# station: invented\ntime acc\n" + "\n".join(f"{x!r} {y!r}" for x, y in zip(t, a)),
        "semi.csv": "t;a\n" + "\n".join(f"{x!r};{y!r}" for x, y in zip(t, a)),
        "euro.csv": "t;a\n" + "\n".join(f"{x:.6f};{y:.9f}".replace(".", ",") for x, y in zip(t, a)),
        "comma.csv": "time [s], acc [cm/s2]\n" + "\n".join(f"{x!r}, {y!r}," for x, y in zip(t, a)),
    }
    for name, body in variants.items():
        p = tmp_path / name
        p.write_text(body + "\n")
        (rec,) = read_record(p, units=None if name == "comma.csv" else "m/s2")
        scale = 0.01 if name == "comma.csv" else 1.0  # 1 gal = 0.01 m/s² (CGS)
        # values as written (9 decimals in the European variant)
        np.testing.assert_allclose(rec.acc, np.array(a) * scale, atol=1e-9 * scale)
        assert rec.dt == pytest.approx(0.01, rel=1e-9)


def test_text_header_units_and_dt(tmp_path):
    p = tmp_path / "one.dat"
    p.write_text("# units: cm/s2\n# dt: 0.02\n" + "\n".join(str(v) for v in range(20)) + "\n")
    (rec,) = read_record(p)
    assert rec.units == "cm/s2" and rec.dt == 0.02
    np.testing.assert_allclose(rec.acc, np.arange(20) * 0.01)  # gal -> m/s² (CGS)


def test_resample_option_for_uneven_time(tmp_path):
    t = np.cumsum(np.r_[0, np.full(30, 0.01), 0.013, np.full(30, 0.01)])
    a = 2.0 * t  # linear: interpolation must be exact
    p = tmp_path / "uneven.csv"
    p.write_text("\n".join(f"{x!r},{y!r}" for x, y in zip(t.tolist(), a.tolist())) + "\n")
    (rec,) = read_record(p, units="m/s2", resample=True)
    assert rec.dt == pytest.approx(0.01)  # the median step
    # linear interpolation of a linear function is exact (calculus)
    np.testing.assert_allclose(rec.acc, 2.0 * rec.time, atol=1e-12)


def test_given_units_must_not_contradict_file(tmp_path):
    p = tmp_path / "g.csv"
    p.write_text("time,acc [g]\n" + "\n".join(f"{i * 0.01},{i}" for i in range(20)) + "\n")
    with pytest.raises(groundshake.InputError, match="states units g"):
        read_record(p, units="cm/s2")


# -- real strong-motion files bundled with ObsPy ----------------------------------------

def test_knet_pga_matches_header():
    from groundshake.processing import ProcessingSettings, correct_record, intensity_measures

    path = _obspy_file("io", "nied", "tests", "data", "test.knet")
    (rec,) = read_record(path)
    assert rec.units == "cm/s2" and rec.dt == 0.01
    only_mean = ProcessingSettings(baseline_order=None, highpass_hz=None, taper_percent=0.0)
    pga_gal = intensity_measures(correct_record(rec, only_mean))["pga"] * 100
    # The file's header states "Max. Acc. (gal) 4.383" (K-NET, peak after removing the
    # mean); within its rounding to 0.001 gal
    assert abs(pga_gal - 4.383) <= 0.0005
    assert rec.metadata["knet.accmax"] == 4.383


def test_kinemetrics_evt_peak_counts_match_header():
    path = _obspy_file("io", "kinemetrics", "tests", "data", "BI008_MEMA-04823.evt")
    recs = read_record(path)
    assert len(recs) == 3 and all(r.units == "g" for r in recs)
    r = recs[0]
    full = r.metadata["kinemetrics_evt.chan_fullscale"]
    sens = r.metadata["kinemetrics_evt.chan_sensitivity"]
    bits = r.metadata["kinemetrics_evt.a2dbits"]
    counts = np.abs(r.acc) / STANDARD_GRAVITY / (full / 2 ** (bits - 1) / sens)
    stated = max(abs(r.metadata["kinemetrics_evt.maxpeak"]), abs(r.metadata["kinemetrics_evt.minpeak"]))
    # the EVT header's own peak counts of the channel (maxpeak/minpeak); counts are integers
    assert counts.max() == pytest.approx(stated, abs=0.5)


def test_obspy_formats_need_units_when_file_has_none(tmp_path):
    write_record(_record(), tmp_path / "r.mseed")
    with pytest.raises(groundshake.InputError, match="does not state its units"):
        read_record(tmp_path / "r.mseed")


def test_record_is_immutable():
    rec = _record()
    with pytest.raises(ValueError):
        rec.acc[0] = 1.0  # numpy read-only array
    with pytest.raises(AttributeError):
        rec.dt = 0.5  # frozen dataclass
    new = rec.replace(acc=rec.acc * 2, step="doubled")
    assert new.history == ("doubled",) and rec.history == ()
    np.testing.assert_array_equal(new.acc, 2 * rec.acc)  # arithmetic


def test_lazy_top_level_names():
    assert groundshake.read_record is read_record
    assert callable(groundshake.correct_record) and callable(groundshake.intensity_measures)
    assert callable(groundshake.write_record)


def test_obspy_ascii_header_units(tmp_path):
    from obspy import Stream, Trace

    tr = Trace(np.arange(20, dtype=float), header={"sampling_rate": 50.0})
    tr.stats.ascii = {"unit": "cm/s2"}
    Stream([tr]).write(str(tmp_path / "a.slist"), format="SLIST")  # ObsPy's own writer
    (rec,) = read_record(tmp_path / "a.slist")
    assert rec.units == "cm/s2" and rec.dt == 0.02
    np.testing.assert_allclose(rec.acc, np.arange(20) * 0.01, rtol=1e-12)  # 1 gal = 0.01 m/s²


from hypothesis import given, settings, strategies as st  # noqa: E402


@settings(max_examples=25, deadline=None)
@given(st.lists(st.floats(min_value=-1e6, max_value=1e6, allow_nan=False, allow_infinity=False,
                          allow_subnormal=False), min_size=16, max_size=60),
       st.sampled_from([0.001, 0.005, 0.01, 0.02, 1 / 3]))
def test_csv_round_trip_any_values(tmp_path_factory, values, dt):
    path = tmp_path_factory.mktemp("rt") / "r.csv"
    rec = Record(acc=np.array(values), dt=dt)
    write_record(rec, path)
    import warnings

    with warnings.catch_warnings():  # huge values warn about units; not the point here
        warnings.simplefilter("ignore", groundshake.GroundshakeWarning)
        (back,) = read_record(path)
    # Python's float repr is the shortest string that reads back to the same double
    np.testing.assert_array_equal(back.acc, rec.acc)
    assert back.dt == pytest.approx(dt, rel=1e-12)


def test_implausible_peak_warns_about_units(tmp_path):
    from groundshake import GroundshakeWarning

    p = tmp_path / "counts.csv"
    p.write_text("\n".join(f"{i * 0.01!r},{3000.0 * (-1) ** i}" for i in range(40)))
    # the largest recorded ground accelerations are a few g (from memory: about 3-4 g);
    # 3000 "g" means wrong units or raw counts
    with pytest.warns(GroundshakeWarning, match="check the units"):
        read_record(p, units="g")


def test_csv_keeps_the_pad_length_of_a_corrected_record(tmp_path):
    from groundshake.processing import correct_record, intensity_measures

    t = np.arange(3000) * 0.01
    rec = Record(acc=np.exp(-((t - 12) / 2) ** 2) * np.sin(2 * np.pi * 2 * t), dt=0.01)
    out = correct_record(rec)
    write_record(out, tmp_path / "c.csv")
    (back,) = read_record(tmp_path / "c.csv")
    assert back.metadata["pad_before_s"] == out.metadata["pad_before_s"]
    # the peak time is counted from the first sample as read, before and after the file
    assert intensity_measures(back)["pga_time"] == intensity_measures(out)["pga_time"]
    # and it falls on a crest of the burst: the crests of sin(4πt) nearest its centre
    # (12 s) are at 12 ± 0.125 s (calculus), within a step
    assert abs(abs(intensity_measures(back)["pga_time"] - 12.0) - 0.125) <= 0.01
