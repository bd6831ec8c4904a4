"""Compiled (numba) loops of the oscillator kernel; imported only when numba is used.

Layout: oscillators are processed in blocks small enough that their state stays in
the L1 cache; within a block the time loop is outermost and the oscillator loop
innermost and branch-free, so it vectorizes. Every entry point works on a range of
blocks and releases the GIL, so the caller runs ranges on threads (cheaper to compile
and start than numba's ``parallel=True``).
Coefficients come from :func:`._coefficients.step_coefficients` (rows a11 a12 a21 a22
b11 b12 b21 b22 cv cx).
"""
from __future__ import annotations

import numpy as np
from groundshake._jit_cache import njit

__all__ = ["peaks_shared_range", "peaks_mixed_range", "history_range", "rotd_range",
           "rotated_peaks", "NB"]

# Oscillators per block: a compile-time constant, so that the whole state of a block
# sits in one small array at fixed offsets; LLVM then keeps it in registers and
# vectorizes the lane loop with no aliasing checks (measured: separate per-quantity
# arrays fell back to scalar code or to slow masked stores).
NB = 8
# Time steps per chunk. Within a chunk only running maxima are kept (branch-free
# vmaxpd); at each chunk end the chunk maxima update the peaks and remember the chunk
# and its starting state, and a short re-run of that one chunk finds the peak's time.
CH = 64
# Rows of the per-block work array S (each NB long).
_RX, _RV = 10, 11          # state x, v
_RCM = 12                  # 12..14 chunk maxima |x|, |v|, |a|
_RGM = 15                  # 15..17 peaks so far
_RGC = 18                  # 18..20 first step of the chunk holding each peak
_RX0, _RV0 = 21, 22        # state at the start of the current chunk
_RSX = 23                  # 23..25 x at the start of each peak's chunk
_RSV = 26                  # 26..28 v at the start of each peak's chunk
_NROW = 29


def _step_loop(gathered: bool, history: bool):
    """A compiled loop taking the NB lanes of a packed block S through steps i0..i1-1.

    ``loop(F, S, i0, i1, H)``: the forcing of every lane at step i is F[i] → F[i + 1]
    (one shared excitation row), or with ``gathered`` lane j's own F[i·NB + j] →
    F[(i + 1)·NB + j] (a chunk gathered lane by lane, rows from 0). After each step
    the chunk maxima of |x|, |v| and |absolute acceleration| rise, or with ``history``
    the new x is stored in H[j, i + 1] (H is unused otherwise: pass None).

    The two switches are constants of the closure, so numba drops the branches not
    taken and each loop compiles as if written out alone: the lane loop stays
    branch-free and vectorizes. (Sharing the step through an inlined helper instead
    measured about 3x slower: the lane loop was no longer vectorized.)
    """
    @njit(cache=True, nogil=True, fastmath={"contract"})
    def loop(F, S, i0, i1, H):
        for i in range(i0, i1):
            if not gathered:
                f0_row = F[i]
                f1_row = F[i + 1]
            for j in range(NB):
                if gathered:
                    f0 = F[i * NB + j]
                    f1 = F[(i + 1) * NB + j]
                else:
                    f0 = f0_row
                    f1 = f1_row
                xo = S[_RX * NB + j]
                vo = S[_RV * NB + j]
                xn = S[j] * xo + S[NB + j] * vo + S[4 * NB + j] * f0 + S[5 * NB + j] * f1
                vn = S[2 * NB + j] * xo + S[3 * NB + j] * vo + S[6 * NB + j] * f0 + S[7 * NB + j] * f1
                S[_RX * NB + j] = xn
                S[_RV * NB + j] = vn
                if history:
                    H[j, i + 1] = xn
                else:
                    S[_RCM * NB + j] = max(S[_RCM * NB + j], abs(xn))
                    S[(_RCM + 1) * NB + j] = max(S[(_RCM + 1) * NB + j], abs(vn))
                    S[(_RCM + 2) * NB + j] = max(S[(_RCM + 2) * NB + j],
                                                 abs(S[8 * NB + j] * vn + S[9 * NB + j] * xn))
    return loop


