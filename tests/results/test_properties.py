"""Properties every linear elastic time-history analysis must have.

Sources: superposition and proportionality of linear systems (Chopra, Dynamics of
Structures, §1.8 and §6.1: the response to a sum of excitations is the sum of the
responses); time invariance of a linear system with constant coefficients (the
response to a delayed excitation is the delayed response — any signals-and-systems
text, e.g. Oppenheim & Willsky §1.6); results that cannot depend on the order in which
the same parts and equipment are listed (a finite-element model is the same model
under any numbering — common practice); and deterministic output (same inputs, same
bytes: the hardening issue's contract). Motions here are invented test signals.
"""
from __future__ import annotations

import json
import math
import warnings

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning
from groundshake.dynamics import motion_from_arrays
from groundshake.model import build_model
from groundshake.pipeline import analyse
from groundshake.scenario import parse_scenario_text
from groundshake.suite import flatten_scalars

from _tables import mesh, sensor, soil

PARTS = {
    "mat": '[[parts]]\nname = "mat"\nmaterial = "c"\norigin = [0, 0, 0]\nsize = [3.0, 2.0, 0.5]\n',
    "plinth": '[[parts]]\nname = "plinth"\nmaterial = "c"\norigin = [1.0, 0.5, 0.5]\n'
              'size = [1.0, 1.0, 0.5]\n',
}
EQUIPMENT = {
    "pump": '[[equipment]]\nname = "pump"\nmass = 800.0\nmount = [1.5, 1.0]\n'
            'footprint = [0.6, 0.6]\ncg_height = 0.5\nfrequency_hz = [8.0, 9.0, 25.0]\n'
            'anchors = [[-0.25, -0.25], [0.25, -0.25], [0.25, 0.25], [-0.25, 0.25]]\n',
    "panel": '[[equipment]]\nname = "panel"\nmass = 300.0\nmount = [0.4, 0.4]\n'
             'footprint = [0.4, 0.4]\ncg_height = 0.8\n'
             'anchors = [[-0.15, -0.15], [0.15, 0.15]]\n',
}
HEAD = ('title = "property test block (invented)"\n'
        "[materials.c]\nyoungs_modulus = 25e9\npoisson_ratio = 0.2\ndensity = 2400\n"
        + mesh(0.5) + soil(200.0, 0.3) + sensor("corner", (3, 2, 0.5)) + """[analysis]
modes = 12
[floor_spectra]
damping_percent = [5]
periods = { min = 0.05, max = 2.0, count = 10 }
""")


def _scenario(part_order=("mat", "plinth"), equipment_order=("pump", "panel")):
    text = HEAD + "".join(PARTS[p] for p in part_order) + "".join(EQUIPMENT[e] for e in equipment_order)
    return parse_scenario_text(text, source="props.toml")


def _signal(n, dt, f, seed):
    # invented test motion: a windowed sine with seeded noise [m/s²]
    t = np.arange(n) * dt
    rng = np.random.default_rng(seed)
    return (np.sin(2 * math.pi * f * t) + 0.3 * rng.standard_normal(n)) * np.sin(math.pi * t / t[-1]) ** 2


@pytest.fixture(scope="module")
def case():
    scen = _scenario()
    model = build_model(scen)
    dt, n = 0.01, 600
    acc = {"x": _signal(n, dt, 2.5, 1), "y": 0.8 * _signal(n, dt, 4.0, 2),
           "z": 0.5 * _signal(n, dt, 7.0, 3)}
    return scen, model, dt, acc


def _run(scen, model, acc, dt, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        return analyse(scen, motion=motion_from_arrays(acc, dt), model=model, progress=False,
                       **kw)


def _history_columns(res, *words):
    return {k: np.asarray(v) for k, v in res.histories.items()
            if all(w in k for w in words)}


def test_superposition_of_components(case):
    # Chopra §1.8: response to x + y + z = sum of the responses to each alone
    scen, model, dt, acc = case
    both = _run(scen, model, acc, dt)
    parts = [_run(scen, model, {d: acc[d]}, dt) for d in ("x", "y", "z")]
    for key, v in both.histories.items():
        # bolt tension and contact pressure carry the constant dead load (affine in the
        # record) and bolt shear is a vector magnitude: superposition holds for the rest
        if key.startswith("time") or "bolt" in key or "anchor" in key or "pressure" in key:
            continue
        total = sum(np.asarray(p.histories[key]) for p in parts)
        scale = max(np.max(np.abs(v)), 1e-300)
        np.testing.assert_allclose(total, v, rtol=0, atol=1e-9 * scale, err_msg=key)


def test_delay_shifts_peaks_and_keeps_values(case):
    # time invariance (Oppenheim & Willsky §1.6): delaying the record by k steps
    # delays every response by k steps and leaves every peak value unchanged
    scen, model, dt, acc = case
    k = 150
    later = {d: np.concatenate([np.zeros(k), a]) for d, a in acc.items()}
    a = _run(scen, model, acc, dt).summary
    b = _run(scen, model, later, dt).summary
    for name in ("corner",):
        for d in "xyz":
            pa = a["sensors"][name]["peak_absolute_acceleration"][d]
            pb = b["sensors"][name]["peak_absolute_acceleration"][d]
            assert pb == pytest.approx(pa, rel=1e-9)
            ta = a["sensors"][name]["time_of_peak_absolute_acceleration"][d]
            tb = b["sensors"][name]["time_of_peak_absolute_acceleration"][d]
            assert tb == pytest.approx(ta + k * dt, abs=1e-9)
    for d in "xy":
        assert b["peaks"]["base_shear"][d] == pytest.approx(a["peaks"]["base_shear"][d], rel=1e-9)


def test_order_of_parts_and_equipment_does_not_matter(case):
    # the same model under another numbering (common practice): same results by name
    scen, model, dt, acc = case
    ref = _run(scen, model, acc, dt).summary
    other = _scenario(part_order=("plinth", "mat"), equipment_order=("panel", "pump"))
    res = _run(other, build_model(other), acc, dt).summary
    for section in ("sensors", "equipment"):
        a = flatten_scalars({k: ref[section][k] for k in sorted(ref[section])})
        b = flatten_scalars({k: res[section][k] for k in sorted(res[section])})
        assert a.keys() == b.keys()
        big = max(abs(v) for v in a.values())
        for key in a:
            assert b[key] == pytest.approx(a[key], rel=1e-6, abs=1e-9 * big), (section, key)
    for d in "xy":
        assert res["peaks"]["base_shear"][d] == pytest.approx(ref["peaks"]["base_shear"][d],
                                                              rel=1e-6)


def test_two_runs_write_identical_bytes(case, tmp_path):
    # the hardening contract: same inputs, byte-identical summary.json but for the date
    from groundshake.results import write_outputs

    scen, model, dt, acc = case
    docs = []
    for k in range(2):
        out = write_outputs(_run(scen, model, acc, dt), tmp_path / f"run{k}")
        doc = json.loads((out / "summary.json").read_text())
        doc["provenance"].pop("date", None)
        doc["provenance"].pop("timings_s", None)     # wall-clock times of the stages
        docs.append(json.dumps(doc, sort_keys=True))
        csvs = sorted(p.name for p in out.glob("*.csv"))
        assert csvs
    assert docs[0] == docs[1]
    for name in csvs:
        assert (tmp_path / "run0" / name).read_bytes() == (tmp_path / "run1" / name).read_bytes()
