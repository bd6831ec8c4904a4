"""Static impedances of a rigid surface foundation on a homogeneous half-space.

Gazetas (1991), "Formulas and charts for impedances of surface and embedded
foundations", J. Geotech. Eng. ASCE 117(9), 1363-1381: rigid rectangle 2L × 2B with
L ≥ B and the x axis along L. Radiation dashpots: Cz = ρ·VLa·A with Lysmer's analog
velocity VLa = 3.4 Vs / (π(1 − ν)), Ch = ρ·Vs·A (high-frequency limits).
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from .._errors import GroundshakeWarning

__all__ = ["Impedance", "gazetas_rectangle", "circle_stiffness", "distributed_bed"]

_DOF_NAMES = ("x", "y", "z", "rx", "ry", "rz")


@dataclass(frozen=True)
class Impedance:
    """Six springs and dashpots of a rigid base, our axes.

    Attributes
    ----------
    stiffness : (6,) Kx, Ky, Kz [N/m], Krx, Kry, Kt [N·m/rad].
    damping : (6,) dashpots [N·s/m], [N·m·s/rad] (zero where none is modelled).
    shear_modulus : G = ρ Vs² [Pa]. notes : provenance and warnings.
    """

    stiffness: np.ndarray
    damping: np.ndarray
    shear_modulus: float
    notes: list[str] = field(default_factory=list)

    def to_dict(self) -> dict:
        return {
            "springs": {f"k_{n}": float(v) for n, v in zip(_DOF_NAMES, self.stiffness)},
            "dashpots": {f"c_{n}": float(v) for n, v in zip(_DOF_NAMES, self.damping)},
            "shear_modulus": float(self.shear_modulus),
            "formulas": list(self.notes),
        }


def gazetas_rectangle(lx: float, ly: float, *, shear_wave_velocity: float,
                      poisson_ratio: float, density: float,
                      radiation_damping: bool = True, warn: bool = True) -> Impedance:
    """Gazetas (1991) static stiffnesses of a rigid rectangle lx × ly on a half-space.

    Parameters
    ----------
    lx, ly : plan dimensions along our x and y [m] (full lengths, 2L and 2B).
    shear_wave_velocity : Vs [m/s]; poisson_ratio : ν; density : ρ [kg/m³].
    radiation_damping : add the translational radiation dashpots.

    Returns
    -------
    Impedance, in our axes: when ly > lx the formulas are applied with L along y and
    the x/y results swapped back.

    Notes
    -----
    χ = B/L, G = ρVs²:
    Kz = 2GL/(1−ν)·(0.73 + 1.54χ^0.75); Ky = 2GL/(2−ν)·(2 + 2.5χ^0.85);
    Kx = Ky − 0.2/(0.75−ν)·GL(1 − B/L); Krx = G/(1−ν)·Ibx^0.75(L/B)^0.25(2.4 + 0.5B/L);
    Kry = 3G/(1−ν)·Iby^0.75(L/B)^0.15; Kt = G·J^0.75[4 + 11(1 − B/L)^10].
    Rocking and torsional radiation dashpots are not modelled (they are small at low
    frequency; leaving them out is on the side of less damping).
    """
    G = density * shear_wave_velocity ** 2
    nu = poisson_ratio
    swap = ly > lx
    L, B = (max(lx, ly) / 2, min(lx, ly) / 2)
    chi = B / L
    kz = 2 * G * L / (1 - nu) * (0.73 + 1.54 * chi ** 0.75)
    ky = 2 * G * L / (2 - nu) * (2 + 2.5 * chi ** 0.85)
    kx = ky - 0.2 / (0.75 - nu) * G * L * (1 - B / L)
    ibx = 4.0 / 3.0 * L * B ** 3
    iby = 4.0 / 3.0 * B * L ** 3
    krx = G / (1 - nu) * ibx ** 0.75 * (L / B) ** 0.25 * (2.4 + 0.5 * B / L)
    kry = 3 * G / (1 - nu) * iby ** 0.75 * (L / B) ** 0.15
    kt = G * (ibx + iby) ** 0.75 * (4 + 11 * (1 - B / L) ** 10)
    k = np.array([kx, ky, kz, krx, kry, kt])
    notes = ["Gazetas (1991) rigid rectangle on a homogeneous half-space, surface "
             f"foundation, L = {L:g} m, B = {B:g} m, G = {G:.4g} Pa, nu = {nu:g}"]
    if swap:
        k = k[[1, 0, 2, 4, 3, 5]]
        notes.append("plan longer in y: formulas applied with L along y and results "
                     "swapped to the model's axes")
    c = np.zeros(6)
    if radiation_damping:
        area = 4 * L * B
        vla = 3.4 * shear_wave_velocity / (np.pi * (1 - nu))
        c[2] = density * vla * area
        c[0] = c[1] = density * shear_wave_velocity * area
        notes.append("radiation dashpots Cz = rho*VLa*A, VLa = 3.4Vs/(pi(1-nu)); "
                     "Cx = Cy = rho*Vs*A; rocking and torsion dashpots not modelled")
    msgs = []
    if L / B > 10:
        msgs.append(f"soil springs: plan aspect L/B = {L / B:.3g} exceeds 10, beyond the "
                    "range of Gazetas (1991) charts; springs are extrapolated")
    if not (0.0 <= nu <= 0.49):
        msgs.append(f"soil springs: poisson_ratio = {nu:g} is outside 0-0.49 for which the "
                    "half-space formulas are stated; springs are extrapolated")
    msgs.append("soil springs: embedment is not modelled (surface foundation formulas); "
                "an embedded block is stiffer and better damped than modelled")
    notes.extend(msgs)
    if warn:
        for mmsg in msgs[:-1]:
            warnings.warn(mmsg, GroundshakeWarning, stacklevel=3)
    return Impedance(stiffness=k, damping=c, shear_modulus=G, notes=notes)


def circle_stiffness(radius: float, *, shear_modulus: float, poisson_ratio: float) -> np.ndarray:
    """Static stiffness of a rigid circular disc on a half-space (closed forms).

    Returns (6,) [Kh, Kh, Kz, Kr, Kr, Kt]: Kz = 4GR/(1−ν), Kh = 8GR/(2−ν),
    Kr = 8GR³/(3(1−ν)), Kt = 16GR³/3.
    """
    G, nu, R = shear_modulus, poisson_ratio, radius
    kh = 8 * G * R / (2 - nu)
    kr = 8 * G * R ** 3 / (3 * (1 - nu))
    return np.array([kh, kh, 4 * G * R / (1 - nu), kr, kr, 16 * G * R ** 3 / 3])


def distributed_bed(xy: np.ndarray, area: np.ndarray, totals: np.ndarray):
    """Nodal springs of a bed whose totals match six rigid-base stiffnesses.

    Parameters
    ----------
    xy : (p, 2) node positions relative to the base centre [m]; area : (p,) tributary
    areas [m²]; totals : (6,) Kx, Ky, Kz, Krx, Kry, Kt.

    Returns
    -------
    k : (p, 3) nodal springs [N/m] in x, y, z, and a note.

    Notes
    -----
    Vertical springs per unit area a + b·gx + c·gy + d·gx·gy, gx = |x/xm|^p,
    gy = |y/ym|^p, with non-negative a..d (scipy nnls) so that Σkz = Kz, Σkz·y² = Krx,
    Σkz·x² = Kry; horizontal springs per unit area (p₀ + t·(r/rm)^p), (q₀ + t·(r/rm)^p)
    so that Σkx = Kx, Σky = Ky and Σ(kx·y² + ky·x²) = Kt. The lowest power p that
    matches is used (the contact pressure under a rigid base on a half-space grows
    towards its edges); if none does, the bed is uniform (totals of translation kept)
    and the note says so.
    """
    x, y = xy[:, 0], xy[:, 1]
    w = area
    Kx, Ky, Kz, Krx, Kry, Kt = totals
    xm = max(np.abs(x).max(), 1e-12)
    ym = max(np.abs(y).max(), 1e-12)
    r2 = x * x + y * y
    rm = max(r2.max(), 1e-24)
    from scipy.optimize import nnls
    for p in (2, 4, 6, 8, 12, 16, 24, 32, 48, 64, 96, 128):
        gx, gy, gr = np.abs(x / xm) ** p, np.abs(y / ym) ** p, (r2 / rm) ** (p / 2)
        basis = np.column_stack([np.ones_like(x), gx, gy, gx * gy]) * w[:, None]  # (n, 4)
        A = np.vstack([basis.sum(0), (basis * (y * y)[:, None]).sum(0),
                       (basis * (x * x)[:, None]).sum(0)])
        rhs = np.array([Kz, Krx, Kry])
        sc = 1.0 / rhs
        cz, _ = nnls(A * sc[:, None], rhs * sc)
        bx = np.column_stack([w, np.zeros_like(w), w * gr])
        by = np.column_stack([np.zeros_like(w), w, w * gr])
        H = np.vstack([bx.sum(0), by.sum(0),
                       (bx * (y * y)[:, None]).sum(0) + (by * (x * x)[:, None]).sum(0)])
        rh = np.array([Kx, Ky, Kt])
        sh = 1.0 / rh
        ch, _ = nnls(H * sh[:, None], rh * sh)
        if (np.abs(A @ cz / rhs - 1).max() < 1e-9 and np.abs(H @ ch / rh - 1).max() < 1e-9):
            kz = basis @ cz
            kx = bx @ ch
            ky = by @ ch
            note = ("distributed bed matching Kx, Ky, Kz, Krx, Kry, Kt (non-negative springs "
                    f"per unit area from 1, |x|^{p}, |y|^{p}, |xy|^{p}, r^{p} terms: stiffer "
                    "towards the edges and corners)")
            break
    else:
        at = w / w.sum()
        kx, ky, kz = Kx * at, Ky * at, Kz * at
        note = ("distributed bed uniform (a matching bed would need negative springs): "
                "translations match, rocking and torsion follow from the bed")
    return np.column_stack([kx, ky, kz]), note
