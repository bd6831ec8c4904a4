"""Progress bars: drawn by the command line on a terminal only, never by the library on its
own, never when the caller or --quiet says no (common practice for command-line tools:
progress on stderr, silent when piped; Python's logging HOWTO for libraries: log, and leave
the handlers to the program)."""
import io
import logging

from groundshake._progress import Progress, set_quiet, show_progress


class _Tty(io.StringIO):
    def isatty(self):
        return True


def test_draws_on_a_terminal_only():
    tty, pipe = _Tty(), io.StringIO()
    old = show_progress(True)                   # what the CLI does
    try:
        for stream in (tty, pipe):
            with Progress("steps", total=4, stream=stream) as bar:
                for _ in range(4):
                    bar.advance()
    finally:
        show_progress(old)
    assert "4/4" in tty.getvalue()
    assert pipe.getvalue() == ""


def test_enabled_false_and_quiet_never_draw():
    off, quiet = _Tty(), _Tty()
    old = show_progress(True)
    try:
        with Progress("steps", total=2, stream=off, enabled=False) as bar:
            bar.advance(2)
        set_quiet(True)
        with Progress("steps", total=2, stream=quiet) as bar:
            bar.advance(2)
    finally:
        show_progress(old)
    assert off.getvalue() == "" and quiet.getvalue() == ""


def test_the_library_alone_draws_nothing_and_logs_each_step(caplog):
    tty = _Tty()
    old = show_progress(False)                  # the library's default: no CLI in charge
    try:
        with caplog.at_level(logging.INFO, logger="groundshake"):
            with Progress("modes", total=3, stream=tty) as bar:
                bar.advance(3)
    finally:
        show_progress(old)
    assert tty.getvalue() == ""
    assert any(r.name == "groundshake" and "modes" in r.getMessage() for r in caplog.records)


def test_the_cli_restores_the_library_default(run_cli):
    show_progress(False)
    assert run_cli("--version").status == 0     # argparse exits before any command
    assert run_cli("info", "no-such-file.csv", "--quiet").status == 2
    assert show_progress(False) is False        # still off after main returns
