"""Scenario validation: every bad input is one ScenarioError naming file:line and key.

Sources of the limits checked (each also named beside its case):
- isotropic linear elasticity: E > 0, ρ > 0, and 0 ≤ ν < 0.5, the upper bound being
  incompressibility (bulk modulus E/3(1−2ν) → ∞) (common practice; e.g. Timoshenko &
  Goodier, Theory of Elasticity, §5);
- viscous damping ratio 0 ≤ ξ < 100 % (100 % is critical damping; Chopra, Dynamics of
  Structures, §2.2);
- Rayleigh damping needs two distinct frequencies (Chopra §11.4);
- HHT-α is unconditionally stable and second-order accurate for −1/3 ≤ α ≤ 0
  (Hilber, Hughes & Taylor 1977);
- ASCE 7-16 §13.3.1: 0 ≤ z/h ≤ 1;
- the TOML 1.0 specification (toml.io): types, tables, arrays of tables; line numbers
  of a key are those of its `key = value` line or its table header;
- the scenario contract (DESIGN.md, docs/INTERNALS.md) for key names and geometry rules
  (parts touch face to face; footprints on a top face; sensors inside the model).
"""
from __future__ import annotations

import re
import warnings

import pytest

from groundshake._errors import InputError, ScenarioError
from groundshake.scenario import load_scenario, parse_scenario_text

from _tables import block_scenario, equipment, part

BASE = block_scenario(
    "Error cases (invented)",
    [part("mat", (6, 4, 1)), part("plinth", (2, 2, 1), origin=(1, 1, 1))], element_size=0.5,
    after=["[damping]\nratio_percent = 5\n",
           equipment("pump", 2000, mount=(2, 2), footprint=(1, 1), cg_height=0.5,
                     extra="anchors = [[-0.4, -0.4], [0.4, 0.4]]\n")]) + """
[[sensors]]
name = "top"
at = [2.0, 2.0, 2.0]

[analysis]
hht_alpha = -0.1

[floor_spectra]
periods = { min = 0.02, max = 5.0, count = 100 }
"""


def _line(text: str, marker: str) -> int:
    """1-based line of the first line containing ``marker`` (found by hand, not by the loader)."""
    for i, line in enumerate(text.splitlines(), 1):
        if marker in line:
            return i
    raise LookupError(marker)


def _error(text: str, tmp_path) -> ScenarioError:
    with pytest.raises(ScenarioError) as info:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            parse_scenario_text(text, source="case.toml", base_dir=tmp_path)
    return info.value


def test_base_is_valid(tmp_path):
    s = parse_scenario_text(BASE, source="case.toml", base_dir=tmp_path)
    # Plinth 2 × 2 × 1 m on the mat: its top face is at z = 2 m (geometry, by hand).
    assert s.mount_position(0) == pytest.approx((2.0, 2.0, 2.0), abs=1e-12)


