"""Nothing let in: no code execution paths from user input.

Sources (common practice, OWASP "Deserialization of untrusted data" and the Python
documentation's warnings on ``pickle``, ``eval`` and ``yaml.load``): the package never
evaluates, unpickles or YAML-loads what a user hands it; work sent to suite workers
is arrays and plain data; the HTML report escapes user text (tested in
tests/report/test_report.py with hostile titles and names).
"""
from __future__ import annotations

import ast
from pathlib import Path

import numpy as np
import pytest

from _blocks import concrete_block
from _tables import equipment

PACKAGE = Path(__file__).resolve().parents[2] / "groundshake"
FORBIDDEN_CALLS = {"eval", "exec", "compile", "__import__"}
FORBIDDEN_MODULES = {"pickle", "cPickle", "dill", "cloudpickle", "yaml", "marshal", "shelve"}


def _sources():
    return sorted(PACKAGE.rglob("*.py"))


@pytest.mark.parametrize("path", _sources(), ids=lambda p: str(p.relative_to(PACKAGE)))
def test_no_eval_pickle_or_yaml(path):
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    for node in ast.walk(tree):
        if isinstance(node, ast.Call) and isinstance(node.func, ast.Name):
            assert node.func.id not in FORBIDDEN_CALLS, f"{path.name}:{node.lineno}"
        if isinstance(node, ast.Import):
            for a in node.names:
                assert a.name.split(".")[0] not in FORBIDDEN_MODULES, f"{path.name}:{node.lineno}"
        if isinstance(node, ast.ImportFrom) and node.module:
            assert node.module.split(".")[0] not in FORBIDDEN_MODULES, f"{path.name}:{node.lineno}"


def _plain_only(obj, where="shared"):
    if obj is None or isinstance(obj, (bool, int, float, str)):
        return
    if isinstance(obj, np.ndarray):
        assert obj.dtype.kind in "biufc", f"{where}: array of {obj.dtype}"
        return
    if isinstance(obj, (list, tuple)):
        for i, v in enumerate(obj):
            _plain_only(v, f"{where}[{i}]")
        return
    assert isinstance(obj, dict), f"{where}: {type(obj).__name__} is not plain data"
    for k, v in obj.items():
        assert isinstance(k, str), f"{where}: key {k!r}"
        _plain_only(v, f"{where}.{k}")


def test_suite_workers_receive_plain_data_only():
    from groundshake.scenario import parse_scenario_text
    from groundshake.suite._plain import from_plain
    from groundshake.suite._run import prepare_suite

    text = ('title = "plain data test (invented)"\n' + concrete_block(support="soil")
            + equipment("unit", 500.0, (1.0, 1.0), (1.0, 1.0), 0.5) + "[analysis]\nmodes = 4\n")
    shared = prepare_suite(parse_scenario_text(text, source="plain.toml"))
    _plain_only(shared)
    model = from_plain(shared["model"])
    assert model.n_dof > 0 and model.K.shape == (model.n_dof, model.n_dof)
    with pytest.raises(TypeError):     # only groundshake data classes are ever rebuilt
        from_plain({"__class__": "os:system", "fields": {}})
