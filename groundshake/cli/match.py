"""Command ``match``: adjust a record to a target spectrum and write it."""
from __future__ import annotations

import argparse
import sys
import warnings
from pathlib import Path

import numpy as np

from .._cautions import CAUTIONS, SCREENING_NOTE
from ._common import check_damping_percent, float_list, options_named, print_json, table
from ._options import add_option
from .._errors import GroundshakeWarning, InputError

__all__ = ["register", "cmd_match"]


def _check_outputs(src: Path, out: Path | None, plot: Path | None) -> None:
    from ..records._write import WRITE_FORMATS

    if out is not None:
        if out.suffix.lower() not in WRITE_FORMATS:
            raise InputError(f"-o {out}: unknown output format {out.suffix or '(none)'!r}; "
                             f"allowed: {', '.join(WRITE_FORMATS)}")
        if out.resolve() == src.resolve():
            raise InputError(f"-o {out}: is the input file; give another output path "
                             "(inputs are never overwritten)")
    if plot is not None:
        if plot.suffix.lower() not in (".png", ".pdf", ".svg"):
            raise InputError(f"--plot {plot}: give a .png, .pdf or .svg file")
        if plot.resolve() == src.resolve() or (out is not None and plot.resolve() == out.resolve()):
            raise InputError(f"--plot {plot}: would overwrite the input or the output")


def cmd_match(args: argparse.Namespace) -> int:
    from .records import _correct_all, read_records_from_args, settings_from_args
    from ..spectra import parse_target
    from ..matching._acceptance import AcceptanceCriteria
    from ..matching._match import match_spectrum_report

    src = Path(args.record)
    out = Path(args.output) if args.output else None
    plot = Path(args.plot) if args.plot else None
    _check_outputs(src, out, plot)
    damping = [d / 100.0 for d in float_list(args.damping, name="--damping", positive=True)]
    if any(d >= 1 for d in damping):
        raise InputError(f"--damping {args.damping}: percent of critical, allowed 0 < value < 100")
    check_damping_percent(100.0 * d for d in damping)
    band = None
    if args.band is not None:
        band = float_list(args.band, name="--band", positive=True)
        if len(band) != 2 or band[0] >= band[1]:
            raise InputError(f"--band {args.band}: allowed two periods T1,T2 in s with T1 < T2")
    periods = None
    if args.periods is not None:
        periods = float_list(args.periods, name="--periods", positive=True)
    if not (args.tolerance > 0):
        raise InputError(f"--tolerance {args.tolerance:g}: allowed a percent > 0")
    if args.max_iterations < 0:
        raise InputError(f"--max-iterations {args.max_iterations}: allowed an integer >= 0")
    specs = args.target
    if len(specs) not in (1, len(damping)):
        raise InputError(f"--target given {len(specs)} times for {len(damping)} damping values; "
                         "allowed: once, or once per damping value (same order)")
    base = Path.cwd()
    targets = [parse_target(s, base_dir=base) for s in specs]
    target = targets[0] if len(damping) == 1 else (targets if len(targets) > 1 else None)
    if target is None:
        raise InputError(f"--target: one target for {len(damping)} damping values; give "
                         "--target once per damping value")
    if args.max_adjacent_below < 0:
        raise InputError(f"--max-adjacent-below {args.max_adjacent_below}: allowed an integer >= 0")
    for opt, value in (("--max-shortfall", args.max_shortfall), ("--max-excess", args.max_excess),
                       ("--max-husid-change", args.max_husid_change)):
        if not (np.isfinite(value) and value >= 0):
            raise InputError(f"{opt} {value:g}: allowed a number >= 0")
    criteria = AcceptanceCriteria(max_shortfall=args.max_shortfall / 100.0,
                                  max_excess=args.max_excess / 100.0,
                                  max_adjacent_below=args.max_adjacent_below,
                                  max_husid_change=args.max_husid_change)

    raws = read_records_from_args([src], args)
    records = _correct_all(raws, settings_from_args(args), args)
    results = []
    # the band and periods are in seconds here and in the library, so an error about them
    # names its option; damping and tolerance are percent here and ratios there (checked above)
    seconds = {k: v for k, v in args.option_of.items() if k in ("band", "periods")}
    with warnings.catch_warnings(record=True) as caught, options_named(args, table=seconds):
        warnings.simplefilter("always", GroundshakeWarning)
        for rec in records:
            results.append(match_spectrum_report(
                rec, target, damping, periods, band=band, tolerance=args.tolerance / 100.0,
                max_iterations=args.max_iterations, criteria=criteria, progress=True))
    messages = [str(w.message) for w in caught if issubclass(w.category, GroundshakeWarning)]
    for m in messages:
        sys.stderr.write(f"groundshake: warning: {m}\n")

    if out is not None:
        from ..records import write_record
        write_record([r.record for r in results], out)
    if plot is not None:
        from ..plots import match_figure, save_figure

        save_figure(match_figure(results), plot, dpi=100)

    failed = [r for r in results if not r.converged]
    if getattr(args, "json", False):
        print_json({"output": str(out) if out else None, "plot": str(plot) if plot else None,
                    "records": [r.to_dict() for r in results], "cautions": list(CAUTIONS)})
    else:
        _print_text(results, out, plot)
    if failed:
        names = ", ".join(f"{r.record.name} ({r.status}, max misfit {100 * r.max_misfit:.1f} %)"
                          for r in failed)
        sys.stderr.write(f"groundshake: match did not converge for {names}; "
                         + ("the output was written, and its history says so\n" if out
                            else "nothing was written\n"))
        return 1
    return 0


