"""The model (figure, materials, support, springs, equipment) and the modes."""
from __future__ import annotations

from typing import Mapping

import numpy as np

from ..results._schema import COLUMNS, DIRECTIONS, header, read, read_table
from . import _figures as F
from ._html import esc, table
from ._units import display_unit, to_display
from ._context import Context, as_float as _f, named as _named

__all__ = ["ModelPart"]


class ModelPart(Context):
    """One part of the report (see the module docstring)."""

    def grid(self):
        if self._grid is not False:
            return self._grid
        self._grid = None
        m = self.f.mesh
        if isinstance(m, Mapping) and isinstance(m.get("lines"), Mapping) and m.get("cells"):
            lf = to_display(1.0, "length", self.sys)       # figures in display lengths
            xs, ys, zs = (lf * np.asarray(m["lines"][a], float) for a in "xyz")
            idx = np.asarray(m["cells"], int).reshape(-1, 3)
            filled = np.zeros((xs.size - 1, ys.size - 1, zs.size - 1), bool)
            filled[tuple(idx.T)] = True
            self._grid = F.VoxelGrid(xs=xs, ys=ys, zs=zs, index=idx, filled=filled)
        return self._grid

    def model(self) -> str:
        grid = self.grid()
        m = self.f.mesh if isinstance(self.f.mesh, Mapping) else {}
        md = read_table(self.s, "model")
        html_ = []
        if grid is not None:
            parts = [str(p) for p in m.get("parts", [])]
            cell_part = np.full(grid.filled.shape, -1)
            cp = np.asarray(m.get("cell_part", np.zeros(grid.index.shape[0])), int)
            cell_part[tuple(grid.index.T)] = cp
            lf = to_display(1.0, "length", self.sys)
            lu = display_unit("length", self.sys)
            boxes = [(e["name"], lf * np.asarray(e["footprint_lo"], float),
                      lf * (np.asarray(e["footprint_hi"], float)
                            + [0, 0, 2.0 * (float(e["cg"][2]) - float(e["footprint_lo"][2]))]))
                     for e in m.get("equipment", [])]
            anchors = [lf * np.asarray(a, float) for e in m.get("equipment", [])
                       for a in e.get("anchors", [])]
            sensors = [(s["name"], lf * np.asarray(s["at"], float)) for s in m.get("sensors", [])]
            html_.append(self._fig(lambda: F.model_figure(
                grid, cell_part=cell_part, part_names=parts, equipment=boxes,
                anchors=np.asarray(anchors, float) if anchors else None, sensors=sensors,
                length_unit=lu),
                f"The block as modelled: {int(grid.filled.sum())} hexahedral elements, the "
                "equipment envelope (footprint × twice the height of its centre of mass), anchor "
                f"bolts (triangles) and sensors (stars). Lengths in {lu}.", fid="fig-model"))
        rows = []
        mats = _named(md.get("materials"))
        for name, _ in mats:
            def mat(key):
                return read(self.s, "model", "materials", name, key)
            rows.append([f"Material {name}: Young's modulus, Poisson's ratio, density",
                         f"{self.q(mat('youngs_modulus'), 'modulus')}, "
                         f"{self.n(mat('poisson_ratio'), 'ratio')}, "
                         f"{self.q(mat('density'), 'density')}"])
        rows.append(["Elements, nodes, degrees of freedom",
                     f"{md.get('n_elements', '—')} {md.get('element', '')}, {md.get('n_nodes', '—')}, "
                     f"{md.get('n_dof', '—')}"])
        if _f(md.get("weight")) is not None:
            rows.append(["Weight of block and equipment", self.q(md.get("weight"), "weight")])
        sup = md.get("support") if isinstance(md.get("support"), Mapping) else {}
        base = md.get("base") if isinstance(md.get("base"), Mapping) else {}
        if base:
            rows.append(["Base footprint", f"{self.n(base.get('lx'), 'length')} × "
                         f"{self.n(base.get('ly'), 'length')} {display_unit('length', self.sys)}"])
        rows.append(["Support", str(sup.get("kind", "—"))])
        if _f(sup.get("shear_modulus")) is not None:
            rows.append(["Soil shear modulus", self.q(sup["shear_modulus"], "modulus")])
        html_.append(table(rows, ["item", "value"], cls="grid kv2"))
        springs = sup.get("springs") if isinstance(sup.get("springs"), Mapping) else {}
        dash = sup.get("dashpots") if isinstance(sup.get("dashpots"), Mapping) else {}
        if springs:
            srows = []
            for d in ("x", "y", "z"):
                srows.append([f"translation {d}", self.cell(springs.get(f"k_{d}"), "stiffness"),
                              self.cell(dash.get(f"c_{d}"), "dashpot"),
                              f"rotation about {d}", self.cell(springs.get(f"k_r{d}"), "rotational_stiffness"),
                              self.cell(dash.get(f"c_r{d}"), "rotational_dashpot")])
            html_.append("<h3>Soil springs and dashpots</h3>" + table(
                srows, ["motion", self.h("stiffness", "stiffness"), self.h("dashpot", "dashpot"),
                        "motion", self.h("stiffness", "rotational_stiffness"),
                        self.h("dashpot", "rotational_dashpot")]))
            formulas = sup.get("formulas") or []
            if formulas:
                html_.append('<p class="note">' + esc(" ".join(str(x) for x in formulas)) + "</p>")
        eqs = [(n, e) for n, e in _named(read(self.s, "equipment")) if isinstance(e, Mapping)]
        if eqs:
            erows = []
            for name, e in eqs:
                fh = e.get("frequency_hz")
                erows.append([name, self.cell(e.get("mass"), "mass"),
                              self._at(e.get("cg")),
                              "rigid" if not fh else ", ".join(self.n(v, "frequency") for v in fh),
                              self.cell(e.get("damping"), "damping"), len(e.get("anchors") or [])])
            html_.append("<h3>Equipment</h3>" + table(
                erows, ["equipment", self.h("mass", "mass"), "centre of mass",
                        self.h("support frequency x, y, z", "frequency"),
                        self.h("damping", "damping"), "bolts"]))
        return "".join(html_)

    def modes(self) -> str:
        t = self.f.table("modes")
        if t is None or t.n_rows == 0:
            return '<p class="none">No modes in this output.</p>'
        cols = {c.label: c for c in COLUMNS["modes"]}

        def col(label):
            v = t.get(cols[label].header)
            return np.full(t.n_rows, np.nan) if v is None else v

        dom = t.strings(cols["dominant direction"].header) or [""] * t.n_rows
        rows = []
        for i in range(min(t.n_rows, 30)):
            rows.append([int(col("mode")[i]), self.cell(col("frequency")[i], "frequency"),
                         self.cell(col("period")[i], "time"),
                         self.cell(col("damping")[i], "damping", digits=2),
                         *(self.cell(100 * col(f"effective mass ratio {d}")[i], "percent", digits=2)
                           for d in DIRECTIONS),
                         *(self.cell(100 * col(f"rotational participation {d}")[i], "percent",
                                     digits=2) for d in DIRECTIONS),
                         self._character(dom[i], [col(f"rotational participation {d}")[i]
                                                  for d in DIRECTIONS])])
        self.ref["percent"] = 100.0
        html_ = ['<p class="note">Effective mass in each direction and rotational participation '
                 "(the same ratio for a rigid rotation about axes through the centre of the base), "
                 "in percent of the total; values below round-off show as 0.</p>",
                 table(rows, ["mode", self.h("frequency", "frequency"), self.h("period", "time"),
                              self.h("damping", "damping"),
                              *(f"mass {d} [%]" for d in DIRECTIONS),
                              *(f"rotation about {d} [%]" for d in DIRECTIONS), "character"])]
        if t.n_rows > 30:
            html_.append(f'<p class="note">First 30 of {t.n_rows} modes; all are in modes.csv.</p>')
        cap = read(self.s, "analysis", "retained_mass_ratio")
        if isinstance(cap, Mapping):
            html_.append('<p class="note">Mass held by the modes kept: ' + ", ".join(
                f"{d} {self.n(100 * (_f(cap.get(d)) or 0), 'percent', digits=4)} %"
                for d in DIRECTIONS) + "; the rest is carried by the missing-mass term.</p>")
        html_.append(self.mode_shapes())
        return "".join(html_)

    def mode_shapes(self) -> str:
        m = self.f.table("mode_shapes")
        grid = self.grid()
        mesh = self.f.mesh if isinstance(self.f.mesh, Mapping) else {}
        if m is None or grid is None or not mesh.get("node_cells"):
            return ""
        index = np.asarray(mesh["node_cells"], int).reshape(-1, 3)
        if index.shape[0] != m.n_rows:
            return '<p class="none">mode_shapes.csv and mesh.json do not hold the same nodes.</p>'
        modes_t = self.f.table("modes")
        freq = modes_t.get(header("frequency", "frequency")) if modes_t is not None else None
        shapes = []
        for k in range(1, 5):
            cs = [m.get(header(f"mode {k} u{d}", "length")) for d in DIRECTIONS]
            if any(c is None for c in cs):
                break
            f = freq[k - 1] if freq is not None and k - 1 < freq.size else None
            shapes.append((f"mode {k}" + (f" · {self.q(f, 'frequency')}" if f is not None else ""),
                           np.nan_to_num(np.column_stack(cs))))
        if not shapes:
            return ""
        lu = display_unit("length", self.sys)
        return self._fig(lambda: F.mode_shapes_figure(grid, index, shapes, length_unit=lu),
                         "The first mode shapes, exaggerated (largest displacement drawn as 12 % of "
                         "the block's size); shade runs from the smallest displacement (light) to "
                         "the largest (dark); the dashed box is the undeformed block.",
                         fid="fig-mode-shapes")

