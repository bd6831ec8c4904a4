"""Fuzzing the scenario loader: the only outcomes are a Scenario or a ScenarioError.

Sources: issue 8 of this project ("the only outcomes allowed are a valid result or the
package's own error"); the TOML 1.0 specification (toml.io) for the value types a file can
hold (strings, integers, floats incl. inf/nan, booleans, dates and times, arrays, tables);
Python's tomllib as the independent parser of the text the fuzzer writes.

CI runs a bounded number of examples; ``benchmarks/fuzz_scenario.py`` runs the same
strategies for ≥ 10,000 inputs and prints the count of inputs and of uncaught exceptions.
"""
from __future__ import annotations

import copy
import json
import tomllib
import warnings
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from groundshake._errors import ScenarioError
from groundshake._toml import toml_key, toml_value
from groundshake.scenario import Scenario, parse_scenario_text

from _tables import block_scenario, equipment, part, soil

# A valid scenario touching every section (invented numbers, for fuzzing only).
BASE_TEXT = block_scenario(
    "Fuzz base (invented)",
    [part("mat", (6, 4, 1)), part("plinth", (2, 2, 1), origin=(1, 1, 1))], element_size=0.5,
    support=soil(),
    before=['[motion]\nx = { file = "h1.mseed", units = "g", scale = 1.0 }\n'
            'y = { file = "h2.mseed", dt = 0.01, trace = 0 }\n'
            'target = "asce7:sds=1.0,sd1=0.6,tl=8"\n',
            "[processing]\nhighpass_hz = 0.1\nlowpass_hz = 25.0\n"],
    after=["[damping]\nratio_percent = 5\nrayleigh_hz = [2.0, 20.0]\n",
           equipment("pump", 2000, mount=(2, 2), footprint=(1, 1), cg_height=0.5,
                     extra="frequency_hz = [9.0, 9.0, 20.0]\n"
                           "anchors = [[-0.4, -0.4], [0.4, 0.4]]\n"
                           "capacity = { tension = 8e4, shear = 5e4 }\n"
                           "fp = { sds = 1.0, ap = 2.5, rp = 2.0 }\n")]) + """
[[sensors]]
name = "top"
at = [2.0, 2.0, 2.0]

[analysis]
method = "direct"
hht_alpha = -0.1
modes = 12

[floor_spectra]
damping_percent = [2, 5]
periods = { min = 0.02, max = 5.0, count = 100 }
"""
BASE = tomllib.loads(BASE_TEXT)
RECORDS = ("h1.mseed", "h2.mseed")


def make_site(folder: Path) -> Path:
    """Stand-in record files the base scenario points to (the loader checks existence only)."""
    folder.mkdir(parents=True, exist_ok=True)
    for name in RECORDS:
        (folder / name).write_bytes(b"")
    return folder


# --- TOML values and trees ------------------------------------------------------------

KEYS = sorted({"x", "file", "size", "origin", "name", "material", "mass", "kind", "at",
               "element_size", "min", "max", "count", "tension", "sds", "concrete"}
              | set(BASE))
keys = st.one_of(st.sampled_from(KEYS), st.text(max_size=12))
scalars = st.one_of(
    st.booleans(),
    st.integers(min_value=-(2**63), max_value=2**63 - 1),
    st.integers(min_value=-5, max_value=200),
    st.floats(allow_nan=True, allow_infinity=True),
    st.floats(min_value=-10, max_value=10),
    st.sampled_from([0.0, -0.0, 0.5, 0.49999, 1e-300, 1e300, 1e308, -1.0 / 3.0]),
    st.text(max_size=20),
    st.sampled_from(["hex8", "soil", "fixed", "modal", "g", "gal", "h1.mseed", "../h1.mseed",
                     "/", "", "asce7:sds=1", "nope.csv", "concrete", "\x00"]),
    st.dates(), st.times(), st.datetimes(),
)
values = st.recursive(
    scalars,
    lambda inner: st.one_of(st.lists(inner, max_size=4),
                            st.dictionaries(keys, inner, max_size=4)),
    max_leaves=12,
)


def _paths(tree, prefix=()):
    """Every path into dicts and lists of ``tree``."""
    out = [prefix]
    if isinstance(tree, dict):
        for k, v in tree.items():
            out += _paths(v, prefix + (k,))
    elif isinstance(tree, list):
        for i, v in enumerate(tree):
            out += _paths(v, prefix + (i,))
    return out


