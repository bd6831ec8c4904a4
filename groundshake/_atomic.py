"""Writers that never leave a half-written file or folder behind.

Every output is written under a temporary name in the destination's own folder
and renamed into place (``os.replace``) only when complete, so an interrupted
run leaves the previous output untouched.
"""
from __future__ import annotations

import contextlib
import os
import shutil
import stat
import tempfile
from pathlib import Path
from typing import Iterator

__all__ = ["atomic_path", "atomic_write_text", "atomic_write_bytes", "atomic_directory",
           "atomic_savefig"]


def _umask() -> int:
    """The process's umask, read without changing it where the system allows."""
    try:    # Linux >= 4.7 reports it; os.umask() alone would change it for a moment
        with open("/proc/self/status", encoding="ascii") as fh:
            for line in fh:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def _plain_mode(target: Path, *, folder: bool) -> int:
    """The permission bits ``open(target, "w")`` (or ``mkdir``) would give ``target``."""
    try:
        if target.exists() and target.is_dir() == folder:
            return stat.S_IMODE(target.stat().st_mode)
    except OSError:
        pass
    return (0o777 if folder else 0o666) & ~_umask()


@contextlib.contextmanager
def atomic_path(path: str | os.PathLike, *, suffix: str | None = None) -> Iterator[Path]:
    """Yield a temporary path beside ``path``; rename it onto ``path`` on success.

    The temporary name keeps the final extension (``suffix`` defaults to it), so
    writers that choose a format from the extension still work. On any exception
    the temporary file is removed and ``path`` is untouched.
    """
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    suffix = path.suffix if suffix is None else suffix
    fd, tmp = tempfile.mkstemp(prefix=f".{path.stem}.", suffix=f".part{suffix}", dir=path.parent)
    os.close(fd)
    tmp_path = Path(tmp)
    try:
        yield tmp_path
        if tmp_path.exists():
            os.chmod(tmp_path, _plain_mode(path, folder=False))
        os.replace(tmp_path, path)
    finally:
        if tmp_path.exists():
            tmp_path.unlink()


def atomic_write_bytes(path: str | os.PathLike, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically; return the final path."""
    with atomic_path(path) as tmp:
        with open(tmp, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    return Path(path)


def atomic_write_text(path: str | os.PathLike, text: str) -> Path:
    """Write UTF-8 ``text`` to ``path`` atomically; return the final path."""
    return atomic_write_bytes(path, text.encode("utf-8"))


def atomic_savefig(fig, path: str | os.PathLike, **savefig_kw) -> Path:
    """Save a matplotlib figure to ``path`` atomically, in the format its extension names.

    ``savefig_kw`` go to ``Figure.savefig`` (``dpi``, ``bbox_inches``...). The figure
    is left open; the caller closes it.
    """
    path = Path(path)
    fmt = path.suffix.lstrip(".").lower() or "png"
    with atomic_path(path) as tmp:
        fig.savefig(tmp, format=fmt, **savefig_kw)
    return path


@contextlib.contextmanager
def atomic_directory(path: str | os.PathLike, *, overwrite: bool = False) -> Iterator[Path]:
    """Yield an empty temporary folder beside ``path``; move it onto ``path`` when done.

    With ``overwrite`` an existing ``path`` is replaced only after the new
    folder is complete (the old one is renamed aside, then removed). On any
    exception, including ``KeyboardInterrupt``, the temporary folder is removed
    and the previous ``path`` is left as it was.
    """
    path = Path(path)
    parent = path.parent
    parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{path.name}.", suffix=".part", dir=parent))
    try:
        yield tmp
        os.chmod(tmp, _plain_mode(path, folder=True))
        if path.exists():
            if not overwrite:
                raise FileExistsError(f"{path}: already exists")
            old = Path(tempfile.mkdtemp(prefix=f".{path.name}.", suffix=".old", dir=parent))
            old.rmdir()
            os.replace(path, old)
            try:
                os.replace(tmp, path)
            except BaseException:
                os.replace(old, path)
                raise
            shutil.rmtree(old, ignore_errors=True)
        else:
            os.replace(tmp, path)
    finally:
        if tmp.exists():
            shutil.rmtree(tmp, ignore_errors=True)
