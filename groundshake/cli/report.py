"""``groundshake demo [-o DIR] [--force]`` and ``groundshake report DIR``."""
from __future__ import annotations

from pathlib import Path

from ._common import options_named, print_json
from ._options import add_option
from .._errors import InputError

__all__ = ["register"]


def register(subparsers, parents) -> None:
    p = subparsers.add_parser(
        "demo", parents=parents,
        help="run the bundled example (an invented site) on the bundled demo records",
        description="Copy the bundled example scenario (an invented transformer pad) and "
                    "the synthetic demo records into DIR, run it, and write the report to "
                    "DIR/results/report.html. Screening only.")
    add_option(p, "output", metavar="DIR", default="groundshake-demo",
               what="demo folder to create (default: ./groundshake-demo)")
    add_option(p, "force", what="replace the demo in DIR if it exists")
    p.set_defaults(func=_demo)

    r = subparsers.add_parser(
        "report", parents=parents,
        help="(re)write report.html of an existing output folder",
        description="Rebuild DIR/report.html from the files a run wrote in DIR "
                    "(summary.json and the CSV tables).")
    r.add_argument("folder", metavar="DIR", help="output folder of `groundshake run`")
    add_option(r, "force", what="replace an existing report.html")
    add_option(r, "report_units")
    r.set_defaults(func=_report)


def _demo(args) -> int:
    from ..pipeline import run_demo

    quiet = bool(getattr(args, "quiet", False))
    with options_named(args, table={**args.option_of, "out_dir": args.option_of["output"]}):
        run = run_demo(args.output, force=bool(args.force), progress=not quiet)
    s = run.summary
    if getattr(args, "json", False):
        print_json({"folder": str(run.folder), "scenario": str(run.scenario),
                    "results": str(run.results), "report": str(run.report),
                    "warnings": s.get("warnings", []), "worst_dc": s.get("worst_dc")})
        return 0
    from .run import _terminal_summary

    print(_terminal_summary(s, run.results, report=False))
    print(f"report: {run.report}")
    return 0


def _report(args) -> int:
    from ..report._report import write_report

    quiet = bool(getattr(args, "quiet", False))
    if (Path(args.folder) / "report.html").exists() and not args.force:
        raise InputError(f"{Path(args.folder) / 'report.html'}: already exists; use --force to "
                         "replace it")
    path = write_report(Path(args.folder), progress=not quiet, units=args.report_units)
    if getattr(args, "json", False):
        print_json({"report": str(path)})
    else:
        print(f"report: {path}")
    return 0
