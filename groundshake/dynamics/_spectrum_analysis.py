"""Response-spectrum analysis: modal peaks from a design spectrum, CQC, missing mass.

For ground direction d and mode n (mass-normalised shape φₙ, participation Γₙd,
circular frequency ωₙ, damping ξₙ) the peak modal response of any linear quantity
y = A u (a displacement-type row: displacement, strain, stress, spring force) or
y = A ü + G a_g (an absolute-acceleration-type row: accelerations, inertia forces) is

    yₙd = (A φₙ) Γₙd Sa_d(Tₙ, ξₙ) / ωₙ²        (displacement type)
    yₙd = (A φₙ) Γₙd Sa_d(Tₙ, ξₙ)              (acceleration type, pseudo = absolute)

The modal peaks of one direction are combined by CQC (Der Kiureghian 1981)

    y_d = √(Σᵢ Σⱼ yᵢd ρᵢⱼ yⱼd),

the modes left out respond rigidly at the zero-period acceleration ZPA_d (missing
mass: displacement-type r_d = A R_d ZPA_d with R the static residual shapes,
acceleration-type r_d = (G_d − A Φ Γ_d) ZPA_d), added by SRSS,
Y_d = √(y_d² + r_d²) (USNRC RG 1.92 Rev. 3, from memory), and the three directions by
SRSS or by the 100-40-40 rule (RG 1.92 Rev. 3; ASCE 4). Every result is a peak
magnitude: signs and simultaneity are lost.

Stiff modes respond partly in phase with the ground: their rigid share αₙ = ZPA/Saₙ
(Lindley & Yow 1980, for modes stiffer than the spectrum's peak) is summed
algebraically with the missing mass and only the periodic share √(1 − αₙ²) enters the
CQC (the treatment of RG 1.92 Rev. 3, from memory). A rigid structure then carries
exactly its mass times the ZPA, which whole-mode CQC plus SRSS of the missing mass
would underestimate.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Literal

import numpy as np
import scipy.sparse as sp

from .._errors import InputError

if TYPE_CHECKING:  # pragma: no cover
    from ..spectra import TargetSpectrum

__all__ = ["cqc_correlation", "damping_factor", "spectral_accelerations", "combine_modes",
           "rigid_fractions", "zero_period_acceleration", "ellipsoid_quadratic_max",
           "VON_MISES_FORM",
           "combine_directions", "ModalSpectrum", "modal_spectrum", "DIRECTION_RULES",
           "DEFAULT_VERTICAL_FRACTION"]

#: Direction-combination rules (``[analysis] direction_combination``).
DIRECTION_RULES = ("srss", "100-40-40")

#: Vertical design spectrum as a share of the horizontal when no vertical target is
#: given: 2/3, the long-period ratio of USNRC RG 1.60 and of ASCE 4 (common practice,
#: from memory). At short periods the vertical can exceed this ratio near the source.
DEFAULT_VERTICAL_FRACTION = 2.0 / 3.0


def cqc_correlation(omega: np.ndarray, damping: np.ndarray) -> np.ndarray:
    """CQC correlation coefficients of modal peaks.

    Parameters
    ----------
    omega : ndarray (m,)
        Circular frequencies [rad/s], > 0.
    damping : ndarray (m,) or float
        Modal damping ratios, ≥ 0.

    Returns
    -------
    ndarray (m, m)
        ρᵢⱼ, symmetric, ρᵢᵢ = 1 (for ξᵢ > 0).

    Notes
    -----
    With r = ωⱼ/ωᵢ (Der Kiureghian 1981, for white-noise input)::

        ρᵢⱼ = 8√(ξᵢξⱼ)(ξᵢ + r ξⱼ) r^1.5
              / ((1 − r²)² + 4 ξᵢ ξⱼ r (1 + r²) + 4 (ξᵢ² + ξⱼ²) r²)

    Two undamped modes are uncorrelated unless their frequencies coincide (ρ = 1 then).

    References
    ----------
    Der Kiureghian, A. (1981), "A response spectrum method for random vibration
    analysis of MDF systems", Earthquake Engineering and Structural Dynamics 9(5).
    """
    w = np.asarray(omega, dtype=float).reshape(-1)
    z = np.broadcast_to(np.asarray(damping, dtype=float), w.shape)
    if np.any(~np.isfinite(w) | (w <= 0)):
        raise InputError("cqc_correlation: omega must be finite and > 0 rad/s")
    if np.any(~np.isfinite(z) | (z < 0)):
        raise InputError("cqc_correlation: damping ratios must be finite and >= 0")
    r = w[None, :] / w[:, None]
    zi, zj = z[:, None], z[None, :]
    num = 8.0 * np.sqrt(zi * zj) * (zi + r * zj) * r ** 1.5
    den = (1.0 - r * r) ** 2 + 4.0 * zi * zj * r * (1.0 + r * r) + 4.0 * (zi * zi + zj * zj) * r * r
    with np.errstate(divide="ignore", invalid="ignore"):
        rho = np.where(den > 0, num / np.where(den > 0, den, 1.0), 1.0)
    rho = 0.5 * (rho + rho.T)           # symmetric to round-off
    np.fill_diagonal(rho, 1.0)
    return np.clip(rho, 0.0, 1.0)


def damping_factor(damping: np.ndarray | float) -> np.ndarray:
    """Damping correction η of a 5 %-damped spectrum.

    Parameters
    ----------
    damping : float or ndarray
        Damping ratio(s).

    Returns
    -------
    ndarray
        η = √(10 / (5 + ξ[%])) ≥ 0.55 (EN 1998-1:2004 §3.2.2.2, eq. 3.6), shape of
        ``damping``; 1 at 5 %.
    """
    pct = 100.0 * np.asarray(damping, dtype=float)
    return np.maximum(np.sqrt(10.0 / (5.0 + pct)), 0.55)


def spectral_accelerations(target: TargetSpectrum, periods: np.ndarray, damping: np.ndarray, *,
                           scale: float = 1.0) -> tuple[np.ndarray, list[str]]:
    """Spectral pseudo-accelerations of a target at the modes' periods and damping.

    Parameters
    ----------
    target : TargetSpectrum
        From :func:`groundshake.spectra.parse_target`.
    periods : ndarray (m,)
        Modal periods [s].
    damping : ndarray (m,)
        Modal damping ratios.
    scale : float
        Factor on the whole target (e.g. the vertical fraction).

    Returns
    -------
    sa : ndarray (m,)
        [m/s²].
    notes : list of str
        What was assumed (periods outside a table, damping correction).

    Notes
    -----
    An EN 1998-1 target is evaluated again at each mode's damping (its own η). Any other
    target takes the EN 1998-1 §3.2.2.2 form of the correction, with e = η(ξₙ)/η(ξ_target):
    from the spectrum's peak on (T ≥ T_peak) Sa·e; below it only the amplification over
    the zero-period acceleration is corrected, Sa_ξ = ZPA + (Sa − ZPA)(β e − 1)/(β − 1)
    with β = Sa_peak/ZPA, so the curve stays continuous at T_peak and tends to the
    damping-independent ZPA at T → 0 (for β = 2.5 this is EN 1998-1's own
    1 + T/T_B(2.5η − 1) branch). A table is held at its end values outside its periods.
    """
    T = np.asarray(periods, dtype=float).reshape(-1)
    z = np.broadcast_to(np.asarray(damping, dtype=float), T.shape)
    notes: list[str] = []
    if T.size == 0:
        return np.zeros(0), notes
    sa = _psa_held(target, T, notes)
    if target.kind == "en1998":
        from ..spectra._targets import en1998_spectrum
        p = target.parameters
        uniq = np.unique(np.round(z, 12))
        for zu in uniq:
            sel = np.isclose(z, zu, rtol=0, atol=1e-12)
            spec = en1998_spectrum(int(p["type"]), str(p["ground"]), float(p["ag"]),
                                   damping_percent=100.0 * float(zu))
            sa[sel] = spec.psa(T[sel])
        if uniq.size > 1 or not np.isclose(uniq[0], target.damping):
            notes.append("EN 1998-1 target evaluated at each mode's damping "
                         "(η = √(10/(5+ξ)) ≥ 0.55, EN 1998-1 §3.2.2.2).")
    else:
        ref = float(damping_factor(target.damping))
        eta = damping_factor(z) / ref
        if np.any(np.abs(eta - 1.0) > 1e-12):
            t_peak, peak, zpa = _peak_of(target)
            beta = peak / zpa if zpa > 0 else np.inf
            if np.isfinite(beta) and beta > 1.0:
                rising = zpa + (sa - zpa) * (beta * eta - 1.0) / (beta - 1.0)
                sa = np.where(T < t_peak, rising, sa * eta)
            else:
                sa = sa * eta
            notes.append(f"Target for {100 * target.damping:g} % damping corrected to each "
                         "mode's damping in the form of EN 1998-1 §3.2.2.2 (η = √(10/(5+ξ%)) "
                         "≥ 0.55): × η(ξ)/η(ξ_target) from the spectrum's peak on, only the "
                         "amplification over the ZPA below it.")
    return sa * float(scale), notes


def _peak_of(target) -> tuple[float, float, float]:
    """(shortest period of the maximum [s], maximum, ZPA) of a target [m/s²]."""
    grid = np.geomspace(0.005, 10.0, 1200)
    vals = np.asarray(target.psa(grid), dtype=float)
    ok = np.isfinite(vals)
    zpa = float(_psa_held(target, np.array([0.0]), [])[0])
    if not np.any(ok):
        return 0.0, zpa, zpa
    top = float(np.max(vals[ok]))
    return float(grid[ok][np.argmax(vals[ok] >= top * (1.0 - 1e-9))]), top, zpa


def _psa_held(target, T: np.ndarray, notes: list[str]) -> np.ndarray:
    """Target PSA [m/s²] at T, held at a table's end values where it is undefined."""
    sa = np.asarray(target.psa(T), dtype=float).copy()
    bad = ~np.isfinite(sa)
    if np.any(bad):
        probe = np.geomspace(1e-3, 1e3, 2001)
        vals = np.asarray(target.psa(probe), dtype=float)
        ok = np.isfinite(vals)
        if not np.any(ok):
            raise InputError(f"target {target.label}: defined at no period")
        lo_t, hi_t = probe[ok][0], probe[ok][-1]
        sa[bad & (T < lo_t)] = vals[ok][0]
        sa[bad & (T > hi_t)] = vals[ok][-1]
        if np.any(bad & (T < lo_t)):
            notes.append(f"target {target.label}: periods below {lo_t:.3g} s take its first "
                         "value (held constant).")
        if np.any(bad & (T > hi_t)):
            notes.append(f"target {target.label}: periods above {hi_t:.3g} s take its last "
                         "value (held constant; conservative where the spectrum falls).")
    return sa


