"""Fixtures shared by the tests.

- ``run_cli``: call ``groundshake.cli.main`` in-process and collect status, stdout, stderr
  and, with ``--json``, the parsed document.
- ``demo_run``: the bundled demo, run once per test session (status, stdout, folder).
- ``scenario_file``: write a small scenario of the tests' own invention (``_blocks.py``)
  with the bundled demo records (INVENTED, labelled so in their headers) as its motion.

Helper modules beside this file (``_oracles.py`` independent reference solutions,
``_blocks.py`` TOML fragments, ``_tables.py`` scenario tables and the check of a slipped
value, ``_strong_motion.py`` published strong-motion files, ``_report_fixture.py`` an
invented output folder) are imported by name.
"""
from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest

ROOT = Path(__file__).resolve().parents[1]
DEMO_RECORDS = ROOT / "records"


@dataclass(frozen=True)
class CliResult:
    """What one call of the command line gave back."""

    status: int
    out: str
    err: str

    @property
    def json(self) -> Any:
        """stdout parsed as the one JSON document ``--json`` promises."""
        return json.loads(self.out)


@pytest.fixture
def run_cli(capsys):
    """``run_cli("info", path, "--json") -> CliResult``; arguments are turned into text."""
    from groundshake.cli import main

    def run(*args) -> CliResult:
        capsys.readouterr()                     # drop anything printed before
        status = main([str(a) for a in args])
        captured = capsys.readouterr()
        return CliResult(status, captured.out, captured.err)

    return run


@pytest.fixture(scope="session")
def demo_run():
    """(exit status, stdout, folder) of ``groundshake demo``, run once per session."""
    from _report_fixture import demo_run as run_demo_once

    return run_demo_once()


@pytest.fixture
def scenario_file(tmp_path):
    """Write ``scenario.toml`` in a fresh folder; return its path.

    ``scenario_file(extra="", *, size=(2, 2, 1), element_size=1.0, support="fixed",
    motion=True)``: a concrete block (``_blocks.concrete_block``), the demo records as
    x, y, z motion when ``motion`` is true, then ``extra`` TOML appended as given.
    """
    from _blocks import concrete_block

    def write(extra: str = "", *, size=(2.0, 2.0, 1.0), element_size: float = 1.0,
              support: str = "fixed", motion: bool = True) -> Path:
        text = 'title = "test block (invented)"\n'
        if motion:
            text += "[motion]\n" + "".join(
                f'{d} = {{ file = "{(DEMO_RECORDS / f"demo-{c}.csv").as_posix()}" }}\n'
                for d, c in (("x", "h1"), ("y", "h2"), ("z", "up")))
        text += concrete_block(size, element_size=element_size, support=support)
        text += extra
        path = tmp_path / "scenario.toml"
        path.write_text(text, encoding="utf-8")
        return path

    return write
