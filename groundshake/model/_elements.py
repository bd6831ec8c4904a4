"""Element matrices of rectangular 8-node bricks (hex8 and hex8-incompatible).

Every element of the structured grid is a box aligned with the axes, so an element
matrix depends only on the box's three edge lengths and its material. The functions
here take a batch of distinct (size, material) combinations and return one matrix per
combination, computed on whole arrays (2×2×2 Gauss points, no loop over elements).

Local node order (natural coordinates ξ, η, ζ):
0 (−,−,−), 1 (+,−,−), 2 (+,+,−), 3 (−,+,−), 4 (−,−,+), 5 (+,−,+), 6 (+,+,+), 7 (−,+,+).
Element DOFs are interleaved: [u0x, u0y, u0z, u1x, ...] (24).
Voigt order of strain and stress: [xx, yy, zz, yz, xz, xy] with engineering shear strain.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np

__all__ = ["NODE_SIGNS", "GAUSS_POINTS", "GAUSS_TO_CORNERS", "ElementMatrices",
           "elasticity_matrix", "brick_matrices"]

#: Sign of ξ, η, ζ at each local node, shape (8, 3).
NODE_SIGNS = np.array([[-1, -1, -1], [1, -1, -1], [1, 1, -1], [-1, 1, -1],
                       [-1, -1, 1], [1, -1, 1], [1, 1, 1], [-1, 1, 1]], dtype=float)

_G = 1.0 / np.sqrt(3.0)
#: 2×2×2 Gauss points in natural coordinates (weights all 1), shape (8, 3); point g sits
#: next to local node g (same signs).
GAUSS_POINTS = NODE_SIGNS * _G
_GAUSS = GAUSS_POINTS


@dataclass(frozen=True)
class ElementMatrices:
    """Matrices of k distinct bricks.

    Attributes
    ----------
    stiffness : (k, 24, 24) N/m, statically condensed for hex8-incompatible.
    mass : (k, 8, 8) kg, the scalar consistent mass ∫ρ N_A N_B dV (the full 24×24 mass
        is this times δij).
    centre_stress : (k, 6, 24) Pa/m, D·B at the element centre (incompatible-mode
        strains vanish there, so it serves both element kinds).
    gauss_stress : (k, 8, 6, 24) Pa/m, stress at the 2×2×2 Gauss points
        (:data:`GAUSS_POINTS`) per unit node displacement; for hex8-incompatible the
        internal modes are recovered from the node displacements,
        D·(B_g − B_i,g K_ii⁻¹ K_ic).
    corner_stress : (k, 8, 6, 24) Pa/m, the Gauss-point stresses extrapolated to the
        eight corners (:data:`GAUSS_TO_CORNERS`), local node order.
    """

    stiffness: np.ndarray
    mass: np.ndarray
    centre_stress: np.ndarray
    gauss_stress: np.ndarray | None = None
    corner_stress: np.ndarray | None = None


def elasticity_matrix(youngs_modulus, poisson_ratio) -> np.ndarray:
    """Isotropic elasticity matrix D, shape (..., 6, 6) [Pa], Voigt order xx yy zz yz xz xy."""
    E = np.asarray(youngs_modulus, dtype=float)
    nu = np.asarray(poisson_ratio, dtype=float)
    E, nu = np.broadcast_arrays(E, nu)
    lam = E * nu / ((1 + nu) * (1 - 2 * nu))
    mu = E / (2 * (1 + nu))
    D = np.zeros(E.shape + (6, 6))
    D[..., :3, :3] = lam[..., None, None]
    idx = np.arange(3)
    D[..., idx, idx] += 2 * mu[..., None]
    D[..., idx + 3, idx + 3] = mu[..., None]
    return D


def _strain_matrix(grad: np.ndarray) -> np.ndarray:
    """B from shape-function gradients ``grad`` (..., m, 3) → (..., 6, 3m)."""
    shape = grad.shape[:-2]
    m = grad.shape[-2]
    B = np.zeros(shape + (6, 3 * m))
    gx, gy, gz = grad[..., 0], grad[..., 1], grad[..., 2]
    B[..., 0, 0::3] = gx
    B[..., 1, 1::3] = gy
    B[..., 2, 2::3] = gz
    B[..., 3, 1::3] = gz
    B[..., 3, 2::3] = gy
    B[..., 4, 0::3] = gz
    B[..., 4, 2::3] = gx
    B[..., 5, 0::3] = gy
    B[..., 5, 1::3] = gx
    return B


def _shape_gradients(points: np.ndarray, half: np.ndarray) -> np.ndarray:
    """Gradients of the 8 trilinear functions at ``points`` (p, 3) for boxes of half-sizes
    ``half`` (k, 3) → (k, p, 8, 3) [1/m]."""
    s = NODE_SIGNS  # (8, 3)
    f = 1.0 + points[:, None, :] * s[None, :, :]  # (p, 8, 3)
    dnat = np.empty_like(f)
    dnat[..., 0] = s[:, 0] * f[..., 1] * f[..., 2] / 8
    dnat[..., 1] = s[:, 1] * f[..., 0] * f[..., 2] / 8
    dnat[..., 2] = s[:, 2] * f[..., 0] * f[..., 1] / 8
    return dnat[None] / half[:, None, None, :]


def shape_values(points: np.ndarray) -> np.ndarray:
    """Trilinear shape functions at natural ``points`` (p, 3) → (p, 8)."""
    f = 1.0 + np.asarray(points, float)[:, None, :] * NODE_SIGNS[None]
    return f.prod(axis=-1) / 8


#: Extrapolation of values at the 2×2×2 Gauss points to the corners, shape (8 corners,
#: 8 points): the trilinear interpolant through the Gauss points (natural coordinates
#: scaled by √3 so that the points sit at ±1) evaluated at the corners (±√3). It
#: reproduces any field in span{1, ξ, η, ζ, ξη, ηζ, ζξ, ξηζ}, which holds every strain
#: of a box-shaped hex8 or hex8-incompatible element.
GAUSS_TO_CORNERS = shape_values(np.sqrt(3.0) * NODE_SIGNS)


def brick_matrices(size, youngs_modulus, poisson_ratio, density, *,
                   element: Literal["hex8", "hex8-incompatible"] = "hex8-incompatible",
                   ) -> ElementMatrices:
    """Stiffness, scalar mass and centre-stress matrices of axis-aligned bricks.

    Parameters
    ----------
    size : (k, 3) edge lengths [m].
    youngs_modulus, poisson_ratio, density : (k,) [Pa], [-], [kg/m³].
    element : ``"hex8"`` (trilinear, 2×2×2 Gauss) or ``"hex8-incompatible"`` (adds the
        nine modes (1 − ξ²), (1 − η²), (1 − ζ²) per displacement component, condensed).

    Returns
    -------
    ElementMatrices

    Notes
    -----
    K = Σ_g Bᵀ D B det J; with incompatible modes K = Kcc − Kci Kii⁻¹ Kic. For a box the
    Jacobian is constant, so the modes pass the patch test as they stand (Taylor,
    Beresford & Wilson 1976 correct the mode derivatives for distorted elements).
    Stresses: the internal mode amplitudes follow from the node displacements,
    α = −Kii⁻¹ Kic u (no load acts on them), so σ_g = D (B_g − B_i,g Kii⁻¹ Kic) u at each
    Gauss point; corner values are these extrapolated with :data:`GAUSS_TO_CORNERS`
    (nodal extrapolation; Zienkiewicz & Zhu 1992 on recovery from Gauss points).

    References
    ----------
    Wilson, Taylor, Doherty & Ghaboussi (1973), Incompatible displacement models.
    Taylor, Beresford & Wilson (1976), IJNME 10, 1211-1219.
    """
    size = np.atleast_2d(np.asarray(size, dtype=float))
    k = size.shape[0]
    E = np.broadcast_to(np.asarray(youngs_modulus, float), (k,))
    nu = np.broadcast_to(np.asarray(poisson_ratio, float), (k,))
    rho = np.broadcast_to(np.asarray(density, float), (k,))
    half = size / 2
    detj = half.prod(axis=1)  # (k,)
    D = elasticity_matrix(E, nu)  # (k, 6, 6)

    grad = _shape_gradients(_GAUSS, half)  # (k, 8g, 8n, 3)
    B = _strain_matrix(grad)  # (k, g, 6, 24)
    DB = np.einsum("kij,kgjn->kgin", D, B)
    K = np.einsum("kgim,kgin->kmn", B, DB) * detj[:, None, None]
    gauss_stress = DB  # (k, g, 6, 24)
    if element == "hex8-incompatible":
        # gradients of the bubbles P_i = 1 - ξ_i²: only dP_i/dx_i = -2 ξ_i / h_i
        gi = np.zeros((k, 8, 3, 3))
        for i in range(3):
            gi[:, :, i, i] = -2.0 * _GAUSS[None, :, i] / half[:, None, i]
        Bi = _strain_matrix(gi)  # (k, g, 6, 9)
        DBi = np.einsum("kij,kgjn->kgin", D, Bi)
        Kci = np.einsum("kgim,kgin->kmn", B, DBi) * detj[:, None, None]
        Kii = np.einsum("kgim,kgin->kmn", Bi, DBi) * detj[:, None, None]
        alpha = np.linalg.solve(Kii, np.swapaxes(Kci, 1, 2))  # (k, 9, 24): −α per unit u
        K = K - Kci @ alpha
        gauss_stress = DB - np.einsum("kgin,knm->kgim", DBi, alpha)
    elif element != "hex8":
        raise ValueError(f"element={element!r}; allowed 'hex8', 'hex8-incompatible'")
    K = 0.5 * (K + np.swapaxes(K, 1, 2))

    N = shape_values(_GAUSS)  # (g, 8)
    m = np.einsum("ga,gb->ab", N, N)[None] * (rho * detj)[:, None, None]

    gc = _shape_gradients(np.zeros((1, 3)), half)[:, 0]  # (k, 8, 3)
    Bc = _strain_matrix(gc)  # (k, 6, 24)
    S = D @ Bc
    corner = np.einsum("ag,kgim->kaim", GAUSS_TO_CORNERS, gauss_stress)
    return ElementMatrices(stiffness=K, mass=m, centre_stress=S, gauss_stress=gauss_stress,
                           corner_stress=corner)
