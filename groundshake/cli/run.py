"""``groundshake run SCENARIO -o DIR``: one scenario through the whole pipeline."""
from __future__ import annotations

import sys
from pathlib import Path

from .._cautions import SCREENING_NOTE
from ._common import print_json, table
from ._options import add_option
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
    add_option(p, "output", metavar="DIR", required=True, what="output folder to create")
    add_option(p, "force", what="replace DIR if it exists")
    add_option(p, "method", choices=("auto", "modal", "coupled", "direct", "spectrum"))
    add_option(p, "report_units", what="report.html and of the table printed here",
               default_text="si; overrides [report] units")
    p.add_argument("--no-report", action="store_true",
                   help="write summary.json and the CSV tables only (no report.html)")
    add_option(p, "inventory", what="the motion's records", note="replaces [motion] inventory")
    p.set_defaults(func=_run)


def _run(args) -> int:
    from ..scenario import errors_at_key, load_scenario
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
    with errors_at_key(scenario, ()):              # a library error names the scenario key
        results = analyse(scenario, progress=not quiet, method=args.method)
    results.summary["provenance"]["command"] = " ".join(["groundshake", *sys.argv[1:]]) \
        if sys.argv and sys.argv[0].endswith("groundshake") else f"groundshake run {args.scenario}"
    units = args.report_units or getattr(getattr(scenario, "report", None), "units", None) or "si"
    write_run(results, out, overwrite=bool(args.force), report=not args.no_report,
              progress=not quiet, report_units=units)
    s = results.summary
    if getattr(args, "json", False):
        print_json(s)
        return 0
    print(_terminal_summary(s, out, units=units, report=not args.no_report))
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


def _terminal_summary(s: dict, out: Path, *, units: str = "si", report: bool = True) -> str:
    """What ``run`` prints: the key answers in engineering units, then every exceedance
    and warning in words, then where the report is (units from the output contract)."""
    from ..report._units import display_unit, fmt

    rows = []

    def add(label, value, kind, where=""):
        u = display_unit(kind, units) if kind else ""
        rows.append((label, fmt(value, kind, units), u, where))

    pk = s.get("peaks") or {}
    bp = (s.get("base") or {}).get("peaks") or {}
    big_f = max([abs(float(v)) for v in (pk.get("base_shear") or {}).values()] + [1.0])
    for d, key in (("x", "Fx"), ("y", "Fy")):
        v = (pk.get("base_shear") or {}).get(d)
        if v is not None:
            rows.append((f"peak base shear {d}", fmt(v, "force", units, ref=big_f),
                         display_unit("force", units), _at_time(bp.get(key))))
    if pk.get("base_axial") is not None:
        add("peak vertical base force", pk["base_axial"], "force", _at_time(bp.get("Fz")))
    for d, key in (("x", "Mx"), ("y", "My")):
        v = (pk.get("overturning_moment") or {}).get(d)
        if v is not None:
            add(f"peak overturning moment about {d}", v, "moment", _at_time(bp.get(key)))
    rd = pk.get("relative_displacement") or {}
    if rd:
        d = max(rd, key=lambda k: float((rd[k] or {}).get("value") or 0.0))
        add("peak displacement (relative)", rd[d]["value"], "displacement", d)
    if pk.get("von_mises") is not None:
        add("peak von Mises stress", pk["von_mises"], "stress")
    contact = (s.get("base") or {}).get("contact")
    if contact:
        add("peak contact pressure", contact["peak_pressure"], "pressure")
        add("least contact pressure", contact["min_pressure"], "pressure")
    st = s.get("stability") or {}
    for key, label in (("sliding", "least sliding safety factor"),
                       ("overturning", "least overturning safety factor")):
        v = (st.get(key) or {}).get("min_safety_factor")
        if v is not None:
            case = (st.get(key) or {}).get("case")
            add(label, v, "ratio", f"{case} soil" if case else "")
    for nm, e in (s.get("equipment") or {}).items():
        a = e.get("peak_absolute_acceleration") or {}
        if a:
            d = max(a, key=lambda k: float(a[k]))
            add(f"{nm}: peak acceleration", a[d], "acceleration", d)
    w = s.get("worst_dc")
    if w:
        add("largest bolt demand/capacity", w["value"], "ratio",
            f"{w['equipment']}, bolt {w['bolt']}")
    wi = s.get("worst_interaction")
    if wi:
        add("largest bolt interaction", wi["value"], "ratio", f"{wi['equipment']}, bolt {wi['bolt']}")
    modes = (s.get("modes") or {}).get("modes") or []
    if modes:
        dom = str(modes[0].get("dominant_direction", ""))
        add("first mode", modes[0]["frequency"], "frequency",
            {"x": "sways in x", "y": "sways in y", "z": "vertical",
             "rotation about z": "torsion"}.get(dom, dom))
    an = s.get("analysis") or {}
    how = (f"{an.get('n_modes', '—')} modes, {an.get('n_steps', '—')} steps"
           if an.get("method") != "spectrum" else
           f"{an.get('n_modes', '—')} modes, design spectrum; peaks without signs or times")
    lines = [f"{s.get('title', 'run')} — {an.get('method', '')} ({how})",
             table(rows, ("result", "value", "unit", "where"))]
    if s.get("soil_cases"):
        lines.append("soil cases: " + ", ".join(
            f"{c['name']} G = {fmt(c['shear_modulus'], 'modulus', units)} "
            f"{display_unit('modulus', units)}" for c in s["soil_cases"])
            + " (peaks above: envelope)")
    ex = _exceedances(s)
    for x in ex:
        lines.append(f"EXCEEDED: {x}")
    if not ex and (w or wi):
        lines.append("no entered capacity is exceeded (screening comparison, not a code check)")
    for x in s.get("warnings") or []:
        lines.append(f"WARNING: {x}")
    lines.append(f"results: {out}" + (f"  report: {out / 'report.html'}" if report else ""))
    lines.append(SCREENING_NOTE)
    return "\n".join(lines)


def _at_time(p) -> str:
    return f"t = {p['time']:.3g} s" if isinstance(p, dict) and p.get("time") is not None else ""


def _exceedances(s: dict) -> list[str]:
    """Comparisons above 1 and lost contact, in words."""
    from ..report._answers import bolt_exceedances

    out = []
    for nm, what, bolts, top, at in bolt_exceedances(s):
        ratio = "ratio" if "interaction" in what else "demand/capacity"
        which = f"bolt {bolts[0]}" if len(bolts) == 1 else \
            "bolts " + ", ".join(map(str, bolts)) + f" (largest at bolt {at})"
        out.append(f"{nm} {which}: {what} {ratio} {top:.3g} (above 1)")
    c = (s.get("base") or {}).get("contact") or {}
    if c.get("uplift"):
        out.append("the base loses contact (uplift): the linear soil-spring model does not hold "
                   "there")
    st = s.get("stability") or {}
    for key in ("sliding", "overturning"):
        v = (st.get(key) or {}).get("min_safety_factor")
        if v is not None and v < 1.0:
            out.append(f"least {key} safety factor {v:.3g} (below 1)")
    return out
