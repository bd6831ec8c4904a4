"""The README's Quick start and the commands page (docs/guide/commands.md) cannot drift
from the tool.

Sources: issue 6 ("Quick start: exactly two commands, one that installs and runs the main
job, one that installs and runs the tests"); issue 12 (CI runs both Quick start lines
exactly as printed, in order, in a new virtual environment, and checks the demo's
report); argparse's own list of the registered subcommands as the truth for the command
reference.
"""
from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _readme() -> str:
    return (ROOT / "README.md").read_text(encoding="utf-8")


def test_quick_start_is_two_commands_demo_then_tests():
    text = _readme()
    start = text.index("## Quick start")
    section = text[start:text.index("\n## ", start + 5)]
    commands = re.findall(r"^\$ (.*)$", section, flags=re.M)
    assert len(commands) == 2                                   # issue 6: exactly two
    assert commands[0].startswith("python -m pip install .")   # installs ...
    assert "groundshake demo" in commands[0]                    # ... and runs the main job
    assert "python -m pytest" in commands[1]                    # ... and the tests
    assert "pip install" in commands[1]


def _quick_start_lines() -> list[str]:
    text = _readme()
    start = text.index("## Quick start")
    section = text[start:text.index("\n## ", start + 5)]
    return re.findall(r"^\$ (.*)$", section, flags=re.M)


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
def test_ci_runs_the_quick_start_lines_exactly_as_printed():
    out = subprocess.run(["bash", str(ROOT / ".ci" / "run"), "--dry-run"], cwd=ROOT,
                         capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    assert out.stdout.splitlines() == _quick_start_lines()     # issue 12: verbatim, in order


def test_ci_checks_the_report_where_the_readme_says_it_is():
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    text = _readme()
    m = re.search(r"open `([^`]+/report\.html)`", text)
    assert m, "the Quick start should say where the demo's report is"
    assert f"report={m.group(1)}" in ci                         # issue 12: CI checks that file
    assert "-o demo-out" in _quick_start_lines()[0] and m.group(1).startswith("demo-out/")
    assert "-m venv" in ci and "mktemp -d" in ci                # issue 12: a new venv each run


def test_command_reference_lists_every_command():
    import argparse

    from groundshake.cli import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    registered = set(sub.choices)                               # argparse's own list
    text = (ROOT / "docs" / "guide" / "commands.md").read_text(encoding="utf-8")
    table = text.split("<!-- commands: begin -->")[1].split("<!-- commands: end -->")[0]
    listed = set(re.findall(r"^\| `groundshake ([a-z-]+)", table, flags=re.M))
    assert listed == registered