def zero_period_acceleration(target, *, scale: float = 1.0) -> tuple[float, list[str]]:
    """The target's zero-period acceleration [m/s²] (its value at T = 0, or at its shortest
    period when it starts later: conservative for a falling short-period branch)."""
    notes: list[str] = []
    v = _psa_held(target, np.array([0.0]), notes)[0]
    return float(v) * float(scale), notes


def combine_modes(peaks: np.ndarray, rho: np.ndarray, residual: np.ndarray | None = None,
                  *, rigid_fraction: np.ndarray | None = None) -> np.ndarray:
    """CQC of modal peaks, plus a rigid (missing-mass) part by SRSS.

    Parameters
    ----------
    peaks : ndarray (k, m)
        Signed modal peaks yₙ of k quantities.
    rho : ndarray (m, m)
        Correlation coefficients (:func:`cqc_correlation`; the identity gives SRSS).
    residual : ndarray (k,), optional
        Signed rigid response of the modes left out at the zero-period acceleration
        (same sign convention as ``peaks``).
    rigid_fraction : ndarray (m,), optional
        αₙ in [0, 1], the share of each mode's peak that is in phase with the ground
        (rigid); 0 when omitted.

    Returns
    -------
    ndarray (k,)
        √(y_pᵀ ρ y_p + y_r²) ≥ 0 with the periodic parts y_p,n = √(1 − αₙ²)·yₙ and the
        rigid part y_r = Σₙ αₙ yₙ + r summed algebraically (USNRC RG 1.92 Rev. 3, from
        memory). With α = 0: √(yᵀρy + r²).
    """
    Y = np.asarray(peaks, dtype=float)
    if Y.ndim == 1:
        Y = Y[None, :]
    rigid = np.zeros(Y.shape[0])
    if rigid_fraction is not None and Y.shape[1]:
        a = np.clip(np.asarray(rigid_fraction, dtype=float).reshape(-1), 0.0, 1.0)
        rigid = Y @ a
        Y = Y * np.sqrt(1.0 - a * a)[None, :]
    q = np.einsum("km,km->k", Y @ np.asarray(rho, dtype=float), Y) if Y.shape[1] else \
        np.zeros(Y.shape[0])
    if residual is not None:
        rigid = rigid + np.asarray(residual, dtype=float)
    return np.sqrt(np.maximum(q + rigid * rigid, 0.0))


