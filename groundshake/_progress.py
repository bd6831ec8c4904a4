"""Progress of long steps: logged by the library, drawn on stderr only for the CLI.

The library never draws: a bar draws only after the command line has switched bars on
(``show_progress(True)``), and then only on a terminal. Every finished step is logged at
INFO on the ``groundshake`` logger (``logging.getLogger("groundshake")``), so a program
that uses the library sees progress through its own logging setup.
"""
from __future__ import annotations

import logging
import sys
import time

__all__ = ["Progress", "show_progress", "progress_shown", "set_quiet"]

log = logging.getLogger("groundshake")

_SHOW = False


def show_progress(show: bool) -> bool:
    """Switch the drawing of progress bars on or off for this process; return the old state.

    The CLI switches them on (unless ``--quiet``); the library leaves them off.
    """
    global _SHOW
    old, _SHOW = _SHOW, bool(show)
    return old


def progress_shown() -> bool:
    """True while progress bars may draw (the CLI asked for them)."""
    return _SHOW


def set_quiet(quiet: bool) -> None:
    """Silence (or allow) every progress bar of this process: ``show_progress(not quiet)``."""
    show_progress(not quiet)


class Progress:
    """A minimal text progress bar.

    ``with Progress("modes", total=30) as p: p.advance()``. It draws only when
    ``enabled``, stderr is a terminal and quiet mode is off, and redraws at most 10 times a
    second, so it costs nothing in a hot loop's outer level.
    """

    def __init__(self, label: str, total: int | None = None, *, stream=None,
                 enabled: bool = True):
        self.label = label
        self.total = total
        self.done = 0
        self.stream = sys.stderr if stream is None else stream
        isatty = getattr(self.stream, "isatty", lambda: False)
        # ``enabled=False`` makes a bar that never draws (a caller that was asked for none)
        self.enabled = bool(enabled) and _SHOW and bool(isatty())
        self._last = 0.0
        self._t0 = time.perf_counter()

    def __enter__(self) -> "Progress":
        self._draw(force=True)
        return self

    def __exit__(self, *exc) -> None:
        if exc[0] is None:
            log.info("%s: done in %.2f s", self.label, time.perf_counter() - self._t0)
        if self.enabled:
            if exc[0] is None and self.total is not None:
                self.done = self.total
            self._draw(force=True)
            self.stream.write("\n")
            self.stream.flush()

    def advance(self, n: int = 1) -> None:
        self.done += n
        self._draw()

    def _draw(self, force: bool = False) -> None:
        if not self.enabled:
            return
        now = time.perf_counter()
        if not force and now - self._last < 0.1:
            return
        self._last = now
        elapsed = now - self._t0
        if self.total:
            frac = min(1.0, self.done / self.total)
            bar = "#" * int(frac * 24)
            msg = f"\r{self.label:<14} [{bar:<24}] {self.done}/{self.total} {elapsed:5.1f} s"
        else:
            msg = f"\r{self.label:<14} {self.done} {elapsed:5.1f} s"
        self.stream.write(msg)
        self.stream.flush()
