"""Scenario loader: the example, defaults, attribute names and round trips.

Sources: the TOML 1.0 specification (toml.io) for what a file may contain; the
scenario contract in docs/INTERNALS.md and DESIGN.md for key names and defaults;
the solid-box moment of inertia m(b² + c²)/12 (any mechanics handbook, e.g.
Meriam & Kraige, Engineering Mechanics: Dynamics, Appendix B).
"""
from __future__ import annotations

import json
import math
import shutil
import warnings
from pathlib import Path

import pytest

from groundshake._errors import GroundshakeWarning, ScenarioError
from groundshake.scenario import (
    MotionComponent,
    Scenario,
    box_rotary_inertia,
    load_scenario,
    parse_scenario_text,
)

REPO = Path(__file__).resolve().parents[2]
EXAMPLE = REPO / "examples" / "transformer-pad.toml"


@pytest.fixture()
def site(tmp_path):
    """A copy of the example beside stand-in record files (the loader only checks they exist)."""
    (tmp_path / "records").mkdir()
    for name in ("demo-h1.mseed", "demo-h2.mseed", "demo-up.mseed"):
        (tmp_path / "records" / name).write_bytes(b"")
    (tmp_path / "examples").mkdir()
    shutil.copy(EXAMPLE, tmp_path / "examples" / EXAMPLE.name)
    return tmp_path / "examples" / EXAMPLE.name


def test_example_values_as_written(site):
    s = load_scenario(site)
    # The values below are those written in the example file (DESIGN.md's scenario).
    assert s.title == "Transformer pad (demo, invented site)"
    assert s.parts[0].origin == (0.0, 0.0, 0.0)  # tuple, as the contract says
    assert s.parts[0].size == (6.0, 4.0, 1.2)
    assert s.materials["concrete"].youngs_modulus == 30e9
    assert s.mesh.element_size == 0.3
    assert s.support.kind == "soil"
    assert s.equipment[0].anchors == ((-1.0, -0.6), (1.0, -0.6), (1.0, 0.6), (-1.0, 0.6))
    assert s.equipment[0].capacity.tension == 80e3
    assert s.floor_spectra.periods.count == 120
    # Paths are resolved against the scenario file's folder (DESIGN contract).
    assert s.motion.x.file == (site.parent.parent / "records" / "demo-h1.mseed").resolve()
    assert s.motion.x.file.is_absolute()
    assert s.motion.x.units == s.motion.z.units == "m/s2"


def test_defaults_are_filled_in(site):
    s = load_scenario(site)
    # Defaults from the INTERNALS.md schema, in brackets there.
    assert s.mesh.mass == "consistent"
    assert s.support.springs == "lumped"
    assert s.analysis.hht_alpha == 0.0 and s.analysis.solver == "auto"
    assert s.analysis.modes is None
    assert s.processing.taper_percent == 5.0 and s.processing.pad is True
    assert s.motion.match_target is False and s.motion.target is None
    assert s.sensors[0].at == (6.0, 4.0, 1.2)


def test_rotary_inertia_default_is_the_solid_box(site):
    s = load_scenario(site)
    m, (bx, by), h = 18000.0, (2.4, 1.6), 1.6
    c = 2 * h
    # Solid rectangular box about its centroid: I = m (a² + b²)/12 (mechanics handbook).
    expected = (m * (by**2 + c**2) / 12, m * (bx**2 + c**2) / 12, m * (bx**2 + by**2) / 12)
    assert s.equipment[0].rotary_inertia == pytest.approx(expected, rel=1e-12)
    # A cube of side a: I = m a²/6 about each axis (mechanics handbook).
    assert box_rotary_inertia(6.0, (2.0, 2.0), 1.0) == pytest.approx((4.0, 4.0, 4.0), rel=1e-12)


def test_equipment_damping_defaults_to_block_damping(site):
    text = site.read_text().replace("damping_percent = 3\n", "")
    s = parse_scenario_text(text, source="t.toml", base_dir=site.parent)
    # INTERNALS.md: equipment damping_percent [same as block].
    assert s.equipment[0].damping_percent == s.damping.ratio_percent == 5.0