_chunk_shared = _step_loop(gathered=False, history=False)
_chunk_gathered = _step_loop(gathered=True, history=False)
_history_steps = _step_loop(gathered=False, history=True)


@njit(cache=True, nogil=True)
def _load_block(coef, k0, k1):
    S = np.zeros(_NROW * NB)
    for r in range(10):
        for j in range(k1 - k0):
            S[r * NB + j] = coef[r, k0 + j]
    return S


@njit(cache=True, nogil=True)
def _start_chunk(S):
    for j in range(NB):
        S[_RX0 * NB + j] = S[_RX * NB + j]
        S[_RV0 * NB + j] = S[_RV * NB + j]
        S[_RCM * NB + j] = 0.0
        S[(_RCM + 1) * NB + j] = 0.0
        S[(_RCM + 2) * NB + j] = 0.0


@njit(cache=True, nogil=True)
def _end_chunk(S, c0):
    for q in range(3):
        for j in range(NB):
            m = S[(_RCM + q) * NB + j]
            if m > S[(_RGM + q) * NB + j]:
                S[(_RGM + q) * NB + j] = m
                S[(_RGC + q) * NB + j] = c0
                S[(_RSX + q) * NB + j] = S[_RX0 * NB + j]
                S[(_RSV + q) * NB + j] = S[_RV0 * NB + j]


@njit(cache=True, nogil=True)
def _finish_block(acc, src, coef, k0, k1, S, pk, ix):
    """Store the peaks; find each one's time by re-running the chunk that holds it."""
    n_steps = acc.shape[1] - 1
    for j in range(k1 - k0):
        k = k0 + j
        r = acc[src[k]]
        a11 = coef[0, k]; a12 = coef[1, k]; a21 = coef[2, k]; a22 = coef[3, k]
        b11 = coef[4, k]; b12 = coef[5, k]; b21 = coef[6, k]; b22 = coef[7, k]
        cv = coef[8, k]; cx = coef[9, k]
        for q in range(3):
            peak = S[(_RGM + q) * NB + j]
            pk[q, k] = peak
            ix[q, k] = 0
            if not peak > 0.0:
                continue
            c0 = int(S[(_RGC + q) * NB + j])
            c1 = min(n_steps, c0 + CH)
            x = S[(_RSX + q) * NB + j]
            v = S[(_RSV + q) * NB + j]
            best = -1.0
            for i in range(c0, c1):
                f0 = r[i]; f1 = r[i + 1]
                xn = a11 * x + a12 * v + b11 * f0 + b12 * f1
                v = a21 * x + a22 * v + b21 * f0 + b22 * f1
                x = xn
                if q == 0:
                    val = abs(x)
                elif q == 1:
                    val = abs(v)
                else:
                    val = abs(cv * v + cx * x)
                if val > best:
                    best = val
                    ix[q, k] = i + 1


@njit(cache=True, nogil=True)
def _block_is_shared(src, k0, k1):
    for k in range(k0, k1):
        if src[k] != src[k0]:
            return False
    return True


@njit(cache=True, nogil=True)
def peaks_shared_range(acc, src, coef, b0, b1, pk, ix):
    """Peaks for oscillator blocks b0..b1-1, each block driven by one row of acc."""
    n_osc = coef.shape[1]
    n_steps = acc.shape[1] - 1
    for b in range(b0, b1):
        k0 = b * NB
        k1 = min(n_osc, k0 + NB)
        S = _load_block(coef, k0, k1)
        row = acc[src[k0]]
        for c0 in range(0, n_steps, CH):
            _start_chunk(S)
            _chunk_shared(row, S, c0, min(n_steps, c0 + CH), None)
            _end_chunk(S, c0)
        _finish_block(acc, src, coef, k0, k1, S, pk, ix)


