"""Command ``spectrum``: response spectra of records, RotDnn, targets and suite statistics."""
from __future__ import annotations

import argparse
import csv
import io
import warnings
from pathlib import Path

import numpy as np

from .._atomic import atomic_write_text
from .._cautions import CAUTIONS, SCREENING_NOTE
from ._common import check_damping_percent, float_list, print_json, table
from ._options import add_option
from .._constants import STANDARD_GRAVITY
from .._errors import GroundshakeWarning, InputError
from ..spectra._spectrum import SAMPLES_PER_PERIOD

__all__ = ["register", "cmd_spectrum"]

G = STANDARD_GRAVITY
_PLOT_SUFFIXES = (".png", ".pdf", ".svg")
_SHOWN_PERIODS = (0.01, 0.02, 0.05, 0.1, 0.2, 0.3, 0.5, 1.0, 2.0, 3.0, 5.0, 10.0)
#: Largest departure from a right angle between two paired horizontals [deg] before a warning.
_SKEW_DEG = 10.0


def _is_vertical(rec) -> bool:
    """Vertical by its component code or header (records/_components.py)."""
    from ..records._components import orientation

    return orientation(rec.component, rec.metadata) == "vertical"


def _station(rec) -> str:
    return str(rec.metadata.get("station") or "").strip()


def _horizontal_pairs(records):
    """Pairs of horizontal records for RotD, and the names of the verticals left out.

    Verticals (UD, UP, Z, HNZ, ... or a header saying so) are left out. When every
    horizontal names its station and each station has exactly two, the two of a
    station pair up; otherwise they pair in the order given (1st with 2nd, ...).
    """
    hor = [r for r in records if not _is_vertical(r)]
    left_out = [r.name for r in records if _is_vertical(r)]
    if len(hor) < 2 or len(hor) % 2:
        raise InputError(f"--rotd needs horizontal records in pairs (1st with 2nd, 3rd with "
                         f"4th, ...); got {len(hor)} horizontal record(s): "
                         + ", ".join(r.name for r in hor)
                         + (f" (left out as vertical: {', '.join(left_out)})" if left_out else ""))
    stations = [_station(r) for r in hor]
    groups: dict[str, list] = {}
    for st, r in zip(stations, hor):
        groups.setdefault(st, []).append(r)
    if all(stations) and all(len(g) == 2 for g in groups.values()):
        couples = [tuple(g) for g in groups.values()]
    else:
        couples = list(zip(hor[0::2], hor[1::2]))
    pairs = []
    for a, b in couples:
        if abs(a.dt - b.dt) > 1e-9 * a.dt:
            raise InputError(f"--rotd: {a.name} (dt {a.dt:g} s) and {b.name} (dt {b.dt:g} s) "
                             "have different time steps; resample one first")
        n = min(a.n, b.n)
        if abs(a.n - b.n) > 1:
            warnings.warn(f"--rotd: {a.name} ({a.n} samples) and {b.name} ({b.n}) differ in "
                          f"length; both are cut to {n} samples", GroundshakeWarning)
        _warn_if_not_orthogonal(a, b)
        pairs.append((a, b, n))
    return pairs, left_out


def _warn_if_not_orthogonal(a, b) -> None:
    from ..records._components import azimuth_deg

    za, zb = azimuth_deg(a.component, a.metadata), azimuth_deg(b.component, b.metadata)
    if za is None or zb is None:
        return
    angle = abs((za - zb) % 180.0)
    if abs(angle - 90.0) > _SKEW_DEG:
        warnings.warn(f"--rotd: {a.name} (azimuth {za:g}°) and {b.name} (azimuth {zb:g}°) are "
                      f"{angle:g}° apart, not at right angles; RotD assumes two orthogonal "
                      "components", GroundshakeWarning)


def _collect(found):
    class _Ctx:
        def __enter__(self):
            self._cm = warnings.catch_warnings(record=True)
            self._caught = self._cm.__enter__()
            warnings.simplefilter("always", GroundshakeWarning)
            return found

        def __exit__(self, *exc):
            self._cm.__exit__(*exc)
            seen = set()
            for w in self._caught:
                msg = str(w.message)
                if issubclass(w.category, GroundshakeWarning):
                    if msg in seen:
                        continue
                    seen.add(msg)
                    found.append(msg)
                warnings.showwarning(w.message, w.category, w.filename, w.lineno)
            return False

    return _Ctx()


