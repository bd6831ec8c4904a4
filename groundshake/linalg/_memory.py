"""Memory guard: estimate what a model will need before it is assembled and factored."""
from __future__ import annotations

import os
import re

from .._errors import InputError, ModelTooLargeError

__all__ = ["estimate_memory", "available_memory", "check_memory"]

# Fill of a nested-dissection Cholesky factor of a 3D hex8 grid, nnz(L) ≈ C·n^(4/3)
# (n^(4/3) is the nested-dissection order for 3D grids). C from PARDISO's own count
# (iparm 18) in benchmarks/model.py: 14.6 at 11k DOFs, 15.8 at 48k, 16.2 at 147k, 17.5 at
# 394k; with the 1.3 overhead factor below the estimate matched the measured peak RSS
# there (5.68 vs 5.67 GiB).
_FILL_C = 16.0
_UNITS = {"": 1, "b": 1, "k": 2**10, "kb": 2**10, "m": 2**20, "mb": 2**20,
          "g": 2**30, "gb": 2**30, "t": 2**40, "tb": 2**40}


def estimate_memory(n_nodes: int, *, n_modes: int = 30) -> dict:
    """Bytes needed by assembly and by factor + eigen-solution of a block of ``n_nodes``.

    Returns a dict with ``n_dof``, ``assembly``, ``matrices``, ``factor``, ``eigen`` and
    ``peak`` [bytes].
    """
    n = 3 * n_nodes
    matrices = n * (81 * 12 + 27 * 12) + 16 * n  # K and consistent M in CSR
    assembly = n_nodes * (243 * 8 + 27 * 8 + 27) + 2 * matrices  # stencils + copies
    factor = int(_FILL_C * n ** (4 / 3) * 8 * 1.3) + 81 * n * 4
    eigen = n * (3 * n_modes + 10) * 8
    peak = max(assembly, matrices + factor + eigen)
    return {"n_dof": n, "assembly": assembly, "matrices": matrices, "factor": factor,
            "eigen": eigen, "peak": peak}


def _parse_bytes(text: str) -> int:
    m = re.fullmatch(r"\s*([0-9.eE+]+)\s*([a-zA-Z]*)\s*", text)
    if not m or m.group(2).lower() not in _UNITS:
        raise InputError(f"GROUNDSHAKE_MEMORY_LIMIT: given {text!r}; allowed a number of "
                         "bytes, optionally with a unit (e.g. 8GB, 512MB)")
    return int(float(m.group(1)) * _UNITS[m.group(2).lower()])


def available_memory() -> int | None:
    """Bytes this process may use: GROUNDSHAKE_MEMORY_LIMIT if set, else MemAvailable."""
    env = os.environ.get("GROUNDSHAKE_MEMORY_LIMIT")
    if env:
        return _parse_bytes(env)
    try:
        with open("/proc/meminfo") as f:
            for line in f:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    try:
        import psutil  # optional
        return int(psutil.virtual_memory().available)
    except Exception:  # noqa: BLE001
        return None


def check_memory(n_nodes: int, element_size: float, *, n_modes: int = 30) -> dict:
    """Raise :class:`ModelTooLargeError` when the estimate exceeds the available memory.

    The suggested element size scales the estimate (∝ h^-4 for the factor) to 80 % of
    what is available.
    """
    est = estimate_memory(n_nodes, n_modes=n_modes)
    avail = available_memory()
    est["available"] = avail
    if avail is not None and est["peak"] > avail:
        h = element_size * (est["peak"] / (0.8 * avail)) ** 0.25
        raise ModelTooLargeError(
            f"mesh.element_size = {element_size:g} m gives about {est['n_dof']:,} DOFs, "
            f"needing an estimated {est['peak'] / 2**30:.2f} GiB; "
            f"{avail / 2**30:.2f} GiB is available. Try mesh.element_size = {h:.3g} m "
            "or larger")
    return est
