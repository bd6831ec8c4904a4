"""Build the block model from a scenario: mesh, matrices, supports, equipment, sensors.

DOFs. The grid's node DOFs (3 per node, interleaved x, y, z) plus a few master DOFs:
the rigid base on soil springs (6, at the centre of the base face), one rigid mount per
equipment item (6, at the centre of its footprint on the top face) and, for equipment
on a flexible support, its three CG translations. Fixed base DOFs are removed; the
nodes of the base face (soil, lumped springs) and of each footprint are slaved to their
master, u = u_m + θ_m × (x − x_m). The reduced DOFs are [free node DOFs, masters].
All displacements are relative to the ground.
"""
from __future__ import annotations

import math

import warnings
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
import scipy.sparse as sp

from .._constants import STANDARD_GRAVITY
from .._errors import GroundshakeWarning, ScenarioError
from ._assembly import assemble, element_keys
from ._elements import brick_matrices, shape_values
from ._factor import Factor, factorize
from ._memory import check_memory
from ._mesh import Box, count_grid, mesh_boxes
from ._cone import rotation_cones
from ._impedance import adjust_impedance, modulus_ratio_of
from ._recovery import StressPoints, surface_stress_points
from ._supports import Impedance, distributed_bed, gazetas_rectangle

__all__ = ["Point", "EquipmentModel", "ReactionOperators", "BlockModel", "build_model",
           "rigid_link", "G_STANDARD"]

#: Standard gravity [m/s²] (the one value of groundshake._constants).
G_STANDARD = STANDARD_GRAVITY
#: Default share of the equipment weight that resists uplift: the 0.9·D of the load
#: combination with E (ASCE 7-16 §2.3.6, from memory).
DEAD_LOAD_FACTOR = 0.9


def _get(obj: Any, name: str, default: Any = None) -> Any:
    if obj is None:
        return default
    if isinstance(obj, dict):
        return obj.get(name, default)
    return getattr(obj, name, default)


def rigid_link(offsets: np.ndarray) -> np.ndarray:
    """Rows (3p, 6) mapping master [u, θ] to the translations of points at ``offsets``
    (p, 3) from the master: u = u_m + θ × r."""
    r = np.atleast_2d(offsets)
    p = r.shape[0]
    T = np.zeros((p, 3, 6))
    T[:, 0, 0] = T[:, 1, 1] = T[:, 2, 2] = 1.0
    T[:, 0, 4], T[:, 0, 5] = r[:, 2], -r[:, 1]
    T[:, 1, 3], T[:, 1, 5] = -r[:, 2], r[:, 0]
    T[:, 2, 3], T[:, 2, 4] = r[:, 1], -r[:, 0]
    return T.reshape(3 * p, 6)


def _mass_solve(M: sp.spmatrix, B: np.ndarray) -> np.ndarray:
    """M⁻¹ B for a mass matrix M (n, n) and B (n, k): diagonal, dense or Jacobi-preconditioned
    conjugate gradients (a consistent mass is well conditioned, Wathen 1987)."""
    M = sp.csr_matrix(M)
    n = M.shape[0]
    d = M.diagonal()
    if M.nnz == n:
        return B / d[:, None]
    if n <= 3000:
        import scipy.linalg as sla
        return sla.solve(M.toarray(), B, assume_a="pos")
    import scipy.sparse.linalg as spla
    pre = sp.diags(1.0 / d)
    out = np.empty_like(B, dtype=float)
    for j in range(B.shape[1]):
        x, info = spla.cg(M, B[:, j], rtol=1e-13, atol=0.0, M=pre, maxiter=2000)
        out[:, j] = x
    return out


def _resultant_rows(offsets: np.ndarray) -> np.ndarray:
    """(6, 3p): forces at points ``offsets`` (p, 3) → [Fx, Fy, Fz, Mx, My, Mz] about 0."""
    return rigid_link(offsets).T


@dataclass(frozen=True, eq=False)
class Point:
    """A sensor: ``operator`` (3, n) sparse gives its relative displacement [m] from u."""

    name: str
    position: np.ndarray
    operator: sp.csr_matrix


@dataclass(frozen=True, eq=False)
class EquipmentModel:
    """An equipment item as modelled.

    ``operator`` (6, n) sparse: CG translations [m] and rotations [rad] (relative).
    ``frequency_hz`` (3,) or None (rigid); ``damping`` ratio of its support.
    """

    name: str
    mass: float
    inertia: np.ndarray
    cg: np.ndarray
    mount: np.ndarray
    anchors: np.ndarray
    dead_load_factor: float
    capacity: Any
    fp: Any
    operator: sp.csr_matrix
    frequency_hz: np.ndarray | None
    damping: float
    footprint: np.ndarray = field(default_factory=lambda: np.zeros(2))

    @property
    def weight(self) -> float:
        """Weight [N]."""
        return self.mass * G_STANDARD


