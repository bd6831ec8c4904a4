"""Suites: the same result from every engine, resilience and resume.

Checks (sources): a suite is the same computation repeated, so serial, pooled and
Dask results must agree to round-off (issue contract: identical to 1e-12); linearity
of the elastic model (Chopra, Dynamics of Structures, §1.8 — response proportional
to the excitation) gives the expected ratio between a record and the same record
scaled; the record files here are invented test data, not real motions.
"""
from __future__ import annotations

import json
import math
import re

import numpy as np
import pytest

from _blocks import concrete_block
from _tables import suite_head
from groundshake.cli import main
from groundshake.scenario import load_scenario
from groundshake.suite import discover_record_sets, flatten_scalars
from groundshake.suite._run import prepare_suite, run_suite

SCENARIO = suite_head("suite test block (invented)", "a") + """[[equipment]]
name = "box"
mass = 1000.0
mount = [1.0, 1.0]
footprint = [1.0, 1.0]
cg_height = 0.8
frequency_hz = [6.0, 6.0, 20.0]
anchors = [[-0.4, -0.4], [0.4, -0.4], [0.4, 0.4], [-0.4, 0.4]]
[[sensors]]
name = "corner"
at = [2.0, 2.0, 1.0]
[analysis]
modes = 4
[floor_spectra]
damping_percent = [5]
periods = {{ min = 0.05, max = 2.0, count = 12 }}
"""


def _write_record(path, amplitude, freq, n=400, dt=0.01, seed=0):
    # invented test motion: a windowed sine plus a little seeded noise
    t = np.arange(n) * dt
    rng = np.random.default_rng(seed)
    a = amplitude * np.sin(2 * math.pi * freq * t) * np.sin(math.pi * t / t[-1]) ** 2
    a += 0.02 * amplitude * rng.standard_normal(n)
    path.write_text("\n".join(f"{v:.9e}" for v in a) + "\n")


@pytest.fixture(scope="module")
def suite_case(tmp_path_factory):
    root = tmp_path_factory.mktemp("suite")
    rec = root / "recs"
    rec.mkdir()
    for k, (amp, f) in enumerate([(1.0, 2.0), (2.0, 3.0), (0.5, 5.0)]):
        name = "abc"[k]
        _write_record(rec / f"{name}-x.csv", amp, f, seed=k)
        _write_record(rec / f"{name}-y.csv", 0.7 * amp, 1.3 * f, seed=10 + k)
    scen = root / "scenario.toml"
    scen.write_text(SCENARIO.format(rec=rec.as_posix(), block=concrete_block()))
    scenario = load_scenario(scen)
    shared = prepare_suite(scenario)
    return root, rec, scen, scenario, shared


def _numbers(records):
    return {r["record"]: flatten_scalars(r["peaks"]) for r in records}


def _assert_same(a, b, rtol=1e-12):
    assert a.keys() == b.keys()
    for name in a:
        assert a[name].keys() == b[name].keys()
        for k, v in a[name].items():
            assert b[name][k] == pytest.approx(v, rel=rtol, abs=1e-300), (name, k)


def test_serial_and_pool_agree(suite_case, tmp_path):
    root, rec, scen, scenario, shared = suite_case
    sets = discover_record_sets(str(rec), units="m/s2", dt=0.01)
    serial = run_suite(scenario, sets, tmp_path / "s", shared=shared, workers=1)
    pooled = run_suite(scenario, sets, tmp_path / "p", shared=shared, workers=2)
    assert [r["status"] for r in serial.records] == ["ok"] * 3
    _assert_same(_numbers(serial.records), _numbers(pooled.records))   # contract: 1e-12


def test_dask_local_cluster_agrees(suite_case, tmp_path):
    distributed = pytest.importorskip("distributed")
    root, rec, scen, scenario, shared = suite_case
    sets = discover_record_sets(str(rec), units="m/s2", dt=0.01)
    serial = run_suite(scenario, sets, tmp_path / "s", shared=shared, workers=1)
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster:
        with distributed.Client(cluster) as client:
            on_dask = run_suite(scenario, sets, tmp_path / "d", shared=shared, scheduler=client)
    _assert_same(_numbers(serial.records), _numbers(on_dask.records))  # contract: 1e-12