# (name, old text, new text, key path in the message, marker of the expected line, source)
CASES = [
    ("nu at 0.5", "poisson_ratio = 0.2", "poisson_ratio = 0.5",
     "materials.concrete.poisson_ratio", "poisson_ratio", "ν < 0.5 incompressibility limit"),
    ("nu negative", "poisson_ratio = 0.2", "poisson_ratio = -0.1",
     "materials.concrete.poisson_ratio", "poisson_ratio", "schema: 0 ≤ ν"),
    ("E zero", "youngs_modulus = 30e9", "youngs_modulus = 0",
     "materials.concrete.youngs_modulus", "youngs_modulus", "E > 0, elasticity"),
    ("density negative", "density = 2400", "density = -2400",
     "materials.concrete.density", "density = -2400", "ρ > 0, physics"),
    ("E as string", "youngs_modulus = 30e9", 'youngs_modulus = "30 GPa"',
     "materials.concrete.youngs_modulus", "youngs_modulus", "TOML: a string is not a number"),
    ("E infinite", "youngs_modulus = 30e9", "youngs_modulus = inf",
     "materials.concrete.youngs_modulus", "youngs_modulus", "TOML allows inf; physics does not"),
    ("element size zero", "element_size = 0.5", "element_size = 0.0",
     "mesh.element_size", "element_size", "a size is > 0"),
    ("element size missing", "element_size = 0.5", "element = \"hex8\"",
     "mesh.element_size", "[mesh]", "required key; falls back to the table header"),
    ("element choice", '[mesh]\n', '[mesh]\nelement = "hex20"\n',
     "mesh.element", "hex20", "DESIGN: hex8-incompatible or hex8"),
    ("unknown key hint", "element_size = 0.5", "elemnt_size = 0.5",
     "mesh.elemnt_size", "elemnt_size", "DESIGN: unknown keys are errors with a hint"),
    ("unknown section", "[analysis]", "[analysys]",
     "analysys", "[analysys]", "DESIGN: unknown keys are errors"),
    ("size negative", "size = [2.0, 2.0, 1.0]", "size = [2.0, -2.0, 1.0]",
     "parts[1].size", "size = [2.0, -2.0", "a length is > 0"),
    ("origin of two", "origin = [1.0, 1.0, 1.0]", "origin = [1.0, 1.0]",
     "parts[1].origin", "origin = [1.0, 1.0]", "schema: [x, y, z]"),
    ("unknown material", 'name = "plinth"\nmaterial = "concrete"', 'name = "plinth"\nmaterial = "concret"',
     "parts[1].material", '"concret"', "materials must exist"),
    ("duplicate part", 'name = "plinth"', 'name = "mat"',
     "parts[1].name", 'name = "mat"\nmaterial = "concrete"\norigin = [1.0', "names are unique"),
    ("overlapping parts", "origin = [1.0, 1.0, 1.0]", "origin = [1.0, 1.0, 0.5]",
     "parts[1]", "[[parts]]\nname = \"plinth\"", "issue 4: overlapping parts are errors"),
    ("disjoint parts", "origin = [1.0, 1.0, 1.0]", "origin = [1.0, 1.0, 1.5]",
     "parts[1]", "[[parts]]\nname = \"plinth\"", "issue 4: disjoint parts are errors"),
    ("edge contact only", "origin = [1.0, 1.0, 1.0]", "origin = [6.0, 4.0, 0.0]",
     "parts[1]", "[[parts]]\nname = \"plinth\"", "face to face, not along an edge"),
    ("sensor outside", "at = [2.0, 2.0, 2.0]", "at = [2.0, 2.0, 2.1]",
     "sensors[0].at", "at = [2.0, 2.0, 2.1]", "a sensor is in the block"),
    ("sensor above the mat, beside the plinth", "at = [2.0, 2.0, 2.0]", "at = [5.0, 3.5, 1.5]",
     "sensors[0].at", "at = [5.0, 3.5, 1.5]", "a sensor is in the block"),
    ("equipment off the top", "mount = [2.0, 2.0]", "mount = [3.0, 2.0]",
     "equipment[0].mount", "mount = [3.0, 2.0]", "footprint on a top face"),
    ("equipment beside the model", "mount = [2.0, 2.0]", "mount = [20.0, 2.0]",
     "equipment[0].mount", "mount = [20.0, 2.0]", "footprint on a top face"),
    ("equipment mass zero", "mass = 2000.0", "mass = 0",
     "equipment[0].mass", "mass = 0", "a mass is > 0"),
    ("equipment damping 100", "cg_height = 0.5", "cg_height = 0.5\ndamping_percent = 100",
     "equipment[0].damping_percent", "damping_percent = 100", "ξ < 100 %, Chopra §2.2"),
    ("frequency zero", "cg_height = 0.5", "cg_height = 0.5\nfrequency_hz = [9.0, 0.0, 20.0]",
     "equipment[0].frequency_hz", "frequency_hz", "a frequency is > 0"),
    ("dead load factor over 1", "cg_height = 0.5", "cg_height = 0.5\ndead_load_factor = 1.5",
     "equipment[0].dead_load_factor", "dead_load_factor", "a share is ≤ 1"),
    ("capacity negative", "cg_height = 0.5", "cg_height = 0.5\ncapacity = { tension = 8e4, shear = -1.0 }",
     "equipment[0].capacity.shear", "capacity", "a capacity is > 0"),
    ("fp z/h over 1", "cg_height = 0.5",
     "cg_height = 0.5\nfp = { sds = 1.0, ap = 1.0, rp = 1.5, z_over_h = 1.2 }",
     "equipment[0].fp.z_over_h", "fp =", "ASCE 7-16 §13.3.1: z/h in [0, 1]"),
    ("fp missing sds", "cg_height = 0.5", "cg_height = 0.5\nfp = { ap = 1.0, rp = 1.5 }",
     "equipment[0].fp.sds", "fp =", "ASCE 7-16 §13.3.1 needs S_DS"),
    ("duplicate equipment", "[[sensors]]",
     '[[equipment]]\nname = "pump"\nmass = 1.0\nmount = [2.0, 2.0]\nfootprint = [0.5, 0.5]\n'
     'cg_height = 0.1\n\n[[sensors]]', "equipment[1].name", 'name = "pump"\nmass = 1.0',
     "names are unique"),
    ("duplicate sensor", "[analysis]", '[[sensors]]\nname = "top"\nat = [0.0, 0.0, 0.0]\n\n[analysis]',
     "sensors[1].name", 'name = "top"\nat = [0.0, 0.0, 0.0]', "names are unique"),
    ("damping over 100", "ratio_percent = 5", "ratio_percent = 120",
     "damping.ratio_percent", "ratio_percent", "ξ < 100 %, Chopra §2.2"),
    ("rayleigh reversed", "ratio_percent = 5", "ratio_percent = 5\nrayleigh_hz = [20.0, 2.0]",
     "damping.rayleigh_hz", "rayleigh_hz", "Rayleigh from f1 < f2, Chopra §11.4"),
    ("hht too negative", "hht_alpha = -0.1", "hht_alpha = -0.5",
     "analysis.hht_alpha", "hht_alpha", "Hilber, Hughes & Taylor 1977: −1/3 ≤ α ≤ 0"),
    ("hht positive", "hht_alpha = -0.1", "hht_alpha = 0.1",
     "analysis.hht_alpha", "hht_alpha", "Hilber, Hughes & Taylor 1977: α ≤ 0"),
    ("cutoff zero", "hht_alpha = -0.1", "cutoff_hz = 0",
     "analysis.cutoff_hz", "cutoff_hz", "a frequency is > 0"),
    ("modes as float", "hht_alpha = -0.1", "modes = 12.5",
     "analysis.modes", "modes = 12.5", "a count is an integer"),
    ("periods reversed", "min = 0.02, max = 5.0", "min = 6.0, max = 5.0",
     "floor_spectra.periods.max", "periods", "min < max"),
    ("period count 1", "count = 100", "count = 1",
     "floor_spectra.periods.count", "periods", "a log range needs ≥ 2 points"),
    ("broadening 60", "[floor_spectra]", "[floor_spectra]\nbroadening_percent = 60",
     "floor_spectra.broadening_percent", "broadening_percent", "schema: 0–50 %"),
    ("soil without Vs", 'kind = "fixed"', 'kind = "soil"\npoisson_ratio = 0.3\ndensity = 1900',
     "support.shear_wave_velocity", "[support]", "soil springs need Vs (Gazetas 1991)"),
    ("soil nu 0.5", 'kind = "fixed"',
     'kind = "soil"\nshear_wave_velocity = 200\npoisson_ratio = 0.5\ndensity = 1900',
     "support.poisson_ratio", "poisson_ratio = 0.5", "ν < 0.5 incompressibility limit"),
    ("bool for number", "ratio_percent = 5", "ratio_percent = true",
     "damping.ratio_percent", "ratio_percent", "TOML: a boolean is not a number"),
    ("date for number", "ratio_percent = 5", "ratio_percent = 1979-05-27",
     "damping.ratio_percent", "ratio_percent", "TOML: a date is not a number"),
    ("mesh as a number", "[mesh]\nelement_size = 0.5", "[meshes]",
     "meshes", "[meshes]", "schema: unknown section"),
    ("motion without components", "[materials.concrete]", "[motion]\nmatch_target = false\n\n[materials.concrete]",
     "motion", "[motion]", "a motion needs at least one component"),
    ("processing lowpass below highpass", "[materials.concrete]",
     "[processing]\nhighpass_hz = 0.1\nlowpass_hz = 0.05\n\n[materials.concrete]",
     "processing.lowpass_hz", "lowpass_hz", "a band-pass needs low corner < high corner"),
    ("processing unknown key", "[materials.concrete]",
     "[processing]\nhighpas_hz = 0.1\n\n[materials.concrete]",
     "processing.highpas_hz", "highpas_hz", "DESIGN: unknown keys are errors"),
    ("taper over 25", "[materials.concrete]",
     "[processing]\ntaper_percent = 30\n\n[materials.concrete]",
     "processing.taper_percent", "taper_percent", "taper of each end at most a quarter"),
    ("huge mesh", "element_size = 0.5", "element_size = 0.002",
     "mesh.element_size", "element_size", "5 million DOFs is beyond a 2-core screening run"),
    ("huge integer", "ratio_percent = 5", "ratio_percent = 9223372036854775807",
     "damping.ratio_percent", "ratio_percent", "TOML 64-bit integer; out of range"),
]