def test_to_dict_is_json_and_round_trips(site):
    s = load_scenario(site)
    d = s.to_dict()
    text = json.dumps(d)  # JSON-able (DESIGN: defaults echoed into summary.json)
    assert json.loads(text) == d
    # Every schema key is present, defaults included (INTERNALS.md list).
    assert d["analysis"]["cutoff_hz"] == 50.0 and d["mesh"]["mass"] == "consistent"
    assert d["motion"]["x"]["file"] == str(s.motion.x.file)
    again = Scenario.from_dict(json.loads(text), source=s.source, base_dir=s.base_dir)
    assert again == s


def test_no_motion_still_loads(site):
    text = site.read_text()
    start, end = text.index("[motion]"), text.index("[processing]")
    s = parse_scenario_text(text[:start] + text[end:], source="t.toml", base_dir=site.parent)
    # DESIGN.md: `modes SCENARIO` needs no [motion].
    assert s.motion is None


def test_with_motion_swaps_records(site, tmp_path):
    s = load_scenario(site)
    other = tmp_path / "other.sac"
    other.write_bytes(b"")
    t = s.with_motion(x=other, y=MotionComponent(file=other, scale=2.0))
    assert t.motion.x.file == other.resolve() and t.motion.z is None
    assert t.motion.y.scale == 2.0
    assert t.parts == s.parts and t.mesh == s.mesh  # only the motion changes
    assert s.motion.x.file != t.motion.x.file  # the original is untouched (frozen)
    with pytest.raises(ScenarioError, match=r"motion\.x\.file"):
        s.with_motion(x=tmp_path / "missing.mseed")
    assert s.with_motion().motion is None


def test_title_defaults_to_file_stem(site):
    text = site.read_text().replace('title = "Transformer pad (demo, invented site)"\n', "")
    p = site.parent / "my-pad.toml"
    p.write_text(text)
    assert load_scenario(p).title == "my-pad"  # INTERNALS.md: title [file stem]


def test_paths_outside_the_folder_are_noted(site):
    s = load_scenario(site)
    # Issue 8: paths leaving the scenario's folder must be shown; ../records does.
    assert len(s.notes) == 3 and all("outside the scenario's folder" in n for n in s.notes)
    assert s.to_dict()["notes"] == list(s.notes)  # echoed with the scenario into outputs
    inside = site.parent / "rec.mseed"
    inside.write_bytes(b"")
    t = parse_scenario_text(site.read_text().replace("../records/demo-h1.mseed", "rec.mseed"),
                            source=str(site), base_dir=site.parent)
    assert not any("motion.x.file" in n for n in t.notes)


def test_anchor_outside_footprint_warns(site):
    text = site.read_text().replace("[-1.0, 0.6]]", "[-1.3, 0.6]]")
    with pytest.warns(GroundshakeWarning, match=r"anchors\[3\]"):
        s = parse_scenario_text(text, source="t.toml", base_dir=site.parent)
    assert any("outside the 2.4 × 1.6 m footprint" in n for n in s.notes)


def test_mount_position_on_top_face(site):
    s = load_scenario(site)
    # The pad's top face is at z = 0 + 1.2 m (geometry of the example).
    assert s.mount_position("transformer") == pytest.approx((3.0, 2.0, 1.2), abs=1e-12)


def test_estimated_dofs_of_a_plain_box(site):
    s = load_scenario(site)
    # 6 × 4 × 1.2 m at 0.3 m: 20, ceil(4/0.3) = 14 and 4 elements per side, so 21·15·5 nodes
    # with 3 DOFs each (node count of a structured grid, by hand).
    assert s.estimated_dofs() == 3 * 21 * 15 * 5


def test_real_example_loads_when_records_exist():
    if not all((REPO / "records" / f"demo-{c}.mseed").exists() for c in ("h1", "h2", "up")):
        pytest.skip("demo records not generated yet")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        s = load_scenario(EXAMPLE)
    assert s.motion.z.file == (REPO / "records" / "demo-up.mseed").resolve()  # DESIGN example


