"""Embedment and frequency dependence of the soil springs of a rigid rectangular base.

Gazetas, G. (1991), "Formulas and charts for impedances of surface and embedded
foundations", J. Geotech. Eng. ASCE 117(9), 1363-1381. Rectangle 2L × 2B, L ≥ B, the
x axis along L, χ = A_b/(4L²) = B/L; a0 = ωB/Vs. The formulas below were written from
memory of the paper's Table 1 (surface: dynamic stiffness coefficients k(a0)) and Table 2
(embedded: factors on the surface stiffness, sidewall dashpots): check them against the
paper before relying on them. Where the paper gives a chart only (k_z, k_y, and the
dimensionless dashpot coefficients c̃ of rocking and torsion), the chart is not encoded:
k = 1 and the dashpots keep their high-frequency values, and the notes say so.

The functions work in the paper's axes (x along the longer side); :func:`to_model_axes`
swaps x/y quantities back when the model's base is longer in y.
"""
from __future__ import annotations

import math
import warnings

import numpy as np

from .._errors import GroundshakeWarning, ScenarioError
from ..scenario import SupportSettings

__all__ = ["adjust_impedance", "modulus_ratio_of", "embedment_factors", "embedment_dashpots",
           "dynamic_stiffness_coefficients",
           "to_model_axes", "half_sides", "shear_modulus_ratio", "SHEAR_MODULUS_RATIO_TABLE"]

#: ASCE 7-16 Table 19.2-1, effective shear modulus ratio G/G0 by site class (rows) and
#: S_DS/2.5 (columns 0, 0.1, 0.4, 0.8), from memory — verify against the standard. NaN:
#: the table asks for a site-specific study.
SHEAR_MODULUS_RATIO_TABLE = {
    "shaking_g": (0.0, 0.1, 0.4, 0.8),
    "A": (1.00, 1.00, 1.00, 1.00),
    "B": (1.00, 1.00, 0.95, 0.90),
    "C": (1.00, 0.95, 0.75, 0.60),
    "D": (1.00, 0.90, 0.50, 0.10),
    "E": (1.00, 0.60, 0.05, math.nan),
}


def half_sides(lx: float, ly: float) -> tuple[float, float, bool]:
    """Half-length L ≥ half-width B [m] of a base lx × ly, and whether L lies along y."""
    return max(lx, ly) / 2.0, min(lx, ly) / 2.0, ly > lx


def to_model_axes(v6: np.ndarray, swapped: bool) -> np.ndarray:
    """Reorder (..., 6) values [x, y, z, rx, ry, t] from the paper's axes to the model's."""
    v6 = np.asarray(v6, dtype=float)
    return v6[..., [1, 0, 2, 4, 3, 5]] if swapped else v6