@pytest.mark.parametrize("name, old, new, key, marker, source", CASES, ids=[c[0] for c in CASES])
def test_bad_scenario(name, old, new, key, marker, source, tmp_path):
    assert old in BASE, name
    text = BASE.replace(old, new, 1)
    e = _error(text, tmp_path)
    message = str(e)
    assert "\n" not in message  # one line (contract in DESIGN.md)
    # Line found by hand in the text: the `key = value` line, or its table header (TOML spec).
    first_marker_line = marker.split("\n")[0]
    if "\n" in marker:
        line = text[: text.index(marker)].count("\n") + 1
    else:
        line = _line(text, first_marker_line)
    assert message.startswith(f"case.toml:{line}: {key}: given "), (source, message)
    assert "; allowed " in message, source
    assert isinstance(e, InputError) and isinstance(e, ValueError)  # error hierarchy contract


def test_unknown_key_suggests_the_right_one(tmp_path):
    e = _error(BASE.replace("element_size = 0.5", "elemnt_size = 0.5"), tmp_path)
    # difflib closest match (Python standard library), as DESIGN asks ("did you mean").
    assert "did you mean 'element_size'?" in str(e)


def test_missing_record_names_key_and_resolved_path(tmp_path):
    text = BASE + '\n[motion]\nx = { file = "rec/missing.mseed" }\n'
    e = _error(text, tmp_path)
    # Task contract: name the key motion.x.file and the resolved path.
    assert str(e).startswith(f"case.toml:{_line(text, 'missing.mseed')}: motion.x.file: "
                             "given 'rec/missing.mseed'")
    assert str(tmp_path / "rec" / "missing.mseed") in str(e)