def _get(tree, path):
    for k in path:
        tree = tree[k]
    return tree


@st.composite
def mutated_scenarios(draw):
    """The base scenario after a few random edits: replace, delete, insert, duplicate."""
    tree = copy.deepcopy(BASE)
    for _ in range(draw(st.integers(1, 4))):
        paths = _paths(tree)
        path = draw(st.sampled_from(paths))
        op = draw(st.sampled_from(["replace", "delete", "insert", "duplicate", "nudge"]))
        if not path:
            if op == "replace":
                tree = draw(values)
            continue
        parent, key = _get(tree, path[:-1]), path[-1]
        if op == "replace":
            parent[key] = draw(values)
        elif op == "delete":
            del parent[key]
        elif op == "insert" and isinstance(parent, dict):
            parent[draw(keys)] = draw(values)
        elif op == "insert" and isinstance(parent, list):
            parent.insert(draw(st.integers(0, len(parent))), draw(values))
        elif op == "duplicate" and isinstance(parent, list):
            parent.append(copy.deepcopy(parent[key]))
        elif op == "nudge" and isinstance(parent[key], (int, float)) and not isinstance(parent[key], bool):
            parent[key] = parent[key] * draw(st.sampled_from([-1, 0, 0.5, 2, 1e6, 1e-6]))
        if not isinstance(tree, dict):
            break
    return tree


random_trees = st.dictionaries(keys, values, max_size=6)


def to_toml(tree: dict) -> str:
    """A TOML document for ``tree``: one ``key = value`` line per top-level key, floats
    written exactly and every key quoted."""
    return "".join(f"{toml_key(str(k), bare=False)} = {toml_value(v, exact=True, bare_keys=False)}\n"
                   for k, v in tree.items())


@st.composite
def edited_texts(draw):
    """The base text with a few characters inserted, deleted or replaced."""
    text = BASE_TEXT
    for _ in range(draw(st.integers(1, 3))):
        i = draw(st.integers(0, len(text)))
        op = draw(st.sampled_from(["insert", "delete", "replace"]))
        piece = draw(st.one_of(st.sampled_from(list("[]{}=\"',.#\n 0-e") + ["[[", "]]", '"""']),
                               st.text(max_size=3)))
        if op == "insert":
            text = text[:i] + piece + text[i:]
        elif op == "delete":
            text = text[:i] + text[i + draw(st.integers(1, 8)):]
        else:
            text = text[:i] + piece + text[i + len(piece):]
    return text


# --- the checks -----------------------------------------------------------------------

def outcome_of_dict(tree, folder: Path) -> str:
    """'ok' or 'error'; anything else propagates (and fails the test)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            s = Scenario.from_dict(tree, source="fuzz.toml", base_dir=folder)
        except ScenarioError as e:
            assert "\n" not in str(e) and str(e).startswith("fuzz.toml")  # one line, names the file
            return "error"
    assert isinstance(s, Scenario)
    json.dumps(s.to_dict())  # a valid scenario always echoes as JSON
    return "ok"


def outcome_of_text(text: str, folder: Path) -> str:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            s = parse_scenario_text(text, source="fuzz.toml", base_dir=folder)
        except ScenarioError as e:
            assert "\n" not in str(e) and str(e).startswith("fuzz.toml")
            return "error"
    assert isinstance(s, Scenario)
    return "ok"


FUZZ = settings(max_examples=200, deadline=None, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    return make_site(tmp_path_factory.mktemp("fuzz"))


def test_base_scenario_is_valid(folder):
    assert outcome_of_dict(copy.deepcopy(BASE), folder) == "ok"  # the fuzz starts from a valid file
    # The writer's text parses back to the same tree under tomllib (independent parser).
    assert tomllib.loads(to_toml(BASE)) == BASE


@FUZZ
@given(tree=mutated_scenarios())
def test_mutated_trees(tree, folder):
    assert outcome_of_dict(tree, folder) in ("ok", "error")


@FUZZ
@given(tree=random_trees)
def test_random_trees(tree, folder):
    assert outcome_of_dict(tree, folder) in ("ok", "error")


@FUZZ
@given(tree=mutated_scenarios())
def test_mutated_trees_as_text(tree, folder):
    if not isinstance(tree, dict):
        return
    text = to_toml(tree)
    assert outcome_of_text(text, folder) in ("ok", "error")


@FUZZ
@given(text=edited_texts())
def test_edited_texts(text, folder):
    assert outcome_of_text(text, folder) in ("ok", "error")