def embedment_factors(L: float, B: float, *, depth: float, contact_depth: float) -> np.ndarray:
    """Factors on the surface stiffnesses for a base cast below grade (Gazetas 1991, Table 2).

    Parameters
    ----------
    L, B : float
        Half-length and half-width [m], L ≥ B (the paper's x along L).
    depth : float
        D, depth of the base below grade [m].
    contact_depth : float
        d, height of the side walls in good contact with the soil [m], 0 ≤ d ≤ D.

    Returns
    -------
    ndarray (6,)
        Factors for [Kx, Ky, Kz, Krx, Kry, Kt] in the paper's axes (1 at D = 0).

    Notes
    -----
    A_w = 4d(L + B) (sidewall contact area), A_b = 4LB, h = D − d/2, χ = B/L:

    - Kz: [1 + D/(21B)·(1 + 1.3χ)]·[1 + 0.2(A_w/A_b)^(2/3)]
    - Ky: [1 + 0.15(D/B)^0.5]·[1 + 0.52(h·A_w/(B·L²))^0.4]
    - Kx: [1 + 0.15(D/L)^0.5]·[1 + 0.52(h·A_w/(L·B²))^0.4]
    - Krx: 1 + 1.26(d/B)·[1 + (d/B)(d/D)^(−0.2)(B/L)^0.5]
    - Kry: 1 + 0.92(d/L)^0.6·[1.5 + (d/L)^1.9(d/D)^(−0.6)]
    - Kt: 1 + 1.4(1 + B/L)(d/B)^0.9

    (Gazetas 1991, Table 2; from memory — verify.)
    """
    if not (L >= B > 0):
        raise ValueError(f"need L >= B > 0; given L={L!r}, B={B!r}")
    if not (depth >= 0 and 0 <= contact_depth <= depth):
        raise ValueError(f"need 0 <= contact_depth <= depth; given depth={depth!r}, "
                         f"contact_depth={contact_depth!r}")
    D, d = float(depth), float(contact_depth)
    if D == 0:
        return np.ones(6)
    chi = B / L
    aw, ab, h = 4.0 * d * (L + B), 4.0 * L * B, D - d / 2.0
    fz = (1 + D / (21 * B) * (1 + 1.3 * chi)) * (1 + 0.2 * (aw / ab) ** (2 / 3))
    fy = (1 + 0.15 * (D / B) ** 0.5) * (1 + 0.52 * (h * aw / (B * L * L)) ** 0.4)
    fx = (1 + 0.15 * (D / L) ** 0.5) * (1 + 0.52 * (h * aw / (L * B * B)) ** 0.4)
    if d > 0:
        frx = 1 + 1.26 * (d / B) * (1 + (d / B) * (d / D) ** -0.2 * (B / L) ** 0.5)
        fry = 1 + 0.92 * (d / L) ** 0.6 * (1.5 + (d / L) ** 1.9 * (d / D) ** -0.6)
        ft = 1 + 1.4 * (1 + B / L) * (d / B) ** 0.9
    else:
        frx = fry = ft = 1.0
    return np.array([fx, fy, fz, frx, fry, ft])


def embedment_dashpots(L: float, B: float, *, contact_depth: float, shear_wave_velocity: float,
                       poisson_ratio: float, density: float) -> np.ndarray:
    """Translational radiation dashpots added by the side walls [N·s/m].

    Parameters
    ----------
    L, B : float
        Half-length and half-width [m], L ≥ B.
    contact_depth : float
        d [m].
    shear_wave_velocity, poisson_ratio, density : float
        Vs [m/s], ν, ρ [kg/m³].

    Returns
    -------
    ndarray (6,)
        Added [Cx, Cy, Cz, 0, 0, 0] in the paper's axes.

    Notes
    -----
    Walls parallel to the motion radiate shear waves (ρVs per unit area), walls
    facing it compression-extension waves at Lysmer's analog velocity
    VLa = 3.4Vs/(π(1 − ν)); vertically all walls shear:
    Cx += ρVs·4Ld + ρVLa·4Bd, Cy += ρVs·4Bd + ρVLa·4Ld, Cz += ρVs·4d(L + B)
    (Gazetas 1991, Table 2, high-frequency form; from memory — verify).
    """
    d = float(contact_depth)
    rho, vs = float(density), float(shear_wave_velocity)
    vla = 3.4 * vs / (math.pi * (1 - float(poisson_ratio)))
    return np.array([rho * vs * 4 * L * d + rho * vla * 4 * B * d,
                     rho * vs * 4 * B * d + rho * vla * 4 * L * d,
                     rho * vs * 4 * d * (L + B), 0.0, 0.0, 0.0])