def test_record_that_is_a_folder(tmp_path):
    (tmp_path / "rec").mkdir()
    e = _error(BASE + '[motion]\nz = { file = "rec" }\n', tmp_path)
    assert "motion.z.file" in str(e) and "a folder" in str(e)  # a folder is not a record


def test_units_are_checked_and_canonical(tmp_path):
    (tmp_path / "a.mseed").write_bytes(b"")
    s = parse_scenario_text(BASE + '[motion]\nx = { file = "a.mseed", units = "gal" }\n',
                            source="case.toml", base_dir=tmp_path)
    assert s.motion.x.units == "cm/s2"  # 1 Gal = 1 cm/s² (CGS unit, common practice)
    text = BASE + '[motion]\nx = { file = "a.mseed", units = "furlongs" }\n'
    e = _error(text, tmp_path)
    assert str(e).startswith(f"case.toml:{_line(text, 'furlongs')}: motion.x.units: given 'furlongs'")


def test_match_target_needs_target(tmp_path):
    (tmp_path / "a.mseed").write_bytes(b"")
    text = BASE + '[motion]\nx = { file = "a.mseed" }\nmatch_target = true\n'
    e = _error(text, tmp_path)
    assert str(e).startswith(f"case.toml:{_line(text, 'match_target')}: motion.match_target: given true")


def test_target_spec_and_target_file(tmp_path):
    (tmp_path / "a.mseed").write_bytes(b"")
    (tmp_path / "t.csv").write_text("0.1,1.0\n1.0,0.5\n")
    tail = '[motion]\nx = { file = "a.mseed" }\ntarget = "TARGET"\n'
    s = parse_scenario_text(BASE + tail.replace("TARGET", "asce7:sds=1.0,sd1=0.6,tl=8"),
                            source="c", base_dir=tmp_path)
    assert s.motion.target == "asce7:sds=1.0,sd1=0.6,tl=8"  # a spec is kept as written
    s = parse_scenario_text(BASE + tail.replace("TARGET", "t.csv"), source="c", base_dir=tmp_path)
    assert s.motion.target == str((tmp_path / "t.csv").resolve())  # a file is resolved
    e = _error(BASE + tail.replace("TARGET", "nope.csv"), tmp_path)
    assert "motion.target" in str(e)


