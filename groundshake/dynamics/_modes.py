"""Natural modes of the block model: shift-invert Lanczos on a sparse factorization.

Solves K φ = ω² M φ for the lowest modes, mass-normalised (φᵀMφ = 1), and reports
participation factors Γ = φᵀ L and effective modal masses Γ² per ground direction, with
L the model's ground load (M ι, or M_ff ι_f + M_fb ι_b on a fixed base).
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

import numpy as np
import scipy.linalg as sla
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .._errors import GroundshakeWarning, InputError
from ._damping import MODAL_DAMPING_CAP, modal_damping

if TYPE_CHECKING:  # pragma: no cover
    from ..model import BlockModel

__all__ = ["Modes", "compute_modes", "lowest_modes", "mass_captured_warnings"]

_DIRS = ("x", "y", "z")
_MAX_MODES = 400


@dataclass(frozen=True, eq=False)
class Modes:
    """The lowest natural modes of a model.

    Attributes
    ----------
    omega, frequency, period : (m,) [rad/s], [Hz], [s].
    shapes : (n, m) mass-normalised mode shapes (φᵀMφ = 1).
    participation : (m, 3) Γ = φᵀL [kg^½] for ground x, y, z (L the ground load).
    effective_mass : (m, 3) Γ² [kg]; effective_mass_ratio : (m, 3) Γ² / total mass;
    cumulative_ratio : (m, 3). damping : (m,) modal damping ratios (composite).
    total_mass : (3,) [kg], every mass of the model. rigid_mass : (3,) [kg], the mass that
    moves rigidly with the ground (m − Lᵀ M⁻¹ L; the base nodes' share on a fixed base),
    so that Σ over all modes of Γ² + rigid_mass = total_mass. warnings : list of str.
    """

    omega: np.ndarray
    frequency: np.ndarray
    period: np.ndarray
    shapes: np.ndarray
    participation: np.ndarray
    effective_mass: np.ndarray
    effective_mass_ratio: np.ndarray
    cumulative_ratio: np.ndarray
    damping: np.ndarray
    total_mass: np.ndarray
    warnings: list
    solver: str = ""
    timings: dict | None = None
    rigid_mass: np.ndarray | None = None

    @property
    def n_modes(self) -> int:
        return self.omega.size

    def dominant_direction(self) -> list[str]:
        """Per mode, the direction (x, y, z) with the largest effective mass ratio, or
        ``"none"`` when no direction holds 0.1 % of the mass (torsion, local modes)."""
        r = self.effective_mass_ratio
        return [_DIRS[i] if r[j, i] >= 1e-3 else "none"
                for j, i in enumerate(np.argmax(r, axis=1))]

    def to_dict(self) -> dict:
        dom = self.dominant_direction()
        modes = []
        for i in range(self.n_modes):
            modes.append({
                "mode": i + 1,
                "frequency": float(self.frequency[i]),
                "period": float(self.period[i]) if np.isfinite(self.period[i]) else None,
                "damping": float(self.damping[i]),
                "participation": dict(zip(_DIRS, map(float, self.participation[i]))),
                "effective_mass": dict(zip(_DIRS, map(float, self.effective_mass[i]))),
                "effective_mass_ratio": dict(zip(_DIRS, map(float, self.effective_mass_ratio[i]))),
                "cumulative_ratio": dict(zip(_DIRS, map(float, self.cumulative_ratio[i]))),
                "dominant_direction": dom[i],
            })
        rigid = np.zeros(3) if self.rigid_mass is None else self.rigid_mass
        return {"total_mass": dict(zip(_DIRS, map(float, self.total_mass))),
                "rigid_mass": dict(zip(_DIRS, map(float, rigid))),
                "n_modes": self.n_modes,
                "captured_ratio": dict(zip(_DIRS, map(float, self.cumulative_ratio[-1])))
                if self.n_modes else {d: 0.0 for d in _DIRS},
                "solver": self.solver,
                "modes": modes, "warnings": list(self.warnings)}


def _factor_of(A, solver):
    from ..linalg import factorize
    return factorize(A, solver=solver)


def lowest_modes(K, M, *, n_modes: int, factor=None, shift: float = 0.0,
                 solver: Literal["auto", "scipy", "pardiso"] = "auto",
                 method: Literal["auto", "lanczos", "block", "amg"] = "auto",
                 tol: float = 1e-10, ncv: int | None = None, stats: dict | None = None):
    """The ``n_modes`` lowest eigenpairs of K φ = λ M φ.

    Parameters
    ----------
    K, M : sparse (n, n) symmetric, M positive definite; K − shift·M must be positive
        definite (use a small negative ``shift`` [rad²/s²] for a free body).
    factor : a factorization of K − shift·M with ``.solve`` (built if None).
    method : ``"lanczos"`` (ARPACK shift-invert through scipy.sparse.linalg.eigsh),
        ``"block"`` (block shift-invert Lanczos with multi-column solves; ARPACK if it
        does not converge), ``"auto"`` (block above 3,000 unknowns, else lanczos) or ``"amg"``
        (LOBPCG preconditioned by smoothed-aggregation algebraic multigrid, pyamg:
        no factorization, for models whose factor would not fit; K must be positive
        definite, so not for a free body).
    stats : dict, optional
        Filled with the block solver's times [s] (``solve_s``, ``orth_s``, ``ritz_s``) and
        counts (``solves``, ``columns``, ``dim``, ``max_residual``).

    Returns
    -------
    lam : (m,) eigenvalues ω² [rad²/s²], ascending; shapes : (n, m), φᵀMφ = 1.
    """
    n = K.shape[0]
    k = int(n_modes)
    if k < 1:
        raise InputError(f"given {n_modes}; allowed >= 1", param="n_modes", value=n_modes)
    if method == "auto":
        method = "block" if n > 3000 else "lanczos"
    if method == "amg" and n > max(3 * k, 200):
        lam, phi = _amg_lobpcg(K, M, k, tol)
        return _normalised(lam, phi, M)
    if factor is None:
        A = K if shift == 0.0 else (K - shift * M)
        factor = _factor_of(sp.csr_matrix(A), solver)
    if n <= max(3 * k, 200):  # small: dense is exact and quick
        lam, phi = sla.eigh((K - shift * M).toarray() if shift else K.toarray(), M.toarray())
        lam, phi = lam[:k] + shift, phi[:, :k]
    elif method == "block" and (out := _block_krylov(K, M, k, factor, shift, tol,
                                                     stats=stats)) is not None:
        lam, phi = out
    else:
        op = spla.LinearOperator((n, n), matvec=factor.solve, dtype=float)
        nc = ncv or min(n - 1, max(2 * k + 1, k + 24))
        rng = np.random.default_rng(12345)
        v0 = rng.standard_normal(n)
        lam, phi = spla.eigsh(K, k=k, M=M, sigma=shift, OPinv=op, which="LM", tol=tol,
                              ncv=nc, v0=v0)
    return _normalised(lam, phi, M)


def _amg_lobpcg(K, M, k: int, tol: float, *, extra: int = 8, maxiter: int = 400):
    """k lowest eigenpairs by LOBPCG with a smoothed-aggregation AMG preconditioner.

    References: Knyazev (2001), SIAM J. Sci. Comput. 23(2) (LOBPCG); Vaněk, Mandel &
    Brezina (1996), Computing 56 (smoothed aggregation). The block carries ``extra``
    vectors beyond ``k`` for convergence; the residual tolerance is at least 1e-8.
    """
    try:
        import pyamg
    except ImportError:
        raise InputError("modes method 'amg' needs pyamg: pip install pyamg") from None
    n = K.shape[0]
    # scaled to unit mean diagonals, so that LOBPCG's absolute residual tolerance means
    # the same for any units; λ = μ·sK/sM
    sK, sM = float(K.diagonal().mean()), float(M.diagonal().mean())
    Kc, Mc = sp.csr_matrix(K) / sK, sp.csr_matrix(M) / sM
    ml = pyamg.smoothed_aggregation_solver(Kc, B=None, max_coarse=500)
    prec = ml.aspreconditioner(cycle="V")
    rng = np.random.default_rng(12345)
    X = rng.standard_normal((n, min(n - 1, k + extra)))
    with warnings.catch_warnings():   # convergence is judged below, on our own measure
        warnings.simplefilter("ignore", UserWarning)
        mu, phi = spla.lobpcg(Kc, X, B=Mc, M=prec, largest=False, tol=max(tol, 1e-9),
                              maxiter=maxiter)
    order = np.argsort(mu)[:k]
    mu, phi = mu[order], phi[:, order]
    KP = Kc @ phi
    rel = np.linalg.norm(KP - (Mc @ phi) * mu, axis=0) / np.maximum(np.linalg.norm(KP, axis=0),
                                                                     1e-300)
    if np.max(rel) > 1e-6:
        warnings.warn(f"modes (amg): LOBPCG stopped with a relative residual of "
                      f"{np.max(rel):.1e} (> 1e-6); the highest modes may be inaccurate",
                      GroundshakeWarning)
    return mu * (sK / sM), phi


def _normalised(lam, phi, M):
    """Ascending order, φᵀMφ = 1, largest component of each shape positive."""
    order = np.argsort(lam)
    lam, phi = lam[order], phi[:, order]
    mm = np.einsum("im,im->m", phi, M @ phi)
    phi = phi / np.sqrt(mm)
    # sign convention: largest component positive
    s = np.sign(phi[np.argmax(np.abs(phi), axis=0), np.arange(phi.shape[1])])
    phi = phi * np.where(s == 0, 1.0, s)
    return lam, phi


def _block_krylov(K, M, k, factor, shift, tol, *, block=None, max_dim=None,
                  stats: dict | None = None):
    """Block shift-invert Lanczos with full reorthogonalisation (no restart).

    Works with A = (K − σM)⁻¹M, self-adjoint in the M inner product. Blocks Q_j of b
    M-orthonormal columns span the Krylov space of A; each step is one solve with b
    right-hand sides (a direct solver does that faster per column than b single solves:
    the factor is read once, BLAS-3 uses every core), then A Q_j is M-orthogonalised
    against the basis V: first against the last two blocks (in exact arithmetic the only
    components), then once against the whole basis (rounding). The projection T = Vᵀ M A V is built from the
    orthogonalisation coefficients, so no product with the whole basis is repeated.
    With W_{j+1} the orthogonalised remainder of A Q_j (Gram matrix G = Wᵀ M W), a Ritz
    pair (θ, y = V c) has the residual ‖A y − θ y‖_M = ‖G^½ c_j‖ (c_j: the entries of c
    on the last block), so convergence costs nothing extra. Converged when that is at
    most 100·tol·θ for the k wanted pairs (the largest θ = 1/(λ − σ)). Returns None when
    ``max_dim`` columns were not enough (the caller falls back to ARPACK).

    References: Golub & Underwood (1977), The block Lanczos method for computing
    eigenvalues; Grimes, Lewis & Simon (1994), SIAM J. Matrix Anal. Appl. 15(1)
    (shifted block Lanczos for vibration problems).
    """
    import time
    n = K.shape[0]
    b = int(block or 10)
    # (np.empty: columns never written cost no memory)
    max_dim = int(max_dim or min(n - 1, max(16 * k, 16 * b, 200)))
    st = stats if stats is not None else {}
    st.update(solve_s=0.0, orth_s=0.0, ritz_s=0.0, solves=0, columns=0)
    rng = np.random.default_rng(12345)
    t0 = time.perf_counter()
    W = factor.solve(M @ rng.standard_normal((n, b)))
    st["solve_s"] += time.perf_counter() - t0
    st["solves"] += 1
    st["columns"] += b
    V = np.empty((n, max_dim))
    MQ = np.empty((n, 0))                  # M times the last two blocks (not the whole basis)
    T = np.zeros((max_dim, max_dim))
    tol_r = max(tol, 1e-12) * 1e2
    d = 0                                  # columns in the basis
    p0 = 0                                 # first column of the previous block
    skip, last, n_step = 0, None, 0        # convergence checks skipped, last (residual, step)
    t0 = time.perf_counter()
    MW = M @ W
    G = W.T @ MW
    while True:
        G = 0.5 * (G + G.T)
        w, U = np.linalg.eigh(G)
        good = w > max(w.max(), 1e-300) * 1e-13
        if not good.any() or d + int(good.sum()) > max_dim:
            return None
        Sc = U[:, good] / np.sqrt(w[good])
        nb = Sc.shape[1]
        j0, d = d, d + nb
        V[:, j0:d] = W @ Sc
        MQj = MW @ Sc
        MQ = np.hstack([MQ[:, MQ.shape[1] - (j0 - p0):], MQj]) if j0 > p0 else MQj
        st["orth_s"] += time.perf_counter() - t0
        t0 = time.perf_counter()
        AQ = factor.solve(MQj)
        st["solve_s"] += time.perf_counter() - t0
        st["solves"] += 1
        st["columns"] += nb
        n_step += 1
        t0 = time.perf_counter()
        # first pass against the last two blocks only (in exact arithmetic A Q_j has no
        # other component), then one pass against the whole basis for rounding
        H1 = MQ.T @ AQ                       # MQ = M V[:, p0:d]
        W = AQ - V[:, p0:d] @ H1
        H = V[:, :d].T @ (M @ W)             # (d, nb): column block of T = Vᵀ M A V
        W -= V[:, :d] @ H
        H[p0:d] += H1
        T[:d, j0:d] = H
        T[j0:d, :d] = H.T
        p0 = j0
        del AQ
        MW = M @ W
        G = W.T @ MW
        st["orth_s"] += time.perf_counter() - t0
        skip -= 1
        if d >= 2 * k + b and skip <= 0:     # Lanczos rarely converges k pairs sooner
            t0 = time.perf_counter()
            Td = 0.5 * (T[:d, :d] + T[:d, :d].T)
            theta, C = np.linalg.eigh(Td)
            theta, C = theta[::-1][:k], C[:, ::-1][:, :k]
            Cl = C[j0:d]                      # coefficients on the last block
            Gs = 0.5 * (G + G.T)
            res = np.sqrt(np.maximum(np.sum((Cl.T @ Gs) * Cl.T, axis=1), 0.0)) / np.abs(theta)
            st["ritz_s"] += time.perf_counter() - t0
            st["max_residual"] = rmax = float(res.max())
            # the residual falls about geometrically with the steps: from the last two
            # checks, skip the steps that cannot reach the tolerance yet (at most 3)
            if last is not None and 0 < rmax < last[0] and rmax > tol_r:
                rate = (rmax / last[0]) ** (1.0 / max(1, n_step - last[1]))
                skip = int(min(3, max(0, np.floor(np.log(tol_r / rmax) / np.log(rate)) - 1)))
            last = (rmax, n_step)
            if np.all(res <= tol_r):
                t0 = time.perf_counter()
                Y = V[:, :d] @ C
                st["ritz_s"] += time.perf_counter() - t0
                st["dim"] = d
                return shift + 1.0 / theta, Y
        t0 = time.perf_counter()


def mass_captured_warnings(cumulative: np.ndarray, excited=(True, True, True), *,
                           threshold: float = 0.9) -> list[str]:
    """Messages for directions whose captured mass ratio is below ``threshold``."""
    out = []
    if cumulative.size == 0:
        return out
    for a, d in enumerate(_DIRS):
        if excited[a] and cumulative[-1, a] < threshold:
            out.append(f"modes capture {100 * cumulative[-1, a]:.1f} % of the mass in {d} "
                       f"(< {100 * threshold:.0f} %, ASCE 7-16 §12.9.1.1 practice); the "
                       "response needs the missing-mass correction or more modes")
    return out


def compute_modes(model: BlockModel, *, cutoff_hz: float | None = None,
                  n_modes: int | None = None,
                  method: Literal["auto", "lanczos", "block", "amg"] = "auto",
                  excited=(True, True, True), warn: bool = True) -> Modes:
    """Lowest modes of a :class:`~groundshake.model.BlockModel`.

    Parameters
    ----------
    model : BlockModel. cutoff_hz : keep all modes up to this frequency [Hz];
    n_modes : or a fixed count (when both are given, the count wins; when neither,
        the model's ``cutoff_hz`` or 50 Hz). method : eigen-solver (see
        :func:`lowest_modes`). excited : directions driven, for the mass warning.

    Returns
    -------
    Modes (warns with GroundshakeWarning when < 90 % of the mass per excited
    direction is captured, ASCE 7-16 §12.9.1.1).
    """
    import time
    t0 = time.perf_counter()
    fac = None if method == "amg" else model.factor()
    t_factor = time.perf_counter() - t0
    n = model.n_dof
    st: dict = {}               # the block solver's own times (its last call)
    K, M = model.K, model.M
    if n_modes is not None:
        if int(n_modes) < 1:
            raise InputError(f"given {n_modes}; allowed >= 1", param="n_modes", value=n_modes)
        k = min(int(n_modes), n if n <= 200 else n - 1)  # all modes only by dense eigh
        lam, phi = lowest_modes(K, M, n_modes=k, factor=fac, method=method, stats=st)
    else:
        fc = cutoff_hz if cutoff_hz is not None else (model.cutoff_hz or 50.0)
        if not fc > 0:
            raise InputError(f"given {fc}; allowed > 0 [Hz]", param="cutoff_hz", value=fc)
        lam_c = (2 * np.pi * fc) ** 2
        k = min(12, n - 1)
        while True:
            lam, phi = lowest_modes(K, M, n_modes=k, factor=fac, method=method, stats=st)
            if lam[-1] > lam_c or k >= n - 1 or k >= _MAX_MODES:
                break
            k = min(2 * k, n - 1, _MAX_MODES)
        keep = lam <= lam_c
        keep[0] = True
        if k >= _MAX_MODES and lam[-1] <= lam_c:
            warnings.warn(f"more than {_MAX_MODES} modes below {fc:g} Hz; kept the lowest "
                          f"{_MAX_MODES}", GroundshakeWarning, stacklevel=2)
        lam, phi = lam[keep], phi[:, keep]
    t_eig = time.perf_counter() - t0 - t_factor
    omega = np.sqrt(np.maximum(lam, 0.0))
    freq = omega / (2 * np.pi)
    with np.errstate(divide="ignore"):
        period = np.where(freq > 0, 1.0 / np.where(freq > 0, freq, 1.0), np.inf)
    gamma = phi.T @ np.asarray(model.ground_load)  # (m, 3)
    meff = gamma ** 2
    total = np.asarray(model.total_mass, float)
    ratio = meff / total[None, :]
    cum = np.cumsum(ratio, axis=0)
    rigid = np.asarray(model.rigid_mass, float)
    # the mass moving rigidly with the ground needs no mode: judge what the modes capture
    # of the mass that can move relative to the ground
    with np.errstate(divide="ignore", invalid="ignore"):
        dyn_cum = np.where(total - rigid > 0, np.cumsum(meff, axis=0) / (total - rigid), 1.0)
    msgs = mass_captured_warnings(dyn_cum, excited)
    if warn:
        for msg in msgs:
            warnings.warn(msg, GroundshakeWarning, stacklevel=2)
    damping = modal_damping(model, phi)
    capped = np.flatnonzero(damping >= MODAL_DAMPING_CAP - 1e-12)
    if capped.size:
        msgs.append(f"modal damping of mode(s) {', '.join(str(i + 1) for i in capped[:10])} "
                    f"limited to {100 * MODAL_DAMPING_CAP:.0f} % (radiation damping would "
                    "give more; ASCE 4 practice, from memory)")
        if warn:
            warnings.warn(msgs[-1], GroundshakeWarning, stacklevel=2)
    return Modes(omega=omega, frequency=freq, period=period, shapes=phi,
                 participation=gamma, effective_mass=meff, effective_mass_ratio=ratio,
                 cumulative_ratio=cum, damping=damping, total_mass=total, warnings=msgs,
                 solver=f"{'' if fac is None else fac.kind} + {_used(method, n, st)}",
                 timings={"factor": t_factor, "eigen": t_eig,
                          **{f"eigen_{k}": v for k, v in st.items()
                             if k in ("solve_s", "orth_s", "ritz_s")}},
                 rigid_mass=rigid)


def _used(method: str, n: int, st: dict) -> str:
    """The eigen-solver that gave the modes (``auto`` resolved, ARPACK fallback named)."""
    if method == "auto":
        method = "block" if n > 3000 else "lanczos"
    if method == "block" and st and "dim" not in st:
        return "block, then lanczos (ARPACK) as fallback"
    return method