def _check_outputs(args, sources):
    srcs = {Path(s).resolve() for s in sources}
    if args.output is not None:
        out = Path(args.output)
        if out.suffix.lower() != ".csv":
            raise InputError(f"-o {out}: the spectra table is written as CSV; give a .csv path")
        if out.resolve() in srcs:
            raise InputError(f"-o {out}: is an input file; inputs are never overwritten")
    if args.plot is not None:
        plot = Path(args.plot)
        if plot.suffix.lower() not in _PLOT_SUFFIXES:
            raise InputError(f"--plot {plot}: give a .png, .pdf or .svg file")
        if plot.resolve() in srcs or (args.output and plot.resolve() == Path(args.output).resolve()):
            raise InputError(f"--plot {plot}: would overwrite an input or the CSV output")


def cmd_spectrum(args: argparse.Namespace) -> int:
    from .records import _correct_all, read_records_from_args, settings_from_args
    from ..spectra._rotd import rotd
    from ..spectra._spectrum import check_damping, check_periods, default_periods, response_spectrum
    from ..spectra._statistics import spectrum_statistics
    from ..spectra._targets import parse_target

    damping_pct = float_list(args.damping, name="--damping", minimum=0.0)
    if any(d >= 100 for d in damping_pct):
        raise InputError(f"--damping: {max(damping_pct):g} %; allowed: percent in [0, 100)")
    check_damping_percent(damping_pct)
    damping = check_damping(np.array(damping_pct) / 100.0, name="--damping")
    periods = (check_periods(float_list(args.periods, name="--periods"), name="--periods")
               if args.periods else default_periods())
    percentiles = float_list(args.rotd, name="--rotd") if args.rotd else None
    if percentiles is not None and any(not 0 <= q <= 100 for q in percentiles):
        raise InputError(f"--rotd: {args.rotd!r}; allowed: percentiles from 0 to 100 (e.g. 50,100)")
    target = parse_target(args.target) if args.target else None
    _check_outputs(args, args.records)
    settings = settings_from_args(args)

    found: list[str] = []
    with _collect(found):
        raws = read_records_from_args(args.records, args)
        records = _correct_all(raws, settings, args) if settings.enabled else raws
        spectra = [response_spectrum(r.acc, r.dt, periods, damping, name=r.name,
                                     interpolate=not args.no_interpolation) for r in records]
        rotds = []
        left_out: list[str] = []
        if percentiles is not None:
            pairs, left_out = _horizontal_pairs(records)
            for a, b, n in pairs:
                rotds.append((f"{a.name}+{b.name}",
                              rotd(a.acc[:n], b.acc[:n], a.dt, periods, damping, percentiles,
                                   interpolate=not args.no_interpolation)))
        stats = None
        if len(spectra) >= 2:
            stats = [spectrum_statistics(np.stack([s.psa[j] for s in spectra]), axis=0)
                     for j in range(damping.size)]
        target_psa = target.psa(periods) if target is not None else None
        if target is not None and not np.any(np.isclose(damping, target.damping)):
            warnings.warn(f"the target is for {100 * target.damping:g} % damping but the "
                          f"spectra are for {', '.join(f'{d:g}' for d in damping_pct)} %; "
                          "ratios compare different damping", GroundshakeWarning)
        if args.output is not None:
            atomic_write_text(args.output, _csv_text(spectra, rotds, target_psa))
        if args.plot is not None:
            from ..plots import save_figure, spectra_overview_figure

            jb = _band_index(damping, target)
            fig = spectra_overview_figure(
                spectra, target=target, rotds=rotds, band=None if stats is None else stats[jb],
                band_damping=float(damping[jb]),
                title="Response spectra" + (" (as read)" if not settings.enabled else ""))
            save_figure(fig, args.plot, dpi=110)
    doc = _document(records, raws, spectra, rotds, stats, target, target_psa, settings, found)
    if left_out:
        doc["rotd_left_out"] = left_out
    if getattr(args, "json", False):
        print_json(doc)
        return 0
    _print_text(spectra, rotds, target, target_psa, settings, args, left_out=left_out)
    return 0


