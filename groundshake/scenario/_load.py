"""Reading and validating scenario files.

Every check runs up front and the first failure raises one
:class:`~groundshake.ScenarioError` of the form
``FILE:LINE: key.path: given VALUE; allowed WHAT``.
"""
from __future__ import annotations

import contextlib
import os
import re
import tomllib
from pathlib import Path

from .._errors import InputError, ScenarioError
from . import _geometry
from ._types import Scenario
from ._codec import scenario_from_dict, scenario_to_dict
from ._spec import _Context, _show, format_path, schema_path, table_keys
from ._validate import _build

__all__ = [
    "load_scenario",
    "parse_scenario_text",
    "scenario_from_dict",
    "scenario_to_dict",
    "format_path",
    "errors_at_key",
    "located_at",
    "MAX_ESTIMATED_DOFS",
]

MAX_ESTIMATED_DOFS = _geometry.MAX_ESTIMATED_DOFS


def parse_scenario_text(text: str, *, source: str = "<string>",
                        base_dir: str | os.PathLike | None = None) -> Scenario:
    """Validate a scenario given as TOML text.

    Parameters
    ----------
    text : str
        The TOML document.
    source : str, keyword-only
        Name used in messages (normally the file path).
    base_dir : path, keyword-only
        Folder that relative paths are resolved against; default the current folder.

    Raises
    ------
    ScenarioError
        On a TOML syntax error or any failed check (one line, with ``file:line``).
    """
    base = Path(base_dir) if base_dir is not None else Path.cwd()
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise _syntax_error(source, str(e), len(text.splitlines())) from None
    except RecursionError:
        raise ScenarioError(f"{source}: given arrays or tables nested too deeply for the TOML "
                            f"parser; allowed the scenario schema (at most a few levels)") from None
    except ValueError as e:  # pragma: no cover - tomllib raises TOMLDecodeError for bad text
        raise ScenarioError(f"{source}: TOML syntax error: {_show(str(e), 120)}") from None
    ctx = _Context(source, text, base)
    return _build(data, ctx)


def _syntax_error(source: str, message: str, last_line: int) -> ScenarioError:
    m = re.search(r"\s*\(at line (\d+), column (\d+)\)\s*$", message)
    if m:
        text = message[: m.start()]
        e = ScenarioError(f"{source}:{m.group(1)}: TOML syntax error at column {m.group(2)}: {text}")
        e.line = int(m.group(1))
    else:
        m = re.search(r"\s*\(at end of document\)\s*$", message)
        text = message[: m.start()] if m else message
        e = ScenarioError(f"{source}:{last_line}: TOML syntax error at the end of the "
                          f"document: {text}")
        e.line = last_line
    e.file, e.key = source, None
    return e


def load_scenario(path: str | os.PathLike) -> Scenario:
    """Read and validate a scenario file (TOML, UTF-8); the file is only read.

    Parameters
    ----------
    path : path
        The scenario file; relative paths inside it are resolved against its folder.

    Returns
    -------
    Scenario
        Every key with its default filled in; ``scenario.notes`` lists what the
        summary should show.

    Raises
    ------
    ScenarioError
        The file cannot be read, is not TOML, or fails a check. The message is one
        line: ``FILE:LINE: key.path: given VALUE; allowed WHAT``.
    """
    p = Path(path)
    try:
        with open(p, "rb") as fh:  # read-only
            raw = fh.read()
    except FileNotFoundError:
        raise ScenarioError(f"{p}: given a path that does not exist; allowed an existing "
                            f"scenario file (TOML)") from None
    except IsADirectoryError:
        raise ScenarioError(f"{p}: given a folder; allowed a scenario file (TOML)") from None
    except OSError as e:
        raise ScenarioError(f"{p}: cannot be read ({e.strerror or e})") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as e:
        line = raw[: e.start].count(b"\n") + 1
        raise ScenarioError(f"{p}:{line}: given bytes that are not UTF-8 at offset {e.start}; "
                            f"allowed a UTF-8 TOML file") from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return parse_scenario_text(text, source=str(p), base_dir=p.resolve().parent)


@contextlib.contextmanager
def errors_at_key(scenario: Scenario, path: tuple):
    """Run library code on behalf of the scenario key ``path`` (``("motion", "x")``,
    ``("processing",)``): an :class:`~groundshake.InputError` raised inside becomes a
    :class:`~groundshake.ScenarioError` naming the scenario file, line and key.

    An error whose ``param`` is a key of that table, or else of a table that encloses it,
    is shown at that key (``case.toml:14: motion.x.trace: given 5; allowed 0..2 ...``,
    ``motion.inventory`` for an error of ``("motion", "x")`` about the inventory); any other
    at ``path`` itself. Errors that already name a scenario file, and every error of a
    scenario without a source file, pass unchanged.
    """
    try:
        yield
    except InputError as e:
        # ``file`` is set only on errors already located in a scenario file (located(file=))
        if not scenario.source or getattr(e, "file", None) is not None:
            raise
        ctx = _context_of(scenario)
        full = schema_path(e.param) if e.param else None
        if full is not None and len(full) > 1:      # a key path of the scenario: "support.kind"
            raise ctx.located(e, full) from None
        if not path:
            raise
        path = tuple(path)
        for n in range(len(path), 0, -1):          # this table's key, else an enclosing one's
            if e.param is not None and e.param in table_keys(path[:n]):
                raise ctx.located(e, path[:n] + (e.param,)) from None
        raise ctx.keyed(e, path) from None


def located_at(scenario: Scenario, path: tuple, err: InputError) -> InputError:
    """``err`` shown at the scenario key ``path``: ``FILE:LINE: key.path`` in front (a
    :class:`~groundshake.ScenarioError`), or the key alone for a scenario without a file."""
    if not scenario.source:
        return err.located(format_path(path))
    return _context_of(scenario).located(err, tuple(path))


def _context_of(scenario: Scenario) -> _Context:
    """The message context of a loaded scenario (file name and the lines of its keys)."""
    ctx = _Context(str(scenario.source), None, Path(scenario.base_dir))
    ctx.lines = scenario.key_lines
    return ctx
