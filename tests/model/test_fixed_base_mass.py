"""A fixed base keeps the consistent mass as assembled (issue 13, item 4).

Sources: scikit-fem (an independent finite-element library: trilinear hexahedra,
linear elasticity and mass forms of its own) for the fixed-base eigenvalues on the
same mesh; Clough & Penzien, Dynamics of Structures, support excitation (the ground
load is M_ff ι_f + M_fb ι_b, the mass moving rigidly with the ground m − Lᵀ M_ff⁻¹ L);
Chopra §13.2 (effective modal masses over all modes add up to the driven mass).
"""
from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg as sla

from groundshake.dynamics import compute_modes
from groundshake.model import build_model
from groundshake.scenario import Scenario

E, NU, RHO = 30e9, 0.2, 2400.0


def _scenario(size, h):
    return Scenario.from_dict({
        "materials": {"c": {"youngs_modulus": E, "poisson_ratio": NU, "density": RHO}},
        "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": list(size)}],
        "mesh": {"element_size": h, "element": "hex8"},
        "support": {"kind": "fixed"}})


def _skfem_fixed_base(size, h, n):
    skfem = pytest.importorskip("skfem")
    from skfem.models.elasticity import lame_parameters, linear_elasticity
    lx, ly, lz = size
    xs, ys, zs = (np.linspace(0, L, int(round(L / h)) + 1) for L in (lx, ly, lz))
    mesh = skfem.MeshHex.init_tensor(xs, ys, zs)
    basis = skfem.Basis(mesh, skfem.ElementVector(skfem.ElementHex1()), intorder=4)
    K = skfem.asm(linear_elasticity(*lame_parameters(E, NU)), basis)

    @skfem.BilinearForm
    def mass(u, v, w):
        return RHO * skfem.helpers.dot(u, v)

    M = skfem.asm(mass, basis)
    fixed = basis.get_dofs(lambda x: np.isclose(x[2], 0.0)).all()
    free = np.setdiff1d(np.arange(K.shape[0]), fixed)
    lam = sla.eigh(K[free][:, free].toarray(), M[free][:, free].toarray(), eigvals_only=True)
    return np.sqrt(lam[:n]) / (2 * np.pi)


@pytest.mark.parametrize("size", [(2.0, 1.5, 0.5), (2.0, 1.5, 1.0), (2.0, 1.5, 1.5)])
def test_fixed_base_frequencies_equal_scikit_fem(size):
    h = 0.5                                     # one, two and three layers of elements
    model = build_model(_scenario(size, h))
    md = compute_modes(model, n_modes=12, warn=False)
    ref = _skfem_fixed_base(size, h, 12)
    # scikit-fem eig(K_ff, M_ff) on the same mesh, same trilinear brick: 1e-9
    np.testing.assert_allclose(md.frequency, ref, rtol=1e-9)


def test_fixed_base_mass_balance_and_rigid_mass():
    size, h = (2.0, 1.5, 0.5), 0.5
    model = build_model(_scenario(size, h))
    m = RHO * np.prod(size)
    # every mass of the model: ρV (definition)
    np.testing.assert_allclose(model.total_mass, m, rtol=1e-12)
    md = compute_modes(model, n_modes=model.n_dof, warn=False)
    # Chopra §13.2 with Clough & Penzien's support excitation: Σ Γ² over all modes is
    # Lᵀ M_ff⁻¹ L; adding the mass moving rigidly with the ground gives ρV
    np.testing.assert_allclose(md.effective_mass.sum(axis=0) + model.rigid_mass, m, rtol=1e-9)
    # the rigid mass from its definition m − Lᵀ M_ff⁻¹ L with a dense solve (scipy)
    L = model.ground_load
    ref = m - np.einsum("ia,ia->a", L, sla.solve(model.M.toarray(), L))
    np.testing.assert_allclose(model.rigid_mass, ref, rtol=1e-9)
    # one layer: the trilinear brick's consistent mass is the tensor product of the 1D
    # bar's (ρAh/6)[[2, 1], [1, 2]] (Cook et al., Concepts and Applications of FEA, the
    # two-node bar); through the thickness M_ff = m/3, L = m/3 + m/6, so Lᵀ M_ff⁻¹ L = 3m/4
    # and the mass moving rigidly with the ground is m/4 in every direction
    np.testing.assert_allclose(model.rigid_mass, m / 4, rtol=1e-9)
