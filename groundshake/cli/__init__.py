"""The ``groundshake`` command line: ``main(argv) -> int``.

Each module of this package holds the commands of one stage (``records``: info and
correct, ``spectrum``, ``match``, ``modes``, ``run``, ``suite``, ``report``: demo and
report) and exposes ``register(subparsers, parents)``; options shared by several commands
are built in ``_options`` (``add_option``), ``_common`` and ``records``. A handler takes
the parsed arguments and returns the exit status. The library never prints; only handlers do.

Exit status: 0 success, 1 a run finished but some part failed (suites),
2 bad input (one line on stderr, no traceback unless ``--debug``), 130 interrupted.
"""
from __future__ import annotations

import argparse
import importlib
import os
import signal
import sys
import warnings

from .. import __version__
from .._errors import GroundshakeError, GroundshakeWarning
from .._progress import show_progress
from ._common import common_options, option_table

__all__ = ["main", "build_parser"]

# Modules that add subcommands, in the order they appear in --help.
_COMMAND_MODULES = (
    "groundshake.cli.records",       # info, correct
    "groundshake.cli.spectrum",      # spectrum
    "groundshake.cli.match",         # match
    "groundshake.cli.modes",         # modes
    "groundshake.cli.run",           # run
    "groundshake.cli.suite",         # suite
    "groundshake.cli.report",        # demo, report
)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="groundshake",
        description="Seismic screening of foundation blocks and their equipment "
                    "(SI units in every output).")
    parser.add_argument("--version", action="version", version=f"groundshake {__version__}")
    parser.add_argument("--debug", action="store_true", help="show a traceback on errors")
    parser.add_argument("--quiet", action="store_true", help="no progress bars on stderr")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    parents = [common_options()]
    for name in _COMMAND_MODULES:
        importlib.import_module(name).register(sub, parents)
    for command in sub.choices.values():  # each command's own option table (errors name options)
        command.set_defaults(option_of=option_table(command))
    return parser


def _show_warning(message, category, filename, lineno, file=None, line=None):
    if issubclass(category, GroundshakeWarning):
        sys.stderr.write(f"groundshake: warning: {message}\n")
    else:
        sys.stderr.write(warnings.formatwarning(message, category, filename, lineno, line))


def main(argv: list[str] | None = None) -> int:
    """Run the CLI; return the exit status (does not call ``sys.exit``)."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as e:          # argparse: --help, --version, usage errors
        return int(e.code or 0)
    debug = bool(getattr(args, "debug", False))
    if not getattr(args, "command", None):
        parser.print_help(sys.stderr)
        return 2
    old_progress = show_progress(not bool(getattr(args, "quiet", False)))  # the CLI draws
    old_show = warnings.showwarning
    warnings.showwarning = _show_warning
    old_term = _term_as_interrupt()
    try:
        return int(args.func(args) or 0)
    except GroundshakeError as e:
        if debug:
            raise
        sys.stderr.write(f"groundshake: error: {e}\n")
        return 2
    except (FileNotFoundError, IsADirectoryError, PermissionError, FileExistsError) as e:
        if debug:
            raise
        where = f"{e.filename}: " if getattr(e, "filename", None) else ""
        sys.stderr.write(f"groundshake: error: {where}{e.strerror or e}\n")
        return 2
    except BrokenPipeError:
        # the reader of stdout went away (``groundshake info ... | head``): not an error
        try:
            sys.stdout = open(os.devnull, "w")
        except OSError:
            pass
        return 0
    except KeyboardInterrupt:
        if debug:
            raise
        sys.stderr.write("groundshake: interrupted; earlier output was left as it was\n")
        return 130
    finally:
        show_progress(old_progress)
        warnings.showwarning = old_show
        if old_term is not None:
            signal.signal(signal.SIGTERM, old_term)


def _raise_interrupt(signum, frame):
    raise KeyboardInterrupt


def _term_as_interrupt():
    """Treat SIGTERM like Ctrl-C so atomic writers clean up; return the old handler."""
    try:
        return signal.signal(signal.SIGTERM, _raise_interrupt)
    except ValueError:  # not the main thread
        return None


def _entry() -> None:  # pragma: no cover
    sys.exit(main())


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
