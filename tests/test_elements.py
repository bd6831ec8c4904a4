"""Brick elements and assembly against independent references.

Sources: scikit-fem (ElementVector(ElementHex1), linear_elasticity, vector mass form)
as an independent assembler; Euler-Bernoulli cantilever (βL = 1.8751041, REFERENCES.md
§7); axial rod fn = (2n−1)/(4L)·√(E/ρ) (REFERENCES.md §7); consistent mass δij·∫ρN_AN_B
carries ρV per direction (common practice); a free elastic body has six rigid-body modes
(common practice); Wilson et al. (1973) / Taylor et al. (1976): trilinear bricks lock in
bending, incompatible modes cure it.
"""
from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg as sla

from groundshake.model._assembly import assemble, element_keys
from groundshake.model._elements import NODE_SIGNS, brick_matrices
from groundshake.model._mesh import Box, mesh_boxes

E, NU, RHO = 30e9, 0.2, 2400.0


def _grid(boxes, h, element="hex8", mass="consistent", materials=((E, NU, RHO),)):
    mesh = mesh_boxes(boxes, h)
    kg, sizes, kmat = element_keys(mesh, [b.material for b in boxes])
    p = np.array(materials)[kmat]
    mats = brick_matrices(sizes, p[:, 0], p[:, 1], p[:, 2], element=element)
    K, M = assemble(mesh, kg, mats, mass=mass)
    return mesh, K, M


def _fixed_base_eigs(mesh, K, M, k):
    fixed = np.flatnonzero(np.repeat(mesh.nodes[:, 2] <= mesh.nodes[:, 2].min() + 1e-12, 3))
    free = np.setdiff1d(np.arange(K.shape[0]), fixed)
    Kf = K[free][:, free]
    Mf = M[free][:, free]
    if Kf.shape[0] > 400:  # shift-invert Lanczos (ARPACK via scipy), checked below vs dense
        from groundshake.dynamics import lowest_modes
        return lowest_modes(Kf, Mf, n_modes=k, solver="scipy")[0]
    return sla.eigh(Kf.toarray(), Mf.toarray(), eigvals_only=True, subset_by_index=[0, k - 1])


def test_hex8_matches_scikit_fem_frequencies():
    skfem = pytest.importorskip("skfem")
    from skfem.helpers import dot
    from skfem.models.elasticity import lame_parameters, linear_elasticity

    boxes = [Box("a", (0.0, 0.0, 0.0), (1.2, 0.9, 0.6))]
    mesh, K, M = _grid(boxes, 0.3, element="hex8")
    xs, ys, zs = mesh.lines
    m = skfem.MeshHex.init_tensor(xs, ys, zs)
    basis = skfem.Basis(m, skfem.ElementVector(skfem.ElementHex1()))
    Ks = skfem.asm(linear_elasticity(*lame_parameters(E, NU)), basis)

    @skfem.BilinearForm
    def mass(u, v, w):
        return RHO * dot(u, v)

    Ms = skfem.asm(mass, basis)
    fixed = basis.get_dofs(lambda x: np.isclose(x[2], 0.0)).flatten()
    free = np.setdiff1d(np.arange(basis.N), fixed)
    ref = sla.eigh(Ks[free][:, free].toarray(), Ms[free][:, free].toarray(),
                   eigvals_only=True, subset_by_index=[0, 9])
    ours = _fixed_base_eigs(mesh, K, M, 10)
    # scikit-fem on the same mesh, independent assembler: 1e-6 relative (issue spec)
    np.testing.assert_allclose(np.sqrt(ours), np.sqrt(ref), rtol=1e-6)
    # scikit-fem: the total mass in one direction is ρV (both assemblers)
    assert Ms.sum() / 3 == pytest.approx(RHO * 1.2 * 0.9 * 0.6, rel=1e-12)


@pytest.mark.parametrize("element", ["hex8", "hex8-incompatible"])
def test_element_rigid_modes_and_mass(element):
    size = np.array([[0.4, 0.7, 1.1]])
    em = brick_matrices(size, E, NU, RHO, element=element)
    w = np.linalg.eigvalsh(em.stiffness[0])
    # common practice: an unsupported element has exactly six zero-energy (rigid) modes
    assert np.sum(np.abs(w) < 1e-9 * w.max()) == 6
    assert w.min() > -1e-9 * w.max()
    # rigid rotation about z gives no force (common practice)
    x = NODE_SIGNS * size[0] / 2
    u = np.cross([0.0, 0.0, 1.0], x).ravel()
    assert np.abs(em.stiffness[0] @ u).max() < 1e-9 * np.abs(em.stiffness[0]).max()
    # consistent mass δij·∫ρN_AN_B sums to ρV (common practice)
    assert em.mass[0].sum() == pytest.approx(RHO * size.prod(), rel=1e-12)


def test_uniform_strain_patch():
    """A linear displacement field gives the exact constant stress (patch test)."""
    size = np.array([[0.5, 0.3, 0.8]])
    em = brick_matrices(size, E, NU, RHO, element="hex8-incompatible")
    x = NODE_SIGNS * size[0] / 2
    eps = np.array([1e-4, -2e-4, 3e-4, 1e-4, 2e-4, -1e-4])  # xx yy zz yz xz xy (engineering)
    grad = np.array([[eps[0], eps[5] / 2, eps[4] / 2],
                     [eps[5] / 2, eps[1], eps[3] / 2],
                     [eps[4] / 2, eps[3] / 2, eps[2]]])
    u = (x @ grad.T).ravel()
    lam = E * NU / ((1 + NU) * (1 - 2 * NU))
    mu = E / (2 * (1 + NU))
    # Hooke's law, isotropic (common practice)
    sig = np.r_[lam * eps[:3].sum() + 2 * mu * eps[:3], mu * eps[3:]]
    np.testing.assert_allclose(em.centre_stress[0] @ u, sig, rtol=1e-10, atol=1e-6)