def _band_index(damping, target):
    if target is not None:
        hit = np.flatnonzero(np.isclose(damping, target.damping))
        if hit.size:
            return int(hit[0])
    return 0


def _pad(rec) -> float:
    """Leading pad [s] of a corrected record (0 as read)."""
    return float(rec.metadata.get("pad_before_s", 0.0) or 0.0)


def _document(records, raws, spectra, rotds, stats, target, target_psa, settings, found):
    out = []
    for rec, raw, s in zip(records, raws, spectra):
        entry = {"name": s.name, "component": rec.component, "source": rec.source,
                 "dt": rec.dt, "n": rec.n, "pga": s.pga,
                 "periods": s.periods, "damping_percent": 100 * s.damping,
                 "sd": s.sd, "sv": s.sv, "sa": s.sa, "psv": s.psv, "psa": s.psa,
                 # peak times on the as-read axis (the correction's pad at t < 0)
                 "sd_time": s.sd_time - _pad(rec), "sa_time": s.sa_time - _pad(rec),
                 "interpolated_below_s": SAMPLES_PER_PERIOD * rec.dt if s.interpolated else None,
                 "pga_band_limited": s.zero_period,
                 "history": list(rec.history)}
        if target_psa is not None:
            entry["ratio_to_target"] = s.psa / target_psa
        out.append(entry)
    doc = {"records": out,
           "units": {"periods": "s", "sd": "m", "sv": "m/s", "sa": "m/s2", "psv": "m/s",
                     "psa": "m/s2", "pga": "m/s2", "pga_band_limited": "m/s2",
                     "sd_time": "s", "sa_time": "s"},
           "processing": {**settings.to_dict(), "description": settings.describe()}}
    if rotds:
        doc["rotd"] = [{"records": label.split("+", 1), "periods": r.periods,
                        "damping_percent": 100 * r.damping, "percentiles": r.percentiles,
                        "psa": {f"{q:g}": r.psa[i] for i, q in enumerate(r.percentiles)},
                        "sd": {f"{q:g}": r.sd[i] for i, q in enumerate(r.percentiles)},
                        "gmrotd50_psa": r.gmrotd50, "angle_of_max_deg": r.angle_of_max,
                        "pga": {f"{q:g}": r.pga[i] for i, q in enumerate(r.percentiles)},
                        "pga_band_limited": {f"{q:g}": r.zero_period[i]
                                             for i, q in enumerate(r.percentiles)}}
                       for label, r in rotds]
    if stats is not None:
        doc["statistics"] = {"quantity": "psa", "over": [s.name for s in spectra],
                             "by_damping": [{"damping_percent": 100 * z,
                                             **{k: v for k, v in st.items()}}
                                            for z, st in zip(spectra[0].damping, stats)]}
    if target is not None:
        doc["target"] = {**target.to_dict(), "periods": spectra[0].periods if spectra else [],
                         "psa": target_psa}
    doc["warnings"] = found
    doc["cautions"] = list(CAUTIONS)
    doc["note"] = SCREENING_NOTE
    return doc


def _csv_text(spectra, rotds, target_psa) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    head = ["record", "kind", "damping_percent", "period_s", "sd_m", "sv_m_per_s",
            "sa_m_per_s2", "psv_m_per_s", "psa_m_per_s2", "psa_g"]
    if target_psa is not None:
        head += ["target_psa_m_per_s2", "ratio_to_target"]
    w.writerow(head)

    def row(name, kind, z, k, sd, sv, sa, psv, psa):
        r = [name, kind, f"{100 * z:g}", f"{periods[k]:.6g}", f"{sd:.8g}",
             "" if sv is None else f"{sv:.8g}", "" if sa is None else f"{sa:.8g}",
             f"{psv:.8g}", f"{psa:.8g}", f"{psa / G:.8g}"]
        if target_psa is not None:
            tp = target_psa[k]
            r += ["" if not np.isfinite(tp) else f"{tp:.8g}",
                  "" if not np.isfinite(tp) else f"{psa / tp:.6g}"]
        w.writerow(r)

    for s in spectra:
        periods = s.periods
        for j, z in enumerate(s.damping):
            for k in range(periods.size):
                row(s.name, "record", z, k, s.sd[j, k], s.sv[j, k], s.sa[j, k], s.psv[j, k],
                    s.psa[j, k])
    for label, r in rotds:
        periods = r.periods
        for i, q in enumerate(r.percentiles):
            for j, z in enumerate(r.damping):
                for k in range(periods.size):
                    row(label, f"RotD{q:g}", z, k, r.sd[i, j, k], None, None, r.psv[i, j, k],
                        r.psa[i, j, k])
    return buf.getvalue()