def _print_text(results, out, plot) -> None:
    for r in results:
        print(f"{r.record.name}: {r.status} (target {r.target_label}, damping "
              f"{', '.join(f'{100 * d:g}' for d in r.damping)} %, band {r.periods[0]:g}-"
              f"{r.periods[-1]:g} s, {r.periods.size} periods)")
        rows = [[str(it["iteration"]), 100 * it["max_misfit"], 100 * it["mean_misfit"]]
                for it in r.iterations]
        print(table(rows, ["iteration", "max misfit %", "mean misfit %"]))
        a = r.acceptance
        print(f"largest shortfall {100 * a['largest_shortfall']:.1f} %, largest excess "
              f"{100 * a['largest_excess']:.1f} %, {a['points_below']} of {a['points_total']} "
              f"points below target (longest run {a['longest_run_below']}), max |ΔHusid| "
              f"{a['husid_max_change']:.3f}; checks "
              + ", ".join(f"{k} {'met' if v else 'NOT met'}" for k, v in a["checks"].items()))
        b, f = a["measures"]["before"], a["measures"]["after"]
        rows = [[label, b[k], f[k], unit] for label, k, unit in (
            ("PGA", "pga", "m/s2"), ("PGV", "pgv", "m/s"), ("PGD", "pgd", "m"),
            ("Arias intensity", "arias_intensity", "m/s"), ("D5-95", "d5_95", "s"),
            ("final velocity", "final_velocity", "m/s"),
            ("final displacement", "final_displacement", "m"))]
        print(table(rows, ["measure", "before", "after", "unit"]))
    if out is not None:
        print(f"wrote {out} (m/s2)")
    if plot is not None:
        print(f"wrote {plot}")
    print(SCREENING_NOTE)


def register(subparsers, parents) -> None:
    """Add ``match`` to the ``groundshake`` command line."""
    from .records import add_processing_options, add_reading_options
    from ..matching._acceptance import AcceptanceCriteria

    d = AcceptanceCriteria()  # one place for the defaults and their sources
    p = subparsers.add_parser(
        "match", parents=parents, help="adjust a record to a target spectrum (corrective wavelets)",
        description="Correct a record (unless --raw), then adjust it with corrective wavelets "
                    "(Al Atik & Abrahamson 2010) until its spectrum matches the target over the "
                    "band. Exit status 1 if the match does not converge.")
    p.add_argument("record", metavar="RECORD", help="record file (every trace is matched)")
    add_option(p, "target", what="target spectrum, once per damping (the default band is "
               "clipped to a table's periods)", required=True, repeat=True)
    add_option(p, "damping", what=", matched at once")
    p.add_argument("--band", metavar="T1,T2", help="period band [s] (default 0.05,4; short end "
                   "at least 10·dt; within a target table's periods)")
    add_option(p, "periods", what=" to match", default_text="30 per decade over the band")
    p.add_argument("--tolerance", type=float, default=5.0, metavar="PCT",
                   help="converged when max |PSA/target - 1| ≤ this, percent (default 5)")
    p.add_argument("--max-iterations", type=int, default=40, metavar="N",
                   help="most iterations (default 40)")
    p.add_argument("--max-shortfall", type=float, default=100 * d.max_shortfall, metavar="PCT",
                   help="acceptance: largest shortfall below the target, percent (default "
                        f"{100 * d.max_shortfall:g}, USNRC SRP 3.7.1)")
    p.add_argument("--max-excess", type=float, default=100 * d.max_excess, metavar="PCT",
                   help="acceptance: largest excess above the target, percent (default "
                        f"{100 * d.max_excess:g}, USNRC SRP 3.7.1)")
    p.add_argument("--max-adjacent-below", type=int, default=d.max_adjacent_below, metavar="N",
                   help="acceptance: most adjacent periods below the target (default "
                        f"{d.max_adjacent_below}, USNRC SRP 3.7.1)")
    p.add_argument("--max-husid-change", type=float, default=d.max_husid_change, metavar="X",
                   help="acceptance: largest change of the normalised Husid curve, 0-1 "
                        f"(default {d.max_husid_change:g}, our choice)")
    add_option(p, "output", metavar="OUT",
               what="write the matched record: .mseed, .sac or .csv (m/s2)")
    add_option(p, "plot", what="plot spectra and acc/vel/disp before and after")
    add_reading_options(p)
    add_processing_options(p)
    p.set_defaults(func=cmd_match)
