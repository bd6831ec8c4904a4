"""numba's compiled-code cache lives in a per-user folder, never inside the package.

Each check runs a fresh interpreter on a copy of the package (so leftovers of other
runs in the checkout cannot hide or fake a result) with its own cache folders.

Sources: numba's documentation on caching (``cache=True`` writes index and data files,
``*.nbi``/``*.nbc``, into the module's ``__pycache__`` unless ``NUMBA_CACHE_DIR`` names
another folder) and the XDG Base Directory Specification (``$XDG_CACHE_HOME``, default
``~/.cache``); keeping caches out of installed packages is common practice.
"""
from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

pytest.importorskip("numba")

import groundshake

PACKAGE = Path(groundshake.__file__).parent

# Runs one compiled kernel of each module that holds compiled code: the oscillator
# kernel (spectra) and the stress fold (results, parallel=True).
SCRIPT = """
import numpy as np
import numba
import groundshake
from groundshake.spectra import response_spectrum
from groundshake.results._stress import _jit
t = np.arange(400) * 0.01
sp = response_spectrum(np.sin(2 * np.pi * t), 0.01, np.array([0.1, 0.5, 1.0]), 0.05,
                       engine="numba")
assert np.all(np.isfinite(sp.psa))
mod = _jit()
assert mod is not None
print("ok", groundshake.__name__)
"""


def _run(tmp_path: Path, env_extra: dict[str, str], *, first: str = "") -> tuple[Path, str]:
    """Copy the package into tmp_path/src, run SCRIPT there; return (package copy, stdout)."""
    src = tmp_path / "src"
    if not src.exists():
        shutil.copytree(PACKAGE, src / "groundshake",
                        ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
    env = {k: v for k, v in os.environ.items() if not k.startswith("NUMBA_")}
    env.pop("GROUNDSHAKE_NO_NUMBA", None)
    env.update({"PYTHONPATH": str(src), "PYTHONDONTWRITEBYTECODE": "1", "HOME": str(tmp_path / "home")},
               **env_extra)
    out = subprocess.run([sys.executable, "-c", first + SCRIPT], cwd=tmp_path, env=env,
                         capture_output=True, text=True, timeout=600)
    assert out.returncode == 0, out.stderr[-2000:]
    return src / "groundshake", out.stdout


def _index_files(folder: Path) -> list[Path]:
    # numba's index (*.nbi) and data (*.nbc) files
    return sorted(p for p in folder.rglob("*") if p.suffix in (".nbi", ".nbc"))


def test_cache_goes_to_the_user_cache_folder_not_the_package(tmp_path):
    cache_home = tmp_path / "xdg"
    package, stdout = _run(tmp_path, {"XDG_CACHE_HOME": str(cache_home)})
    assert "ok groundshake" in stdout
    assert _index_files(package) == []                         # nothing inside the package
    assert list(package.rglob("__pycache__")) == []
    assert _index_files(cache_home / "groundshake" / "numba")  # the XDG base directory rule
    # A second run finds the same cache and still writes nothing into the package.
    package, _ = _run(tmp_path, {"XDG_CACHE_HOME": str(cache_home)})
    assert _index_files(package) == []


def test_numba_cache_dir_is_honoured_even_when_set_after_numba_was_imported(tmp_path):
    chosen = tmp_path / "mine"
    # numba reads NUMBA_CACHE_DIR when numba.config is first imported (numba docs,
    # "Environment variables"); here it is set only afterwards.
    first = f"import os, numba\nos.environ['NUMBA_CACHE_DIR'] = {str(chosen)!r}\n"
    package, _ = _run(tmp_path, {"XDG_CACHE_HOME": str(tmp_path / "xdg")}, first=first)
    assert _index_files(package) == []
    assert _index_files(chosen)
    assert not (tmp_path / "xdg").exists()


def test_an_unusable_cache_folder_means_no_cache_and_no_failure(tmp_path):
    # A file where the cache folder's parent should be: mkdir fails even for root,
    # as on a read-only or unwritable home.
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("x")
    package, stdout = _run(tmp_path, {"XDG_CACHE_HOME": str(blocker)})
    assert "ok groundshake" in stdout
    assert _index_files(package) == []
    assert _index_files(tmp_path) == []                       # nothing cached anywhere


def test_every_compiled_module_uses_the_one_cache_rule():
    # No module calls numba's own njit/jit with cache=True directly.
    offenders = []
    for path in PACKAGE.rglob("*.py"):
        text = path.read_text(encoding="utf-8")
        if path.name != "_jit_cache.py" and ("from numba import njit" in text
                                            or "from numba import jit" in text
                                            or "numba.njit(" in text or "numba.jit(" in text):
            offenders.append(path.name)
    assert offenders == []