@njit(cache=True, nogil=True)
def peaks_mixed_range(acc, src, coef, b0, b1, pk, ix):
    """Peaks for oscillator blocks b0..b1-1 whose oscillators may have their own rows."""
    n_osc = coef.shape[1]
    n_steps = acc.shape[1] - 1
    G = np.zeros((CH + 1) * NB)
    for b in range(b0, b1):
        k0 = b * NB
        k1 = min(n_osc, k0 + NB)
        if _block_is_shared(src, k0, k1):
            peaks_shared_range(acc, src, coef, b, b + 1, pk, ix)
            continue
        S = _load_block(coef, k0, k1)
        for c0 in range(0, n_steps, CH):
            c1 = min(n_steps, c0 + CH)
            _start_chunk(S)
            for j in range(k1 - k0):
                r = acc[src[k0 + j]]
                for i in range(c0, c1 + 1):
                    G[(i - c0) * NB + j] = r[i]
            _chunk_gathered(G, S, 0, c1 - c0, None)
            _end_chunk(S, c0)
        _finish_block(acc, src, coef, k0, k1, S, pk, ix)


@njit(cache=True, nogil=True, fastmath={"contract"})
def _history_block(acc, src, coef, k0, k1, hd, hv, ha):
    n_t = acc.shape[1]
    for j in range(k1 - k0):
        k = k0 + j
        a11 = coef[0, k]; a12 = coef[1, k]; a21 = coef[2, k]; a22 = coef[3, k]
        b11 = coef[4, k]; b12 = coef[5, k]; b21 = coef[6, k]; b22 = coef[7, k]
        cv = coef[8, k]; cx = coef[9, k]
        row = acc[src[k]]
        x = 0.0; v = 0.0
        hd[k, 0] = 0.0; hv[k, 0] = 0.0; ha[k, 0] = 0.0
        for i in range(n_t - 1):
            f0 = row[i]; f1 = row[i + 1]
            xn = a11 * x + a12 * v + b11 * f0 + b12 * f1
            v = a21 * x + a22 * v + b21 * f0 + b22 * f1
            x = xn
            hd[k, i + 1] = x; hv[k, i + 1] = v; ha[k, i + 1] = cv * v + cx * x


@njit(cache=True, nogil=True)
def history_range(acc, src, coef, b0, b1, hd, hv, ha):
    """Histories of oscillators b0·NB .. b1·NB-1 (one oscillator at a time)."""
    n_osc = coef.shape[1]
    _history_block(acc, src, coef, b0 * NB, min(n_osc, b1 * NB), hd, hv, ha)


_ARC_MARGIN = 0.01   # degrees added to each side of an arc (the atan2 error is < 1e-5°)


@njit(cache=True, nogil=True, fastmath={"contract"})
def _project_range(a, b, cs, sn, out, k0, k1):
    for k in range(k0, k1):
        out[k] = max(out[k], abs(a * cs[k] + b * sn[k]))


@njit(cache=True, nogil=True, fastmath={"contract"})
def _project_arc(a, b, cs, sn, out, lo, hi):
    """Project (a, b) on the integer angles in [lo, hi] degrees (any real lo ≤ hi)."""
    na = cs.size
    if hi - lo < 1.0:                # the usual case: a narrow arc holds one angle or none
        k = int(np.ceil(lo))
        if k <= hi:
            k %= na
            out[k] = max(out[k], abs(a * cs[k] + b * sn[k]))
        return
    if hi - lo >= na - 1:
        _project_range(a, b, cs, sn, out, 0, na)
        return
    k0 = int(np.ceil(lo))
    k1 = int(np.floor(hi)) + 1
    if k1 <= k0:
        return
    k0 %= na
    k1 = k0 + (k1 - int(np.ceil(lo)))
    if k1 <= na:
        _project_range(a, b, cs, sn, out, k0, k1)
    else:
        _project_range(a, b, cs, sn, out, k0, na)
        _project_range(a, b, cs, sn, out, 0, k1 - na)


