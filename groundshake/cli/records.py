"""Commands ``info`` and ``correct``, and the record options other commands share.

Other stages' commands can reuse :func:`add_reading_options`,
:func:`add_processing_options`, :func:`settings_from_args` and
:func:`read_records_from_args` so that every command reads records alike.
"""
from __future__ import annotations

import argparse
import contextlib
import os
import warnings
from pathlib import Path

import numpy as np

from .._cautions import SCREENING_NOTE
from ._common import options_named, print_json, table
from ._options import add_option
from .._errors import GroundshakeWarning, InputError
from ..records._record import STANDARD_GRAVITY, Record

__all__ = ["register", "add_reading_options", "add_processing_options", "settings_from_args",
           "distinct_names",
           "read_records_from_args", "cmd_info", "cmd_correct"]


# -- shared options -------------------------------------------------------------------

def add_reading_options(p: argparse.ArgumentParser) -> None:
    """Add ``--units``, ``--dt``, ``--resample`` and ``--inventory`` (how files are read)."""
    g = p.add_argument_group("reading")
    add_option(g, "units")
    add_option(g, "dt")
    g.add_argument("--resample", action="store_true",
                   help="put text files with uneven time steps on a uniform step "
                        "(linear interpolation at the median step)")
    add_option(g, "inventory")


def _setting(name: str):
    import dataclasses

    from ..processing._settings import ProcessingSettings

    return next(f for f in dataclasses.fields(ProcessingSettings) if f.name == name)


def _about(name: str, *, none_text: bool | None = None) -> str:
    """``default X`` of a ProcessingSettings field, and ``0 for none`` where 0 means no
    such step (``none_text`` forces that part on or off)."""
    f = _setting(name)
    d = f.default
    parts = ["default none" if d is None else f"default {d:g}"]
    if f.metadata.get("zero_means_none") if none_text is None else none_text:
        parts.append("0 for none")
    return "; ".join(parts)


def _limits(name: str) -> str:
    """``LO-HI`` of a field whose metadata bounds it on both sides."""
    meta = _setting(name).metadata
    return f"{meta['ge']:g}-{meta['le']:g}"


def add_processing_options(p: argparse.ArgumentParser, *, raw: bool = True) -> None:
    """Add the correction options (defaults: published practice).

    Each option's ``dest`` is the :class:`~groundshake.processing.ProcessingSettings` field
    it sets, so that an error about a field names its option (:func:`options_named`).
    """
    g = p.add_argument_group("correction (defaults follow Boore & Bommer 2005)")
    if raw:
        g.add_argument("--raw", action="store_true",
                       help="use each record exactly as read (no correction)")
    g.add_argument("--highpass", dest="highpass_hz", type=float, metavar="HZ",
                   help=f"low-cut corner [Hz] ({_about('highpass_hz')})")
    g.add_argument("--lowpass", dest="lowpass_hz", type=float, metavar="HZ",
                   help=f"high-cut corner [Hz] ({_about('lowpass_hz', none_text=False)})")
    g.add_argument("--order", dest="filter_order", type=int, metavar="N",
                   help=f"Butterworth order of each pass ({_about('filter_order')})")
    g.add_argument("--baseline-order", dest="baseline_order", type=int, metavar="K",
                   help="order of the polynomial fitted to velocity, "
                        f"{_limits('baseline_order')} ({_about('baseline_order', none_text=True)})")
    g.add_argument("--taper", dest="taper_percent", type=float, metavar="PCT",
                   help=f"cosine taper at each end, percent of the record ({_about('taper_percent')})")
    g.add_argument("--pre-event", dest="pre_event_s", type=float, metavar="S",
                   help="remove the mean of the first S seconds instead of the whole record")
    g.add_argument("--no-pad", action="store_true", help="no zero pads before the low-cut filter")


#: ProcessingSettings fields set from options of the same ``dest`` (0 for a corner is "none").
_SETTING_OPTIONS = ("highpass_hz", "lowpass_hz", "filter_order", "baseline_order",
                    "taper_percent", "pre_event_s")


def settings_from_args(args: argparse.Namespace):
    """A ProcessingSettings from the options of :func:`add_processing_options`."""
    from ..processing import ProcessingSettings

    if getattr(args, "raw", False):
        return ProcessingSettings(enabled=False)
    kw = {name: getattr(args, name) for name in _SETTING_OPTIONS
          if getattr(args, name, None) is not None}
    if "pre_event_s" in kw:
        kw["mean_removal"] = "pre-event"
    if getattr(args, "no_pad", False):
        kw["pad"] = False
    with options_named(args):
        return ProcessingSettings(**kw)


