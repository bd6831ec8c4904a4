"""Suites scaled to a target spectrum: factors, the combination rule, every engine.

Sources of the expected numbers:
- linearity of the oscillator (Chopra, Dynamics of Structures, §1.8 and ch. 6): the
  spectrum of c·a(t) is c times the spectrum of a(t); for two equal components the
  rotated record a·(cosθ + sinθ) peaks at θ = 45° with √2·a, so RotD100 = √2·S and the
  SRSS of the pair is √2·S (hand calculation);
- the rules' bands and shares (ASCE 7-16 §16.2.3: 90 % over 0.2T–2T; ASCE 7-10 §16.1.3.2:
  100 % over 0.2T–1.5T; EN 1998-1 §3.2.3.1.2(4): 90 % over 0.2T–2T) and the mean-of-7,
  else-maximum rule (EN 1998-1 §4.3.3.4.3; ASCE 7-10 §16.1.4), all from memory;
- Newton's second law for a rigid block on a fixed base: base shear = m × ground
  acceleration, and a linear model's peaks scale with the record (Chopra §1.8).
The records are invented test data (a windowed sine), not real motions.
"""
from __future__ import annotations

import json
import math
import warnings

import numpy as np
import pytest

from _blocks import concrete_block
from _tables import suite_head
from groundshake._errors import GroundshakeWarning, InputError, ScenarioError
from groundshake.cli import main
from groundshake.scenario import parse_scenario_text
from groundshake.spectra import response_spectrum
from groundshake.spectra._scaling import SCALING_RULES
from groundshake.suite import discover_record_sets, flatten_scalars
from groundshake.pipeline import SuiteScaling, combine_by_rule, scale_record_sets
from groundshake.pipeline._set_scaling import BAND_PERIODS
from groundshake.suite._run import run_suite

G = 9.80665            # standard gravity [m/s²] (CGPM 1901)
DT = 0.01
PERIOD = 0.25          # the fundamental period given for the band [s]
MULTIPLES = {"p": 2.0, "q": 0.5}   # each set is this multiple of one invented record

SCENARIO = suite_head("scaling test block (invented)", "p") + """[analysis]
modes = 4
[floor_spectra]
damping_percent = [5]
periods = {{ min = 0.05, max = 1.0, count = 8 }}
{extra}
"""


def _base_record(n=400):
    # invented test motion: a 3 Hz sine in a sine-squared window
    t = np.arange(n) * DT
    return np.sin(2 * math.pi * 3.0 * t) * np.sin(math.pi * t / t[-1]) ** 2


def _write(path, values):
    path.write_text("\n".join(f"{v:.17g}" for v in values) + "\n")


def _scenario(root, extra=""):
    text = SCENARIO.format(rec=root.joinpath("recs").as_posix(), block=concrete_block(),
                           extra=extra)
    return parse_scenario_text(text, source=str(root / "scenario.toml"), base_dir=root)


@pytest.fixture(scope="module")
def case(tmp_path_factory):
    root = tmp_path_factory.mktemp("scaling")
    rec = root / "recs"
    rec.mkdir()
    a = _base_record()
    for name, c in MULTIPLES.items():
        _write(rec / f"{name}-x.csv", c * a)
        _write(rec / f"{name}-y.csv", c * a)
    # one target table per rule, equal to the base record's own spectrum at the band's
    # periods (the band is checked at BAND_PERIODS log-spaced periods from aT to bT)
    targets = {}
    for rule, (lo, hi, _, _) in SCALING_RULES.items():
        T = np.geomspace(lo * PERIOD, hi * PERIOD, BAND_PERIODS)
        S = response_spectrum(a, DT, T, 0.05).psa[0]
        path = root / f"target-{rule}.csv"
        path.write_text("period [s],PSA [g]\n"
                        + "".join(f"{float(p)!r},{float(v) / G!r}\n" for p, v in zip(T, S)))
        targets[rule] = str(path)
    return root, rec, targets


def _sets(rec):
    return discover_record_sets(str(rec), units="m/s2", dt=DT)


@pytest.mark.parametrize("rule, pair", [("en1998", 1.0),              # mean of x and y: c·S
                                        ("asce7-10", math.sqrt(2)),   # SRSS: √2·c·S
                                        ("asce7-16", math.sqrt(2))])  # RotD100: √2·c·S
