"""Where compiled (numba) code is cached: a per-user folder, never the package.

numba's own ``cache=True`` writes ``__pycache__`` folders beside the source files,
which for an installed package means inside ``site-packages/groundshake``: that
fails on read-only installs and leaves folders that turn an installed copy into a
namespace package. Every compiled function of groundshake is therefore made by
:func:`njit` below, which keeps numba's cache files in :func:`cache_folder`:

1. ``NUMBA_CACHE_DIR`` when the user set it (read from the environment at each
   call, so it works even when numba was imported before it was set);
2. otherwise ``$XDG_CACHE_HOME/groundshake/numba``, ``%LOCALAPPDATA%\\groundshake\\numba``
   on Windows, or ``~/.cache/groundshake/numba``.

When that folder cannot be made or written to, or numba's cache machinery is not
what this module expects, functions are compiled without a cache (slower first
call, same results); nothing is ever written inside the package.
"""
from __future__ import annotations

import logging
import os
import sys
import tempfile
from pathlib import Path

import numba

__all__ = ["njit", "cache_folder"]

_log = logging.getLogger(__name__)


def cache_folder() -> Path | None:
    """The folder numba's cache files go to, or None when none is usable.

    Returns
    -------
    pathlib.Path or None
        An absolute, existing and writable folder; None when it cannot be made
        or written to (compiled code is then not cached).
    """
    given = os.environ.get("NUMBA_CACHE_DIR", "").strip() or getattr(numba.config, "CACHE_DIR", "")
    if given:
        folder = Path(given).expanduser()
    else:
        if sys.platform == "win32" and os.environ.get("LOCALAPPDATA"):
            base = Path(os.environ["LOCALAPPDATA"])
        else:
            base = Path(os.environ.get("XDG_CACHE_HOME", "").strip() or Path.home() / ".cache")
        folder = base.expanduser() / "groundshake" / "numba"
    try:
        folder = folder.resolve()
        folder.mkdir(parents=True, exist_ok=True)
        tempfile.TemporaryFile(dir=folder).close()    # writable?
    except OSError as exc:
        _log.info("compiled code is not cached: %s is not writable (%s)", folder, exc)
        return None
    return folder


def _cache_class(folder: Path):
    """A numba cache class whose only locator points into ``folder``."""
    from numba.core import caching

    class _Locator(caching.UserProvidedCacheLocator):
        def __init__(self, py_func, py_file):
            super().__init__(py_func, py_file)
            # The same sub-folder scheme as NUMBA_CACHE_DIR (source folder name + hash).
            self._cache_path = os.path.join(os.fspath(folder),
                                            self.get_suitable_cache_subpath(py_file))

        @classmethod
        def from_function(cls, py_func, py_file):
            # Skip UserProvidedCacheLocator's test of numba.config.CACHE_DIR.
            return caching._SourceFileBackedLocatorMixin.from_function.__func__(
                cls, py_func, py_file)

    class _Impl(caching.CompileResultCacheImpl):
        _locator_classes = [_Locator]

    class _Cache(caching.FunctionCache):
        _impl_class = _Impl

    return _Cache


def njit(*args, cache: bool = False, **options):
    """``numba.njit`` whose ``cache=True`` caches in :func:`cache_folder`.

    Used exactly as ``numba.njit`` (with or without arguments). With
    ``cache=True`` the compiled code is kept in the per-user cache folder, or not
    cached at all when that folder is unusable; never beside the source.
    """
    def decorate(func):
        dispatcher = numba.njit(cache=False, **options)(func)
        if cache:
            folder = cache_folder()
            if folder is not None:
                try:
                    dispatcher._cache = _cache_class(folder)(dispatcher.py_func)
                except Exception as exc:    # numba internals moved, or the folder vanished
                    _log.info("compiled code of %s is not cached: %s", func.__qualname__, exc)
        return dispatcher

    if len(args) == 1 and callable(args[0]) and not options:
        return decorate(args[0])
    if args:
        raise TypeError("njit takes the function or keyword options only")
    return decorate
