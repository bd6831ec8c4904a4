"""``groundshake suite SCENARIO --records DIR|GLOB|MANIFEST.csv -o DIR``."""
from __future__ import annotations

from pathlib import Path

from ._common import options_named, print_json, table
from ._options import add_option
from .._errors import InputError
from .._progress import Progress

__all__ = ["register"]


def register(subparsers, parents) -> None:
    p = subparsers.add_parser(
        "suite", parents=parents,
        help="run many record sets through one scenario's model; statistics of every peak",
        description="Run a suite of records through the model of SCENARIO (its [motion] is "
                    "replaced by each record set). The model and its modes are built once. "
                    "Writes DIR/suite.json, DIR/records/NAME.json as each finishes, spectra "
                    "statistics (CSV, PNG) and DIR/suite.html. Exit status 1 if any record "
                    "failed. Screening only.")
    p.add_argument("scenario", metavar="SCENARIO", help="scenario file (TOML)")
    p.add_argument("--records", required=True, metavar="DIR|GLOB|MANIFEST.csv",
                   help="a folder, a glob pattern (quote it) or a manifest CSV")
    add_option(p, "units", what="records")
    add_option(p, "dt", what="records")
    grp = p.add_mutually_exclusive_group()
    grp.add_argument("--workers", type=int, default=None, metavar="N",
                     help="local worker processes (default: the CPU count)")
    grp.add_argument("--scheduler", default=None, metavar="ADDRESS",
                     help="dask.distributed scheduler address, e.g. tcp://10.0.0.5:8786")
    add_option(p, "method", choices=("auto", "modal", "coupled", "direct"))
    add_option(p, "target", what="target spectrum drawn with the ground-spectra band")
    p.add_argument("--scale-to", default=None, metavar="SPEC",
                   help="scale each record set to this target spectrum (the forms of --target) "
                        "before it runs; the results are then combined by the rule: the mean "
                        "with 7 or more sets, else the maximum. Overrides [suite] scale_to")
    p.add_argument("--scale-rule", choices=("asce7-16", "asce7-10", "en1998"), default=None,
                   help="period band, share of the target and horizontal spectrum of the "
                        "scaling (default asce7-16; from memory of the standards, verify)")
    p.add_argument("--scale-mode", choices=("record", "set"), default=None,
                   help="record: each set fitted to the target first, then one common factor "
                        "(default); set: one common factor for all sets")
    p.add_argument("--scale-range", default=None, metavar="LOW,HIGH",
                   help="warn about scale factors outside this range (default 0.25,4)")
    p.add_argument("--scale-period", type=float, default=None, metavar="S",
                   help="fundamental period [s] that sets the scaling band (default: the "
                        "model's first mode)")
    p.add_argument("--set-timeout", type=float, default=None, metavar="S",
                   help="time limit of one record set [s]; a set past it is reported failed "
                        "(default: 120 s + 1e-6 s x DOFs x record samples, x10 on the second "
                        "term for the direct method; 0: no limit)")
    p.add_argument("--retries", type=int, default=2, metavar="N",
                   help="times a set is run again after its worker was lost (default 2)")
    p.add_argument("--resume", action="store_true",
                   help="keep finished records in DIR and run only the rest")
    add_option(p, "report_units", what="suite.html")
    add_option(p, "force", what="write into an existing DIR")
    add_option(p, "output", required=True, metavar="DIR", what="output folder")
    p.set_defaults(func=_suite)


