"""The output contract (results/_schema.py) and the display units (report/_units.py).

Sources: NIST SP 811 (2008), Appendix B, exact definitions: 1 in = 0.0254 m,
1 ft = 0.3048 m, 1 lbf = 4.4482216152605 N, 1 lb = 0.45359237 kg; standard gravity
9.80665 m/s² (3rd CGPM, 1901); 1 ksf = 1000 lbf/ft² and 1 psi = 1 lbf/in² (definitions);
the summary keys of the project's DESIGN contract (checked as an interface: each must
have a quantity kind); RFC 4180 for reading the CSV headers back (Python's csv module).
"""
from __future__ import annotations

import csv
import json

import numpy as np
import pytest

from groundshake.report._units import SYSTEMS, display_unit, fmt, to_display
from groundshake.results._schema import (COLUMNS, FILES, SUMMARY_KINDS, UNITS, header, iter_values,
                                         kind_of, parse_header)

from _report_fixture import demo_run

#: The summary.json keys every run must carry (DESIGN contract, "run SCENARIO -o DIR").
DESIGN_KEYS = {
    "peaks.base_shear.x": "force", "peaks.base_shear.y": "force", "peaks.base_axial": "force",
    "peaks.overturning_moment.x": "moment", "peaks.overturning_moment.y": "moment",
    "peaks.von_mises": "stress", "peaks.principal_tension": "stress",
    "sensors.NAME.peak_absolute_acceleration.x": "acceleration",
    "sensors.NAME.peak_relative_displacement.z": "displacement",
    "equipment.NAME.peak_absolute_acceleration.y": "acceleration",
    "equipment.NAME.anchors.0.peak_tension": "force",
    "equipment.NAME.anchors.0.peak_shear": "force",
    "stability.sliding.min_safety_factor": "ratio",
    "stability.overturning.min_safety_factor": "ratio",
    "stability.bearing.peak_pressure": "pressure",
    "soil_cases.0.shear_modulus": "modulus",
}


@pytest.mark.parametrize("path,kind", sorted(DESIGN_KEYS.items()))
def test_design_keys_have_their_quantity_kind(path, kind):
    assert kind_of(path) == kind                                # DESIGN contract, by meaning


def test_more_specific_pattern_wins():
    # base.peaks.Fx.time is a time although base.peaks.Fx.* are forces (the contract's rule)
    assert kind_of("base.peaks.Fx.time") == "time"
    assert kind_of("base.peaks.Fx.value") == "force"
    assert kind_of("base.peaks.Mz.signed") == "moment"
    assert kind_of("no.such.key") is None


def test_every_kind_has_an_si_unit_and_a_display_unit():
    kinds = set(SUMMARY_KINDS.values()) | {c.kind for cols in COLUMNS.values() for c in cols}
    for k in kinds:
        assert k in UNITS, k
        for system in SYSTEMS:
            display_unit(k, system)                             # never raises for a known kind


def test_header_round_trip():
    h = header("psa broadened", "acceleration")
    assert h == "psa broadened [m/s2]"                          # the contract's SI unit
    assert parse_header(h) == ("psa broadened", "m/s2")
    assert header("direction", "text") == "direction"


def test_us_factors_are_the_exact_definitions():
    # NIST SP 811 App. B: 1 kip = 4448.2216152605 N
    assert to_display(4448.2216152605, "force", "us") == pytest.approx(1.0, rel=1e-15)
    assert to_display(4448.2216152605 * 0.3048, "moment", "us") == pytest.approx(1.0, rel=1e-15)
    assert to_display(0.0254, "displacement", "us") == pytest.approx(1.0, rel=1e-15)
    assert to_display(4.4482216152605 / 0.0254 ** 2, "stress", "us") == pytest.approx(1.0, rel=1e-14)
    assert to_display(4448.2216152605 / 0.3048 ** 2, "pressure", "us") == pytest.approx(1.0, rel=1e-14)
    assert to_display(9.80665, "acceleration", "us") == pytest.approx(1.0, rel=1e-15)  # 1 g
    # SI engineering units: kN, kN·m, mm, MPa, kPa; damping ratio 0.05 = 5 %
    assert to_display(1000.0, "force") == 1.0 and to_display(1000.0, "moment") == 1.0
    assert to_display(0.001, "displacement") == 1.0 and to_display(1e6, "stress") == 1.0
    assert to_display(1e3, "pressure") == 1.0 and to_display(0.05, "damping") == pytest.approx(5.0)
    assert display_unit("force", "us") == "kip" and display_unit("moment", "si") == "kN·m"


def test_round_off_is_shown_as_zero():
    # rule of issue 16: |value| < 1e-9 × the largest of its kind is round-off
    assert fmt(3.095e-8, "force", ref=3.48e5) == "0"
    assert fmt(7.2e-27, "ratio", ref=1.0) == "0"
    assert fmt(0.293, "ratio", ref=1.0) == "0.293"              # 3 significant digits
    assert fmt(259835.02, "force") == "260"                     # 259.8 kN to 3 digits
    assert fmt(1234567.0, "force") == "1\u202f235"             # whole kN kept whole
    assert fmt(None, "force") == "—" and fmt(float("nan"), "force") == "—"
    assert fmt(0.05, "damping", unit=True) == "5%"


def _summary_numbers(summary: dict):
    for path, v in iter_values({k: x for k, x in summary.items() if k != "scenario"}):
        if isinstance(v, (int, float)) and not isinstance(v, bool):
            yield path, v
        elif isinstance(v, list) and v and all(isinstance(x, (int, float)) and
                                               not isinstance(x, bool) for x in v):
            yield path, v[0]


