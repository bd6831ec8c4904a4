"""The spectrum method end to end: Newton for a rigid block, an oscillator reads the target.

Sources: Newton's second law (a rigid body on a moving base carries m times the ground's
acceleration; at the zero-period end every mode is rigid); the design spectrum formulas of
ASCE 7-16 §11.4.6 (computed in the tests from the formula, docs/references.md §5); the damping
factor η = √(10/(5+ξ%)) of EN 1998-1 §3.2.2.2; a single-degree-of-freedom oscillator's
peak absolute acceleration is its spectral acceleration (definition of the response
spectrum; Chopra, Dynamics of Structures, ch. 6). The blocks, targets and equipment are
invented for the tests.
"""
from __future__ import annotations

import json
import math
import warnings

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning, InputError
from groundshake.pipeline import analyse
from groundshake.scenario import Scenario

G = 9.80665
CONCRETE = {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}}
STIFF = {"c": {"youngs_modulus": 30e12, "poisson_ratio": 0.2, "density": 2400.0}}


def _scenario(*, motion, materials=CONCRETE, equipment=(), analysis=None, base_dir=None,
              support=None):
    d = {"title": "block (invented)", "materials": materials,
         "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [2.0, 2.0, 1.0]}],
         "mesh": {"element_size": 0.5},
         "support": support or {"kind": "fixed"},
         "sensors": [{"name": "top", "at": [1.0, 1.0, 1.0]}],
         "equipment": list(equipment),
         "motion": motion,
         "analysis": {"method": "spectrum", "cutoff_hz": 50.0, **(analysis or {})},
         "floor_spectra": {"damping_percent": [5], "periods": {"min": 0.05, "max": 1.0,
                                                                "count": 8}}}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        return Scenario.from_dict(d, base_dir=base_dir)


def _run(scen):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        return analyse(scen, progress=False)


def _flat_zpa_table(tmp_path, zpa_g=0.5):
    # an invented design spectrum with the usual rigid end: flat at the ZPA up to 33 Hz
    p = tmp_path / "design.csv"
    p.write_text(f"0,{zpa_g}\n0.03,{zpa_g}\n0.1,1.2\n0.5,1.2\n2.0,0.3\n", encoding="utf-8")
    return p


@pytest.mark.parametrize("rule", ["srss", "100-40-40"])
def test_rigid_block_base_shear_is_mass_times_zpa(tmp_path, rule):
    table = _flat_zpa_table(tmp_path, 0.5)
    eq = {"name": "box", "mass": 3000.0, "mount": [1.0, 1.0], "footprint": [0.8, 0.8],
          "cg_height": 0.5}
    scen = _scenario(motion={"target": table.name}, base_dir=tmp_path, equipment=[eq],
                     analysis={"direction_combination": rule})
    res = _run(scen)
    f1 = res.summary["modes"]["modes"][0]["frequency"]
    assert f1 > 40.0          # precondition: every mode on the flat (rigid) end of the table
    m = 2.0 * 2.0 * 1.0 * 2400.0 + 3000.0
    pk = res.summary["peaks"]
    zpa = 0.5 * G
    # Newton: a rigid body carries m × ZPA (x, y full; z at the default 2/3 fraction,
    # USNRC RG 1.60 / ASCE 4 long-period ratio, from memory); nothing couples the directions
    # of a symmetric block, so SRSS and 100-40-40 agree
    assert pk["base_shear"]["x"] == pytest.approx(m * zpa, rel=1e-6)
    assert pk["base_shear"]["y"] == pytest.approx(m * zpa, rel=1e-6)
    assert pk["base_axial"] == pytest.approx(m * zpa * 2.0 / 3.0, rel=1e-6)
    # the equipment moves with the ground: its acceleration is the ZPA (rigid body)
    a = res.summary["equipment"]["box"]["peak_absolute_acceleration"]
    assert a["x"] == pytest.approx(zpa, rel=1e-6)
    assert a["z"] == pytest.approx(zpa * 2.0 / 3.0, rel=1e-6)