def rigid_fractions(target, periods: np.ndarray, sa: np.ndarray, zpa: float) -> np.ndarray:
    """Rigid-response fractions of modes (Lindley & Yow 1980).

    Parameters
    ----------
    target : TargetSpectrum
    periods : ndarray (m,)
        Modal periods [s].
    sa : ndarray (m,)
        The modes' spectral accelerations [m/s²] (damping corrected, scaled).
    zpa : float
        Zero-period acceleration [m/s²] on the same scale as ``sa``.

    Returns
    -------
    ndarray (m,)
        αₙ = ZPA / Saₙ (≤ 1) for modes stiffer than the spectrum's peak (period below the
        shortest period where the target reaches its maximum), 0 for the others.

    References
    ----------
    Lindley, D.W. and Yow, T.R. (1980), "Modal response summation for seismic
    qualification", ASCE Second Conference on Civil Engineering and Nuclear Power; adopted
    in USNRC RG 1.92 Rev. 3 (from memory).
    """
    T = np.asarray(periods, dtype=float).reshape(-1)
    t_peak, _, _ = _peak_of(target)
    if zpa <= 0:
        return np.zeros(T.size)
    with np.errstate(divide="ignore", invalid="ignore"):
        a = np.where(np.asarray(sa) > 0, zpa / np.asarray(sa), 1.0)
    return np.where(T < t_peak, np.clip(a, 0.0, 1.0), 0.0)