def _correct_all(records, settings, args: argparse.Namespace):
    from ..processing import correct_record

    with options_named(args):
        return [correct_record(r, settings) for r in records]


def read_records_from_args(paths, args: argparse.Namespace) -> list[Record]:
    """Read every file of ``paths`` with the options of :func:`add_reading_options`."""
    from ..records._read import read_record

    out = []
    with options_named(args):                  # an error about the units names --units
        for path in paths:
            out.extend(read_record(path, units=getattr(args, "units", None),
                                   dt=getattr(args, "dt", None),
                                   resample=getattr(args, "resample", False),
                                   inventory=getattr(args, "inventory", None)))
    return distinct_names(out)


def distinct_names(records: list[Record]) -> list[Record]:
    """Records whose names repeat across files get their file name added, then ``.2``, ...

    Names are ``"<station> <component>"``; the same station and channel from two
    events would otherwise be two rows that cannot be told apart.
    """
    from collections import Counter

    count = Counter(r.name for r in records)
    if all(c == 1 for c in count.values()):
        return records
    renamed = [r.replace(name=f"{r.name} ({Path(r.source).name})")
               if count[r.name] > 1 and r.source else r for r in records]
    seen: Counter = Counter()
    out = []
    for r in renamed:
        seen[r.name] += 1
        out.append(r if seen[r.name] == 1 else r.replace(name=f"{r.name}.{seen[r.name]}"))
    return out


# -- info -----------------------------------------------------------------------------

_INFO_ROWS = (
    ("PGA", "pga", "m/s2"), ("PGA", "pga_g", "g"), ("time of PGA", "pga_time", "s"),
    ("PGV", "pgv", "m/s"), ("time of PGV", "pgv_time", "s"),
    ("PGD", "pgd", "m"), ("time of PGD", "pgd_time", "s"),
    ("Arias intensity", "arias_intensity", "m/s"),
    ("D5-75", "d5_75", "s"), ("D5-95", "d5_95", "s"),
    ("bracketed (0.05 g)", "bracketed_duration", "s"),
    ("CAV", "cav", "m/s"), ("standardized CAV", "cav_std", "m/s"),
    ("mean period", "mean_period", "s"),
)


@contextlib.contextmanager
def _collect_warnings():
    """Collect GroundshakeWarnings (for the JSON) and show each once on stderr afterwards."""
    found: list[str] = []
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", GroundshakeWarning)
        try:
            yield found
        finally:
            pass
    for w in caught:
        if issubclass(w.category, GroundshakeWarning):
            found.append(str(w.message))
        warnings.showwarning(w.message, w.category, w.filename, w.lineno)


def cmd_info(args: argparse.Namespace) -> int:
    with _collect_warnings() as found:
        doc = _info(args)
    if getattr(args, "json", False):
        print_json({**doc, "warnings": found, "note": SCREENING_NOTE})
    else:
        _print_info(doc)
    return 0


def _info(args: argparse.Namespace) -> dict:
    from ..processing import SCALAR_MEASURES, intensity_measures

    settings = settings_from_args(args)
    records = read_records_from_args(args.records, args)
    out = []
    for raw, rec in zip(records, _correct_all(records, settings, args)):
        m = intensity_measures(rec)
        entry = {"name": rec.name, "component": rec.component, "source": rec.source,
                 "units_read": raw.units, "dt": rec.dt, "n_read": raw.n, "n": rec.n,
                 "duration_read": raw.duration, "start_time": raw.start_time}
        entry.update({k: m[k] for k in SCALAR_MEASURES})
        entry["pga_g"] = m["pga"] / STANDARD_GRAVITY
        entry["history"] = list(rec.history)
        out.append(entry)
    return {"processing": {**settings.to_dict(), "description": settings.describe()},
            "records": out}


def _print_info(doc: dict) -> None:
    out = doc["records"]
    header = ["measure", "unit", *[e["name"] for e in out]]
    rows = [["component", "", *[e["component"] or "-" for e in out]],
            ["units read", "", *[e["units_read"] for e in out]],
            ["samples x dt [s]", "", *[f"{e['n_read']} x {e['dt']:g}" for e in out]]]
    rows += [[label, unit, *[e[key] for e in out]] for label, key, unit in _INFO_ROWS]
    print(table(rows, header))
    print(f"processing: {doc['processing']['description']}")
    print("times from the first sample as read; " + SCREENING_NOTE)