@dataclass(frozen=True, eq=False)
class ReactionOperators:
    """Base resultants R(t) = K·u + C·u̇ + M·ü + G·a_g the structure exerts on its
    support, [Fx, Fy, Fz, Mx, My, Mz] [N, N·m] about the centre of the base face.
    ``K``, ``C``, ``M`` (6, n) dense, ``G`` (6, 3) dense."""

    K: np.ndarray
    C: np.ndarray
    M: np.ndarray
    G: np.ndarray


@dataclass(eq=False)
class BlockModel:
    """The finite-element model of a block and what stands on it (see docs/INTERNALS.md).

    Matrices are in the reduced DOFs (n,) of relative displacement: ``K`` [N/m],
    ``M`` [kg] sparse CSR (n, n), the consistent (or lumped) mass exactly as assembled;
    ``influence`` (n, 3) ι, the rigid translation of each reduced DOF under a unit ground
    displacement; ``ground_load`` (n, 3) [kg], L = M_ff ι_f + M_fb ι_b, so that the load of
    the ground acceleration a_g is −L·a_g (equal to M ι unless the base is fixed);
    ``total_mass`` (3,) [kg], every mass of the model including the fixed base nodes';
    ``rigid_mass`` (3,) [kg], m − Lᵀ M⁻¹ L, the mass that moves rigidly with the ground
    (the base nodes' share on a fixed base; zero on soil).
    """

    nodes: np.ndarray
    elements: np.ndarray
    element_centres: np.ndarray
    element_part: np.ndarray
    K: sp.csr_matrix
    M: sp.csr_matrix
    influence: np.ndarray
    total_mass: np.ndarray
    ground_load: np.ndarray
    rigid_mass: np.ndarray
    weight: float
    sensors: list
    equipment: list
    reaction: ReactionOperators
    stress: sp.csr_matrix
    base: dict
    damping_ratio: float
    rayleigh_hz: tuple[float, float] | None
    support_kind: str
    element_kind: str
    mass_kind: str
    part_names: list
    materials: dict
    node_map: sp.csr_matrix
    impedance: Impedance | None = None
    solver: str = "auto"
    cutoff_hz: float | None = None
    _stiff_parts: list = field(default_factory=list)   # (ratio, K_part (n, n))
    _dashpots: sp.csr_matrix | None = None             # discrete dashpots (n, n)
    _radiation: sp.csr_matrix | None = None            # soil radiation part of them
    _factor: Factor | None = None
    notes: list = field(default_factory=list)
    rayleigh_used_hz: tuple[float, float] | None = None
    mesh: Any = None  # the GridMesh, for plots
    inertia_reaction: ReactionOperators | None = None
    _equipment_mass: sp.csr_matrix | None = None       # masses on flexible supports (n, n)
    rayleigh_choice: str = ""
    _radiation_lowrank: tuple | None = None            # (U (n, r), d (r,))
    stress_points: StressPoints | None = None  # where the rows of ``stress`` sit
    #: rotational cones of a lumped soil base for step-by-step runs (model/_cone.py) and
    #: the reduced DOFs of the base's rotations about x, y, z they hang on
    cones: Any = None
    base_rotation_dofs: np.ndarray | None = None

    @property
    def n_dof(self) -> int:
        return self.K.shape[0]

    @property
    def is_classically_damped(self) -> bool:
        """False when discrete dashpots (soil radiation, equipment supports) are present."""
        return ((self._dashpots is None or self._dashpots.nnz == 0)
                and self._radiation_lowrank is None)

    def factor(self) -> Factor:
        """The factorization of K, built once and reused (``.solve(B)`` gives K⁻¹B)."""
        if self._factor is None:
            self._factor = factorize(self.K, solver=self.solver)
        return self._factor

    def block_mass_matrix(self) -> sp.csr_matrix:
        """M (n, n) [kg] without the masses on flexible equipment supports: the block, its
        rigidly attached equipment and the equipment's rotary inertia on its mount."""
        if self._equipment_mass is None or self._equipment_mass.nnz == 0:
            return self.M
        return sp.csr_matrix(self.M - self._equipment_mass)

    def damping_update(self):
        """Low-rank damping (U (n, r), d (r,)) added to :meth:`damping_matrix`: C += U·diag(d)·Uᵀ
        [N·s/m] (radiation dashpots on the area-averaged translations of a distributed bed),
        or None."""
        return self._radiation_lowrank

    def _block_stiffness(self):
        K = self.K
        for ratio, Kp in self._stiff_parts:
            if ratio is not None:
                K = K - Kp
        return K

    def describe(self) -> dict:
        """Plain dict for summary.json: mesh counts, element, supports, materials."""
        d = {
            "element": self.element_kind,
            "mass": self.mass_kind,
            "n_nodes": int(self.nodes.shape[0]),
            "n_elements": int(self.elements.shape[0]),
            "n_dof": int(self.n_dof),
            "parts": list(self.part_names),
            "materials": self.materials,
            "total_mass": [float(v) for v in self.total_mass],
            "rigid_mass": [float(v) for v in self.rigid_mass],
            "weight": float(self.weight),
            "support": {"kind": self.support_kind},
            "base": {k: (v.tolist() if isinstance(v, np.ndarray) else v)
                     for k, v in self.base.items()},
            "damping": {"ratio": self.damping_ratio,
                        "rayleigh_hz": list(self.rayleigh_hz) if self.rayleigh_hz else None,
                        "classical": self.is_classically_damped},
            "equipment": [{"name": e.name, "mass": e.mass, "cg": e.cg.tolist(),
                           "support": "rigid" if e.frequency_hz is None else "flexible",
                           "frequency_hz": None if e.frequency_hz is None
                           else e.frequency_hz.tolist(),
                           "damping": e.damping} for e in self.equipment],
            "sensors": [{"name": s.name, "at": s.position.tolist()} for s in self.sensors],
            "equipment_link": "footprint nodes slaved to a rigid mount (master-slave)",
            "notes": list(self.notes),
        }
        if self.impedance is not None:
            d["support"].update(self.impedance.to_dict())
        return d


