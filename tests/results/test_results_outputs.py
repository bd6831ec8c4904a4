"""`groundshake run`: the files it writes, their keys, and its refusals; motion assembly.

Sources: the output contract of docs/INTERNALS.md and the DESIGN.md summary keys (the
project's own published interface, checked as a contract); the engineering cautions of
common practice (screening, not design); Fourier resampling preserves a band-limited
sine (Nyquist-Shannon; scipy.signal.resample as reference); facts of the trade for the
warnings (at least ~10 samples per period, Phillips et al. 2012). Records are invented.
"""
from __future__ import annotations

import csv
import json
from pathlib import Path

import numpy as np
import pytest

from groundshake._cautions import CAUTIONS
from groundshake.cli import main
from groundshake.records import Record, write_record
from groundshake.results import OUTPUT_FILES

from _tables import block_scenario, part, soil

# a str.format template: {rx} and {ry} are the record files
SCENARIO = "\n" + block_scenario(
    "outputs test (invented)", [part("pad", (2, 2, 0.6))], element_size=0.5,
    support=soil(200.0, 0.3), sep="",
    before=['[motion]\nx = {{ file = "{rx}" }}\ny = {{ file = "{ry}" }}\n',
            "[processing]\nhighpass_hz = 0.5\n"]) + """[[equipment]]
name = "box"
mass = 1500.0
mount = [1.0, 1.0]
footprint = [1.0, 1.0]
cg_height = 0.6
anchors = [[-0.4, -0.4], [0.4, -0.4], [0.4, 0.4], [-0.4, 0.4]]
capacity = {{ tension = 20e3, shear = 10e3 }}
fp = {{ sds = 1.0, ap = 1.0, rp = 2.5, ip = 1.0, z_over_h = 0.0 }}
[[sensors]]
name = "edge"
at = [2.0, 1.0, 0.6]
[floor_spectra]
damping_percent = [5]
periods = {{ min = 0.05, max = 2.0, count = 15 }}
"""


def write_case(folder: Path, *, n_y: int = 500, dt_y: float = 0.01) -> Path:
    t = np.arange(600) * 0.01
    ax = 1.5 * np.sin(2 * np.pi * 2.0 * t) * np.sin(np.pi * t / t[-1]) ** 2
    ty = np.arange(n_y) * dt_y
    ay = 1.0 * np.sin(2 * np.pi * 3.0 * ty) * np.sin(np.pi * ty / ty[-1]) ** 2
    write_record([Record(acc=ax, dt=0.01, name="rx", component="x")], folder / "rx.csv")
    write_record([Record(acc=ay, dt=dt_y, name="ry", component="y")], folder / "ry.csv")
    p = folder / "case.toml"
    p.write_text(SCENARIO.format(rx="rx.csv", ry="ry.csv"), encoding="utf-8")
    return p


@pytest.fixture(scope="module")
def run_dir(tmp_path_factory):
    folder = tmp_path_factory.mktemp("case")
    scen = write_case(folder)
    out = folder / "out"
    assert main(["run", str(scen), "-o", str(out), "--quiet", "--no-report"]) == 0
    return scen, out


def test_run_writes_every_file_with_the_contract_keys(run_dir):
    _, out = run_dir
    for name in OUTPUT_FILES:                     # docs/INTERNALS.md: files in DIR
        assert (out / name).is_file(), name
    s = json.loads((out / "summary.json").read_text())
    # DESIGN.md contract keys
    assert set(s["peaks"]["base_shear"]) >= {"x", "y"}
    for d in "xyz":
        assert s["sensors"]["edge"]["peak_absolute_acceleration"][d] >= 0
        assert s["sensors"]["edge"]["peak_relative_displacement"][d] >= 0
        assert s["equipment"]["box"]["peak_absolute_acceleration"][d] >= 0
    a = s["equipment"]["box"]["anchors"]
    assert len(a) == 4 and all({"peak_tension", "peak_shear", "dc_tension", "dc_shear"} <= set(b) for b in a)
    assert s["cautions"] == list(CAUTIONS)                      # common practice: cautions carried
    assert isinstance(s["warnings"], list) and s["modes"]["modes"]
    for key in ("scenario", "records", "model", "analysis", "stresses", "base", "floor_spectra",
                "provenance"):
        assert key in s, key
    assert s["scenario"]["analysis"]["method"] == "auto"         # defaults echoed
    assert "not a code capacity check" in s["equipment"]["box"]["fp"]["note"]
    assert any(str(Path(run_dir[0]).resolve()) in k or k.endswith("case.toml")
               for k in s["provenance"]["inputs"])
    # the 3-s y record is shorter than the 6-s x record: zero-padded, and the run says so
    assert any("zero-padded" in w for w in s["warnings"])


