"""One time base: components in step, every time counted from the first sample as read.

Sources:
- Issue 14 (the rule docs/guide/run.md states): every reported time and every written time
  column is counted from the first sample as read, pads at negative times; matched and
  unmatched components share their onset (first exceedance of 5 % of the peak).
- The demo records' own time column (records/demo-*.csv, "time [s]" from 0.0): the
  as-read axis itself, read here with the csv module, not with groundshake.
- ObsPy reading our MiniSEED/SAC files (an independent reader): start time, SAC ``b``
  and reference time (SAC format: b is the first sample's time relative to the
  reference time).
- Cross-correlation of two signals peaks at their delay (common practice).
- Chopra, Dynamics of Structures §6.6: a very stiff oscillator moves with the ground,
  so its peak is at the time of the PGA.
The demo records are synthetic (records/README.md).
"""
from __future__ import annotations

import csv
import json
import warnings
from pathlib import Path

import numpy as np
import pytest

from _blocks import concrete_block

from groundshake._errors import GroundshakeWarning
from groundshake.cli import main
from groundshake.pipeline import build_motion
from groundshake.processing import correct_record, intensity_measures
from groundshake.records import read_record, write_record
from groundshake.scenario import parse_scenario_text

ROOT = Path(__file__).resolve().parents[2]
H1 = (ROOT / "records" / "demo-h1.csv").as_posix()
UP = (ROOT / "records" / "demo-up.csv").as_posix()
DT = 0.005      # records/README.md: 0.005 s step


def _file_columns(path):
    """time and acceleration columns of a demo CSV, read with the csv module."""
    rows = [r for r in csv.reader(open(path, encoding="utf-8")) if r and not r[0].startswith("#")]
    data = np.array([[float(v) for v in r] for r in rows[1:]])
    return data[:, 0], data[:, 1]


def _onset(t, a):
    """First time |a| exceeds 5 % of its peak (issue 14's onset)."""
    return float(t[np.argmax(np.abs(a) > 0.05 * np.abs(a).max())])