# -- correct --------------------------------------------------------------------------

def _same_file(a: Path, b: Path) -> bool:
    try:
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except OSError:
        return False


def _is_input(src: Path, path: Path) -> bool:
    """Whether writing ``path`` would overwrite the input ``src`` (same file or path)."""
    return _same_file(src, path) or src.resolve() == path.resolve()


def cmd_correct(args: argparse.Namespace) -> int:
    from ..records._write import WRITE_FORMATS

    src, dst = Path(args.record), Path(args.output)
    if dst.suffix.lower() not in WRITE_FORMATS:
        raise InputError(f"-o {dst}: unknown output format {dst.suffix or '(none)'!r}; "
                         f"allowed: {', '.join(WRITE_FORMATS)}")
    if _is_input(src, dst):
        raise InputError(f"-o {dst}: is the input file; give another output path "
                         f"(inputs are never overwritten)")
    if args.plot is not None:
        plot = Path(args.plot)
        if plot.suffix.lower() not in (".png", ".pdf", ".svg"):
            raise InputError(f"--plot {plot}: give a .png, .pdf or .svg file")
        if _same_file(src, plot) or plot.resolve() in (src.resolve(), dst.resolve()):
            raise InputError(f"--plot {plot}: would overwrite the input or the output")
    settings = settings_from_args(args)
    from ..records._write import output_paths, write_records

    with _collect_warnings() as found:
        raws = read_records_from_args([src], args)
        corrected = _correct_all(raws, settings, args)
        paths = output_paths(corrected, dst)
        if any(_is_input(src, p) for p in paths):
            raise InputError(f"-o {dst}: would overwrite the input file; give another output "
                             "path (inputs are never overwritten)")
        written = write_records(corrected, dst)
        if args.plot is not None:
            from ..plots import correction_figure, save_figure

            save_figure(correction_figure(raws, corrected), Path(args.plot), dpi=110)
    if getattr(args, "json", False):
        print_json({"output": str(dst), "files": [str(p) for p in written],
                    "plot": args.plot, "warnings": found,
                    "note": SCREENING_NOTE,
                    "processing": {**settings.to_dict(), "description": settings.describe()},
                    "records": [{"name": c.name, "component": c.component, "dt": c.dt,
                                 "n_read": r.n, "n": c.n,
                                 "pad_before_s": c.metadata.get("pad_before_s", 0.0),
                                 "pga_read": float(np.max(np.abs(r.acc))),
                                 "pga": float(np.max(np.abs(c.acc))),
                                 "history": list(c.history)}
                                for r, c in zip(raws, corrected)]})
        return 0
    if len(written) == 1:
        print(f"wrote {dst} ({len(corrected)} record{'s' if len(corrected) > 1 else ''}, m/s2)")
    else:
        print(f"wrote {len(written)} files, one record each ({dst.suffix} holds them only one "
              f"at a time; m/s2): {', '.join(p.name for p in written)}")
    if args.plot is not None:
        print(f"wrote {args.plot}")
    print(f"processing: {settings.describe()}")
    for c in corrected:
        print(f"{c.name}:")
        for step in c.history:
            print(f"  - {step}")
    return 0


# -- registration ---------------------------------------------------------------------

def register(subparsers, parents) -> None:
    """Add ``info`` and ``correct`` to the ``groundshake`` command line."""
    p = subparsers.add_parser(
        "info", parents=parents, help="intensity measures of records (PGA, Arias, durations, CAV)",
        description="Read records, correct them (unless --raw) and print their intensity "
                    "measures in SI units.")
    p.add_argument("records", nargs="+", metavar="RECORD", help="record files (any ObsPy format, "
                   "or delimited text)")
    add_reading_options(p)
    add_processing_options(p)
    p.set_defaults(func=cmd_info)

    p = subparsers.add_parser(
        "correct", parents=parents, help="correct a record and write it (MiniSEED, SAC or CSV)",
        description="Correct a record (mean, velocity baseline, taper, zero pads, acausal "
                    "Butterworth) and write the padded result in m/s²; the format follows "
                    "the extension of -o.")
    p.add_argument("record", metavar="RECORD", help="record file")
    add_option(p, "output", required=True, metavar="OUT",
               what="output file: .mseed, .sac or .csv")
    add_option(p, "plot", what="also plot acceleration, velocity and displacement before and "
               "after correction")
    add_reading_options(p)
    add_processing_options(p, raw=False)
    p.set_defaults(func=cmd_correct)