def _suite(args) -> int:
    from ..scenario import load_scenario
    from ..suite._discover import discover_record_sets
    from ..suite._output import write_suite_outputs
    from ..suite._run import run_suite

    out = Path(args.output)
    scen_path = Path(args.scenario)
    if out.exists() and not out.is_dir():
        raise InputError(f"-o {args.output}: exists and is not a folder")
    if out.exists() and any(out.iterdir()) and not (args.resume or args.force):
        raise InputError(f"-o {args.output}: already holds results; use --resume to finish "
                         "them or --force to write over them")
    if out.resolve() == scen_path.resolve().parent:
        raise InputError(f"-o {args.output}: the scenario's own folder; give a new folder")
    if args.workers is not None and args.workers < 1:
        raise InputError(f"--workers {args.workers}: must be >= 1")
    if args.set_timeout is not None and not (args.set_timeout >= 0 and args.set_timeout < float("inf")):
        raise InputError(f"--set-timeout {args.set_timeout}: give seconds > 0 (0: no limit)")
    if args.retries < 0:
        raise InputError(f"--retries {args.retries}: must be >= 0")
    scenario = load_scenario(scen_path)
    comps = tuple(scenario.motion.components()) if scenario.motion is not None else ("x", "y", "z")
    if args.dt is not None and not args.dt > 0:
        raise InputError(f"--dt {args.dt}: must be > 0")
    with options_named(args):              # an error about an option's value names it
        scaling = _scaling_of(args, scenario)
        sets = discover_record_sets(args.records, components=comps, units=args.units,
                                    dt=args.dt)
    quiet = bool(getattr(args, "quiet", False))
    bar = Progress("records", total=len(sets)) if not quiet else None
    if bar is not None:
        bar.enabled = bar.enabled and not quiet
        bar.__enter__()
    try:
        with options_named(args):
            result = run_suite(
                scenario, sets, out, workers=args.workers, scheduler=args.scheduler,
                resume=args.resume, method=args.method,
                set_timeout="auto" if args.set_timeout is None else args.set_timeout,
                retries=args.retries, scaling=scaling,
                on_result=(lambda r: bar.advance()) if bar is not None else None)
    finally:
        if bar is not None:
            bar.__exit__(None, None, None)
    write_suite_outputs(result, scenario,
                        target=args.target or (scaling.target if scaling is not None else None),
                        units=args.report_units)
    doc_path = out / "suite.json"
    if getattr(args, "json", False):
        import json
        print_json(json.loads(doc_path.read_text(encoding="utf-8")))
    else:
        rows = [(r["record"], r["status"], r.get("error", "")) for r in result.records]
        print(table(rows, ["record set", "status", "error"]))
        if result.scaling is not None:
            print("\n" + "\n".join(scaling_lines(result.scaling)))
        print(f"\n{result.engine.line()}")
        print(f"{len(result.records) - result.n_failed} ok, {result.n_failed} failed; "
              f"wrote {doc_path} and {out / 'suite.html'}")
        print("For screening only — not a design or a code check.")
    return 1 if result.n_failed else 0


def _scaling_of(args, scenario):
    """The scaling asked for: the command line's options over the scenario's ``[suite]``."""
    from ..pipeline import SuiteScaling
    from ..scenario import errors_at_key

    with errors_at_key(scenario, ("suite",)):      # a bad [suite] value names its key
        base = SuiteScaling.from_settings(getattr(scenario, "suite", None))
    options = (args.scale_rule, args.scale_mode, args.scale_range, args.scale_period)
    if args.scale_to is None and base is None:
        if any(v is not None for v in options):
            raise InputError("--scale-rule/--scale-mode/--scale-range/--scale-period: given "
                             "without a target; add --scale-to TARGET (or [suite] scale_to)")
        return None
    limits = base.limits if base is not None else (0.25, 4.0)
    if args.scale_range is not None:
        parts = str(args.scale_range).split(",")
        try:
            limits = tuple(float(v) for v in parts)
        except ValueError:
            limits = ()
        if len(limits) != 2:
            raise InputError(f"--scale-range {args.scale_range}: allowed two numbers LOW,HIGH "
                             "with 0 < LOW < HIGH, e.g. 0.25,4")
    return SuiteScaling(
        target=args.scale_to if args.scale_to is not None else base.target,
        rule=args.scale_rule or (base.rule if base is not None else "asce7-16"),
        mode=args.scale_mode or (base.mode if base is not None else "record"),
        limits=limits,
        period=args.scale_period if args.scale_period is not None
        else (base.period if base is not None else None))


def scaling_lines(doc: dict) -> list[str]:
    """The scale-factor table and the combination rule, for the terminal."""
    lo, hi = doc["range"]
    rows = [(f["record"], f"{f['factor']:.4g}", f"{f['own']:.4g}",
             "" if f["in_range"] else f"outside {lo:g}-{hi:g}") for f in doc["factors"]]
    lines = [f"scaled to {doc['target_label']} by {doc['rule']} ({doc['source']}):",
             f"  mean {doc['spectrum'].split(' (')[0]} >= {100 * doc['share']:g} % of the target "
             f"over {doc['band'][0]:.3g}-{doc['band'][1]:.3g} s (T = {doc['period_s']:.3g} s, "
             f"{doc['period_from']});",
             f"  mode {doc['mode']}, common factor {doc['set_factor']:.4g}",
             table(rows, ["record set", "factor", "own fit", "note"])]
    if "combination" in doc:
        lines.append(f"results combined by the {doc['combination']}: {doc['combination_note']}")
    return lines