def _print_text(spectra, rotds, target, target_psa, settings, args, *, left_out=()):
    p = spectra[0].periods
    if p.size <= 20:
        idx = np.arange(p.size)
    else:
        idx = np.unique([int(np.argmin(np.abs(np.log(p / t)))) for t in _SHOWN_PERIODS
                         if p.min() * 0.8 <= t <= p.max() * 1.25])
    header = ["period [s]"]
    cols = []
    for s in spectra:
        for j, z in enumerate(s.damping):
            header.append(f"{s.name} {100 * z:g}%")
            cols.append(s.psa[j] / G)
    for label, r in rotds:
        for i, q in enumerate(r.percentiles):
            for j, z in enumerate(r.damping):
                header.append(f"RotD{q:g} {100 * z:g}%")
                cols.append(r.psa[i, j] / G)
    if target_psa is not None:
        header.append("target")
        cols.append(target_psa / G)
    rows = [[f"{p[k]:.3g}", *[c[k] for c in cols]] for k in idx]
    print("PSA [g] (pseudo-spectral acceleration; SI values with --json or -o)")
    print(table(rows, header))
    print("PGA [g] over the samples: " + ", ".join(f"{s.name} {s.pga / G:.4g}" for s in spectra))
    if any(s.interpolated for s in spectra):
        print("PGA [g] band-limited (the short-period limit of SA here): "
              + ", ".join(f"{s.name} {s.zero_period / G:.4g}" for s in spectra))
    for s in spectra:
        j, k = np.unravel_index(np.argmax(s.psa), s.psa.shape)
        print(f"{s.name}: peak PSA {s.psa[j, k] / G:.4g} g at {s.periods[k]:.3g} s "
              f"({100 * s.damping[j]:g} %)")
    if target is not None:
        print(f"target: {target.label}")
    for label, _ in rotds:
        print(f"RotD pair: {label.replace('+', ' with ')}")
    if left_out:
        print(f"RotD: left out {', '.join(left_out)} (vertical)")
    print(f"processing: {settings.describe() if settings.enabled else 'none (records as read)'}")
    if args.output:
        print(f"wrote {args.output}")
    if args.plot:
        print(f"wrote {args.plot}")
    print(SCREENING_NOTE)


def register(subparsers, parents) -> None:
    """Add ``spectrum`` to the ``groundshake`` command line."""
    from .records import add_processing_options, add_reading_options

    p = subparsers.add_parser(
        "spectrum", parents=parents,
        help="response spectra (SD, SV, SA, PSV, PSA), RotDnn, targets",
        description="Response spectra of records (corrected unless --raw), exact for "
                    "piecewise-linear records. SI units in JSON and CSV.")
    p.add_argument("records", nargs="+", metavar="RECORD", help="record files")
    add_option(p, "damping")
    add_option(p, "periods", default_text="100 log-spaced from 0.01 to 10 s")
    p.add_argument("--rotd", metavar="NN", help="also RotDnn of the horizontal records taken "
                   "in pairs, e.g. 50,100 (and GMRotD50)")
    add_option(p, "target", what="target spectrum to compare with")
    p.add_argument("--no-interpolation", action="store_true",
                   help="do not Fourier-interpolate records for periods below 10·dt")
    add_option(p, "output", metavar="CSV", what="write the spectra as a CSV table")
    add_option(p, "plot", what="plot PSA (linear, log) and a four-way log plot")
    add_reading_options(p)
    add_processing_options(p)
    p.set_defaults(func=cmd_spectrum)