def dynamic_stiffness_coefficients(a0, *, L: float, B: float, poisson_ratio: float,
                                   warn: bool = True) -> np.ndarray:
    """Dynamic stiffness coefficients k(a0) of a surface rectangle (Gazetas 1991, Table 1).

    Parameters
    ----------
    a0 : float or ndarray (m,)
        Dimensionless frequency ωB/Vs.
    L, B : float
        Half-length and half-width [m], L ≥ B (kept for the signature; the encoded
        closed forms do not depend on L/B).
    poisson_ratio : float
        ν of the soil.
    warn : bool
        Warn (GroundshakeWarning) when a0 lies beyond 2 or ν ≥ 0.45.

    Returns
    -------
    ndarray (..., 6)
        k for [Kx, Ky, Kz, Krx, Kry, Kt] in the paper's axes; the dynamic stiffness is
        K(ω) = K_static·k(a0).

    Notes
    -----
    k_x ≃ 1; k_rx ≃ 1 − 0.20a0; k_ry ≃ 1 − 0.26a0 (ν < 0.45); k_t ≃ 1 − 0.14a0
    (Gazetas 1991, Table 1, from memory — verify). k_y and k_z are charts in the paper
    and are taken as 1 here (not encoded). a0 is clipped to [0, 2], the range of the
    charts the formulas were fitted to.
    """
    a = np.asarray(a0, dtype=float)
    if warn and np.any(a > 2.0):
        warnings.warn(f"soil springs: dimensionless frequency a0 = {float(np.max(a)):.3g} "
                      "beyond 2, the range of the dynamic stiffness formulas; a0 = 2 used",
                      GroundshakeWarning, stacklevel=2)
    if warn and poisson_ratio >= 0.45:
        warnings.warn(f"soil springs: poisson_ratio = {poisson_ratio:g} >= 0.45: the rocking "
                      "coefficient 1 - 0.26 a0 is stated for nu < 0.45 and is used anyway",
                      GroundshakeWarning, stacklevel=2)
    a = np.clip(a, 0.0, 2.0)
    one = np.ones_like(a)
    return np.stack([one, one, one, 1 - 0.20 * a, 1 - 0.26 * a, 1 - 0.14 * a], axis=-1)


def shear_modulus_ratio(site_class: str, shaking_g: float) -> float:
    """Strain-compatible G/G0 by site class and level of shaking.

    Parameters
    ----------
    site_class : {"A", "B", "C", "D", "E"}
    shaking_g : float
        S_DS/2.5 (or the site's PGA) [g], ≥ 0.

    Returns
    -------
    float
        G/G0 from :data:`SHEAR_MODULUS_RATIO_TABLE` (ASCE 7-16 Table 19.2-1, from memory),
        linear between the columns, held beyond 0.8 g.

    Raises
    ------
    ValueError
        For an unknown site class, negative shaking, or where the table asks for a
        site-specific study (class E above 0.4 g).
    """
    tab = SHEAR_MODULUS_RATIO_TABLE
    if site_class not in tab or site_class == "shaking_g":
        raise ValueError(f"site_class: given {site_class!r}; allowed one of A, B, C, D, E")
    if not shaking_g >= 0:
        raise ValueError(f"shaking_g: given {shaking_g!r}; allowed a number >= 0 [g]")
    xs, ys = np.array(tab["shaking_g"]), np.array(tab[site_class])
    ok = np.isfinite(ys)
    if shaking_g > xs[ok][-1] and not ok.all():
        raise ValueError(f"site class {site_class} at {shaking_g:g} g: the table asks for a "
                         f"site-specific study above {xs[ok][-1]:g} g; enter modulus_ratio "
                         "instead")
    return float(np.interp(shaking_g, xs[ok], ys[ok]))


