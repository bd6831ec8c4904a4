"""The ``info`` and ``correct`` commands, and the stochastic demo-record generator.

Sources named beside each check: the K-NET header of ObsPy's bundled test file
("Max. Acc. (gal) 4.383"); ObsPy (obspy.read) as an independent reader; DESIGN.md's
JSON contract for ``info``; the PNG signature (PNG specification, ISO/IEC 15948);
Brune (1970) corner frequency in SI units fc = 0.4906·β·(Δσ/M0)^(1/3); Hanks & Kanamori
(1979) moment magnitude; Boore (2003) stochastic method (expected squared Fourier
amplitude of a simulation equals the target's); typical PGA of M 6.5 at 15 km (from
memory: ground-motion models give roughly 0.15-0.35 g).
"""
from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from groundshake.cli import main
from groundshake.records import read_record

REPO = Path(__file__).resolve().parents[2]
DEMO = [str(REPO / "records" / f"demo-{c}.mseed") for c in ("h1", "h2", "up")]


def _knet() -> Path:
    import obspy

    p = Path(obspy.__file__).parent / "io" / "nied" / "tests" / "data" / "test.knet"
    if not p.exists():
        pytest.skip("ObsPy K-NET test file not installed")
    return p


def test_info_json_contract(capsys):
    assert main(["info", *DEMO, "--units", "m/s2", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    # "<station> <channel>" from the files' own MiniSEED headers (XX.DEMO..HN1, ..HN2, ..HNZ)
    assert [r["name"] for r in doc["records"]] == ["DEMO HN1", "DEMO HN2", "DEMO HNZ"]
    for r in doc["records"]:
        # DESIGN.md: info --json → records with these keys, SI units
        for key in ("name", "pga", "pgv", "pgd", "arias_intensity", "d5_95", "cav"):
            assert key in r
        assert r["pga"] == pytest.approx(r["pga_g"] * 9.80665)  # CGPM 1901 g
        assert 0 < r["d5_75"] < r["d5_95"]  # definition: 5-75 % inside 5-95 %
        assert r["cav_std"] <= r["cav"]  # EPRI 1991: a part of the CAV integral
    assert doc["processing"]["highpass_hz"] == 0.1


def test_info_table_prints_defaults(capsys):
    assert main(["info", str(REPO / "records" / "demo-h1.csv")]) == 0
    out = capsys.readouterr().out
    assert "PGA" in out and "Arias intensity" in out and "D5-95" in out
    assert "Boore" in out  # the published defaults are printed with the results
    assert "screening" in out.lower()


def test_info_knet_pga_matches_agency_header(capsys):
    path = _knet()
    assert main(["info", str(path), "--highpass", "0", "--baseline-order", "0", "--taper", "0",
                 "--json"]) == 0
    rec = json.loads(capsys.readouterr().out)["records"][0]
    # K-NET header "Max. Acc. (gal) 4.383" (peak after the mean is removed), ±0.0005 gal
    assert abs(rec["pga"] * 100 - 4.383) <= 0.0005
    assert rec["units_read"] == "cm/s2"
    assert main(["info", str(path), "--raw", "--json"]) == 0
    raw = json.loads(capsys.readouterr().out)["records"][0]
    import obspy

    tr = obspy.read(str(path))[0]
    # --raw: exactly as read; ObsPy's counts × calib (m/s² per count) give the same peak
    assert raw["pga"] == pytest.approx(np.abs(tr.data * tr.stats.calib).max(), rel=1e-12)


def test_correct_writes_padded_record_and_plot(tmp_path, capsys):
    src = REPO / "records" / "demo-h1.csv"
    out, png = tmp_path / "h1.sac", tmp_path / "h1.png"
    assert main(["correct", str(src), "-o", str(out), "--highpass", "0.2", "--order", "2",
                 "--plot", str(png), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    (back,) = read_record(out)
    raw = read_record(src)[0]
    # Boore (2005) pads: 1.5·n/fc = 15 s in total are kept in the output
    assert (back.n - raw.n) * raw.dt == pytest.approx(15.0, abs=2 * raw.dt)
    assert doc["records"][0]["pad_before_s"] == pytest.approx(7.5, abs=raw.dt)
    assert len(doc["records"][0]["history"]) == 5
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948)
    assert not list(tmp_path.glob(".*part*"))  # no temporary files left (atomic writes)


def test_correct_mseed_output_readable_by_obspy(tmp_path, capsys):
    out = tmp_path / "all.mseed"
    assert main(["correct", DEMO[0], "--units", "m/s2", "-o", str(out)]) == 0
    assert "wrote" in capsys.readouterr().out
    import obspy

    st = obspy.read(str(out))  # ObsPy reads what we wrote
    (rec,) = read_record(out, units="m/s2")
    np.testing.assert_array_equal(st[0].data, rec.acc)


# -- the stochastic generator --------------------------------------------------------------

def test_corner_frequency_is_brune_in_si_units():
    from groundshake.records.synthetic import DEMO_SCENARIO as s

    m0_nm = 10 ** (1.5 * s.magnitude + 9.05)  # Hanks & Kanamori (1979), N·m
    beta = s.beta_km_s * 1000.0
    dsigma = s.stress_drop_bar * 1e5  # 1 bar = 1e5 Pa
    # Brune (1970): fc = 0.4906 β (Δσ/M0)^(1/3) in SI units, 1e-3
    assert s.corner_hz == pytest.approx(0.4906 * beta * (dsigma / m0_nm) ** (1 / 3), rel=1e-3)


def test_simulations_follow_the_target_spectrum():
    from groundshake.records.synthetic import stochastic_acceleration, target_fourier_amplitude

    dt, dur = 0.005, 40.0
    power = 0.0
    for seed in range(12):
        a = stochastic_acceleration(np.random.default_rng(seed), dt=dt, duration=dur)
        power = power + np.abs(np.fft.rfft(a) * dt) ** 2
    f = np.fft.rfftfreq(a.size, dt)
    band = (f > 0.5) & (f < 20.0)
    ratio = np.mean(power[band] / 12) / np.mean(target_fourier_amplitude(f[band]) ** 2)
    # Boore (2003): the expected squared amplitude spectrum equals the target's;
    # 12 records average to within 10 %
    assert ratio == pytest.approx(1.0, rel=0.10)


def test_demo_pga_is_plausible_for_the_invented_scenario():
    recs = [read_record(p, units="m/s2")[0] for p in DEMO]
    pga_g = [np.abs(r.acc - r.acc.mean()).max() / 9.80665 for r in recs]
    # from memory: ground-motion models give roughly 0.15-0.35 g horizontal for
    # M 6.5 at 15 km; the vertical about 0.6 of the horizontal (scaled so, invented)
    assert all(0.1 < p < 0.5 for p in pga_g[:2])
    assert 0.3 < pga_g[2] / max(pga_g[:2]) < 0.9


def test_generator_command(tmp_path, capsys):
    from groundshake.records.synthetic import _main

    assert _main([str(tmp_path / "d")]) == 0
    written = capsys.readouterr().out.split()
    assert len(written) == 6 and all(Path(p).exists() for p in written)
    # invented records say so: the folder's README states it (checked on the shipped one)
    text = (REPO / "records" / "README.md").read_text().lower()
    assert "synthetic" in text and "invented" in text


def test_info_json_carries_warnings_and_note(tmp_path, capsys):
    p = tmp_path / "short.txt"
    p.write_text("# units: g\n# dt: 0.01\n" +
                 "\n".join(repr(float(v)) for v in 0.01 * np.sin(np.arange(100) / 3.0)))
    assert main(["info", str(p), "--json"]) == 0
    captured = capsys.readouterr()
    doc = json.loads(captured.out)
    # a 1-s record cannot carry a 10-s (0.1 Hz) filter period (common practice:
    # the low-cut period must be well inside the record) -> an automatic warning
    assert any("high-pass corner" in w for w in doc["warnings"])
    assert "warning" in captured.err
    assert "screening" in doc["note"].lower()


@pytest.mark.parametrize("ext", [".sac", ".csv", ".mseed"])
def test_correct_a_three_channel_file_to_each_format(tmp_path, capsys, ext):
    # a real three-channel record (CWB text, tests/data/strong-motion/SOURCES.md); SAC holds
    # one trace per file (the SAC format), so it gets one file per channel; CSV and MiniSEED
    # hold the three together. Each file reads back, independently of groundshake, with
    # ObsPy or as text, to the corrected values (float32 in SAC: 1e-6 relative)
    import obspy

    src = REPO / "tests" / "data" / "strong-motion" / "cwb_us1000chhc_1-EAS.dat"
    out = tmp_path / f"corrected{ext}"
    assert main(["correct", str(src), "-o", str(out), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    files = [Path(f) for f in doc["files"]]
    assert len(doc["records"]) == 3
    if ext == ".sac":
        assert len(files) == 3 and len({f.name for f in files}) == 3
        assert all(f.name.startswith("corrected-") and f.suffix == ".sac" for f in files)
        traces = [obspy.read(str(f))[0] for f in files]
    else:
        assert files == [out]
        traces = None if ext == ".csv" else list(obspy.read(str(out)))
    pgas = [r["pga"] for r in doc["records"]]
    if traces is not None:
        np.testing.assert_allclose([np.max(np.abs(t.data)) for t in traces], pgas, rtol=1e-6)
    else:
        # the CSV as plain text: comment lines, a header row, then time and three columns
        lines = [ln for ln in out.read_text().splitlines() if not ln.startswith("#")]
        assert lines[0].startswith("time [s],")
        data = np.array([[float(v) for v in ln.split(",")] for ln in lines[1:]])
        assert data.shape[1] == 4
        np.testing.assert_allclose(np.max(np.abs(data[:, 1:]), axis=0), pgas, rtol=1e-12)
