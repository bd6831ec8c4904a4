"""``groundshake run SCENARIO -o DIR``: one scenario through the whole pipeline."""
from __future__ import annotations

import sys
from pathlib import Path

from .._cautions import SCREENING_NOTE
from ._common import print_json, table
from .._errors import InputError

__all__ = ["register"]


def register(subparsers, parents) -> None:
    p = subparsers.add_parser(
        "run", parents=parents,
        help="drive the block of a scenario with its motion; write summary, CSVs and report",
        description="Run a scenario: correct the motion, build the block model, compute "
                    "modes and the time history, and write summary.json, CSV tables and "
                    "report.html into DIR (SI units). Screening only.")
    p.add_argument("scenario", metavar="SCENARIO", help="scenario file (TOML)")
    p.add_argument("-o", "--output", metavar="DIR", required=True,
                   help="output folder to create")
    p.add_argument("--force", action="store_true", help="replace DIR if it exists")
    p.add_argument("--method", choices=("auto", "modal", "coupled", "direct", "spectrum"),
                   default=None,
                   help="override [analysis] method")
    p.add_argument("--no-report", action="store_true",
                   help="write summary.json and the CSV tables only (no report.html)")
    p.add_argument("--inventory", metavar="FILE",
                   help="station inventory (StationXML) of motion records in raw counts "
                        "(replaces [motion] inventory)")
    p.set_defaults(func=_run)


def _run(args) -> int:
    from ..scenario import load_scenario
    from ..pipeline import analyse, write_run

    scen_path = Path(args.scenario)
    out = Path(args.output)
    if out.resolve() == scen_path.resolve().parent:
        raise InputError(f"-o {args.output}: the scenario's own folder; give a new folder "
                         "for the results")
    if out.exists() and not args.force:
        raise InputError(f"-o {args.output}: already exists; use --force to replace it")
    if out.exists() and not out.is_dir():
        raise InputError(f"-o {args.output}: exists and is not a folder")
    scenario = load_scenario(scen_path)
    if getattr(args, "inventory", None):
        scenario = _with_inventory(scenario, Path(args.inventory))
    quiet = bool(getattr(args, "quiet", False))
    results = analyse(scenario, progress=not quiet, method=args.method)
    results.summary["provenance"]["command"] = " ".join(["groundshake", *sys.argv[1:]]) \
        if sys.argv and sys.argv[0].endswith("groundshake") else f"groundshake run {args.scenario}"
    write_run(results, out, overwrite=bool(args.force), report=not args.no_report,
              progress=not quiet)
    s = results.summary
    if getattr(args, "json", False):
        print_json(s)
        return 0
    print(_terminal_summary(s, out))
    return 0


def _with_inventory(scenario, inventory: Path):
    """The scenario with ``[motion] inventory`` set to ``inventory`` (a file that exists)."""
    import dataclasses

    if scenario.motion is None:
        raise InputError(f"--inventory {inventory}: the scenario has no [motion] to read it with")
    if not inventory.is_file():
        raise InputError(f"--inventory {inventory}: no such file (StationXML expected)")
    motion = dataclasses.replace(scenario.motion, inventory=inventory.resolve())
    return dataclasses.replace(scenario, motion=motion)


def _terminal_summary(s: dict, out: Path) -> str:
    rows = []
    pk = s["peaks"]
    for d in ("x", "y"):
        rows.append((f"base shear {d}", pk["base_shear"][d], "N"))
    rows.append(("base axial", pk["base_axial"], "N"))
    for d in ("x", "y"):
        rows.append((f"overturning moment {d}", pk["overturning_moment"][d], "N*m"))
    for d in ("x", "y", "z"):
        rd = pk["relative_displacement"][d]
        rows.append((f"relative displacement {d}", rd["value"], "m"))
    if pk.get("von_mises") is not None:
        rows.append(("von Mises stress", pk["von_mises"], "Pa"))
        rows.append(("principal tension", pk["principal_tension"], "Pa"))
    for nm, e in s["sensors"].items():
        a = e["peak_absolute_acceleration"]
        rows.append((f"{nm}: abs acc x/y/z", "/".join(f"{a[d]:.3g}" for d in "xyz"), "m/s2"))
    for nm, e in s["equipment"].items():
        a = e["peak_absolute_acceleration"]
        rows.append((f"{nm}: abs acc x/y/z", "/".join(f"{a[d]:.3g}" for d in "xyz"), "m/s2"))
        if e["anchors"]:
            rows.append((f"{nm}: max bolt tension", max(b["peak_tension"] for b in e["anchors"]), "N"))
            rows.append((f"{nm}: max bolt shear", max(b["peak_shear"] for b in e["anchors"]), "N"))
    contact = s["base"].get("contact")
    if contact:
        rows.append(("min contact pressure", contact["min_pressure"], "Pa"))
    st = s.get("stability") or {}
    for key, label in (("sliding", "least sliding FS"), ("overturning", "least overturning FS")):
        v = (st.get(key) or {}).get("min_safety_factor")
        if v is not None:
            case = (st.get(key) or {}).get("case")
            rows.append((label + (f" ({case} soil)" if case else ""), v, "-"))
    q = (st.get("bearing") or {}).get("peak_pressure")
    if q is not None:
        rows.append(("peak bearing pressure", q / 1e3, "kPa"))
    wi = s.get("worst_interaction")
    if wi:
        rows.append((f"bolt interaction ({wi['equipment']}, bolt {wi['bolt']})", wi["value"], "-"))
    an = s["analysis"]
    how = (f"{an['n_modes']} modes, {an['n_steps']} steps" if an["method"] != "spectrum" else
           f"{an['n_modes']} modes, design spectrum; peaks without signs or times")
    lines = [f"{s['title']} — {an['method']} ({how})",
             table(rows, ("peak", "value", "unit"))]
    w = s.get("worst_dc")
    if w:
        lines.append(f"worst demand/capacity: {w['value']:.3g} ({w['equipment']}, bolt {w['bolt']}) "
                     f"— {w['note']}")
    if s.get("soil_cases"):
        lines.append("soil cases: " + ", ".join(
            f"{c['name']} G = {c['shear_modulus'] / 1e6:.4g} MPa" for c in s["soil_cases"])
            + " (peaks above: envelope)")
    if st:
        lines.append(f"stability: {st.get('note', '')}")
    lines.append(f"warnings: {len(s['warnings'])}" + (" (see summary.json)" if s["warnings"] else ""))
    lines.append(f"written: {out}")
    lines.append(SCREENING_NOTE)
    return "\n".join(lines)