def adjust_impedance(impedance, lx: float, ly: float, *, support: SupportSettings,
                     frequency_hz=None):
    """Surface springs of :func:`gazetas_rectangle` adjusted for embedment and frequency.

    Parameters
    ----------
    impedance : Impedance
        Static surface springs and dashpots in the model's axes.
    lx, ly : float
        Base lengths along the model's x and y [m].
    support : SupportSettings
        Reads ``embedment_depth``, ``sidewall_contact_depth`` (None: the embedment
        depth), ``shear_wave_velocity``, ``poisson_ratio``, ``density`` and
        ``radiation_damping``.
    frequency_hz : array (6,), optional
        Frequency [Hz] at which each spring [x, y, z, rx, ry, t] (model axes) is
        evaluated with :func:`dynamic_stiffness_coefficients`; None: static springs.

    Returns
    -------
    Impedance
        A new one (the input is not changed), with notes naming each formula used.
    """
    from ._supports import Impedance

    L, B, swapped = half_sides(lx, ly)
    depth = float(support.embedment_depth)
    contact = depth if support.sidewall_contact_depth is None else \
        float(support.sidewall_contact_depth)
    vs, nu, rho = (float(support.shear_wave_velocity), float(support.poisson_ratio),
                   float(support.density))
    vs *= math.sqrt(modulus_ratio_of(support)[0])       # strain-compatible, as the springs
    k = np.array(impedance.stiffness, dtype=float)
    c = np.array(impedance.damping, dtype=float)
    notes = [n for n in impedance.notes if not n.startswith("soil springs: embedment is not")]
    if depth > 0:
        k = k * to_model_axes(embedment_factors(L, B, depth=depth, contact_depth=contact),
                              swapped)
        notes.append(f"embedded base: D = {depth:g} m below grade, side walls in contact over "
                     f"d = {contact:g} m; stiffness factors of Gazetas (1991) Table 2 "
                     "(from memory - verify)")
        if support.radiation_damping and contact > 0:
            c = c + to_model_axes(embedment_dashpots(L, B, contact_depth=contact,
                                                     shear_wave_velocity=vs,
                                                     poisson_ratio=nu, density=rho), swapped)
            notes.append("side-wall dashpots rho*Vs and rho*VLa per unit wall area added to "
                         "the translations (Gazetas 1991 Table 2, from memory)")
    else:
        notes.append("soil springs: surface foundation (embedment_depth = 0)")
    if frequency_hz is not None:
        f = np.asarray(frequency_hz, dtype=float).reshape(6)
        a0 = 2 * np.pi * f * B / vs
        a0_paper = to_model_axes(a0, swapped)          # the swap is its own inverse
        kd = dynamic_stiffness_coefficients(a0_paper, L=L, B=B, poisson_ratio=nu)
        kdiag = to_model_axes(np.diagonal(kd), swapped) if kd.ndim == 2 else kd
        k = k * kdiag
        notes.append("frequency-dependent springs K(w) = K_static * k(a0), a0 = wB/Vs, "
                     "k_rx = 1 - 0.20a0, k_ry = 1 - 0.26a0, k_t = 1 - 0.14a0, k_x = k_y = "
                     "k_z = 1 (Gazetas 1991 Table 1, from memory; the k_y, k_z charts not "
                     "encoded); evaluated at " + ", ".join(
                         f"{n} {v:.3g} Hz (a0 {a:.2f})" for n, v, a in
                         zip(("x", "y", "z", "rx", "ry", "t"), f, a0)))
    return Impedance(stiffness=k, damping=c, shear_modulus=impedance.shear_modulus, notes=notes)


def modulus_ratio_of(support: SupportSettings) -> tuple[float, str]:
    """Strain-compatible G/G0 of a ``[support]`` table and where it came from.

    Parameters
    ----------
    support : SupportSettings

    Returns
    -------
    (float, str)
        The ratio (1 when none is asked for) and a one-line source.

    Raises
    ------
    ScenarioError
        When the table asks for a site-specific study.
    """
    if support.modulus_ratio is not None:
        return float(support.modulus_ratio), "modulus_ratio as entered"
    sc = support.strain_compatible
    if sc is not None:
        cls, g = sc.site_class, float(sc.shaking_g)
        try:
            ratio = shear_modulus_ratio(cls, g)
        except ValueError as exc:
            raise ScenarioError(str(exc), param="support.strain_compatible",
                                value=(cls, g)) from exc
        return ratio, (f"ASCE 7-16 Table 19.2-1 (from memory), site class {cls}, "
                       f"S_DS/2.5 = {g:g} g")
    return 1.0, "small-strain modulus (no reduction asked for)"