def test_processing_settings_are_built_from_the_scenario(site):
    pytest.importorskip("groundshake.processing")
    s = load_scenario(site)
    ps = s.processing_settings()
    # Same field names and values (INTERNALS.md: names = the scenario's [processing] keys).
    assert ps.highpass_hz == 0.1 and ps.filter_order == 4 and ps.baseline_order == 1
    assert ps.taper_percent == s.processing.taper_percent


def test_scenario_pickles(site):
    import pickle
    s = load_scenario(site)
    # A local process pool sends the scenario by pickle (standard library behaviour).
    t = pickle.loads(pickle.dumps(s))
    assert t == s and t.notes == s.notes and t.base_dir == s.base_dir


def test_order_of_tables_does_not_matter(site):
    import tomllib
    text = site.read_text()
    data = tomllib.loads(text)
    # TOML 1.0: a document is an unordered collection of tables; so is our schema.
    reordered = dict(reversed(list(data.items())))
    a = Scenario.from_dict(data, base_dir=site.parent)
    b = Scenario.from_dict(reordered, base_dir=site.parent)
    assert a == b


def test_to_dict_has_exactly_the_schema_keys(site):
    from groundshake.scenario._schema import schema_rows
    d = load_scenario(site).to_dict()
    flat = set()

    def walk(v, prefix):
        if isinstance(v, dict):
            for k, x in v.items():
                if prefix == "materials.":
                    walk(x, "materials.NAME.")
                elif prefix == "motion." and k in "xyz":
                    walk(x, "motion.{x,y,z}.")
                else:
                    flat.add(prefix + k)
                    walk(x, prefix + k + ".")
        elif isinstance(v, list) and v and isinstance(v[0], dict):
            for x in v:
                walk(x, prefix[:-1] + "[].")

    walk(d, "")
    schema = {r[0] for r in schema_rows()}
    # Every echoed key is a schema key (INTERNALS.md: to_dict gives every key with its default).
    assert flat - {"motion.x", "motion.y", "motion.z", "materials.concrete", "notes"} <= schema
    leaves = {r[0] for r in schema_rows() if r[2] != "a table" and not r[2].startswith("an array of tables")
              and r[2] != "one table per name"}
    # optional sub-tables absent from the example: fp, strain_compatible, suite
    present = {k for k in leaves if not k.startswith(("equipment[].fp",
                                                      "support.strain_compatible", "suite."))}
    assert present <= flat, present - flat


def test_symlink_leaving_the_folder_is_noted(site, tmp_path):
    outside = tmp_path / "elsewhere.mseed"
    outside.write_bytes(b"")
    link = site.parent / "local.mseed"
    link.symlink_to(outside)
    text = site.read_text().replace("../records/demo-h1.mseed", "local.mseed")
    s = parse_scenario_text(text, source=str(site), base_dir=site.parent)
    # Issue 8: a path that looks local but resolves elsewhere must be shown, too.
    assert any("motion.x.file" in n and str(outside.resolve()) in n for n in s.notes)


def test_one_processing_schema_and_one_spelling_of_no_high_pass():
    # design rule (docs/architecture.md): the scenario's [processing] table and the
    # processing stage's settings have the same names and defaults, and "no high-pass" is
    # 0 in the scenario as on the command line (--highpass 0), None in Python
    import dataclasses

    from groundshake.processing import ProcessingSettings
    from groundshake.scenario import parse_scenario_text
    from _blocks import concrete_block

    (table,) = [f for f in dataclasses.fields(Scenario) if f.name == "processing"]
    assert table.metadata["cls"] is ProcessingSettings                # one declaration
    assert ProcessingSettings(highpass_hz=0).highpass_hz is None
    assert ProcessingSettings(highpass_hz=0.0, lowpass_hz=0).lowpass_hz is None
    scen = parse_scenario_text("[processing]\nhighpass_hz = 0\nlowpass_hz = 25.0\n"
                               + concrete_block())
    settings = scen.processing_settings()
    assert settings is scen.processing
    assert settings.highpass_hz is None and settings.lowpass_hz == 25.0
    # the file's spelling comes back in the echo: 0, since an absent key means 0.1
    assert scen.to_dict()["processing"]["highpass_hz"] == 0.0
    assert Scenario.from_dict(scen.to_dict()) == scen
    assert "high-pass" not in settings.describe() and "low-pass 25 Hz" in settings.describe()