def test_scaled_record_scales_every_peak(suite_case, tmp_path):
    # linearity of the elastic model (Chopra §1.8): twice the record, twice every peak
    root, rec, scen, scenario, shared = suite_case
    manifest = tmp_path / "m.csv"
    manifest.write_text(f"set,x,y,scale\none,{rec}/a-x.csv,{rec}/a-y.csv,1\n"
                        f"two,{rec}/a-x.csv,{rec}/a-y.csv,2\n")
    res = run_suite(scenario, discover_record_sets(str(manifest), units="m/s2", dt=0.01),
                    tmp_path / "out", shared=shared)
    one, two = (flatten_scalars(r["peaks"]) for r in res.records)
    for k, v in one.items():
        if v > 1e-12 * max(one.values()):
            assert two[k] == pytest.approx(2 * v, rel=1e-9), k


def test_bad_record_is_reported_not_fatal(suite_case, tmp_path):
    root, rec, scen, scenario, shared = suite_case
    bad = tmp_path / "recs"
    bad.mkdir()
    for n in ("a-x.csv", "a-y.csv"):
        (bad / n).write_text((rec / n).read_text())
    (bad / "z-x.csv").write_text("not a number\n")
    (bad / "z-y.csv").write_text("1\n2\n")
    out = tmp_path / "out"
    status = main(["suite", str(scen), "--records", str(bad), "--units", "m/s2", "--dt", "0.01",
                   "--workers", "1", "-o", str(out), "--quiet"])
    assert status == 1                                   # contract: 1 when any record failed
    doc = json.loads((out / "suite.json").read_text())
    by = {r["record"]: r for r in doc["records"]}
    assert by["a"]["status"] == "ok" and by["z"]["status"] == "failed"
    assert "z-" in by["z"]["error"] or "line" in by["z"]["error"]
    assert doc["cautions"] and (out / "suite.html").is_file()
    # issue 16: suite.html names quantities in words with engineering units, numbers bolts
    # from 1 and shows the failed set and why
    page = (out / "suite.html").read_text(encoding="utf-8")
    text = re.sub(r"<style>.*?</style>|<[^>]+>", " ", page, flags=re.S)
    assert "anchors[" not in text and "peak_tension" not in text and "base_shear" not in text
    assert "box, bolt 1: peak tension" in text and "box, bolt 4: peak shear" in text
    assert "kN" in text and "licensed engineer" in text and "FAILED" in text


def test_resume_runs_only_the_rest(suite_case, tmp_path):
    root, rec, scen, scenario, shared = suite_case
    sets = discover_record_sets(str(rec), units="m/s2", dt=0.01)
    out = tmp_path / "out"
    first = run_suite(scenario, sets, out, shared=shared)
    (out / "records" / "b.json").unlink()               # as if interrupted before b finished
    seen = []
    again = run_suite(scenario, sets, out, shared=shared, resume=True, on_result=seen.append)
    assert [r["record"] for r in seen] == ["b"]
    _assert_same(_numbers(first.records), _numbers(again.records))


def test_workers_reuse_the_shared_missing_mass_shapes(suite_case):
    # build once (issue contract): with the modal method the missing-mass shapes come
    # with the shared data, so a worker never factorizes K itself; and they equal a
    # fresh K^-1 (M iota - sum Gamma M phi) solve (the missing-mass definition,
    # USNRC RG 1.92 Rev. 3)
    import scipy.sparse.linalg as spla

    from groundshake.suite._run import _objects, run_record_set

    root, rec, scen, scenario, shared = suite_case
    local = {k: v for k, v in shared.items() if not k.startswith("_")}
    sets = discover_record_sets(str(rec), units="m/s2", dt=0.01)
    assert run_record_set(local, sets[0].to_dict())["status"] == "ok"
    _, model, modes = _objects(local)
    assert model._factor is None
    # the ground load L = M_ff ι_f + M_fb ι_b (effective-force method, Clough & Penzien
    # support excitation); the residual is K⁻¹(L − Σ Γₙ M φₙ) (USNRC RG 1.92 Rev. 3 missing mass)
    M, load = model.M, model.ground_load
    B = load - M @ (modes.shapes @ modes.participation)
    direct = spla.spsolve(model.K.tocsc(), B)
    np.testing.assert_allclose(shared["residual"], direct, rtol=1e-8,
                               atol=1e-12 * np.abs(direct).max())