def test_csv_headers_carry_si_units(run_dir):
    _, out = run_dir
    with open(out / "histories.csv", newline="") as fh:
        head = next(csv.reader(fh))
    assert head[0] == "time [s]"                                  # INTERNALS.md: abscissa first
    assert "base Fx [N]" in head and "box bolt 1 tension [N]" in head
    with open(out / "element_peaks.csv", newline="") as fh:
        head = next(csv.reader(fh))
    assert head[:6] == ["x [m]", "y [m]", "z [m]", "von mises [Pa]", "principal tension [Pa]",
                        "principal compression [Pa]"]
    from groundshake.results._schema import COLUMNS

    with open(out / "floor_spectra.csv", newline="") as fh:
        rows = list(csv.reader(fh))
    # the output contract (results/_schema.py): long format, damping a number column
    assert rows[0] == [c.header for c in COLUMNS["floor_spectra"]]
    assert rows[0] == ["point", "direction", "damping [ratio]", "period [s]", "psa [m/s2]",
                       "psa broadened [m/s2]"]
    assert {r[0] for r in rows[1:]} >= {"envelope"}
    per_curve = {}
    for r in rows[1:]:
        per_curve.setdefault((r[0], r[1], r[2]), []).append(r)
    assert {len(v) for v in per_curve.values()} == {15}           # 15 periods per curve
    with open(out / "ground_spectra.csv", newline="") as fh:
        g = list(csv.reader(fh))
    assert g[0] == ["direction", "damping [ratio]", "period [s]", "psa [m/s2]"]


def test_rotational_participation_of_all_modes_sums_to_one():
    """Chopra, Dynamics of Structures §13.1: with every mode kept, Σ Γn² = ιᵀMι for any
    rigid-body vector ι, so the rotational ratios of all modes sum to 1."""
    from types import SimpleNamespace

    import scipy.linalg as sla
    import scipy.sparse as sp

    from groundshake.results._outputs import rotational_participation

    rng = np.random.default_rng(3)
    nodes = rng.uniform(-1, 1, (5, 3))                           # invented 5-node body
    n = 15
    M = np.diag(rng.uniform(1.0, 3.0, n))
    A = rng.normal(size=(n, n))
    K = A @ A.T + n * np.eye(n)
    w2, phi = sla.eigh(K, M)                                     # mass-normalised (scipy)
    model = SimpleNamespace(M=sp.csr_matrix(M), nodes=nodes, node_map=sp.identity(n, format="csr"),
                            equipment=[], base={"centre": np.zeros(3)})
    r = rotational_participation(model, SimpleNamespace(shapes=phi))
    assert r.shape == (n, 3)
    np.testing.assert_allclose(r.sum(axis=0), 1.0, rtol=1e-9)    # completeness, Chopra §13.1


def test_refuses_existing_folder_and_the_scenario_folder(run_dir, capsys):
    scen, out = run_dir
    before = (out / "summary.json").read_bytes()
    assert main(["run", str(scen), "-o", str(out), "--quiet", "--no-report"]) == 2        # CLI contract: status 2
    assert "already exists" in capsys.readouterr().err
    assert (out / "summary.json").read_bytes() == before                   # left as it was
    assert main(["run", str(scen), "-o", str(scen.parent), "--quiet", "--no-report"]) == 2
    assert "scenario" in capsys.readouterr().err


def test_json_output_and_direct_method(tmp_path, capsys):
    scen = write_case(tmp_path)
    assert main(["run", str(scen), "-o", str(tmp_path / "o"), "--method", "direct", "--json",
                 "--quiet", "--no-report"]) == 0
    s = json.loads(capsys.readouterr().out)
    assert s["analysis"]["method"] == "direct"
    assert any("Newmark" in a for a in s["analysis"]["assumptions"])      # states its scheme


