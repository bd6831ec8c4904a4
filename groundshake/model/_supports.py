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
    frequency; leaving them out is on the side of less damping), for lumped springs and
    for a distributed bed alike.
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


def distributed_bed(area: float, second_moments: tuple[float, float],
                    totals: np.ndarray) -> tuple[np.ndarray, str]:
    """Uniform subgrade moduli of a spring bed whose translation totals are Kx, Ky, Kz.

    Parameters
    ----------
    area : contact area A [m²]. second_moments : (Ix, Iy) [m⁴], ∫y² dA and ∫x² dA about the
    centre of the base. totals : (6,) Kx, Ky, Kz [N/m], Krx, Kry, Kt [N·m/rad] of the
    rigid base (Gazetas 1991).

    Returns
    -------
    moduli : (3,) [N/m³] horizontal x, y and vertical springs per unit area, k_d = K_d / A;
    note : what the bed gives and how its rocking and torsion compare with the rigid base.

    Notes
    -----
    A uniform (Winkler) bed carries a uniform load with a uniform contact pressure and,
    under a rigid base, rocks with k_z·I and twists with k_x·Ix + k_y·Iy. A rigid base on
    a half-space is stiffer in rocking and torsion (its contact pressure rises towards the
    edges, about 2-3 times the bed's values for usual plans); the bed keeps the flexible
    mat's load path and states the difference instead of concentrating springs at the
    edges.
    """
    Kx, Ky, Kz, Krx, Kry, Kt = np.asarray(totals, dtype=float)
    ix, iy = second_moments
    k = np.array([Kx, Ky, Kz]) / area
    rx, ry = k[2] * ix, k[2] * iy
    rt = k[0] * ix + k[1] * iy
    note = ("distributed bed: uniform subgrade moduli kx = Kx/A, ky = Ky/A, kz = Kz/A (Gazetas "
            "translation totals), each spread over the base face by its shape functions "
            "(consistent Winkler bed); rocking and torsion follow from the bed: "
            f"Krx {rx / Krx:.2f}, Kry {ry / Kry:.2f}, Kt {rt / Kt:.2f} of Gazetas' rigid-base "
            "values (a flexible mat's rocking is softer than a rigid base's; for a stiff block "
            "choose springs = \"lumped\")")
    return k, note