@pytest.mark.slow
def test_every_number_of_the_demo_summary_has_a_kind():
    status, _, folder = demo_run()
    assert status == 0
    out = folder / "results"
    s = json.loads((out / FILES["summary"]).read_text())
    missing = sorted({".".join(p) for p, _ in _summary_numbers(s) if kind_of(p) is None})
    assert missing == [], missing                               # units come from the contract
    assert s["schema"]["version"] >= 2
    for name in ("ground_spectra", "floor_spectra", "modes", "element_peaks"):
        with open(out / FILES[name], newline="") as fh:
            head = next(csv.reader(fh))
        want = [c.header for c in COLUMNS[name]]
        assert head[:len(want)] == want, name                   # writers use the contract
    mesh = json.loads((out / FILES["mesh"]).read_text())
    with open(out / FILES["element_peaks"], newline="") as fh:
        n_el = sum(1 for _ in csv.reader(fh)) - 1
    assert len(mesh["cells"]) == n_el                           # one cell per element row
    xs, ys, zs = (np.asarray(mesh["lines"][a]) for a in "xyz")
    with open(out / FILES["mode_shapes"], newline="") as fh:
        rows = list(csv.reader(fh))
    nodes = np.array([[float(v) for v in r[:3]] for r in rows[1:]])
    idx = np.asarray(mesh["node_cells"])
    # each node sits on the grid lines mesh.json names for it (structured grid)
    np.testing.assert_allclose(np.column_stack([xs[idx[:, 0]], ys[idx[:, 1]], zs[idx[:, 2]]]),
                               nodes, atol=1e-9)


def test_every_display_factor_agrees_with_pint():
    """Each display unit's factor equals pint's own conversion of the contract's SI unit
    (pint as an independent units library)."""
    pint = pytest.importorskip("pint")
    ureg = pint.UnitRegistry()
    spell = {"kN·m": "kN*m", "kip·ft": "kip*ft", "rad/s²": "rad/s**2", "kg/m³": "kg/m**3",
             "lb/ft³": "lb/ft**3", "m²": "m**2", "ft²": "ft**2", "kN·m/rad": "kN*m/rad",
             "kip·ft/rad": "kip*ft/rad", "kN·s/m": "kN*s/m", "kip·s/in": "kip*s/inch",
             "kN·m·s/rad": "kN*m*s/rad", "kip·ft·s/rad": "kip*ft*s/rad", "in": "inch",
             "in/s": "inch/s", "g": "standard_gravity", "t": "tonne", "kN/mm": "kN/mm",
             "kip/in": "kip/inch", "ksf": "kip/ft**2", "lb": "lb", "psi": "psi", "ksi": "ksi"}
    si_spell = {"N*m": "N*m", "m/s2": "m/s**2", "rad/s2": "rad/s**2", "kg/m3": "kg/m**3",
                "m2": "m**2", "N*m/rad": "N*m/rad", "N*s/m": "N*s/m", "N*m*s/rad": "N*m*s/rad"}
    checked = 0
    for system, table in SYSTEMS.items():
        for kind, (unit, factor) in table.items():
            si = UNITS.get(kind, "")
            if not unit or not si or unit in ("%",) or "^" in unit or si == "ratio":
                continue
            q = ureg.Quantity(1.0, si_spell.get(si, si)).to(spell.get(unit, unit))
            assert q.magnitude == pytest.approx(factor, rel=1e-12), (system, kind, unit)
            checked += 1
    assert checked >= 30


def test_reader_gives_declared_paths_and_refuses_others():
    """The contract reader: a declared path gives its value (None where this summary lacks
    it), list entries by index, and a path the contract does not declare is an error (the
    contract's own rule: the report reads results only through it)."""
    from groundshake.results._schema import read, read_list, read_number, read_table
    summary = {"peaks": {"base_shear": {"x": 12.5}},
               "equipment": {"pump": {"anchors": [{"peak_tension": 3.0e3}]}},
               "stability": {"sliding": {"min_safety_factor": float("nan")}}}
    assert read(summary, "peaks", "base_shear", "x") == 12.5
    assert read(summary, "peaks", "base_shear", "y") is None
    assert read_number(summary, "equipment", "pump", "anchors", 0, "peak_tension") == 3.0e3
    assert read_number(summary, "equipment", "pump", "anchors", 1, "peak_tension") is None
    assert read_number(summary, "stability", "sliding", "min_safety_factor") is None  # NaN
    assert read_list(summary, "equipment", "pump", "anchors") == [{"peak_tension": 3.0e3}]
    assert read_table(summary, "base", "contact") == {}
    with pytest.raises(KeyError):
        read(summary, "peaks", "base_shear_x")


def test_report_reads_only_declared_paths():
    """Every summary.json path the report's modules read through the contract reader is a
    path of the contract (names held in variables may stand for any key)."""
    import ast
    import fnmatch
    from pathlib import Path

    from groundshake.results._schema import SUMMARY_GROUPS

    patterns = [tuple(p.split(".")) for p in (*SUMMARY_KINDS, *SUMMARY_GROUPS)]
    report = Path(__file__).resolve().parents[2] / "groundshake" / "report"
    checked = 0
    for path in sorted(report.glob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if not (isinstance(node, ast.Call) and isinstance(node.func, ast.Name)
                    and node.func.id in ("read", "read_number", "read_table", "read_list")):
                continue
            keys = node.args[1:]
            if any(isinstance(k, ast.Starred) for k in keys):
                continue                       # a local helper passing a key path on
            keys = [str(k.value) if isinstance(k, ast.Constant) else None for k in keys]
            assert any(len(p) == len(keys) and all(k is None or fnmatch.fnmatchcase(k, q)
                                                   for k, q in zip(keys, p))
                       for p in patterns), (path.name, node.lineno, keys)
            checked += 1
    assert checked >= 40
