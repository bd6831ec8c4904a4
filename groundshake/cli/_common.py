"""Helpers shared by every command of the CLI (argument parsing, JSON out)."""
from __future__ import annotations

import argparse
import contextlib
import math
import sys
from typing import Any, Iterable, Mapping

import numpy as np

from .._errors import InputError
from .._json import json_dumps, to_jsonable

__all__ = ["common_options", "print_json", "to_jsonable", "float_list", "json_dumps",
           "check_damping_percent", "option_table", "options_named"]


def common_options() -> argparse.ArgumentParser:
    """A parent parser holding the options every subcommand accepts."""
    p = argparse.ArgumentParser(add_help=False)
    p.add_argument("--json", action="store_true", default=argparse.SUPPRESS,
                   help="print one JSON document on stdout (SI units)")
    p.add_argument("--quiet", action="store_true", default=argparse.SUPPRESS,
                   help="no progress bars on stderr")
    p.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                   help="show a traceback on errors")
    return p


def option_table(parser: argparse.ArgumentParser) -> dict[str, str]:
    """Each option's destination → the option as typed (``"highpass_hz"`` →
    ``"--highpass"``), read from the parser's own definitions.

    Options whose value a library function takes as a parameter of the same name use
    that name as their ``dest``, so a library error's ``param`` finds its option here.
    """
    table = {}
    for action in parser._actions:            # argparse keeps no public list of actions
        if action.option_strings and action.dest not in (argparse.SUPPRESS, "help"):
            long = [o for o in action.option_strings if o.startswith("--")]
            table.setdefault(action.dest, (long or action.option_strings)[0])
    return table


@contextlib.contextmanager
def options_named(args: argparse.Namespace, *, table: Mapping[str, str] | None = None):
    """Run library code on the options' values: an :class:`InputError` whose ``param`` is
    an option's destination is shown at that option (``--highpass: given -1; ...``).

    ``table`` defaults to the command's own (``args.option_of``, set by
    :func:`groundshake.cli.build_parser` from :func:`option_table`). An error that already
    names a scenario file (the value came from the scenario) passes unchanged.
    """
    table = getattr(args, "option_of", None) or {} if table is None else table
    try:
        yield
    except InputError as e:
        option = table.get(e.param) if e.param is not None else None
        if option is None or getattr(e, "file", None) is not None:
            raise
        raise e.located(option) from None


def print_json(obj: Any) -> None:
    """Print one JSON document on stdout."""
    sys.stdout.write(json_dumps(obj) + "\n")


def float_list(text: str, *, name: str, positive: bool = False,
               minimum: float | None = None) -> list[float]:
    """Parse ``"a,b,c"`` into floats; raise :class:`InputError` naming the option."""
    try:
        values = [float(s) for s in text.replace(";", ",").split(",") if s.strip()]
    except ValueError:
        raise InputError(f"{name}: {text!r} is not a comma-separated list of numbers") from None
    if not values:
        raise InputError(f"{name}: give at least one number")
    for v in values:
        if not math.isfinite(v):
            raise InputError(f"{name}: {v} is not finite")
        if positive and v <= 0:
            raise InputError(f"{name}: {v:g} must be > 0")
        if minimum is not None and v < minimum:
            raise InputError(f"{name}: {v:g} must be >= {minimum:g}")
    return values


def check_damping_percent(values: Iterable[float], *, name: str = "--damping") -> None:
    """Stop on a damping that can only be a ratio typed for percent (0.05 for 5 %);
    warn on an unusual one (ranges in :mod:`groundshake._plausible`).

    Parameters
    ----------
    values : iterable of float
        Damping in percent of critical, as the option gives it.
    name : str
        The option, for the message.
    """
    from .._plausible import check_value

    for v in values:
        check_value("damping_percent", float(v), key=name, stacklevel=2)


def table(rows: Iterable[Iterable[Any]], header: Iterable[str]) -> str:
    """A plain fixed-width text table."""
    header = [str(h) for h in header]
    body = [[_fmt(c) for c in r] for r in rows]
    widths = [max([len(h)] + [len(r[i]) for r in body]) for i, h in enumerate(header)]
    lines = ["  ".join(h.ljust(w) for h, w in zip(header, widths)),
             "  ".join("-" * w for w in widths)]
    lines += ["  ".join(c.rjust(w) if i else c.ljust(w) for i, (c, w) in enumerate(zip(r, widths)))
              for r in body]
    return "\n".join(lines)


def _fmt(c: Any) -> str:
    if isinstance(c, (float, np.floating)):
        return f"{c:.4g}"
    return str(c)