@njit(cache=True, nogil=True, error_model="numpy")
def _atan2_deg(y, x):
    """atan2 in degrees, error below 1e-5 degrees (octant reduction + odd polynomial);
    NaN for (0, 0)."""
    ax = abs(x)
    ay = abs(y)
    hi = max(ax, ay)
    t = min(ax, ay) / max(hi, 1e-300)
    k = t > 0.41421356237309503
    t2 = (t - 1.0) / (t + 1.0) if k else t          # atan t = π/4 + atan((t-1)/(t+1))
    z = t2 * t2
    p = t2 * (1.0 + z * (-0.3333333333333333 + z * (0.2 + z * (-0.14285714285714285
              + z * (0.1111111111111111 + z * (-0.09090909090909091
                                               + z * 0.07692307692307693))))))
    a = p + 0.7853981633974483 if k else p
    a = 1.5707963267948966 - a if ay > ax else a
    a = 3.141592653589793 - a if x < 0.0 else a
    a = -a if y < 0.0 else a
    return a * 57.29577951308232 if hi > 0.0 else np.nan


@njit(cache=True, nogil=True)
def _visit(i, n, u1, u2, cs, sn, out, prev_i, prev_al):
    """Raise the rotated peaks with sample i at the angles where it can be a local
    maximum in time: e·(u_i - u_{i-1}) ≥ 0 ≥ e·(u_{i+1} - u_i) (or the reverse).

    Returns the direction of the segment after sample i, which is the segment before
    sample i + 1: a caller visiting i + 1 next passes it back as ``prev_al`` with
    ``prev_i = i`` and saves one arctangent.
    """
    na = cs.size
    a = u1[i]
    b = u2[i]
    if i == 0 or i == n - 1:
        _project_range(a, b, cs, sn, out, 0, na)
        return np.nan
    if prev_i == i - 1:
        al1 = prev_al
    else:
        al1 = _atan2_deg(b - u2[i - 1], a - u1[i - 1])
    al2 = _atan2_deg(u2[i + 1] - b, u1[i + 1] - a)
    if not (al1 == al1 and al2 == al2):      # a zero-length segment: all angles
        _project_range(a, b, cs, sn, out, 0, na)
        return al2
    beta = al2 - al1
    if beta > 180.0:
        beta -= 360.0
    elif beta <= -180.0:
        beta += 360.0
    if beta >= 0.0:
        lo = al1 - 90.0
        hi = lo + beta
    else:
        hi = al1 + 90.0
        lo = hi + beta
    _project_arc(a, b, cs, sn, out, lo - _ARC_MARGIN + 360.0, hi + _ARC_MARGIN + 360.0)
    return al2