@pytest.mark.parametrize("f_hz, xi_pct", [(5.0, 5.0), (1.0 / 1.2, 5.0), (5.0, 2.0), (12.0, 5.0)])
def test_flexible_equipment_on_rigid_base_reads_the_target(f_hz, xi_pct):
    sds, sd1, tl = 1.0, 0.6, 8.0
    eq = {"name": "unit", "mass": 500.0, "mount": [1.0, 1.0], "footprint": [0.6, 0.6],
          "cg_height": 0.6, "frequency_hz": [f_hz, f_hz, 30.0], "damping_percent": xi_pct}
    scen = _scenario(motion={"target": f"asce7:sds={sds},sd1={sd1},tl={tl}",
                             "vertical_fraction": 0.0},
                     materials=STIFF, equipment=[eq])
    res = _run(scen)
    T = 1.0 / f_hz
    t0, ts = 0.2 * sd1 / sds, sd1 / sds
    # ASCE 7-16 §11.4.6, written out here: ramp, plateau, SD1/T, SD1·TL/T²
    sa = (sds * (0.4 + 0.6 * T / t0) if T < t0 else sds if T <= ts
          else sd1 / T if T <= tl else sd1 * tl / T ** 2)
    eta = math.sqrt(10.0 / (5.0 + xi_pct))         # EN 1998-1 §3.2.2.2 damping factor
    a = res.summary["equipment"]["unit"]["peak_absolute_acceleration"]
    # (below T0 the mode is stiffer than the spectrum's peak: rigid share α = ZPA/Sa and
    # periodic share √(1 − α²) (Lindley & Yow 1980) add up to √((α·Sa)² + (1 − α²)·Sa²) = Sa)
    # definition of the response spectrum: an oscillator on the ground reads Sa(T, ξ)
    assert a["x"] == pytest.approx(sa * eta * G, rel=1e-5)
    assert a["y"] == pytest.approx(sa * eta * G, rel=1e-5)


def test_spectrum_method_needs_a_target():
    from groundshake._errors import ScenarioError
    with pytest.raises(ScenarioError, match="motion.target"):
        _scenario(motion={"vertical_fraction": 0.5})


def test_spectrum_method_refuses_a_given_motion():
    from groundshake.dynamics import motion_from_arrays
    scen = _scenario(motion={"target": "asce7:sds=1.0,sd1=0.6,tl=8"})
    with pytest.raises(InputError, match="spectrum"):
        analyse(scen, motion=motion_from_arrays({"x": np.zeros(10)}, 0.01), progress=False)


def test_summary_keys_and_notes(tmp_path):
    from groundshake.pipeline import write_run
    eq = {"name": "unit", "mass": 500.0, "mount": [1.0, 1.0], "footprint": [0.6, 0.6],
          "cg_height": 0.6, "frequency_hz": [8.0, 8.0, 30.0],
          "anchors": [[-0.2, -0.2], [0.2, -0.2], [0.2, 0.2], [-0.2, 0.2]],
          "capacity": {"tension": 1e4, "shear": 1e4}}
    scen = _scenario(motion={"target": "en1998:type=1,ground=C,ag=0.3",
                             "target_z": "en1998:type=2,ground=C,ag=0.2"}, equipment=[eq],
                     support={"kind": "soil", "shear_wave_velocity": 250.0,
                              "poisson_ratio": 0.33, "density": 1900.0})
    res = _run(scen)
    s = res.summary
    # the keys of the output contract (DESIGN.md) that a peak can fill
    for k in ("x", "y"):
        assert s["peaks"]["base_shear"][k] > 0 and s["peaks"]["overturning_moment"][k] > 0
    assert s["peaks"]["base_axial"] > 0 and s["peaks"]["von_mises"] > 0
    assert s["sensors"]["top"]["peak_relative_displacement"]["x"] > 0
    b = s["equipment"]["unit"]["anchors"][0]
    assert b["peak_tension"] >= 0 and b["peak_shear"] > 0
    assert any("signs" in a and "simultaneity" in a for a in s["analysis"]["assumptions"])
    # EN 1998-1 §3.2.2.2: S·ag for type 1 ground C, 1.15 × 0.3 g; type 2 ground C 1.5 × 0.2 g
    assert s["analysis"]["zero_period_acceleration"]["x"] == pytest.approx(1.15 * 0.3 * G)
    assert s["analysis"]["zero_period_acceleration"]["z"] == pytest.approx(1.5 * 0.2 * G)
    out = write_run(res, tmp_path / "run")
    names = {p.name for p in out.iterdir()}
    assert "summary.json" in names and "report.html" in names
    assert "histories.csv" not in names          # no time histories in a spectrum run
    back = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert back["analysis"]["method"] == "spectrum"


