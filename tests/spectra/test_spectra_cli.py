"""The ``spectrum`` command: JSON/CSV contracts, RotD, targets, plots and errors.

Sources:
- DESIGN.md: the JSON contract {"records": [{"name", "periods", "damping_percent", "sd",
  "sv", "sa", "psv", "psa"}]} in SI, status 2 with one line on stderr for bad input.
- Chopra, Dynamics of Structures, ch. 3: at resonance the steady-state amplitude of
  a damped oscillator is 1/(2ξ) times the static one, so PSA = a0/(2ξ).
- docs/references.md §4 [C]: RotD50 = 0.7071·RotD100 for linearly polarised motion.
- PNG file signature (common practice: the 8 bytes 89 50 4E 47 0D 0A 1A 0A).
Records here are invented test data written by the tests.
"""
import csv
import hashlib
import json

import numpy as np
import pytest

from groundshake.cli import main

G = 9.80665


def _write_record(path, acc, dt, component="HN1"):
    """Write an invented test record as two-column CSV in m/s²."""
    t = np.arange(acc.size) * dt
    lines = ["# invented test record", "# units: m/s2", f"# dt: {dt}",
             f"# components: {component}", "time [s],acc [m/s2]"]
    lines += [f"{a:.6f},{b:.12g}" for a, b in zip(t, acc)]
    path.write_text("\n".join(lines) + "\n")
    return path


@pytest.fixture()
def sine(tmp_path):
    dt, a0 = 0.01, 0.5
    t = np.arange(0, 60, dt)
    return _write_record(tmp_path / "sine.csv", a0 * np.sin(2 * np.pi * t), dt), a0


def test_json_contract_and_resonance(sine, capsys):
    path, a0 = sine
    rc = main(["spectrum", str(path), "--raw", "--json", "--damping", "2,5",
               "--periods", "0.5,1.0,2.0"])
    assert rc == 0
    doc = json.loads(capsys.readouterr().out)
    rec = doc["records"][0]
    for key in ("name", "periods", "damping_percent", "sd", "sv", "sa", "psv", "psa"):
        assert key in rec                                   # DESIGN.md JSON contract
    assert np.array(rec["psa"]).shape == (2, 3)             # DESIGN.md (n_damping, n_periods)
    assert rec["damping_percent"] == [2.0, 5.0]             # DESIGN.md: percent in the CLI
    psa = np.array(rec["psa"])
    # Chopra ch. 3: at resonance (T = 1 s under a 1 Hz sine) PSA → a0/(2ξ); after 60 s
    # the build-up factor 1 - exp(-ξωt) is 1 - 5e-4 at 2 % and 1 at 5 %
    assert psa[1, 1] == pytest.approx(a0 / (2 * 0.05), rel=2e-3)
    assert psa[0, 1] == pytest.approx(a0 / (2 * 0.02) * (1 - np.exp(-0.02 * 2 * np.pi * 60)),
                                      rel=2e-3)
    assert rec["pga"] == pytest.approx(a0, rel=1e-6)        # SI (m/s²), DESIGN.md
    assert doc["cautions"] and "screening" in doc["note"].lower()   # preamble: cautions


def test_csv_output_and_plot_and_inputs_untouched(sine, tmp_path, capsys):
    path, a0 = sine
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    target = tmp_path / "target.csv"
    target.write_text("period_s,psa_g\n0.1,1.0\n3.0,0.5\n")   # invented target table
    out, png = tmp_path / "sp.csv", tmp_path / "sp.png"
    rc = main(["spectrum", str(path), "--raw", "--periods", "0.2,1.0", "--target",
               str(target), "-o", str(out), "--plot", str(png)])
    assert rc == 0
    rows = list(csv.DictReader(out.open()))
    assert len(rows) == 2                                    # one row per damping x period
    r = {float(x["period_s"]): x for x in rows}
    # DESIGN.md: SI columns; psa_g = psa / g (standard gravity 9.80665, CGPM 1901)
    assert float(r[1.0]["psa_g"]) == pytest.approx(float(r[1.0]["psa_m_per_s2"]) / G, rel=1e-6)
    # ratio column = computed / target, with the target table log-log interpolated
    tgt = np.exp(np.interp(np.log(1.0), np.log([0.1, 3.0]), np.log([1.0, 0.5]))) * G
    assert float(r[1.0]["ratio_to_target"]) == pytest.approx(
        float(r[1.0]["psa_m_per_s2"]) / tgt, rel=1e-5)
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"      # PNG signature
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before   # inputs never modified


def test_rotd_of_a_polarised_pair(tmp_path, capsys):
    rng = np.random.default_rng(5)
    dt = 0.01
    a = np.convolve(rng.standard_normal(3000), np.ones(5) / 5, "same")
    f1 = _write_record(tmp_path / "h1.csv", a * np.cos(0.4), dt, "HN1")
    f2 = _write_record(tmp_path / "h2.csv", a * np.sin(0.4), dt, "HN2")
    rc = main(["spectrum", str(f1), str(f2), "--raw", "--json", "--rotd", "50,100",
               "--periods", "0.2,1.0"])
    assert rc == 0
    doc = json.loads(capsys.readouterr().out)
    rd = doc["rotd"][0]
    ratio = np.array(rd["psa"]["50"]) / np.array(rd["psa"]["100"])
    # docs/references.md §4 [C]: 0.7071 for polarised motion (text output rounds inputs to
    # 12 digits, hence 1e-4)
    np.testing.assert_allclose(ratio, 0.7071, rtol=1e-4)
    assert "statistics" in doc and len(doc["statistics"]["by_damping"]) == 1


@pytest.mark.parametrize("extra, match", [
    (["--damping", "120"], "--damping"),
    (["--periods", "0,1"], "--periods"),
    (["--target", "asce7:sds=1"], "missing"),
    (["--rotd", "50"], "pairs"),
    (["-o", "out.txt"], "CSV"),
    (["--plot", "x.jpg"], "png"),
])
def test_bad_input_is_status_2_one_line(sine, tmp_path, capsys, extra, match):
    path, _ = sine
    extra = [str(tmp_path / e) if e in ("out.txt", "x.jpg") else e for e in extra]
    rc = main(["spectrum", str(path), "--raw", *extra])
    err = capsys.readouterr().err
    assert rc == 2                                   # DESIGN.md: bad input → status 2
    assert match.lower() in err.lower() and "Traceback" not in err
    assert err.count("error:") == 1                  # DESIGN.md: one line