def test_record_mode_factors_are_the_inverse_multiples(case, rule, pair):
    root, rec, targets = case
    scaled, failed, doc = scale_record_sets(
        _scenario(root), _sets(rec), SuiteScaling(target=targets[rule], rule=rule,
                                                  mode="record", period=PERIOD))
    share = SCALING_RULES[rule][2]
    assert not failed
    for rs in scaled:
        # hand calculation: a set of c × the record has the spectrum pair·c·target, so its
        # own fit is 1/(pair·c), and the common factor then brings the mean to the share
        expected = share / (pair * MULTIPLES[rs.name])
        assert rs.factor == pytest.approx(expected, rel=1e-9)
    assert doc["least_ratio"] == pytest.approx(share, rel=1e-9)   # the rule's share, reached
    assert doc["band"] == pytest.approx([SCALING_RULES[rule][0] * PERIOD,
                                         SCALING_RULES[rule][1] * PERIOD])


def test_set_mode_one_common_factor(case):
    root, rec, targets = case
    scaled, _, doc = scale_record_sets(
        _scenario(root), _sets(rec), SuiteScaling(target=targets["en1998"], rule="en1998",
                                                  mode="set", period=PERIOD))
    # hand calculation: mean spectrum = (2 + 0.5)/2 = 1.25 × target; 90 % needs 0.9/1.25
    assert [rs.factor for rs in scaled] == pytest.approx([0.72, 0.72], rel=1e-9)
    assert doc["set_factor"] == pytest.approx(0.72, rel=1e-9)


def test_factor_outside_the_range_is_warned(case):
    root, rec, targets = case
    with pytest.warns(GroundshakeWarning, match="outside 0.25–1"):
        _, _, doc = scale_record_sets(
            _scenario(root), _sets(rec), SuiteScaling(target=targets["en1998"], rule="en1998",
                                                      limits=(0.25, 1.0), period=PERIOD))
    # hand calculation (above): p gets 0.9/2 = 0.45 (inside), q gets 0.9/0.5 = 1.8 (outside)
    inside = {f["record"]: f["in_range"] for f in doc["factors"]}
    assert inside == {"p": True, "q": False}
    assert any("record set q" in w for w in doc["warnings"])


@pytest.mark.parametrize("n_ok, expected", [(6, "max"), (7, "mean"), (11, "mean")])
def test_combination_switches_at_seven(n_ok, expected):
    # EN 1998-1 §4.3.3.4.3 / ASCE 7-10 §16.1.4 (from memory): 7 or more records → mean
    stats = {"peaks.base_shear.x": {"count": n_ok, "mean": 2.0, "max": 5.0}}
    out = combine_by_rule(stats, 0, n_ok)
    assert out["combination"] == expected
    assert out["combined"]["peaks.base_shear.x"] == {"mean": 2.0, "max": 5.0}[expected]


def test_failed_sets_do_not_count_towards_seven():
    # 7 sets of which one failed: 6 ran, fewer than 7 → the maximum (same sources)
    out = combine_by_rule({"q": {"count": 6, "mean": 1.0, "max": 3.0}}, 1, 7)
    assert (out["combination"], out["count"], out["combined"]["q"]) == ("max", 6, 3.0)
    assert "1 of 7" in out["combination_note"]


def _manifest(path, rows):
    path.write_text("set,x,y\n" + "".join(f"{n},{x},{y}\n" for n, x, y in rows))
    return discover_record_sets(str(path), units="m/s2", dt=DT)


def test_scaled_suite_peaks_scale_with_the_factor(case, tmp_path):
    root, rec, targets = case
    scen = _scenario(root)
    sets = _sets(rec)
    plain = run_suite(scen, sets, tmp_path / "plain", workers=1, set_timeout=0)
    scaled = run_suite(scen, sets, tmp_path / "scaled", workers=1, set_timeout=0,
                       scaling=SuiteScaling(target=targets["en1998"], rule="en1998",
                                            period=PERIOD))
    factors = {f["record"]: f["factor"] for f in scaled.scaling["factors"]}
    mass = 2.0 * 2.0 * 1.0 * 2400.0            # the block of tests/_blocks.py [kg]
    pga = float(np.max(np.abs(_base_record())))
    for r0, r1 in zip(plain.records, scaled.records):
        assert r1["target_factor"] == factors[r1["record"]]
        assert r1["scale"] == {"x": factors[r1["record"]], "y": factors[r1["record"]]}
        one, two = flatten_scalars(r0["peaks"]), flatten_scalars(r1["peaks"])
        f = factors[r1["record"]]
        for k, v in one.items():      # a linear model: every peak × the factor (Chopra §1.8)
            if v > 1e-9 * max(one.values()):
                assert two[k] == pytest.approx(f * v, rel=1e-9), k
        # a stiff block on a fixed base moves with the ground: V = m·a (Newton), here
        # within 1 % (the block's first mode is far above the record's 3 Hz)
        c = MULTIPLES[r1["record"]]
        assert two["peaks.base_shear.x"] == pytest.approx(mass * f * c * pga, rel=0.01)
    doc = json.loads((tmp_path / "scaled" / "suite.json").read_text(encoding="utf-8"))
    sc = doc["scaling"]
    assert {"rule", "target", "band", "factors", "combination"} <= set(sc)
    assert sc["combination"] == "max"          # 2 sets < 7 (EN 1998-1 §4.3.3.4.3, memory)
    stats = doc["statistics"]["peaks.base_shear.x"]
    assert sc["combined"]["peaks.base_shear.x"] == stats["max"]