_NCLASS = 16    # length classes of the candidates (counting sort)
_FIRST = 0.36   # candidates first: squared length at least 0.36 of the largest (0.6 R)
_NSEC = 16      # direction sectors of a sample (mod 180°), 11.25° each
_SEC_W = 180.0 / _NSEC
# tan of the sector edges in the first quadrant: 11.25°, 22.5°, ... 78.75°
_SEC_TAN = np.tan(np.deg2rad(_SEC_W * np.arange(1, _NSEC // 2)))
_SEC_REFRESH = 64   # visits between refreshes of the sector bounds


def sector_reach(na: int) -> np.ndarray:
    """(_NSEC, na): 1 / max |cos(θ_k − ψ)| over ψ in each sector (widened by 0.01° on
    each side, which covers the rounding of :func:`_sector`); angles θ_k = k° for k < na."""
    th = np.arange(na, dtype=float)
    lo = np.arange(_NSEC)[:, None] * _SEC_W - 0.01
    hi = lo + _SEC_W + 0.02
    d = np.abs(((th[None, :] - lo) + 90.0) % 180.0 - 90.0)      # distance to each edge
    d = np.minimum(d, np.abs(((th[None, :] - hi) + 90.0) % 180.0 - 90.0))
    inside = ((th[None, :] - lo) % 180.0) <= (hi - lo)
    d = np.where(inside, 0.0, d)
    c = np.cos(np.deg2rad(d))
    return 1.0 / np.maximum(c, 1e-300)


_REACH = sector_reach(180)


@njit(cache=True, nogil=True)
def _sector(a, b):
    """The sector (0.._NSEC-1) of the direction of (a, b) modulo 180°, by comparisons."""
    x = abs(a)
    y = abs(b)
    k = 0
    for t in _SEC_TAN:
        k += y > x * t
    if (a >= 0.0) == (b >= 0.0):
        return k
    return _NSEC - 1 - k


@njit(cache=True, nogil=True)
def _sector_bounds(out, reach, bnd2):
    """bnd2[s] = (min_k out[k]·reach[s, k])²: a sample of sector s no longer than that
    cannot raise any rotated peak (|projection| ≤ r·max|cos| ≤ out[k] at every k).
    For angles other than 0..179° (no ``reach``) every sector gets (min_k out[k])²."""
    na = out.size
    if reach.shape[1] != na:
        m = np.inf
        for k in range(na):
            m = min(m, out[k])
        for s in range(_NSEC):
            bnd2[s] = m * m * (1.0 - 1e-12)
        return
    for s in range(_NSEC):
        m = np.inf
        for k in range(na):
            m = min(m, out[k] * reach[s, k])
        bnd2[s] = m * m * (1.0 - 1e-12)


_RCH = 16       # samples per chunk of the rotated-peak search


@njit(cache=True, nogil=True)
def _visit_chunk(c0, c1, n, u1, u2, r2, cs, sn, out, reach, bnd2, low2, state):
    """Visit the samples c0..c1-1 that the bounds cannot rule out; ``state`` holds
    (previous sample visited, its segment direction, visits since the last refresh)."""
    for i in range(c0, c1):
        if r2[i] > low2 and r2[i] > bnd2[_sector(u1[i], u2[i])]:
            state[1] = _visit(i, n, u1, u2, cs, sn, out, int(state[0]), state[1])
            state[0] = i
            state[2] += 1
            if state[2] >= _SEC_REFRESH:
                _sector_bounds(out, reach, bnd2)
                state[2] = 0


@njit(cache=True, nogil=True)
def _lowest(bnd2):
    low2 = bnd2[0]
    for s in range(1, _NSEC):
        low2 = min(low2, bnd2[s])
    return low2


@njit(cache=True, nogil=True, error_model="numpy")
def rotated_peaks(u1, u2, cs, sn, out):
    """out[k] = max_i |u1[i]·cos k° + u2[i]·sin k°| for k = 0..len(cs)-1 (1° steps), exactly.

    Three exact prunings. (1) For any angle the maximum over samples is a local maximum
    in time of |projection|, so an interior sample can hold it only at the angles
    whose direction e satisfies e·(u_i - u_{i-1}) ≥ 0 ≥ e·(u_{i+1} - u_i) (or the
    reverse): an arc as wide as the curve's turn at that sample. (2) Chunks of 16
    samples whose longest is at least 0.6 of the longest of all are visited longest
    first (counting sort into length classes), then the rest in time order; a chunk no
    longer than the bound below is skipped whole. (3) A sample of length r whose
    direction lies in a sector (11.25° wide, found by comparisons) projects on angle k
    at most r·max|cos(k − sector)|: when that is no more than the running peak at every
    k the sample cannot raise any peak and is skipped (the bounds per sector are
    refreshed as the peaks grow; the smallest of them bounds a whole chunk).
    """
    reach = _REACH
    n = u1.size
    na = cs.size
    for k in range(na):
        out[k] = 0.0
    if n == 0:
        return
    n_ch = (n + _RCH - 1) // _RCH
    r2 = np.empty(n)
    cm2 = np.empty(n_ch)
    rmax2 = 0.0
    for j in range(n_ch):
        c0 = j * _RCH
        c1 = min(n, c0 + _RCH)
        m = 0.0
        for i in range(c0, c1):
            v = u1[i] * u1[i] + u2[i] * u2[i]
            r2[i] = v
            m = max(m, v)
        cm2[j] = m
        rmax2 = max(rmax2, m)
    if rmax2 == 0.0:
        return
    thr2 = _FIRST * rmax2
    scale = _NCLASS / (rmax2 - thr2)
    count = np.zeros(_NCLASS + 1, np.int64)
    for j in range(n_ch):
        if cm2[j] >= thr2:
            c = min(_NCLASS - 1, int((rmax2 - cm2[j]) * scale))
            count[c + 1] += 1
    for c in range(_NCLASS):
        count[c + 1] += count[c]
    order = np.empty(count[_NCLASS], np.int64)
    fill = count[:_NCLASS].copy()
    for j in range(n_ch):
        if cm2[j] >= thr2:
            c = min(_NCLASS - 1, int((rmax2 - cm2[j]) * scale))
            order[fill[c]] = j
            fill[c] += 1
    bnd2 = np.zeros(_NSEC)
    state = np.array([-2.0, np.nan, 0.0])
    low2 = 0.0
    for c in range(_NCLASS):
        if state[2] > 0:                         # peaks raised since the last refresh
            _sector_bounds(out, reach, bnd2)
            state[2] = 0
            low2 = _lowest(bnd2)
        if rmax2 - c / scale <= low2:            # the whole class is no longer than L
            break
        for m in range(count[c], count[c + 1]):
            j = order[m]
            if cm2[j] > low2:
                _visit_chunk(j * _RCH, min(n, (j + 1) * _RCH), n, u1, u2, r2, cs, sn, out,
                             reach, bnd2, low2, state)
                low2 = _lowest(bnd2)
    _sector_bounds(out, reach, bnd2)
    state[2] = 0
    low2 = _lowest(bnd2)
    if low2 >= thr2:
        return
    state[0] = -2.0
    for j in range(n_ch):
        if cm2[j] > low2 and cm2[j] < thr2:
            _visit_chunk(j * _RCH, min(n, (j + 1) * _RCH), n, u1, u2, r2, cs, sn, out,
                         reach, bnd2, low2, state)
            low2 = _lowest(bnd2)


@njit(cache=True, nogil=True)
def _history_om(row, S, H):
    """Displacement histories of NB oscillators from rest, one row each of H (NB, n_t),
    packed S."""
    for j in range(NB):
        H[j, 0] = 0.0
        S[_RX * NB + j] = 0.0
        S[_RV * NB + j] = 0.0
    _history_steps(row, S, 0, row.size - 1, H)


@njit(cache=True, nogil=True)
def _rotd_block(acc1, acc2, coef, k0, k1, cs, sn, out):
    n = acc1.size
    S = np.zeros(_NROW * NB)
    for r in range(8):
        for j in range(k1 - k0):
            S[r * NB + j] = coef[r, k0 + j]
    H1 = np.empty((NB, n))
    H2 = np.empty((NB, n))
    _history_om(acc1, S, H1)
    _history_om(acc2, S, H2)
    for j in range(k1 - k0):
        rotated_peaks(H1[j], H2[j], cs, sn, out[k0 + j])


@njit(cache=True, nogil=True)
def rotd_range(acc1, acc2, coef, cs, sn, b0, b1, out):
    """Rotated displacement peaks of oscillator blocks b0..b1-1."""
    n_osc = coef.shape[1]
    for b in range(b0, b1):
        _rotd_block(acc1, acc2, coef, b * NB, min(n_osc, (b + 1) * NB), cs, sn, out)