def test_bad_vertical_target_names_its_key():
    from groundshake._errors import ScenarioError
    # ASCE 7-16 §11.4.6 needs SD1 > 0 (the formula divides by SDS and uses SD1/T)
    with pytest.raises(ScenarioError, match="motion.target_z"):
        _scenario(motion={"target": "asce7:sds=1.0,sd1=0.6,tl=8",
                          "target_z": "asce7:sds=1.0,sd1=0,tl=8"})


def test_run_command_with_method_spectrum(tmp_path):
    from groundshake.cli import main
    src = tmp_path / "s.toml"
    src.write_text(
        'title = "block (invented)"\n[motion]\ntarget = "asce7:sds=0.5,sd1=0.3,tl=8"\n'
        '[materials.c]\nyoungs_modulus = 30e9\npoisson_ratio = 0.2\ndensity = 2400\n'
        '[[parts]]\nname = "b"\nmaterial = "c"\norigin = [0, 0, 0]\nsize = [2.0, 2.0, 1.0]\n'
        '[mesh]\nelement_size = 0.5\n[support]\nkind = "fixed"\n', encoding="utf-8")
    out = tmp_path / "out"
    assert main(["run", str(src), "-o", str(out), "--method", "spectrum", "--quiet",
                 "--no-report"]) == 0
    s = json.loads((out / "summary.json").read_text(encoding="utf-8"))
    assert s["analysis"]["method"] == "spectrum"
    # ASCE 7-16 §11.4.6: ZPA = 0.4·SDS; a concrete block this small is rigid on a fixed
    # base, so its base shear is close to m·ZPA (Newton); the ramp above T = 0 adds a little
    m = 2.0 * 2.0 * 1.0 * 2400.0
    assert s["peaks"]["base_shear"]["x"] == pytest.approx(m * 0.4 * 0.5 * G, rel=0.02)


def test_time_history_of_a_target_only_motion_says_what_to_do():
    scen = _scenario(motion={"target": "asce7:sds=1.0,sd1=0.6,tl=8"},
                     analysis={"method": "modal"})
    with pytest.raises(InputError, match="spectrum"):
        analyse(scen, progress=False)