def test_pool_and_dask_carry_the_factor(case, tmp_path):
    root, rec, targets = case
    scen = _scenario(root)
    how = SuiteScaling(target=targets["asce7-16"], rule="asce7-16", period=PERIOD)
    serial = run_suite(scen, _sets(rec), tmp_path / "s", workers=1, scaling=how)
    pooled = run_suite(scen, _sets(rec), tmp_path / "p", workers=2, scaling=how)
    engines = [pooled]
    distributed = None
    try:
        import distributed
    except ImportError:
        pass
    if distributed is not None:
        with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                      dashboard_address=None) as cluster:
            with distributed.Client(cluster) as client:
                engines.append(run_suite(scen, _sets(rec), tmp_path / "d", scheduler=client,
                                         scaling=how))
    for other in engines:
        for a, b in zip(serial.records, other.records):
            assert b["target_factor"] == a["target_factor"]
            fa, fb = flatten_scalars(a["peaks"]), flatten_scalars(b["peaks"])
            for k, v in fa.items():      # the same computation: identical to 1e-12
                assert fb[k] == pytest.approx(v, rel=1e-12, abs=1e-300), k


def test_an_unreadable_set_fails_alone(case, tmp_path):
    root, rec, targets = case
    bad = tmp_path / "bad-x.csv"
    bad.write_text("not a number\n")
    sets = _manifest(tmp_path / "m.csv", [("p", rec / "p-x.csv", rec / "p-y.csv"),
                                          ("bad", bad, rec / "q-y.csv")])
    res = run_suite(_scenario(root), sets, tmp_path / "out", workers=1,
                    scaling=SuiteScaling(target=targets["en1998"], rule="en1998", mode="set",
                                         period=PERIOD))
    status = {r["record"]: r["status"] for r in res.records}
    assert status == {"p": "ok", "bad": "failed"}
    assert "while scaling" in res.records[1]["error"]
    # the one readable set alone: 90 % of the target needs 0.9/2 (hand calculation)
    assert res.scaling["factors"] == [{"record": "p", "factor": pytest.approx(0.45, rel=1e-9),
                                       "own": 1.0, "in_range": True}]


def test_matching_and_scaling_do_not_mix(case):
    root, rec, targets = case
    scen = _scenario(root).with_motion(x=str(rec / "p-x.csv"), target=targets["en1998"],
                                       match_target=True)
    with pytest.raises(InputError, match="match_target"):
        scale_record_sets(scen, _sets(rec), SuiteScaling(target=targets["en1998"],
                                                         period=PERIOD))


def test_target_must_cover_the_band(case):
    root, rec, targets = case
    with pytest.raises(InputError, match="not defined"):
        # the en1998 table stops at 2T = 0.5 s; T = 1 s asks for 0.2–2 s
        scale_record_sets(_scenario(root), _sets(rec),
                          SuiteScaling(target=targets["en1998"], rule="en1998", period=1.0))


@pytest.mark.parametrize("kw, word", [({"rule": "asce7-22"}, "--scale-rule"),
                                      ({"mode": "each"}, "--scale-mode"),
                                      ({"limits": (4.0, 0.25)}, "--scale-range"),
                                      ({"period": -1.0}, "--scale-period")])
def test_bad_scaling_settings(kw, word):
    with pytest.raises(InputError, match=word):
        SuiteScaling(target="asce7:sds=1.0,sd1=0.6,tl=8", **kw)


