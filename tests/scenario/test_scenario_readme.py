"""The scenario guide (docs/guide/scenario.md) against the schema, so the two cannot drift.

Sources: the scenario contract in docs/INTERNALS.md (the list of sections and keys,
defaults in brackets) and the guide itself (documented examples must work, STYLE.md
point 11). The key table must equal the one generated from the dataclasses.
"""
from __future__ import annotations

import dataclasses
import re
from pathlib import Path

import pytest

from groundshake._errors import ScenarioError
from groundshake.scenario import Scenario, parse_scenario_text
from groundshake.scenario._schema import schema_markdown, schema_rows

REPO = Path(__file__).resolve().parents[2]


def _section() -> str:
    # the guide page is the former README section "The scenario file", whole
    return (REPO / "docs" / "guide" / "scenario.md").read_text(encoding="utf-8")


def test_readme_table_equals_the_schema():
    section = _section()
    table = section.split("<!-- scenario keys: begin -->\n")[1].split("<!-- scenario keys: end -->")[0]
    assert table == schema_markdown()


def test_every_key_both_ways():
    section = _section()
    in_readme = set(re.findall(r"^\| `([^`]+)` \|", section, flags=re.M))
    in_schema = {row[0] for row in schema_rows()}
    assert in_readme == in_schema


# The key names of docs/INTERNALS.md "scenario.py", written out by hand from that list.
INTERNALS_KEYS = {
    "title",
    "motion.{x,y,z}.file", "motion.{x,y,z}.units", "motion.{x,y,z}.scale", "motion.{x,y,z}.dt",
    "motion.{x,y,z}.trace", "motion.target", "motion.match_target",
    "processing.enabled", "processing.mean_removal", "processing.pre_event_s",
    "processing.baseline_order", "processing.highpass_hz", "processing.lowpass_hz",
    "processing.filter_order", "processing.taper_percent", "processing.pad",
    "materials.NAME.youngs_modulus", "materials.NAME.poisson_ratio", "materials.NAME.density",
    "parts[].name", "parts[].material", "parts[].origin", "parts[].size",
    "mesh.element_size", "mesh.element", "mesh.mass",
    "support.kind", "support.shear_wave_velocity", "support.poisson_ratio", "support.density",
    "support.radiation_damping", "support.springs",
    "damping.ratio_percent", "damping.rayleigh_hz",
    "equipment[].name", "equipment[].mass", "equipment[].mount", "equipment[].footprint",
    "equipment[].cg_height", "equipment[].frequency_hz", "equipment[].damping_percent",
    "equipment[].rotary_inertia", "equipment[].anchors", "equipment[].dead_load_factor",
    "equipment[].capacity", "equipment[].fp",
    "sensors[].name", "sensors[].at",
    "analysis.method", "analysis.cutoff_hz", "analysis.modes", "analysis.hht_alpha",
    "analysis.solver",
    "floor_spectra.damping_percent", "floor_spectra.broadening_percent", "floor_spectra.periods",
}

# Defaults of the INTERNALS.md list (in brackets there), by hand.
INTERNALS_DEFAULTS = {
    "motion.{x,y,z}.scale": "1", "motion.match_target": "false",
    "processing.enabled": "true", "processing.mean_removal": '"whole"',
    "processing.pre_event_s": "0", "processing.baseline_order": "1",
    "processing.highpass_hz": "0.1", "processing.lowpass_hz": "none",
    "processing.filter_order": "4", "processing.taper_percent": "5", "processing.pad": "true",
    "mesh.element": '"hex8-incompatible"', "mesh.mass": '"consistent"',
    "support.kind": '"fixed"', "support.radiation_damping": "true", "support.springs": '"lumped"',
    "damping.ratio_percent": "5", "damping.rayleigh_hz": "none",
    "equipment[].frequency_hz": "none", "equipment[].anchors": "[]",
    "equipment[].dead_load_factor": "0.9", "equipment[].capacity": "none", "equipment[].fp": "none",
    "analysis.method": '"auto"', "analysis.cutoff_hz": "50", "analysis.modes": "none",
    "analysis.hht_alpha": "0", "analysis.solver": '"auto"',
    "floor_spectra.damping_percent": "[2, 5]", "floor_spectra.broadening_percent": "15",
    "floor_spectra.periods.min": "0.02", "floor_spectra.periods.max": "5",
    "floor_spectra.periods.count": "120",
}