def combine_directions(per_direction: np.ndarray,
                       rule: Literal["srss", "100-40-40"] = "srss") -> np.ndarray:
    """Combine the peaks of the three ground directions.

    Parameters
    ----------
    per_direction : ndarray (3, ...)
        Peak magnitudes for ground x, y, z.
    rule : {"srss", "100-40-40"}
        SRSS, or the largest of R_a + 0.4 R_b + 0.4 R_c over the three choices of the
        full direction a (USNRC RG 1.92 Rev. 3; ASCE 4).

    Returns
    -------
    ndarray (...)
    """
    R = np.abs(np.asarray(per_direction, dtype=float))
    if rule == "srss":
        return np.sqrt(np.sum(R * R, axis=0))
    if rule == "100-40-40":
        s = np.sum(R, axis=0)
        return np.max(0.6 * R + 0.4 * s[None], axis=0)
    raise InputError(f"given {rule!r}; allowed " + ", ".join(repr(r) for r in DIRECTION_RULES),
                     param="direction_combination", value=rule)


def _dense(a) -> np.ndarray:
    return np.asarray(a.toarray() if sp.issparse(a) else a, dtype=float)


#: von Mises² = sᵀ P s for s = [σxx, σyy, σzz, τyz, τxz, τxy].
VON_MISES_FORM = np.array([[1.0, -0.5, -0.5, 0, 0, 0], [-0.5, 1.0, -0.5, 0, 0, 0],
                           [-0.5, -0.5, 1.0, 0, 0, 0], [0, 0, 0, 3.0, 0, 0],
                           [0, 0, 0, 0, 3.0, 0], [0, 0, 0, 0, 0, 3.0]])


def ellipsoid_quadratic_max(cov: np.ndarray, form: np.ndarray) -> np.ndarray:
    """Largest value of a quadratic form over the response ellipsoid.

    Parameters
    ----------
    cov : ndarray (k, g, g)
        Response covariances Σ (positive semi-definite), e.g. from
        :meth:`ModalSpectrum.covariance`.
    form : ndarray (g, g)
        Symmetric positive semi-definite Q.

    Returns
    -------
    ndarray (k,)
        max sᵀQs over the ellipsoid {s = Σ^½ u : |u| ≤ 1} = λ_max(Σ^½ Q Σ^½).

    Notes
    -----
    Every point of the ellipsoid is a response state whose projections on the axes do
    not exceed the CQC peaks of the components, and the ellipsoid's extent along any
    direction c is the CQC peak √(cᵀΣc) of that combination (Menun & Der Kiureghian
    2000, "Envelopes for seismic response vectors", J. Struct. Eng. 126(4), from memory).
    """
    C = 0.5 * (cov + np.swapaxes(cov, 1, 2))
    w, V = np.linalg.eigh(C)
    half = (V * np.sqrt(np.maximum(w, 0.0))[:, None, :]) @ np.swapaxes(V, 1, 2)
    M = half @ form @ half
    return np.maximum(np.linalg.eigvalsh(0.5 * (M + np.swapaxes(M, 1, 2)))[:, -1], 0.0)