def _cantilever_f1(element, n_len, ratio=20.0, nu=NU):
    h = 1.0
    L = ratio * h
    # 2 × 2 elements through the section, n_len along the length (a hand-made grid)
    xs = np.linspace(0, h, 3)
    zs = np.linspace(0, L, n_len + 1)
    from groundshake.model import _mesh as mm
    lines = (xs, xs.copy(), zs)
    filled = np.ones((n_len, 2, 2), dtype=bool)
    node_id = np.arange(3 * 3 * (n_len + 1)).reshape(n_len + 1, 3, 3)
    kk, jj, ii = np.nonzero(node_id >= 0)
    nodes = np.column_stack([xs[ii], xs[jj], zs[kk]])
    ek, ej, ei = np.nonzero(filled)
    off = ((NODE_SIGNS + 1) / 2).astype(int)
    elements = node_id[ek[:, None] + off[:, 2], ej[:, None] + off[:, 1], ei[:, None] + off[:, 0]]
    mesh = mm.GridMesh(lines=lines, filled=filled, cell_part=np.zeros(filled.shape, int),
                       node_id=node_id, nodes=nodes, elements=elements,
                       element_cell=np.column_stack([ei, ej, ek]),
                       element_part=np.zeros(ek.size, int))
    kg, sizes, _ = element_keys(mesh, [0])
    mats = brick_matrices(sizes, E, nu, RHO, element=element)
    K, M = assemble(mesh, kg, mats)
    f = np.sqrt(_fixed_base_eigs(mesh, K, M, 1)[0]) / (2 * np.pi)
    I = h ** 4 / 12
    f_eb = 1.8751041 ** 2 / (2 * np.pi * L ** 2) * np.sqrt(E * I / (RHO * h * h))
    return f, f_eb


def test_slender_cantilever_incompatible_vs_euler_bernoulli_and_hex8_locks():
    f_inc, f_eb = _cantilever_f1("hex8-incompatible", 20)
    f_h8, _ = _cantilever_f1("hex8", 20)
    # Euler-Bernoulli cantilever, βL = 1.8751041 (REFERENCES.md §7): within 3 % (issue spec)
    assert f_inc == pytest.approx(f_eb, rel=0.03)
    # trilinear bricks lock in bending (Wilson et al. 1973): > 10 % too stiff on this mesh,
    # and at least 5 times the error of the incompatible-mode brick
    assert f_h8 > 1.10 * f_eb
    assert (f_h8 - f_eb) > 5 * abs(f_inc - f_eb)


def test_axial_rod_frequencies_and_convergence_rate():
    """Fixed-free rod with ν = 0 (no lateral coupling): fn = (2n−1)/(4L)·√(E/ρ)."""
    L = 4.0
    errs = []
    hs = [1.0, 0.5, 0.25]
    for h in hs:
        boxes = [Box("r", (0.0, 0.0, 0.0), (0.5, 0.5, L))]
        mesh, K, M = _grid(boxes, h, element="hex8", materials=((E, 0.0, RHO),))
        # with ν = 0 the axial modes are uncoupled; keep uz DOFs only for the z modes
        fixed = np.repeat(mesh.nodes[:, 2] <= 1e-12, 3)
        zdof = np.tile([False, False, True], mesh.n_nodes)
        sel = np.flatnonzero(zdof & ~fixed)
        w = sla.eigh(K[sel][:, sel].toarray(), M[sel][:, sel].toarray(), eigvals_only=True,
                     subset_by_index=[0, 1])
        f = np.sqrt(w) / (2 * np.pi)
        ref = np.array([1, 3]) / (4 * L) * np.sqrt(E / RHO)
        errs.append(abs(f[0] - ref[0]) / ref[0])
        if h == hs[-1]:
            # rod closed form (REFERENCES.md §7) within 1 % for the first two modes
            np.testing.assert_allclose(f, ref, rtol=1e-2)
    rate = np.polyfit(np.log(hs), np.log(errs), 1)[0]
    # linear elements: eigenvalue error O(h²) (Strang & Fix; scikit-fem-style fitted rate)
    assert 1.8 < rate < 2.2


def test_free_block_has_six_rigid_body_modes():
    from groundshake.dynamics import lowest_modes
    boxes = [Box("a", (0.0, 0.0, 0.0), (2.0, 1.5, 1.0)), Box("b", (0.5, 0.5, 1.0), (1.0, 0.5, 0.5))]
    mesh, K, M = _grid(boxes, 0.25, element="hex8-incompatible")
    lam, phi = lowest_modes(K, M, n_modes=8, shift=-1.0, solver="scipy")
    # common practice: a free elastic body has 6 zero-frequency modes, then elastic ones
    assert np.all(np.abs(lam[:6]) < 1e-6 * lam[6])
    assert lam[6] > 100.0
    # mass-normalised shapes (φᵀMφ = I, definition)
    np.testing.assert_allclose(phi.T @ (M @ phi), np.eye(8), atol=1e-8)