def test_schema_covers_the_internals_contract():
    keys = {row[0] for row in schema_rows()}
    assert INTERNALS_KEYS <= keys, INTERNALS_KEYS - keys


def test_defaults_match_the_internals_contract():
    defaults = {row[0]: row[1] for row in schema_rows()}
    for key, expected in INTERNALS_DEFAULTS.items():
        assert defaults[key] == expected, key


def _toml_value(value) -> str:
    return ("true" if value else "false") if isinstance(value, bool) else (
        f'"{value}"' if isinstance(value, str) else repr(value))


def test_processing_defaults_and_limits_are_those_of_the_settings():
    # one declaration (docs/architecture.md): the [processing] table is
    # groundshake.processing.ProcessingSettings; read both sides through dataclasses.fields,
    # every default and every limit of a setting holds in the scenario file too
    from groundshake.processing import ProcessingSettings
    from _blocks import concrete_block

    (table,) = [f for f in dataclasses.fields(Scenario) if f.name == "processing"]
    assert table.metadata["cls"] is ProcessingSettings
    loaded = parse_scenario_text(concrete_block()).processing
    shown = {row[0]: row[1] for row in schema_rows()}

    def scenario_takes(name, value) -> bool:
        extra = "pre_event_s = 1.0\n" if value == "pre-event" else ""
        try:
            parse_scenario_text(f"[processing]\n{extra}{name} = {_toml_value(value)}\n"
                                + concrete_block())
        except ScenarioError as e:
            assert e.key == f"processing.{name}", str(e)
            return False
        return True

    def library_takes(name, value) -> bool:
        extra = {"pre_event_s": 1.0} if value == "pre-event" else {}
        try:
            ProcessingSettings(**extra, **{name: value})
        except ValueError as e:
            assert e.param == name, str(e)
            return False
        return True

    checked = 0
    for f in dataclasses.fields(ProcessingSettings):
        assert getattr(loaded, f.name) == f.default, f.name          # same default
        text = ("none" if f.default is None else f"{f.default:g}"
                if isinstance(f.default, float) else _toml_value(f.default))
        assert shown[f"processing.{f.name}"] == text, f.name            # as the guide shows
        step = 1 if isinstance(f.default, int) and not isinstance(f.default, bool) else 0.5
        probes = []
        if "ge" in f.metadata:
            probes += [(f.metadata["ge"], True), (f.metadata["ge"] - step, False)]
        if "le" in f.metadata:
            probes += [(f.metadata["le"], True), (f.metadata["le"] + step, False)]
        if "choices" in f.metadata:
            probes += [(c, True) for c in f.metadata["choices"]] + [("median", False)]
        if isinstance(f.default, bool):
            probes += [(not f.default, True), ("yes", False)]
        for value, allowed in probes:
            assert scenario_takes(f.name, value) is allowed, (f.name, value)
            assert library_takes(f.name, value) is allowed, (f.name, value)
            checked += 1
    assert checked >= 20


def _readme_example() -> str:
    section = _section()
    return section.split("```toml\n")[1].split("```")[0]


def test_readme_example_loads(tmp_path):
    (tmp_path / "records").mkdir()
    (tmp_path / "records" / "h1.mseed").write_bytes(b"")
    s = parse_scenario_text(_readme_example(), source="pad.toml", base_dir=tmp_path)
    assert isinstance(s, Scenario)
    assert s.motion.x.units == "cm/s2"  # "gal" is the CGS name of cm/s² (common practice)


def test_readme_error_example(tmp_path):
    (tmp_path / "records").mkdir()
    (tmp_path / "records" / "h1.mseed").write_bytes(b"")
    text = _readme_example().replace("poisson_ratio = 0.2", "poisson_ratio = 0.5")
    with pytest.raises(ScenarioError) as info:
        parse_scenario_text(text, source="pad.toml", base_dir=tmp_path)
    # The message quoted in the README, verbatim.
    quoted = re.search(r"e\.g\.\n  `([^`]+)`", _section()).group(1)
    assert str(info.value) == quoted