def test_cli_scale_to(case, tmp_path, capsys):
    root, rec, targets = case
    scen = tmp_path / "scenario.toml"
    scen.write_text(SCENARIO.format(rec=rec.as_posix(), block=concrete_block(), extra=""))
    out = tmp_path / "out"
    code = main(["suite", str(scen), "--records", str(rec), "--units", "m/s2", "--dt", "0.01",
                 "--workers", "1", "--scale-to", targets["en1998"], "--scale-rule", "en1998",
                 "--scale-period", str(PERIOD), "--scale-range", "0.25,4", "-o", str(out)])
    assert code == 0
    text = capsys.readouterr().out
    assert "0.45" in text and "1.8" in text      # the factors' table (values below)
    assert "combined by the max" in text and "en1998" in text
    doc = json.loads((out / "suite.json").read_text(encoding="utf-8"))
    # hand calculation as above: 0.9/2 and 0.9/0.5
    assert [f["factor"] for f in doc["scaling"]["factors"]] == pytest.approx([0.45, 1.8])
    html = (out / "suite.html").read_text(encoding="utf-8")
    assert "Scaling to a target" in html and "combined (max)" in html


def test_cli_scenario_suite_table(case, tmp_path):
    root, rec, targets = case
    scen = tmp_path / "scenario.toml"
    extra = (f'[suite]\nscale_to = "{targets["asce7-10"]}"\nscale_rule = "asce7-10"\n'
             f"scale_period = {PERIOD}\n")
    scen.write_text(SCENARIO.format(rec=rec.as_posix(), block=concrete_block(), extra=extra))
    out = tmp_path / "out"
    assert main(["suite", str(scen), "--records", str(rec), "--units", "m/s2", "--dt", "0.01",
                 "--workers", "1", "--quiet", "-o", str(out)]) == 0
    doc = json.loads((out / "suite.json").read_text(encoding="utf-8"))
    # ASCE 7-10 (from memory): SRSS √2·c·S must reach 100 % → 1/(√2·c)
    assert doc["scaling"]["rule"] == "asce7-10"
    assert [f["factor"] for f in doc["scaling"]["factors"]] == pytest.approx(
        [1 / (math.sqrt(2) * 2.0), 1 / (math.sqrt(2) * 0.5)], rel=1e-9)


@pytest.mark.parametrize("extra_args", [["--scale-rule", "en1998"],
                                        ["--scale-to", "asce7:sds=1.0,sd1=0.6,tl=8",
                                         "--scale-range", "4,0.25"],
                                        ["--scale-to", "asce7:sds=1.0,sd1=0.6,tl=8",
                                         "--scale-range", "1"]])
def test_cli_bad_scaling_options(case, tmp_path, capsys, extra_args):
    root, rec, targets = case
    scen = tmp_path / "scenario.toml"
    scen.write_text(SCENARIO.format(rec=rec.as_posix(), block=concrete_block(), extra=""))
    code = main(["suite", str(scen), "--records", str(rec), "-o", str(tmp_path / "o")]
                + extra_args)
    assert code == 2
    assert "--scale" in capsys.readouterr().err


@pytest.mark.parametrize("table, word", [('scale_range = [4.0, 0.25]', "scale_range"),
                                         ('scale_mode = "each"', "scale_mode"),
                                         ('scale_to = "asce7:sds=9.81,sd1=0.6,tl=8"',
                                          "scale_to")])
def test_scenario_suite_table_errors(case, table, word):
    root, rec, targets = case
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        with pytest.raises(ScenarioError, match=word):
            _scenario(root, extra=f"[suite]\n{table}\n")


def test_resume_keeps_sets_scaled_alike(case, tmp_path):
    # a set is "done" only for the same files and the same total scale (README, Resilience)
    root, rec, targets = case
    scen = _scenario(root)
    same = SuiteScaling(target=targets["en1998"], rule="en1998", period=PERIOD)
    run_suite(scen, _sets(rec), tmp_path / "o", workers=1, scaling=same)
    seen = []
    run_suite(scen, _sets(rec), tmp_path / "o", workers=1, scaling=same, resume=True,
              on_result=seen.append)
    assert seen == []                      # nothing ran again
    other = SuiteScaling(target=targets["en1998"], rule="en1998", mode="set", period=PERIOD)
    run_suite(scen, _sets(rec), tmp_path / "o", workers=1, scaling=other, resume=True,
              on_result=seen.append)
    assert sorted(r["record"] for r in seen) == ["p", "q"]   # new factors: both ran again