def _materials(scenario):
    mats = _get(scenario, "materials", {}) or {}
    names = list(mats.keys())
    props = []
    for nm in names:
        m = mats[nm]
        props.append((float(_get(m, "youngs_modulus")), float(_get(m, "poisson_ratio")),
                      float(_get(m, "density"))))
    return names, props


def build_model(scenario, *, solver: Literal["auto", "scipy", "pardiso"] | None = None,
                check_memory_first: bool = True, soil_frequency_hz=None,
                cones: bool = False) -> BlockModel:
    """Build the :class:`BlockModel` of a scenario.

    Parameters
    ----------
    scenario : a ``groundshake.scenario.Scenario`` (or any object/dict with the same
        attribute names: ``parts``, ``materials``, ``mesh``, ``support``, ``damping``,
        ``equipment``, ``sensors``, ``analysis``).
    solver : factorization for :meth:`BlockModel.factor` (default from
        ``analysis.solver``).
    soil_frequency_hz : array (6,), optional
        On soil: the frequency [Hz] at which each base spring x, y, z, rx, ry, t is
        evaluated (frequency-dependent impedance, model/_impedance.py); None = static.
    cones : bool
        On soil with lumped springs: also fit rotational cones (Wolf 1994) to the static
        rocking and torsion springs, for step-by-step runs (``BlockModel.cones``; see
        :func:`groundshake.model._cone.with_cones`). Modal runs do not use them.

    Raises
    ------
    ScenarioError for geometry that cannot be modelled; ModelTooLargeError (quickly,
    before assembly) when the estimate exceeds the available memory.
    """
    mat_names, mat_props = _materials(scenario)
    parts = list(_get(scenario, "parts", []) or [])
    boxes = []
    for i, p in enumerate(parts):
        mname = _get(p, "material")
        if mname not in mat_names:
            raise ScenarioError(f"parts[{i}].material: given {mname!r}; allowed one of "
                                f"{mat_names}")
        boxes.append(Box(name=str(_get(p, "name", f"part{i}")),
                         origin=tuple(float(v) for v in _get(p, "origin")),
                         size=tuple(float(v) for v in _get(p, "size")),
                         material=mat_names.index(mname)))
    mesh_cfg = _get(scenario, "mesh")
    h = float(_get(mesh_cfg, "element_size", 0.5))
    element = _get(mesh_cfg, "element", "hex8-incompatible")
    mass_kind = _get(mesh_cfg, "mass", "consistent")
    support = _get(scenario, "support")
    kind = _get(support, "kind", "fixed")
    springs = _get(support, "springs", "lumped")
    dmp = _get(scenario, "damping")
    ratio = float(_get(dmp, "ratio_percent", 5.0)) / 100.0
    rayleigh = _get(dmp, "rayleigh_hz", None)
    analysis = _get(scenario, "analysis")
    if solver is None:
        solver = _get(analysis, "solver", "auto") or "auto"
    equipment_cfg = list(_get(scenario, "equipment", []) or [])
    sensors_cfg = list(_get(scenario, "sensors", []) or [])

    soft = ([], [], [])
    for e in equipment_cfg:
        mx, my = (float(v) for v in _get(e, "mount"))
        bx, by = (float(v) for v in _get(e, "footprint"))
        soft[0].extend([mx - bx / 2, mx, mx + bx / 2])
        soft[1].extend([my - by / 2, my, my + by / 2])
    for s in sensors_cfg:
        at = [float(v) for v in _get(s, "at")]
        for a in range(3):
            soft[a].append(at[a])

    if check_memory_first:
        n_nodes_est, _ = count_grid(boxes, h, soft)
        check_memory(n_nodes_est, h)

    mesh = mesh_boxes(boxes, h, soft)
    material_of_part = [b.material for b in boxes]
    key_grid, sizes, kmat = element_keys(mesh, material_of_part)
    props = np.array(mat_props)[kmat]
    mats = brick_matrices(sizes, props[:, 0], props[:, 1], props[:, 2], element=element)
    Kn, Mn = assemble(mesh, key_grid, mats, mass=mass_kind)
    nn = mesh.n_nodes
    nodes = mesh.nodes
    xs, ys, zs = mesh.lines
    notes: list[str] = []

    # ---- base face
    zmin = zs[0]
    base_nodes = np.flatnonzero(np.abs(nodes[:, 2] - zmin) <= 1e-9 * max(1.0, zs[-1] - zmin))
    bottom = mesh.filled[0]
    dxs, dys = np.diff(xs), np.diff(ys)
    area = float((bottom * dys[:, None] * dxs[None, :]).sum())
    bx0, bx1 = nodes[base_nodes, 0].min(), nodes[base_nodes, 0].max()
    by0, by1 = nodes[base_nodes, 1].min(), nodes[base_nodes, 1].max()
    lx, ly = bx1 - bx0, by1 - by0
    centre = np.array([(bx0 + bx1) / 2, (by0 + by1) / 2, zmin])
    base = {"area": area, "lx": float(lx), "ly": float(ly), "centre": centre, "z": float(zmin)}
    if abs(area - lx * ly) > 0.01 * lx * ly:
        msg = (f"base face is not a rectangle (area {area:.4g} m² vs {lx:g} × {ly:g} m); "
               "soil springs use the enclosing rectangle")
        notes.append(msg)
        if kind == "soil":
            warnings.warn(msg, GroundshakeWarning, stacklevel=2)

    # ---- masters: list of (name, n dofs); node DOF classification
    n_node_dof = 3 * nn
    status = np.zeros(n_node_dof, dtype=np.int8)  # 0 free, 1 fixed, 2 slaved
    slave_rows: list[np.ndarray] = []   # node DOF index arrays
    slave_maps: list[tuple[int, np.ndarray]] = []  # (master offset, (3p, 6) matrix)
    n_extra = 0
    base_master = None
    impedance = None
    base_dofs = (3 * base_nodes[:, None] + np.arange(3)).ravel()
    if kind == "fixed":
        status[base_dofs] = 1
    elif kind == "soil":
        # strain-compatible modulus G = (G/G0)·ρVs², as an effective Vs (model/_impedance.py)
        vs = float(_get(support, "shear_wave_velocity")) * math.sqrt(modulus_ratio_of(support)[0])
        nus = float(_get(support, "poisson_ratio"))
        rhos = float(_get(support, "density"))
        impedance = gazetas_rectangle(lx, ly, shear_wave_velocity=vs, poisson_ratio=nus,
                                      density=rhos,
                                      radiation_damping=bool(_get(support, "radiation_damping", True)))
        # embedment and frequency dependence (model/_impedance.py)
        impedance = adjust_impedance(impedance, lx, ly, support=support,
                                     frequency_hz=soil_frequency_hz)
        if springs == "distributed":
            # consistent Winkler bed: ∫N_A N_B dA over the bottom faces of the bottom cells
            jj, ii = np.nonzero(bottom)
            quad = np.stack([mesh.node_id[0, jj, ii], mesh.node_id[0, jj, ii + 1],
                             mesh.node_id[0, jj + 1, ii + 1], mesh.node_id[0, jj + 1, ii]], 1)
            q4 = np.array([[4, 2, 1, 2], [2, 4, 2, 1], [1, 2, 4, 2], [2, 1, 2, 4]]) / 36.0
            vals = (dxs[ii] * dys[jj])[:, None, None] * q4[None]
            Qn = sp.csr_matrix((vals.ravel(), (np.repeat(quad, 4, axis=1).ravel(),
                                               np.tile(quad, (1, 4)).ravel())), shape=(nn, nn))
            wq = np.asarray(Qn.sum(axis=1)).ravel()           # ∫N_A dA, tributary areas
            xc, yc = nodes[:, 0] - centre[0], nodes[:, 1] - centre[1]
            ix_b, iy_b = float(wq @ (yc * yc)), float(wq @ (xc * xc))  # exact for bilinear N
            k_area, note = distributed_bed(area, (ix_b, iy_b), impedance.stiffness)
            notes.append(note)
            notes.append("distributed bed: radiation dashpots Cx, Cy, Cz act on the base's "
                         "area-averaged translations, so rocking and torsion carry no "
                         "radiation damping, as with lumped springs")
        else:
            base_master = n_extra
            n_extra += 6
            status[base_dofs] = 2
            slave_rows.append(base_dofs)
            slave_maps.append((base_master, rigid_link(nodes[base_nodes] - centre)))
    else:
        raise ScenarioError(f"given {kind!r}; allowed 'fixed', 'soil'", param="support.kind",
                            value=kind)

    # ---- equipment mounts
    eq_info = []
    top_tol = 1e-9 * max(1.0, zs[-1] - zmin)
    for q, e in enumerate(equipment_cfg):
        name = str(_get(e, "name", f"equipment{q}"))
        mx, my = (float(v) for v in _get(e, "mount"))
        bxf, byf = (float(v) for v in _get(e, "footprint"))
        x0, x1, y0, y1 = mx - bxf / 2, mx + bxf / 2, my - byf / 2, my + byf / 2
        ci = np.flatnonzero(((xs[:-1] + xs[1:]) / 2 > x0) & ((xs[:-1] + xs[1:]) / 2 < x1))
        cj = np.flatnonzero(((ys[:-1] + ys[1:]) / 2 > y0) & ((ys[:-1] + ys[1:]) / 2 < y1))
        if ci.size == 0 or cj.size == 0:
            raise ScenarioError(f"footprint of {name!r}, {bxf:g} × {byf:g} m at mount "
                                f"[{mx:g}, {my:g}] covers no element; allowed a footprint "
                                "on the block's top face", param=f"equipment[{q}]")
        col = mesh.filled[:, cj[:, None], ci[None, :]]  # (nez, nj, ni)
        has = col.any(axis=0)
        topk = np.where(has, col.shape[0] - 1 - np.argmax(col[::-1], axis=0), -1)
        if not has.all() or np.unique(topk).size != 1:
            raise ScenarioError(f"footprint of {name!r} at mount [{mx:g}, {my:g}] does not lie "
                                "on one flat top face of the block; allowed a footprint within "
                                "a single top surface", param=f"equipment[{q}]")
        ztop = zs[int(topk.flat[0]) + 1]
        if int(topk.flat[0]) + 1 < len(zs) - 1 and mesh.filled[int(topk.flat[0]) + 1:,
                                                             cj[:, None], ci[None, :]].any():
            raise ScenarioError(f"footprint of {name!r} is not on a top face",
                                param=f"equipment[{q}]")
        sel = ((np.abs(nodes[:, 2] - ztop) <= top_tol)
               & (nodes[:, 0] >= x0 - 1e-9) & (nodes[:, 0] <= x1 + 1e-9)
               & (nodes[:, 1] >= y0 - 1e-9) & (nodes[:, 1] <= y1 + 1e-9))
        fp_nodes = np.flatnonzero(sel)
        fp_dofs = (3 * fp_nodes[:, None] + np.arange(3)).ravel()
        if np.any(status[fp_dofs] != 0):
            raise ScenarioError(f"footprint of {name!r} overlaps the base or another equipment "
                                "footprint; allowed separate footprints on the top face",
                                param=f"equipment[{q}]")
        mount_pt = np.array([mx, my, ztop])
        mo = n_extra
        n_extra += 6
        status[fp_dofs] = 2
        slave_rows.append(fp_dofs)
        slave_maps.append((mo, rigid_link(nodes[fp_nodes] - mount_pt)))
        freq = _get(e, "frequency_hz", None)
        eo = None
        if freq is not None:
            eo = n_extra
            n_extra += 3
        eq_info.append((q, name, e, mount_pt, mo, eo, fp_nodes))

    # ---- node map P: node DOFs (3nn) = P · reduced
    free_dofs = np.flatnonzero(status == 0)
    nf = free_dofs.size
    n = nf + n_extra
    red_of = np.full(n_node_dof, -1, dtype=np.int64)
    red_of[free_dofs] = np.arange(nf)
    rows = [free_dofs]
    cols = [np.arange(nf)]
    vals = [np.ones(nf)]
    for dofs, (mo, T) in zip(slave_rows, slave_maps):
        nz = T != 0
        r, c = np.nonzero(nz)
        rows.append(dofs[r])
        cols.append(nf + mo + c)
        vals.append(T[nz])
    P = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                      shape=(n_node_dof, n))

    # ---- reduce K and M: K_red = Pᵀ K P (+ master terms)
    s_dofs = np.flatnonzero(status == 2)
    Ts = P[s_dofs][:, nf:]  # (|s|, n_extra)
    Kf = Kn[free_dofs]
    Mf = Mn[free_dofs]

    def reduce(A, Af):
        Aff = Af[:, free_dofs]
        if n_extra == 0:
            return sp.csr_matrix(Aff)
        Afs = Af[:, s_dofs] @ Ts
        Ass = Ts.T @ (A[s_dofs][:, s_dofs] @ Ts)
        return sp.bmat([[Aff, Afs], [Afs.T, Ass]], format="csr")

    K = reduce(Kn, Kf)
    M = reduce(Mn, Mf)
    Kx = np.zeros((n_extra, n_extra))
    Mx = np.zeros((n_extra, n_extra))
    Cx = np.zeros((n_extra, n_extra))
    stiff_parts = []

    def extra_mat(D):
        if n_extra == 0:
            return sp.csr_matrix((n, n))
        Z = sp.csr_matrix(D)
        return sp.bmat([[sp.csr_matrix((nf, nf)), None], [None, Z]], format="csr")

    rad = None
    dash = None
    radiation_lowrank = None
    if kind == "soil":
        if base_master is not None:
            Ks = np.zeros((n_extra, n_extra))
            Ks[base_master:base_master + 6, base_master:base_master + 6] = np.diag(impedance.stiffness)
            Kx += Ks
            Cr = np.zeros((n_extra, n_extra))
            Cr[base_master:base_master + 6, base_master:base_master + 6] = np.diag(impedance.damping)
            Cx += Cr
            rad = extra_mat(Cr)
        else:
            bd = red_of[base_dofs]
            Qc = Qn.tocoo()
            Ks_sp = sp.csr_matrix(sum(
                sp.csr_matrix((k_area[d] * Qc.data, (red_of[3 * Qc.row + d],
                                                     red_of[3 * Qc.col + d])), shape=(n, n))
                for d in range(3)))
            K = K + Ks_sp
            # dashpots on the mean translation ū_d = Σ (w_A/A) u_Ad: C = U diag(c) Uᵀ
            U = sp.csr_matrix((np.tile(wq[base_nodes] / area, 3),
                               (np.concatenate([red_of[3 * base_nodes + d] for d in range(3)]),
                                np.repeat(np.arange(3), base_nodes.size))), shape=(n, 3))
            radiation_lowrank = (U, impedance.damping[:3].copy())

    # ---- equipment masses, springs
    Meq = np.zeros((n_extra, n_extra))   # masses on flexible supports (damped by them alone)
    equipment = []
    eq_parts = []
    for (q, name, e, mount_pt, mo, eo, fp_nodes) in eq_info:
        m = float(_get(e, "mass"))
        hcg = float(_get(e, "cg_height"))
        bxf, byf = (float(v) for v in _get(e, "footprint"))
        inertia = _get(e, "rotary_inertia", None)
        if inertia is None:
            hz = 2 * hcg
            inertia = np.array([m / 12 * (byf ** 2 + hz ** 2), m / 12 * (bxf ** 2 + hz ** 2),
                                m / 12 * (bxf ** 2 + byf ** 2)])
        inertia = np.broadcast_to(np.asarray(inertia, float), (3,)).copy()
        cg = mount_pt + np.array([0.0, 0.0, hcg])
        Tcg = rigid_link(cg - mount_pt)  # (3, 6)
        dp = _get(e, "damping_percent", None)
        zeta = ratio if dp is None else float(dp) / 100.0
        freq = _get(e, "frequency_hz", None)
        Mx[mo + 3:mo + 6, mo + 3:mo + 6] += np.diag(inertia)
        op = np.zeros((6, n))
        op[3:, nf + mo + 3:nf + mo + 6] = np.eye(3)
        if freq is None:
            Mx[mo:mo + 6, mo:mo + 6] += m * Tcg.T @ Tcg
            op[:3, nf + mo:nf + mo + 6] = Tcg
            fz = None
        else:
            fz = np.broadcast_to(np.asarray(freq, float), (3,)).copy()
            kk = m * (2 * np.pi * fz) ** 2
            cc = 2 * zeta * m * (2 * np.pi * fz)
            Mx[eo:eo + 3, eo:eo + 3] += m * np.eye(3)
            Meq[eo:eo + 3, eo:eo + 3] += m * np.eye(3)
            L = np.zeros((3, n_extra))
            L[:, eo:eo + 3] = np.eye(3)
            L[:, mo:mo + 6] -= Tcg
            Kq = L.T @ np.diag(kk) @ L
            Cq = L.T @ np.diag(cc) @ L
            Kx += Kq
            Cx += Cq
            eq_parts.append((zeta, extra_mat(Kq)))
            op[:3, nf + eo:nf + eo + 3] = np.eye(3)
        equipment.append(EquipmentModel(
            name=name, mass=m, inertia=inertia, cg=cg, mount=mount_pt,
            anchors=np.asarray(_get(e, "anchors", []) or [], float).reshape(-1, 2),
            dead_load_factor=float(_get(e, "dead_load_factor", DEAD_LOAD_FACTOR)),
            capacity=_get(e, "capacity", None), fp=_get(e, "fp", None),
            operator=sp.csr_matrix(op), frequency_hz=fz, damping=zeta,
            footprint=np.array([bxf, byf])))
    if n_extra:
        K = sp.csr_matrix(K + extra_mat(Kx))
        M = sp.csr_matrix(M + extra_mat(Mx))
        Cd = extra_mat(Cx)
        dash = Cd if dash is None else dash + Cd
    if kind == "soil":
        if base_master is not None:
            Ks6 = np.zeros((n_extra, n_extra))
            Ks6[base_master:base_master + 6, base_master:base_master + 6] = np.diag(impedance.stiffness)
            stiff_parts.append((None, extra_mat(Ks6)))
        else:
            stiff_parts.append((None, Ks_sp))
    stiff_parts.extend(eq_parts)
    K.sort_indices()
    M.sort_indices()

    # ---- influence, total mass, weight
    iota = np.zeros((n, 3))
    comp = free_dofs % 3
    iota[np.arange(nf), comp] = 1.0
    if base_master is not None:
        iota[nf + base_master + np.arange(3), np.arange(3)] = 1.0
    for (q, name, e, mount_pt, mo, eo, fp_nodes) in eq_info:
        iota[nf + mo + np.arange(3), np.arange(3)] = 1.0
        if eo is not None:
            iota[nf + eo + np.arange(3), np.arange(3)] = 1.0
    # ground load L = M_ff ι_f + M_fb ι_b: the consistent mass stays as assembled; on a
    # fixed base the coupling of the first layer of nodes to the moving base nodes is part
    # of the load (Clough & Penzien, support excitation).
    iota_nodes = sp.csr_matrix((np.ones(n_node_dof), (np.arange(n_node_dof),
                                                      np.arange(n_node_dof) % 3)),
                               shape=(n_node_dof, 3))
    Mi = np.asarray(M @ iota)
    if kind == "fixed":
        iota_b = np.zeros((n_node_dof, 3))
        fixed_dofs = np.flatnonzero(status == 1)
        iota_b[fixed_dofs, fixed_dofs % 3] = 1.0
        Mnb = np.asarray(Mn @ iota_b)
        ground_load = Mi + np.asarray(P.T @ Mnb)
        total_mass = (np.einsum("ia,ia->a", iota, Mi)
                      + 2 * np.einsum("ia,ia->a", iota, np.asarray(P.T @ Mnb))
                      + np.einsum("ia,ia->a", iota_b, Mnb))
        moving = np.einsum("ia,ia->a", ground_load, _mass_solve(M, ground_load))
        rigid_mass = np.maximum(total_mass - moving, 0.0)
        notes.append(f"fixed base: {mass_kind} mass kept as assembled; ground load "
                     "L = M_ff·ι_f + M_fb·ι_b; mass moving rigidly with the ground "
                     f"(m − Lᵀ M_ff⁻¹ L) {rigid_mass[0]:.4g} kg of {total_mass[0]:.4g} kg; "
                     "base reactions include the base nodes' inertia and M_bf·ü_f")
    else:
        ground_load = Mi
        total_mass = np.einsum("ia,ia->a", iota, Mi)
        rigid_mass = np.zeros(3)
    block_mass = float(Mn.sum() / 3.0)
    weight = G_STANDARD * (block_mass + sum(e.mass for e in equipment))

    # ---- sensors
    sensors = []
    for si, s in enumerate(sensors_cfg):
        at = np.array([float(v) for v in _get(s, "at")])
        nm = str(_get(s, "name", f"sensor{si}"))
        op = _point_operator(mesh, P, at)
        if op is None:
            raise ScenarioError(f"sensors[{si}].at ({nm}): {at.tolist()} is not inside or on "
                                "the block; allowed a point of the modelled parts")
        sensors.append(Point(name=nm, position=at, operator=op))

    # ---- reactions
    if kind == "fixed":
        Sres = sp.csr_matrix(_resultant_rows(nodes[base_nodes] - centre))  # (6, 3nb)
        KR = -(Sres @ (Kn[base_dofs] @ P)).toarray()
        MR = -(Sres @ (Mn[base_dofs] @ P)).toarray()
        GR = -(Sres @ (Mn[base_dofs] @ iota_nodes)).toarray()
        CR = np.zeros_like(KR)  # damping forces at the fixed base are not included
    elif base_master is not None:
        KR = np.zeros((6, n))
        CR = np.zeros((6, n))
        KR[:, nf + base_master:nf + base_master + 6] = np.diag(impedance.stiffness)
        CR[:, nf + base_master:nf + base_master + 6] = np.diag(impedance.damping)
        MR = np.zeros((6, n))
        GR = np.zeros((6, 3))
    else:
        Sres = _resultant_rows(nodes[base_nodes] - centre)
        bd = red_of[base_dofs]
        KR = np.zeros((6, n))
        CR = np.zeros((6, n))
        KR = (sp.csr_matrix(Sres) @ Ks_sp[bd]).toarray()
        Ul, cl = radiation_lowrank
        CR = ((Sres @ Ul[bd].toarray()) * cl[None, :]) @ Ul.T.toarray()
        MR = np.zeros((6, n))
        GR = np.zeros((6, 3))
    reaction = ReactionOperators(K=KR, C=CR, M=MR, G=GR)
    # d'Alembert: the structure exerts −Σ m ü_abs on its support (moments about the centre
    # of the base face). T (n, 6) is a rigid motion about that centre in reduced DOFs.
    T = np.zeros((n, 6))
    T[:nf] = rigid_link(nodes[free_dofs // 3] - centre).reshape(-1, 3, 6)[
        np.arange(nf), free_dofs % 3]
    if base_master is not None:
        T[nf + base_master:nf + base_master + 6] = np.eye(6)
    for (q, name, e, mount_pt, mo, eo, fp_nodes) in eq_info:
        T[nf + mo:nf + mo + 3] = rigid_link(mount_pt - centre)
        T[nf + mo + 3:nf + mo + 6, 3:] = np.eye(3)
        if eo is not None:
            T[nf + eo:nf + eo + 3] = rigid_link(equipment[q].cg - centre)
    MT = -np.asarray((M @ T).T)
    GT = -T.T @ ground_load
    if kind == "fixed":   # the base nodes' own inertia and their coupling M_bf ü_f
        MT = MT + MR
        GT = GT + GR
    inertia_reaction = ReactionOperators(K=np.zeros((6, n)), C=np.zeros((6, n)), M=MT, G=GT)

    held = status.reshape(-1, 3).max(axis=1)            # 1 fixed, 2 slaved (rigid base/mount)
    constraint = np.where(held > 0, 2, 0)
    constraint[base_nodes[held[base_nodes] > 0]] = 1      # fixed or rigid base
    stress_points = surface_stress_points(mesh, key_grid, mats, kmat, constrained=constraint)
    stress = sp.csr_matrix(stress_points.operator @ P)
    materials = {nm: {"youngs_modulus": p[0], "poisson_ratio": p[1], "density": p[2]}
                 for nm, p in zip(mat_names, mat_props)}
    cone_model = rotation_dofs = None
    if kind == "soil":
        notes.extend(impedance.notes)
        if cones and base_master is not None:
            cone_model = rotation_cones(lx, ly, impedance.stiffness[3:], shear_wave_velocity=vs,
                                        poisson_ratio=nus, density=rhos)
            rotation_dofs = nf + base_master + np.arange(3, 6)
            notes.append("time-domain soil impedance: rocking and torsion as rotational cones "
                         "(Wolf 1994, from memory), each the static spring plus an extra "
                         "rotation of inertia rho*I*z0 hung on the base by the dashpot "
                         "rho*c*I, fitted to the static springs; translations keep their "
                         "springs and dashpots")
        elif cones:
            notes.append("time-domain soil impedance: rotational cones need lumped springs; "
                         "the distributed bed keeps its static springs")
    model = BlockModel(
        nodes=nodes, elements=mesh.elements, element_centres=mesh.element_centres,
        element_part=mesh.element_part, K=K, M=M, influence=iota, total_mass=total_mass,
        ground_load=ground_load, rigid_mass=rigid_mass,
        weight=weight, sensors=sensors, equipment=equipment, reaction=reaction,
        stress=stress, stress_points=stress_points, base=base, damping_ratio=ratio,
        rayleigh_hz=None if rayleigh is None else (float(rayleigh[0]), float(rayleigh[1])),
        support_kind=kind, element_kind=element, mass_kind=mass_kind,
        part_names=[b.name for b in boxes], materials=materials, node_map=P,
        impedance=impedance, solver=solver,
        cutoff_hz=_get(analysis, "cutoff_hz", None),
        _stiff_parts=stiff_parts, _dashpots=dash, _radiation=rad, notes=notes, mesh=mesh,
        inertia_reaction=inertia_reaction, _radiation_lowrank=radiation_lowrank,
        _equipment_mass=extra_mat(Meq) if n_extra else None,
        cones=cone_model, base_rotation_dofs=rotation_dofs)
    return model


def _point_operator(mesh, P, at) -> sp.csr_matrix | None:
    """(3, n) operator interpolating the displacement at point ``at`` (3,) [m]."""
    xs, ys, zs = mesh.lines
    idx = []
    for a, l in zip(at, (xs, ys, zs)):
        tol = 1e-9 * max(1.0, l[-1] - l[0])
        if a < l[0] - tol or a > l[-1] + tol:
            return None
        i = int(np.clip(np.searchsorted(l, a, side="right") - 1, 0, len(l) - 2))
        idx.append(i)
    # a point on a cell face may belong to a neighbour cell that is filled
    cand = []
    for di in (0, -1):
        for dj in (0, -1):
            for dk in (0, -1):
                i, j, k = idx[0] + di, idx[1] + dj, idx[2] + dk
                if min(i, j, k) < 0 or i >= len(xs) - 1 or j >= len(ys) - 1 or k >= len(zs) - 1:
                    continue
                lo = np.array([xs[i], ys[j], zs[k]])
                hi = np.array([xs[i + 1], ys[j + 1], zs[k + 1]])
                if mesh.filled[k, j, i] and np.all(at >= lo - 1e-9) and np.all(at <= hi + 1e-9):
                    cand.append((i, j, k, lo, hi))
    if not cand:
        return None
    i, j, k, lo, hi = cand[0]
    xi = np.clip(2 * (at - lo) / (hi - lo) - 1, -1, 1)
    N = shape_values(xi[None])[0]  # (8,)
    from ._elements import NODE_SIGNS
    off = ((NODE_SIGNS + 1) / 2).astype(int)
    nid = mesh.node_id[k + off[:, 2], j + off[:, 1], i + off[:, 0]]
    W = sp.csr_matrix((np.repeat(N, 3), (np.tile(np.arange(3), 8),
                                         (3 * nid[:, None] + np.arange(3)).ravel())),
                      shape=(3, P.shape[0]))
    return sp.csr_matrix(W @ P)