def test_components_resampled_to_the_finest_step(tmp_path):
    from groundshake.pipeline import build_motion
    from groundshake.scenario import load_scenario
    scen = load_scenario(write_case(tmp_path, n_y=300, dt_y=0.02))
    m = build_motion(scen)
    assert m.dt == pytest.approx(0.01)                    # the finest of 0.01 and 0.02
    assert m.acc.shape == (3, m.n) and not np.any(m.acc[2])   # z absent: zeros
    assert any("resampled" in n for n in m.notes)
    # Fourier resampling keeps a well-sampled 3 Hz sine's peak (Nyquist-Shannon), 2 %
    assert np.max(np.abs(m.acc[1])) == pytest.approx(np.max(np.abs(m.corrected["y"].acc)), rel=0.02)


def test_records_say_how_long_their_leading_pad_is():
    # Boore (2005): the padded record is kept, so reported times include the pad; the
    # summary states the pad (1.5·n/fc in total, half before the record) so that a
    # reader can line the corrected record up with the record as read
    from groundshake.processing import ProcessingSettings, correct_record
    from groundshake.records import Record
    import numpy as _np

    rec = Record(acc=_np.sin(_np.arange(2000) * 0.05), dt=0.01, name="invented")
    out = correct_record(rec, ProcessingSettings(highpass_hz=0.5, filter_order=4))
    from groundshake.dynamics import Motion
    from groundshake.results._run import _records_summary

    acc = _np.zeros((3, out.n))
    acc[0] = out.acc
    mot = Motion(acc=acc, dt=out.dt, components=("x",), raw={"x": rec}, corrected={"x": out})
    (entry,) = _records_summary(mot)
    assert entry["pad_before_s"] == pytest.approx(0.5 * 1.5 * 4 / 0.5, rel=0.05)


def test_run_prints_engineering_units_and_where_the_report_is(tmp_path, capsys):
    """`run` prints its answers in display units and says where the report is; with
    `--report-units us` (or `[report] units = "us"`) in kip, kip·ft and g (NIST SP 811,
    App. B: 1 kip = 4448.2216152605 N; 1 g = 9.80665 m/s², CGPM 1901)."""
    scen = write_case(tmp_path)
    out = tmp_path / "us"
    assert main(["run", str(scen), "-o", str(out), "--quiet", "--report-units", "us"]) == 0
    text = capsys.readouterr().out
    s = json.loads((out / "summary.json").read_text())
    assert f"report: {out / 'report.html'}" in text
    assert "kip" in text and "kip·ft" in text
    assert f"{s['peaks']['base_shear']['x'] / 4448.2216152605:.3g}" in text
    assert "warnings: " not in text                            # issue 16: warnings in words
    for w in s["warnings"]:
        assert w in text
    assert "[kip]" in (out / "report.html").read_text(encoding="utf-8")
    # the scenario's own [report] units = "us" does the same without the option
    (tmp_path / "case2.toml").write_text(scen.read_text() + '\n[report]\nunits = "us"\n')
    assert main(["run", str(tmp_path / "case2.toml"), "-o", str(tmp_path / "us2"),
                 "--quiet"]) == 0
    assert "kip" in capsys.readouterr().out
    assert "[kip]" in (tmp_path / "us2" / "report.html").read_text(encoding="utf-8")


def test_ground_spectra_target_row_carries_the_targets_own_damping():
    """The target's rows in ground_spectra.csv name the damping the target is for: an
    EN 1998-1 target at 2 % (η = √(10/7), EN 1998-1 §3.2.2.2) is labelled 0.02, not 5 %."""
    from groundshake.dynamics import motion_from_arrays
    from groundshake.results import RunResults
    from groundshake.results._outputs import _ground_csv
    from groundshake.spectra import parse_target

    tgt = parse_target("en1998:type=1,ground=C,ag=0.3,damping=2")
    periods = np.array([0.1, 0.5, 1.0])
    mot = motion_from_arrays({"x": np.zeros(8)}, 0.01)
    res = RunResults(summary={}, motion=mot, model=None, modes=None, time=mot.time,
                     histories={}, ground_spectra={"periods": periods, "damping": np.array([0.05]),
                                                   "psa": np.zeros((3, 1, 3))},
                     floor={}, stress=None, target_psa=tgt.psa(periods),
                     target_damping=tgt.damping)
    rows = list(csv.reader(_ground_csv(res).splitlines()))
    target = [r for r in rows[1:] if r[0] == "target"]
    assert len(target) == 3
    assert {float(r[1]) for r in target} == {0.02}      # the spec's damping=2 [%]
    np.testing.assert_allclose([float(r[3]) for r in target], tgt.psa(periods), rtol=1e-9)
