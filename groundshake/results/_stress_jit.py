"""Compiled fold of stress blocks into per-element peaks (numba; imported on first use).

One pass over a block of stresses shaped (c, 6, b) — element-major, as a matrix
product of stress modes and modal histories gives them. Von Mises is √(3 J₂); the
principal stresses are solved (trigonometric form) only when the bound
p + 2√(J₂/3) ≥ σ₁ (or p − 2√(J₂/3) ≤ σ₃) can still beat the element's running peak,
which after the first few steps is rare.
"""
from __future__ import annotations

import math

import numpy as np
from numba import prange

from groundshake._jit_cache import njit

__all__ = ["fold_block"]


@njit(cache=True, nogil=True, fastmath=False)
def _principal(sxx, syy, szz, tyz, txz, txy):
    p = (sxx + syy + szz) / 3.0
    dx = sxx - p
    dy = syy - p
    dz = szz - p
    j2 = 0.5 * (dx * dx + dy * dy + dz * dz) + tyz * tyz + txz * txz + txy * txy
    if j2 <= 0.0:
        return p, p
    j3 = (dx * (dy * dz - tyz * tyz) - txy * (txy * dz - tyz * txz)
          + txz * (txy * tyz - dy * txz))
    c3 = 1.5 * math.sqrt(3.0) * j3 / j2 ** 1.5
    if c3 > 1.0:
        c3 = 1.0
    elif c3 < -1.0:
        c3 = -1.0
    th = math.acos(c3) / 3.0
    r = 2.0 * math.sqrt(j2 / 3.0)
    return p + r * math.cos(th), p + r * math.cos(th + 2.0 * math.pi / 3.0)


@njit(cache=True, parallel=True, nogil=True)
def fold_block(sig, steps, e0, vm, vm_step, ten, ten_step, com, com_step):
    """Fold ``sig`` (c, 6, b) of elements e0..e0+c at record ``steps`` (b,) into the peaks."""
    c = sig.shape[0]
    b = sig.shape[2]
    for i in prange(c):
        e = e0 + i
        bv = vm[e]
        bvs = vm_step[e]
        bt = ten[e]
        bts = ten_step[e]
        bc = com[e]
        bcs = com_step[e]
        for j in range(b):
            sxx = sig[i, 0, j]
            syy = sig[i, 1, j]
            szz = sig[i, 2, j]
            tyz = sig[i, 3, j]
            txz = sig[i, 4, j]
            txy = sig[i, 5, j]
            p = (sxx + syy + szz) / 3.0
            dx = sxx - p
            dy = syy - p
            dz = szz - p
            j2 = 0.5 * (dx * dx + dy * dy + dz * dz) + tyz * tyz + txz * txz + txy * txy
            r = math.sqrt(j2 / 3.0)
            v = 3.0 * r
            if v > bv:
                bv = v
                bvs = steps[j]
            if p + 2.0 * r > bt or p - 2.0 * r < bc:
                s1, s3 = _principal(sxx, syy, szz, tyz, txz, txy)
                if s1 > bt:
                    bt = s1
                    bts = steps[j]
                if s3 < bc:
                    bc = s3
                    bcs = steps[j]
        vm[e] = bv
        vm_step[e] = bvs
        ten[e] = bt
        ten_step[e] = bts
        com[e] = bc
        com_step[e] = bcs


def warm() -> None:
    """Compile once on a tiny block (used by tests and benchmarks)."""
    z = np.zeros(1)
    i = np.zeros(1, dtype=np.int64)
    fold_block(np.zeros((1, 6, 2)), np.arange(2, dtype=np.int64), 0, z.copy(), i.copy(),
               np.full(1, -np.inf), i.copy(), np.full(1, np.inf), i.copy())