@pytest.mark.parametrize("text", [
    "title = \n",
    BASE.replace("size = [6.0, 4.0, 1.0]", "size = [6.0, 4.0, 1.0"),
    BASE + "\n[mesh]\nelement_size = 1.0\n",
    "a = 1\na = 2\n",
    BASE.replace('[[parts]]\nname = "mat"', '[parts]\nname = "mat"'),
])
def test_toml_syntax_errors_give_the_line(text, tmp_path):
    import tomllib
    with pytest.raises(tomllib.TOMLDecodeError) as ref:
        tomllib.loads(text)
    # The line is the one Python's tomllib reports (an independent TOML 1.0 parser; duplicate
    # tables and keys are invalid TOML).
    line = re.search(r"at line (\d+)", str(ref.value)).group(1)
    e = _error(text, tmp_path)
    assert str(e).startswith(f"case.toml:{line}: TOML syntax error")
    assert "\n" not in str(e)


def test_single_parts_table_is_refused(tmp_path):
    one = BASE.replace('[[parts]]\nname = "plinth"\nmaterial = "concrete"\norigin = [1.0, 1.0, 1.0]\n'
                       'size = [2.0, 2.0, 1.0]\n', "")
    one = one.replace("[[parts]]", "[parts]").replace("mount = [2.0, 2.0]", "mount = [2.0, 2.0]")
    one = one.replace("at = [2.0, 2.0, 2.0]", "at = [2.0, 2.0, 1.0]")
    e = _error(one, tmp_path)
    # TOML 1.0: [parts] is one table; an array of tables is written [[parts]].
    assert str(e).startswith(f"case.toml:{_line(one, '[parts]')}: parts: given a table")
    assert "[[parts]]" in str(e)


def test_file_level_errors(tmp_path):
    with pytest.raises(ScenarioError, match="does not exist"):
        load_scenario(tmp_path / "nope.toml")
    with pytest.raises(ScenarioError, match="a folder"):
        load_scenario(tmp_path)
    bad = tmp_path / "latin1.toml"
    bad.write_bytes('title = "caf\xe9"\n'.encode("latin-1"))
    # TOML 1.0: a document must be valid UTF-8.
    with pytest.raises(ScenarioError, match=r"latin1\.toml:1: .*not UTF-8"):
        load_scenario(bad)


def test_input_file_is_not_modified(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text(BASE)
    before = (p.read_bytes(), p.stat().st_mtime_ns)
    load_scenario(p)
    assert (p.read_bytes(), p.stat().st_mtime_ns) == before  # inputs are only read (DESIGN)


def test_from_dict_errors_name_the_key_without_a_line():
    import tomllib
    d = tomllib.loads(BASE.replace("poisson_ratio = 0.2", "poisson_ratio = 0.7"))
    from groundshake.scenario import Scenario
    with pytest.raises(ScenarioError) as info:
        Scenario.from_dict(d)
    # No text, so no line: "<dict>: key: given ...; allowed ..." (scenario contract).
    assert re.match(r"<dict>: materials\.concrete\.poisson_ratio: given 0\.7; allowed ", str(info.value))


def test_hostile_names_keep_the_message_on_one_line(tmp_path):
    # Names may hold any TOML string (TOML 1.0 escapes); the message stays one line.
    text = BASE.replace('name = "mat"', 'name = "m\\nat"').replace(
        "origin = [1.0, 1.0, 1.0]", "origin = [1.0, 1.0, 0.5]")
    e = _error(text, tmp_path)
    assert "overlapping parts[0] ('m\\nat')" in str(e) and "\n" not in str(e)
    text = BASE.replace("[materials.concrete]", '[materials."con\\ncrete"]').replace(
        "poisson_ratio = 0.2", "poisson_ratio = 0.6")
    e = _error(text, tmp_path)
    assert 'materials."con\\ncrete".poisson_ratio' in str(e) and "\n" not in str(e)