@dataclass(frozen=True, eq=False)
class ModalSpectrum:
    """Modal spectral quantities of one model under one set of design spectra.

    Attributes
    ----------
    shapes : ndarray (n, m)
        Mass-normalised mode shapes.
    omega, damping : ndarray (m,)
        [rad/s] and ratios.
    participation : ndarray (m, 3)
        Γₙd.
    sa : ndarray (3, m)
        Spectral pseudo-acceleration of each mode for ground x, y, z [m/s²] (0 for a
        direction not driven).
    zpa : ndarray (3,)
        Zero-period accelerations [m/s²].
    rho : ndarray (m, m)
        CQC correlation.
    rigid : ndarray (3, m) or None
        Rigid-response fraction αₙ of each mode per direction (:func:`rigid_fractions`).
    residual : ndarray (n, 3) or None
        Static residual shapes R (u_res = R·(−a_g)), None without missing mass.
    rule : str
        Direction combination.
    notes : list of str
    """

    shapes: np.ndarray
    omega: np.ndarray
    damping: np.ndarray
    participation: np.ndarray
    sa: np.ndarray
    zpa: np.ndarray
    rho: np.ndarray
    residual: np.ndarray | None
    rule: str = "srss"
    rigid: np.ndarray | None = None
    notes: list = field(default_factory=list)

    @property
    def sd(self) -> np.ndarray:
        """Spectral displacement Sa/ω² of each mode (3, m) [m]."""
        return self.sa / (self.omega ** 2)[None, :]

    def per_direction(self, op, *, kind: Literal["displacement", "acceleration"],
                      ground: np.ndarray | None = None) -> np.ndarray:
        """Peaks of the rows of ``op`` for each ground direction.

        Parameters
        ----------
        op : sparse or ndarray (k, n)
            Linear operator on the relative displacement (or acceleration) vector.
        kind : {"displacement", "acceleration"}
            ``"displacement"``: y = op·u. ``"acceleration"``: y = op·ü + ground·a_g,
            absolute acceleration type.
        ground : ndarray (k, 3), optional
            The ground coefficients G of an acceleration-type quantity (op·ι for the
            absolute acceleration of points); zero when omitted.

        Returns
        -------
        ndarray (3, k)
            Peak magnitude per ground direction (CQC of the modes + missing mass by SRSS).
        """
        A = _dense(op @ self.shapes)                              # (k, m)
        k = A.shape[0]
        out = np.zeros((3, k))
        spec = self.sd if kind == "displacement" else self.sa
        if kind == "displacement":
            res = None if self.residual is None else _dense(op @ self.residual)   # (k, 3)
        elif kind == "acceleration":
            G = np.zeros((k, 3)) if ground is None else np.asarray(ground, float).reshape(k, 3)
            res = G - A @ self.participation if self.residual is not None else None
        else:
            raise InputError(f"given {kind!r}; allowed 'displacement', 'acceleration'",
                             param="kind", value=kind)
        for d in range(3):
            if self.zpa[d] == 0 and not np.any(spec[d]):
                continue
            Y = A * (self.participation[:, d] * spec[d])[None, :]
            r = None if res is None else res[:, d] * self.zpa[d]
            out[d] = combine_modes(Y, self.rho, r,
                                   rigid_fraction=None if self.rigid is None else self.rigid[d])
        return out

    def covariance(self, op, *, kind: Literal["displacement", "acceleration"] = "displacement",
                   group: int = 6, chunk: int = 4096) -> np.ndarray:
        """Response covariance of groups of rows (e.g. the six stress components of a point).

        Parameters
        ----------
        op : sparse or ndarray (g·k, n)
            Rows in groups of ``group`` (row ``g·p + i`` is component i of point p).
        kind : {"displacement", "acceleration"}
            As :meth:`per_direction` (acceleration type without ground terms).
        group : int
            Rows per point.
        chunk : int
            Points per block (memory bound).

        Returns
        -------
        ndarray (k, group, group)
            Σ = Σ_d [Y_p,d ρ Y_p,dᵀ + r_d r_dᵀ] with the periodic modal peaks Y_p and the
            rigid part r (rigid shares of the modes plus missing mass) of each direction
            d: the covariance whose diagonal holds the squared SRSS-over-directions peaks
            of :meth:`per_direction`, and for which the peak of any combination cᵀy of
            the group is √(cᵀΣc) (the CQC of that combination).
        """
        op = sp.csr_matrix(op) if sp.issparse(op) else np.asarray(op, dtype=float)
        n_rows = op.shape[0]
        k = n_rows // group
        out = np.zeros((k, group, group))
        spec = self.sd if kind == "displacement" else self.sa
        for p0 in range(0, k, chunk):                     # blocks of points, not a loop
            rows = slice(group * p0, group * min(k, p0 + chunk))
            A = _dense(op[rows] @ self.shapes)                          # (g·c, m)
            res = None
            if self.residual is not None:
                res = (_dense(op[rows] @ self.residual) if kind == "displacement"
                       else -A @ self.participation)
            c = A.shape[0] // group
            for d in range(3):                                          # three directions
                if self.zpa[d] == 0 and not np.any(spec[d]):
                    continue
                Y = A * (self.participation[:, d] * spec[d])[None, :]
                a = (np.zeros(Y.shape[1]) if self.rigid is None
                     else np.clip(self.rigid[d], 0.0, 1.0))
                r = Y @ a
                if res is not None:
                    r = r + res[:, d] * self.zpa[d]
                Yp = (Y * np.sqrt(1.0 - a * a)[None, :]).reshape(c, group, -1)
                out[p0:p0 + c] += np.einsum("pim,mn,pjn->pij", Yp, self.rho, Yp)
                rr = r.reshape(c, group)
                out[p0:p0 + c] += rr[:, :, None] * rr[:, None, :]
        return out

    def peak(self, op, *, kind: Literal["displacement", "acceleration"],
             ground: np.ndarray | None = None) -> np.ndarray:
        """Peaks (k,) of the rows of ``op``, the three directions combined by ``rule``."""
        return combine_directions(self.per_direction(op, kind=kind, ground=ground), self.rule)


