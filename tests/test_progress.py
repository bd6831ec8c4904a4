"""Progress bars: drawn on a terminal only, never when the caller or --quiet says no
(common practice for command-line tools: progress on stderr, silent when piped)."""
import io

from groundshake._progress import Progress, set_quiet


class _Tty(io.StringIO):
    def isatty(self):
        return True


def test_draws_on_a_terminal_only():
    tty, pipe = _Tty(), io.StringIO()
    for stream in (tty, pipe):
        with Progress("steps", total=4, stream=stream) as bar:
            for _ in range(4):
                bar.advance()
    assert "4/4" in tty.getvalue()
    assert pipe.getvalue() == ""


def test_enabled_false_and_quiet_never_draw():
    off, quiet = _Tty(), _Tty()
    with Progress("steps", total=2, stream=off, enabled=False) as bar:
        bar.advance(2)
    set_quiet(True)
    try:
        with Progress("steps", total=2, stream=quiet) as bar:
            bar.advance(2)
    finally:
        set_quiet(False)
    assert off.getvalue() == "" and quiet.getvalue() == ""
