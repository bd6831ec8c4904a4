"""Sparse factorizations of symmetric positive definite matrices, reused for many solves.

PARDISO (through pypardiso's library loader, MKL) is used as SPD (mtype = 2) on the
upper triangle, through a thin wrapper that keeps the 1-based index arrays and turns
iterative refinement off; scipy's SuperLU is the pure-scipy path that works everywhere.
"""
from __future__ import annotations

import ctypes
from typing import Literal

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .._errors import GroundshakeError

__all__ = ["Factor", "factorize", "pardiso_available"]


def pardiso_available() -> bool:
    """True when pypardiso and its MKL library load on this machine."""
    try:
        _solver_lib()
        return True
    except Exception:  # noqa: BLE001 - any failure means "not available"
        return False


_LIB = None


class _Lib:
    """The MKL ``pardiso`` entry point (found the way pypardiso finds it, but without
    the slow ``find_library`` shell-out when the wheel's library sits in ``sys.prefix``)."""

    def __init__(self):
        import glob
        import os
        import sys
        # MKL's OpenMP threads spin for 200 ms after each call by default, which starves
        # numpy's own BLAS threads between the many solves of an eigen-solution.
        os.environ.setdefault("KMP_BLOCKTIME", "0")
        path = os.environ.get("PYPARDISO_MKL_RT")
        cands = [path] if path else []
        for root in (sys.prefix, getattr(sys, "base_prefix", sys.prefix)):
            cands += sorted(glob.glob(os.path.join(root, "lib", "libmkl_rt.so*")), key=len)
        lib = None
        for c in cands:
            try:
                lib = ctypes.CDLL(c)
                break
            except OSError:
                continue
        if lib is None:
            from pypardiso.pardiso_wrapper import PyPardisoSolver  # slower search
            lib = PyPardisoSolver().libmkl
        self._mkl_pardiso = f = lib.pardiso
        self._pt_type = ((ctypes.c_int64, np.int64) if ctypes.sizeof(ctypes.c_void_p) == 8
                         else (ctypes.c_int32, np.int32))
        i32 = ctypes.POINTER(ctypes.c_int32)
        f.argtypes = [ctypes.POINTER(self._pt_type[0]), i32, i32, i32, i32, i32,
                      ctypes.c_void_p, i32, i32, i32, i32, i32, i32,
                      ctypes.c_void_p, ctypes.c_void_p, i32]
        f.restype = None


def _solver_lib():
    global _LIB
    if _LIB is None:
        _LIB = _Lib()
    return _LIB


class Factor:
    """A factorization of A (n, n); ``solve(B)`` returns A⁻¹B for B (n,) or (n, k)."""

    kind: str = ""
    n: int = 0
    factor_nnz: int | None = None
    peak_bytes: int | None = None

    def solve(self, B: np.ndarray) -> np.ndarray:  # pragma: no cover - interface
        raise NotImplementedError

    def free(self) -> None:
        pass


class _SuperLUFactor(Factor):
    kind = "scipy-splu"

    def __init__(self, A):
        self.n = A.shape[0]
        self._lu = spla.splu(sp.csc_matrix(A), permc_spec="MMD_AT_PLUS_A",
                             options={"SymmetricMode": True})
        self.factor_nnz = int(self._lu.L.nnz + self._lu.U.nnz)

    def solve(self, B):
        B = np.asarray(B, dtype=float)
        return self._lu.solve(B)


class _PardisoFactor(Factor):
    kind = "pardiso"

    def __init__(self, A):
        lib = _solver_lib()
        self._f = lib._mkl_pardiso
        self._pt_t = lib._pt_type
        U = sp.triu(A, format="csr")
        U.sort_indices()
        self.n = U.shape[0]
        self._data = np.ascontiguousarray(U.data, dtype=np.float64)
        self._ia = (U.indptr + 1).astype(np.int32)
        self._ja = (U.indices + 1).astype(np.int32)
        self._pt = np.zeros(64, dtype=self._pt_t[1])
        self._iparm = np.zeros(64, dtype=np.int32)
        ip = self._iparm
        ip[0] = 1    # own settings
        ip[1] = 2    # nested dissection (METIS)
        ip[7] = 0    # no iterative refinement steps
        ip[9] = 8    # pivot perturbation 1e-8
        ip[17] = -1  # report factor nnz
        ip[26] = 0   # no matrix checker
        self._perm = np.zeros(0, dtype=np.int32)
        self._call(12, np.zeros((self.n, 1)))
        self.factor_nnz = int(ip[17])
        self.peak_bytes = int(max(ip[14], ip[15] + ip[16])) * 1024

    def _call(self, phase, b):
        b = np.asfortranarray(b, dtype=np.float64)
        x = np.zeros_like(b)
        err = ctypes.c_int32(0)
        i32 = ctypes.POINTER(ctypes.c_int32)
        f64 = ctypes.POINTER(ctypes.c_double)
        nrhs = 1 if b.ndim == 1 else b.shape[1]
        self._f(self._pt.ctypes.data_as(ctypes.POINTER(self._pt_t[0])),
                ctypes.byref(ctypes.c_int32(1)), ctypes.byref(ctypes.c_int32(1)),
                ctypes.byref(ctypes.c_int32(2)), ctypes.byref(ctypes.c_int32(phase)),
                ctypes.byref(ctypes.c_int32(self.n)), self._data.ctypes.data_as(f64),
                self._ia.ctypes.data_as(i32), self._ja.ctypes.data_as(i32),
                self._perm.ctypes.data_as(i32), ctypes.byref(ctypes.c_int32(nrhs)),
                self._iparm.ctypes.data_as(i32), ctypes.byref(ctypes.c_int32(0)),
                b.ctypes.data_as(f64), x.ctypes.data_as(f64), ctypes.byref(err))
        if err.value != 0:
            raise GroundshakeError(
                f"sparse factorization failed (PARDISO error {err.value}); the stiffness "
                "matrix is not positive definite - is the model supported?")
        return x

    def solve(self, B):
        B = np.asarray(B, dtype=float)
        x = self._call(33, B)
        return np.ascontiguousarray(x)

    def free(self):
        # also called from __del__, where __init__ may have failed before _pt was set
        if getattr(self, "_pt", None) is not None and np.any(self._pt):
            self._call(-1, np.zeros((self.n, 1)))
            self._pt[:] = 0

    def __del__(self):  # release MKL memory with the object
        try:
            self.free()
        except Exception:  # noqa: BLE001
            pass


def factorize(A, *, solver: Literal["auto", "scipy", "pardiso"] = "auto") -> Factor:
    """Factor a sparse SPD matrix A (n, n).

    ``auto`` uses PARDISO where it loads and scipy's SuperLU otherwise (SuperLU is
    fine to some 50k unknowns and becomes very slow and large beyond).
    """
    A = sp.csr_matrix(A)
    if solver == "auto":
        solver = "pardiso" if pardiso_available() else "scipy"
    if solver == "pardiso":
        return _PardisoFactor(A)
    if solver == "scipy":
        return _SuperLUFactor(A)
    raise ValueError(f"solver={solver!r}; allowed 'auto', 'scipy', 'pardiso'")