def _motion(tmp_path, match: bool):
    text = f"""title = "time base test (invented)"
[motion]
x = {{ file = "{H1}" }}
z = {{ file = "{UP}" }}
target = "asce7:sds=0.8,sd1=0.4,tl=8"
match_target = {"true" if match else "false"}
""" + concrete_block()
    scen = parse_scenario_text(text, source=str(tmp_path / "s.toml"), base_dir=tmp_path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        return build_motion(scen)


def test_matching_keeps_the_components_in_step(tmp_path):
    plain, matched = _motion(tmp_path, False), _motion(tmp_path, True)
    t_file, up = _file_columns(UP)
    # issue 14: the unmatched vertical keeps its onset to one sample, matched or not, and
    # that onset is the one of the file's own time column
    assert _onset(matched.time, matched.acc[2]) == pytest.approx(
        _onset(plain.time, plain.acc[2]), abs=DT * 1.001)
    assert _onset(matched.time, matched.acc[2]) == pytest.approx(_onset(t_file, up),
                                                                 abs=DT * 1.001)
    # the matched horizontal is not shifted: cross-correlation with the unmatched one
    # peaks at zero delay (common practice), to one sample
    a = np.interp(plain.time, matched.time, matched.acc[0])
    b = plain.acc[0]
    lags = np.arange(-400, 401)
    cc = [np.dot(a[max(0, k):a.size + min(0, k)], b[max(0, -k):b.size - max(0, k)])
          for k in lags]
    assert abs(lags[int(np.argmax(cc))]) <= 1
    # one grid: every component states the same leading pad, the motion's own
    pads = {d: r.metadata["pad_before_s"] for d, r in matched.corrected.items()}
    assert len(set(pads.values())) == 1
    assert matched.time[0] == pytest.approx(-pads["x"])
    assert any("motion.z: zero-padded" in n for n in matched.notes)


def test_written_records_keep_the_as_read_axis(tmp_path):
    from obspy import UTCDateTime
    from obspy import read as obspy_read

    t_file, acc = _file_columns(H1)
    t_pga = t_file[np.argmax(np.abs(acc))]                 # the file's own time column
    rec = read_record(H1)[0]
    cor = correct_record(rec)
    pad = cor.metadata["pad_before_s"]
    assert pad > 0
    # CSV: the time column starts at -pad; the PGA row is at the file's PGA time
    write_record(cor, tmp_path / "c.csv")
    t_out, a_out = _file_columns(tmp_path / "c.csv")
    assert t_out[0] == pytest.approx(-pad, abs=1e-9)
    assert t_out[np.argmax(np.abs(a_out))] == pytest.approx(t_pga, abs=DT * 1.001)
    for ext in ("mseed", "sac"):
        path = tmp_path / f"c.{ext}"
        write_record(cor, path)
        tr = obspy_read(str(path))[0]
        # ObsPy: the clock-less record's as-read origin at the epoch, the pad before it
        assert float(tr.stats.starttime - UTCDateTime(0)) == pytest.approx(-pad, abs=1e-6)
        peak_clock = tr.stats.starttime + tr.times()[np.argmax(np.abs(tr.data))]
        assert float(peak_clock - UTCDateTime(0)) == pytest.approx(t_pga, abs=DT * 1.001)
        if ext == "sac":   # SAC format: b = first sample relative to the reference time
            assert tr.stats.sac.b == pytest.approx(-pad, abs=1e-4)
        # read back by groundshake: the PGA at the same time as in the original
        back = read_record(path, units="m/s2")[0]
        assert intensity_measures(back)["pga_time"] == pytest.approx(t_pga, abs=DT * 1.001)


def _corrected_sac(clock: str, folder: Path):
    """H1 with its first sample at ``clock``, corrected and written as ``c.sac`` in
    ``folder``: (the pad before the record [s], the file's trace as ObsPy reads it)."""
    from obspy import read as obspy_read

    cor = correct_record(read_record(H1)[0].replace(start_time=clock))
    write_record(cor, folder / "c.sac")
    return cor.metadata["pad_before_s"], obspy_read(str(folder / "c.sac"))[0]


def test_sac_with_a_clock_keeps_it_at_the_as_read_origin(tmp_path):
    from obspy import UTCDateTime

    clock = "2020-01-02T03:04:05"
    pad, tr = _corrected_sac(clock, tmp_path)
    # ObsPy: first sample = clock − pad; SAC reference time = the clock (b = −pad)
    assert float(tr.stats.starttime - UTCDateTime(clock)) == pytest.approx(-pad, abs=1e-3)
    ref = tr.stats.starttime - tr.stats.sac.b
    assert float(ref - UTCDateTime(clock)) == pytest.approx(0.0, abs=1e-3)


def test_run_outputs_count_from_the_first_sample_as_read(tmp_path):
    scen = tmp_path / "s.toml"
    scen.write_text(f"""title = "time base run (invented)"
[motion]
x = {{ file = "{H1}" }}
z = {{ file = "{UP}" }}
target = "asce7:sds=0.8,sd1=0.4,tl=8"
match_target = true
""" + concrete_block(), encoding="utf-8")
    out = tmp_path / "out"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        assert main(["run", str(scen), "-o", str(out)]) == 0
    summary = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    pad = summary["analysis"]["pad_before_s"]
    with open(out / "histories.csv", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    head = rows[0]
    hist = np.array([[float(v) for v in r] for r in rows[1:]])
    t = hist[:, head.index("time [s]")]
    assert t[0] == pytest.approx(-pad, abs=1e-6)          # issue 14: pads at negative times
    # the vertical's onset in histories.csv is the file's own (to one sample)
    t_up, up = _file_columns(UP)
    z = hist[:, head.index("ground z acc [m/s2]")]
    assert _onset(t, z) == pytest.approx(_onset(t_up, up), abs=DT * 1.001)
    # records.csv: raw and corrected on one row at one time; the raw column is the file's
    with open(out / "records.csv", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    head = rows[0]
    assert [h for h in head if "time" in h] == ["time [s]"]
    tt = np.array([float(r[0]) for r in rows[1:]])
    raw = np.array([float(r[head.index("x raw acc [m/s2]")] or "nan") for r in rows[1:]])
    t_h1, h1 = _file_columns(H1)
    have = np.isfinite(raw)
    assert tt[have][0] == pytest.approx(0.0, abs=1e-9)          # file: first sample at 0
    np.testing.assert_allclose(tt[have], t_h1, atol=1e-9)       # the file's time column
    np.testing.assert_allclose(raw[have], h1, rtol=1e-9)        # written with 10 digits
    # summary peak times lie on the as-read axis: within [−pad, end of the grid]
    times = [summary["peaks"]["relative_displacement"][d]["time"] for d in "xyz"]
    for e in summary.get("equipment", {}).values():
        times += [b["time_of_peak_tension"] for b in e.get("anchors", [])]
    times += [v["time"] for v in summary.get("stresses", {}).values()
              if isinstance(v, dict) and "time" in v]
    times += [v["time"] for v in summary["base"]["peaks"].values()]
    times += [v["time"] for v in (summary.get("stability") or {}).values()
              if isinstance(v, dict) and v.get("time") is not None]
    assert len(times) >= 12
    # Newton's second law for a stiff block (modes far above the record's content): the
    # base axial force follows m·a_z, so it peaks at the vertical's PGA time of the file
    assert summary["base"]["peaks"]["Fz"]["time"] == pytest.approx(
        t_up[np.argmax(np.abs(up))], abs=2 * DT)
    assert all(-pad - 1e-9 <= v <= t[-1] + 1e-9 for v in times)
    # the PGA time of the unmatched vertical (summary) is the file's own (to one sample)
    by_dir = {r["direction"]: r for r in summary["records"]}
    assert by_dir["z"]["measures"]["pga_time"] == pytest.approx(
        t_up[np.argmax(np.abs(up))], abs=DT * 1.001)
    assert by_dir["x"]["pad_before_s"] == by_dir["z"]["pad_before_s"] == pytest.approx(pad)


def test_spectrum_peak_times_are_on_the_as_read_axis(capsys):
    assert main(["spectrum", H1, "--periods", "0.01,1", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    t_h1, h1 = _file_columns(H1)
    # Chopra §6.6: the stiff (0.01 s) oscillator peaks with the ground, at the PGA time
    # of the file's own time column, although the corrected record is padded in front
    sa_time = np.asarray(doc["records"][0]["sa_time"])
    assert sa_time[0][0] == pytest.approx(t_h1[np.argmax(np.abs(h1))], abs=2 * DT)


def test_match_output_and_plot_on_the_as_read_axis(tmp_path, monkeypatch):
    import groundshake._atomic as atomic

    figures = []
    real = atomic.atomic_savefig

    def keep(fig, path, **kw):
        figures.append(fig)
        return real(fig, path, **kw)

    monkeypatch.setattr(atomic, "atomic_savefig", keep)
    out, png = tmp_path / "m.csv", tmp_path / "m.png"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        main(["match", H1, "--target", "asce7:sds=0.8,sd1=0.4,tl=8", "--periods",
              "0.1,0.3,1.0", "--max-iterations", "1", "-o", str(out), "--plot", str(png),
              "--quiet"])
    t_h1, h1 = _file_columns(H1)
    t_pga = t_h1[np.argmax(np.abs(h1))]                       # the file's own time column
    t_out, _ = _file_columns(out)
    pad = -t_out[0]
    assert pad > 30.0              # issue 14: the correction's and the matching's pads, t < 0
    # the plot's "before" acceleration (the corrected record, scaled) peaks at the file's
    # PGA time: the plot's time axis is the as-read axis (issue 14)
    lines = [ln for fig in figures for ax in fig.axes for ln in ax.get_lines()
             if str(ln.get_label()).startswith("before, scaled")]
    t, y = lines[0].get_xdata(), lines[0].get_ydata()
    assert t[0] == pytest.approx(-pad, abs=1e-9)
    assert t[np.argmax(np.abs(y))] == pytest.approx(t_pga, abs=DT * 1.001)


@pytest.mark.parametrize("clock", ["2020-01-02T03:04:05.437", "2019-07-06T03:19:23.0383"])
def test_sac_with_a_sub_second_clock_keeps_the_as_read_axis(tmp_path, clock):
    # real files start at fractions of a second (e.g. an ESM header's
    # DATE_TIME_FIRST_SAMPLE 16:09:19.870); SAC's reference time holds whole
    # milliseconds (SAC format: nzmsec), so the rest must not move the samples
    from obspy import UTCDateTime

    t_file, acc = _file_columns(H1)
    t_pga = t_file[np.argmax(np.abs(acc))]                 # the file's own time column
    pad, tr = _corrected_sac(clock, tmp_path)
    # ObsPy (an independent reader): the first sample at clock − pad, to its 1 µs
    assert float(tr.stats.starttime - UTCDateTime(clock)) == pytest.approx(-pad, abs=2e-6)
    # SAC format: reference time = starttime − b, at the clock to SAC's 1 ms (b is a
    # 32-bit float: about 2e-6 s of rounding at 30 s)
    ref = tr.stats.starttime - tr.stats.sac.b
    assert -2e-6 <= float(UTCDateTime(clock) - ref) < 1e-3 + 2e-6
    # read back by groundshake: the pad again, and the PGA at the file's own time
    back = read_record(tmp_path / "c.sac")[0]
    assert back.metadata["pad_before_s"] == pytest.approx(pad, abs=1e-9)
    assert intensity_measures(back)["pga_time"] == pytest.approx(t_pga, abs=1e-9)