def modal_spectrum(shapes: np.ndarray, omega: np.ndarray, damping: np.ndarray,
                   participation: np.ndarray, targets, *, scales=(1.0, 1.0, 1.0),
                   residual: np.ndarray | None = None,
                   rule: Literal["srss", "100-40-40"] = "srss",
                   rigid_modes: bool = True) -> ModalSpectrum:
    """Spectral values of every mode for each ground direction.

    Parameters
    ----------
    shapes : ndarray (n, m)
        Mass-normalised mode shapes.
    omega : ndarray (m,)
        [rad/s], > 0.
    damping : ndarray (m,)
        Modal damping ratios.
    participation : ndarray (m, 3)
        Γₙd = φₙᵀ L_d.
    targets : sequence of 3 TargetSpectrum or None
        Design spectrum for ground x, y, z; None leaves a direction undriven.
    scales : sequence of 3 float
        Factor on each direction's target (the vertical fraction for z).
    residual : ndarray (n, 3), optional
        Missing-mass shapes (:func:`groundshake.dynamics.residual_vectors`).
    rule : {"srss", "100-40-40"}
        Direction combination.
    rigid_modes : bool
        Separate the rigid part of stiff modes (:func:`rigid_fractions`) and add it
        algebraically to the missing mass; False combines whole modes by CQC.

    Returns
    -------
    ModalSpectrum
    """
    if rule not in DIRECTION_RULES:
        combine_directions(np.zeros(3), rule)          # raises the message
    w = np.asarray(omega, dtype=float).reshape(-1)
    z = np.broadcast_to(np.asarray(damping, dtype=float), w.shape).copy()
    T = 2.0 * math.pi / w if w.size else np.zeros(0)
    sa = np.zeros((3, w.size))
    zpa = np.zeros(3)
    alpha = np.zeros((3, w.size))
    notes: list[str] = []
    for d in range(3):
        tgt = targets[d]
        if tgt is None or float(scales[d]) == 0.0:
            continue
        sa[d], nt = spectral_accelerations(tgt, T, z, scale=float(scales[d]))
        zpa[d], nz = zero_period_acceleration(tgt, scale=float(scales[d]))
        if rigid_modes:
            alpha[d] = rigid_fractions(tgt, T, sa[d], zpa[d])
        notes.extend(m for m in nt + nz if m not in notes)
    rho = cqc_correlation(w, z) if w.size else np.zeros((0, 0))
    return ModalSpectrum(shapes=np.asarray(shapes, dtype=float), omega=w, damping=z,
                         participation=np.asarray(participation, float).reshape(-1, 3),
                         sa=sa, zpa=zpa, rho=rho, residual=residual, rule=rule, notes=notes,
                        rigid=alpha)