def test_spectrum_compatible_motions_give_floor_spectra_and_a_side_by_side(tmp_path):
    from groundshake.pipeline import write_run
    eq = {"name": "unit", "mass": 500.0, "mount": [1.0, 1.0], "footprint": [0.6, 0.6],
          "cg_height": 0.6, "frequency_hz": [8.0, 8.0, 30.0]}
    scen = _scenario(motion={"target": "asce7:sds=1.0,sd1=0.6,tl=8"}, equipment=[eq],
                     materials=STIFF, analysis={"spectrum_motions": 2})
    res = _run(scen)
    side = res.summary["analysis"]["spectrum_motions"]
    assert side["n"] == 2 and side["comparison"]
    # matching (groundshake.matching) converges to its default 5 % target within the band;
    # 15 % allows for the odd period the matcher leaves above it (as its report states)
    assert side["largest_match_misfit"] < 0.15
    row = next(r for r in side["comparison"] if r["quantity"] == "unit acceleration x [m/s2]")
    # an oscillator on a rigid base: its mean time-history peak is near the spectrum's Sa
    # (definition of the response spectrum; ASCE 7-16 §11.4.6 plateau SDS = 1.0 g at 0.125 s);
    # two matched motions of a 5 % match scatter by several per cent
    assert row["spectrum"] == pytest.approx(1.0 * G, rel=1e-3)
    assert row["time_history_mean"] == pytest.approx(1.0 * G, rel=0.10)
    fl = res.summary["floor_spectra"]["points"]["unit mount"]["x"]["5%"]
    # on a rigid base the floor spectrum is the ground's: its peak is the plateau SDS
    # (ASCE 7-16 §11.4.6) within the match tolerance and the 15 % broadening's envelope
    assert fl["peak_psa"] == pytest.approx(1.0 * G, rel=0.15)
    out = write_run(res, tmp_path / "run")
    lines = (out / "floor_spectra.csv").read_text(encoding="utf-8").splitlines()
    # long format of the output contract: point, direction, damping [ratio], period, psa...
    assert lines[0] == "point,direction,damping [ratio],period [s],psa [m/s2],psa broadened [m/s2]"
    assert any(ln.startswith("unit mount,x,0.05,") for ln in lines[1:])
    assert "Side by side" in (out / "report.html").read_text(encoding="utf-8")


def test_soil_cases_stability_and_interaction_by_the_spectrum_method():
    eq = {"name": "unit", "mass": 500.0, "mount": [1.0, 1.0], "footprint": [0.6, 0.6],
          "cg_height": 0.6, "frequency_hz": [8.0, 8.0, 30.0],
          "anchors": [[-0.2, -0.2], [0.2, -0.2], [0.2, 0.2], [-0.2, 0.2]],
          "capacity": {"tension": 1e4, "shear": 1e4}}
    soil = {"kind": "soil", "shear_wave_velocity": 250.0, "poisson_ratio": 0.33,
            "density": 1900.0, "variation": 0.5, "friction_coefficient": 0.5}
    res = _run(_scenario(motion={"target": "asce7:sds=1.0,sd1=0.6,tl=8"}, equipment=[eq],
                         support=soil))
    s = res.summary
    assert [c["name"] for c in s["soil_cases"]] == ["lower", "best", "upper"]
    # the envelope over the cases governs (ASCE 4-16 §5.1.7 practice, from memory)
    assert s["peaks"]["base_shear"]["x"] == pytest.approx(
        max(c["peaks"]["base_shear"]["x"] for c in s["soil_cases"]))
    st = s["stability"]
    # sliding FS = μ·N/|V| of rigid-block statics (common practice); with the peaks taken
    # together at their worst signs: N = W − Fz, |V| = √(Vx² + Vy²) for each case
    best = next(c for c in s["soil_cases"] if c["name"] == "best")
    pk = best["peaks"]
    W = (2.0 * 2.0 * 1.0 * 2400.0 + 500.0) * G
    fs = 0.5 * (W - pk["base_axial"]) / math.hypot(pk["base_shear"]["x"], pk["base_shear"]["y"])
    assert best["stability"]["sliding"]["min_safety_factor"] == pytest.approx(fs, rel=1e-9)
    assert st["sliding"]["min_safety_factor"] <= best["stability"]["sliding"]["min_safety_factor"]
    b = s["equipment"]["unit"]["anchors"][0]
    # 5/3-power interaction (T/Tc)^(5/3) + (V/Vc)^(5/3) (ACI 318-19 R17.8, docs/references.md):
    # at least that of the peak tension alone and at most the sum at both peaks
    lo = (b["peak_tension"] / 1e4) ** (5 / 3)
    hi = lo + (b["peak_shear"] / 1e4) ** (5 / 3)
    assert lo - 1e-12 <= b["interaction_ratio"] <= hi + 1e-12
    assert "time_of_peak_tension" not in b
