"""Geometry checks that need only the scenario: parts, footprints, sensors, mesh size.

Boxes are axis-aligned; all coordinates in m. Lengths are compared with a
tolerance of 1e-9 times the model's extent (at least 1e-9 m). The number of
parts, equipment and sensors is small, so plain loops over them are fine here
(nothing in this module touches elements or nodes).
"""
from __future__ import annotations

import math

__all__ = ["check_geometry", "estimated_dofs", "top_face_height", "MAX_ESTIMATED_DOFS"]

#: Scenarios whose rough DOF estimate exceeds this are refused at load time
#: (the model's own memory guard checks the rest before assembly).
MAX_ESTIMATED_DOFS = 5_000_000


def _tolerance(parts) -> float:
    extent = 1.0
    for p in parts:
        for o, s in zip(p.origin, p.size):
            extent = max(extent, abs(o), abs(o + s))
    return 1e-9 * extent if math.isfinite(extent) else 1e-9


def _overlap(a_lo, a_hi, b_lo, b_hi) -> float:
    return min(a_hi, b_hi) - max(a_lo, b_lo)


def _relation(a, b, tol) -> str:
    """'overlap', 'face' (touch face to face) or 'apart' for parts a and b."""
    au, bu = a.upper, b.upper
    gaps = [_overlap(a.origin[k], au[k], b.origin[k], bu[k]) for k in range(3)]
    if all(g > tol for g in gaps):
        return "overlap"
    touching = [abs(g) <= tol for g in gaps]
    if sum(touching) == 1 and all(g > tol for g, t in zip(gaps, touching) if not t):
        return "face"
    return "apart"


def estimated_dofs(parts, element_size: float) -> float:
    """Rough count of degrees of freedom: 3 per node of each part's own grid.

    Shared faces are counted twice and extra grid lines are ignored, so this is
    an estimate (within tens of percent for simple blocks), meant only to stop
    absurd meshes early. Returns a float (may be ``inf``).
    """
    total = 0.0
    for p in parts:
        nodes = 1.0
        for s in p.size:
            n = s / element_size
            n = math.ceil(n) if math.isfinite(n) and n < 1e15 else 1e15
            nodes *= max(n, 1) + 1
        total += nodes
    return 3.0 * total


def top_face_height(parts, mount, footprint, tol) -> tuple[float | None, str]:
    """Height [m] of the exposed top face under a footprint, or (None, reason)."""
    cx, cy = mount
    bx, by = footprint
    x0, x1, y0, y1 = cx - bx / 2, cx + bx / 2, cy - by / 2, cy + by / 2
    area = bx * by
    under = []
    for p in parts:
        u = p.upper
        ox = _overlap(x0, x1, p.origin[0], u[0])
        oy = _overlap(y0, y1, p.origin[1], u[1])
        if ox > tol and oy > tol:
            under.append((u[2], ox * oy, p))
    if not under:
        return None, "the footprint is not over any part"
    top = max(z for z, _, _ in under)
    covered = sum(a for z, a, _ in under if abs(z - top) <= tol)
    if covered < area * (1 - 1e-9) - tol * tol:
        return None, (f"only {100 * covered / area:.3g} % of the footprint lies on the top face "
                      f"at z = {top:g} m")
    return top, ""


def check_geometry(values: dict, ctx) -> None:
    """Raise the scenario's error for impossible geometry; warn for doubtful geometry."""
    parts = values["parts"]
    tol = _tolerance(parts)
    for i, a in enumerate(parts):
        for j in range(i):
            if _relation(a, parts[j], tol) == "overlap":
                raise ctx.error(("parts", i), f"a box overlapping parts[{j}] ({parts[j].name!r})",
                                "parts that touch face to face without overlapping")
    # every part must be joined to the first through faces
    joined = {0}
    frontier = [0]
    while frontier:
        i = frontier.pop()
        for j in range(len(parts)):
            if j not in joined and _relation(parts[i], parts[j], tol) == "face":
                joined.add(j)
                frontier.append(j)
    for j in range(len(parts)):
        if j not in joined:
            raise ctx.error(("parts", j), f"a box that does not touch parts[0] ({parts[0].name!r}) "
                            "or any part joined to it face to face",
                            "parts that touch face to face (no gaps, no edge or corner contact)")
    mesh = values["mesh"]
    dofs = estimated_dofs(parts, mesh.element_size)
    if dofs > MAX_ESTIMATED_DOFS:
        vol = sum(p.size[0] * p.size[1] * p.size[2] for p in parts)
        suggest = (3.0 * vol / MAX_ESTIMATED_DOFS) ** (1 / 3) if math.isfinite(vol) and vol > 0 else float("nan")
        raise ctx.error(("mesh", "element_size"),
                        f"{mesh.element_size!r} (about {dofs:.3g} degrees of freedom)",
                        f"a size giving at most {MAX_ESTIMATED_DOFS:,} degrees of freedom "
                        f"(try element_size ≥ {suggest:.3g} m)")
    for i, s in enumerate(values.get("sensors") or ()):
        if not any(all(p.origin[k] - tol <= s.at[k] <= p.upper[k] + tol for k in range(3))
                   for p in parts):
            raise ctx.bad(("sensors", i, "at"), list(s.at), "a point inside or on a part")
    for i, e in enumerate(values.get("equipment") or ()):
        z, why = top_face_height(parts, e.mount, e.footprint, tol)
        if z is None:
            raise ctx.error(("equipment", i, "mount"),
                            f"mount {list(e.mount)} with footprint {list(e.footprint)} ({why})",
                            "a footprint lying wholly on one top face of the model")
