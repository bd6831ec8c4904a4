"""The README as the user guide: its Quick start and command reference cannot drift
from the tool.

Sources: issue 6 ("Quick start: exactly two commands, one that installs and runs the main
job, one that installs and runs the tests"); the line .ci/run extracts (its sed pattern:
a `$ ` line holding `python -m pytest`); argparse's own list of the registered
subcommands as the truth for the command reference.
"""
from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


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
    assert "python -m pytest" in commands[1]                    # .ci/run's sed pattern
    assert "pip install" in commands[1]


def test_command_reference_lists_every_command():
    import argparse

    from groundshake.cli import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    registered = set(sub.choices)                               # argparse's own list
    text = _readme()
    table = text.split("<!-- commands: begin -->")[1].split("<!-- commands: end -->")[0]
    listed = set(re.findall(r"^\| `groundshake ([a-z-]+)", table, flags=re.M))
    assert listed == registered
