"""The ``modes`` command: JSON contract, table, figures, error status.

Sources: period = 1/f and cumulative effective-mass ratios (definitions, Chopra,
Dynamics of Structures §13.2); exit status 2 for bad input (common practice for Unix
tools); PNG signature (PNG specification, ISO/IEC 15948).
"""
from __future__ import annotations

import json
from pathlib import Path

import numpy as np

from _tables import block_scenario, equipment, part, sensor

from groundshake.cli import main

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "transformer-pad.toml"

SMALL = block_scenario(
    "small pad (invented)", [part("pad", (3.0, 2.0, 1.0))], element_size=0.5,
    after=[equipment("box", 1000.0, (1.5, 1.0), (1.0, 1.0), 0.5,
                     extra="anchors = [[-0.4, -0.4], [0.4, 0.4]]\n"),
           sensor("corner", (3.0, 2.0, 1.0)), "[analysis]\nmodes = 5\n"])


def test_modes_json_contract(tmp_path, capsys):
    sc = tmp_path / "small.toml"
    sc.write_text(SMALL)
    assert main(["modes", str(sc), "--json", "--plot", str(tmp_path / "fig"),
                 "--plot-modes", "1"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert set(doc["total_mass"]) == {"x", "y", "z"}
    modes = doc["modes"]
    assert len(modes) == 5
    f = np.array([m["frequency"] for m in modes])
    T = np.array([m["period"] for m in modes])
    assert np.all(np.diff(f) >= 0) and np.all(f > 0)
    # period = 1/f (definition), to round-off
    np.testing.assert_allclose(T, 1 / f, rtol=1e-12)
    cum = np.cumsum([m["effective_mass_ratio"]["x"] for m in modes])
    # cumulative share is the running sum of the ratios and never exceeds 1 (Chopra §13.2)
    np.testing.assert_allclose(cum, [m["cumulative_ratio"]["x"] for m in modes], rtol=1e-12)
    assert cum[-1] <= 1 + 1e-9
    assert doc["cautions"] and isinstance(doc["warnings"], list)
    figs = sorted((tmp_path / "fig").glob("*.png"))
    assert [p.name for p in figs] == ["mode-1.png", "model.png"]
    for p in figs:
        # PNG signature (ISO/IEC 15948)
        assert p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_modes_table_on_the_example(capsys):
    assert main(["modes", str(EXAMPLE), "--modes", "4"]) == 0
    out = capsys.readouterr().out
    assert "f [Hz]" in out and "screening" in out.lower()


def test_modes_on_a_fixed_base_state_the_mass_moving_with_the_base(tmp_path, capsys):
    # on a fixed base the base nodes' mass moves with the ground: the effective masses of
    # all modes plus that rigid mass make the driven mass (m = Σ Γ² + (m − Lᵀ M⁻¹ L);
    # Chopra §13.2 for Σ Γ² = m of a structure with every mass free), so the table's shares
    # end below 100 % by exactly the rigid share
    sc = tmp_path / "small.toml"
    sc.write_text(SMALL)
    assert main(["modes", str(sc), "--modes", "5", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    rigid, total = doc["rigid_mass"]["x"], doc["total_mass"]["x"]
    assert 0 < rigid < total
    assert doc["modes"][-1]["cumulative_ratio"]["x"] <= 1 - rigid / total + 1e-9
    assert main(["modes", str(sc), "--modes", "5"]) == 0
    out = capsys.readouterr().out
    assert f"moving rigidly with the base (needs no mode): x {rigid:.6g} kg" in out
    assert f"reach x {100 * (1 - rigid / total):.1f} %" in out


def test_modes_bad_input_exit_2(tmp_path, capsys):
    sc = tmp_path / "bad.toml"
    sc.write_text(SMALL.replace("element_size = 0.5", "element_size = -1"))
    # bad input: status 2 and one line on stderr, no traceback (common practice)
    assert main(["modes", str(sc)]) == 2
    err = capsys.readouterr().err
    assert "element_size" in err and "Traceback" not in err
    good = tmp_path / "small.toml"
    good.write_text(SMALL)
    assert main(["modes", str(good), "--modes", "0"]) == 2
    assert "--modes" in capsys.readouterr().err
