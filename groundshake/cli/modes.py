"""Command ``modes SCENARIO [--json] [--plot DIR]``: the natural modes of the block."""
from __future__ import annotations

import time
import warnings
from pathlib import Path

from .._cautions import CAUTIONS, SCREENING_NOTE
from ._common import print_json, table
from .._errors import InputError
from .._progress import Progress

__all__ = ["register", "cmd_modes"]


def cmd_modes(args) -> int:
    from ..dynamics import compute_modes
    from ..scenario import errors_at_key, load_scenario
    from ..model import build_model

    scenario = load_scenario(args.scenario)
    n_modes = args.modes if args.modes is not None else scenario.analysis.modes
    cutoff = args.cutoff if args.cutoff is not None else scenario.analysis.cutoff_hz
    if n_modes is not None and n_modes < 1:
        raise InputError(f"--modes: given {n_modes}; allowed >= 1")
    if cutoff is not None and not cutoff > 0:
        raise InputError(f"--cutoff: given {cutoff}; allowed > 0 Hz")
    caught: list[str] = []
    with warnings.catch_warnings(record=True) as wlist:
        warnings.simplefilter("always")
        t0 = time.perf_counter()
        with Progress("model", total=1) as bar:
            with errors_at_key(scenario, ()):    # a model error names the scenario key
                model = build_model(scenario)
            bar.advance()
        t_build = time.perf_counter() - t0
        with Progress("modes", total=1) as bar:
            modes = compute_modes(model, cutoff_hz=None if n_modes else cutoff, n_modes=n_modes)
            bar.advance()
        t_modes = time.perf_counter() - t0 - t_build
    for w in wlist:
        msg = str(w.message)
        if msg not in caught:
            caught.append(msg)
    caught.extend(n for n in getattr(scenario, "notes", ()) if n not in caught)
    figures = []
    if args.plot:
        from ..plots import block_mode_figure, block_model_figure, save_figure

        out = Path(args.plot)
        out.mkdir(parents=True, exist_ok=True)
        kw = dict(dpi=110, bbox_inches="tight")
        fig = block_model_figure(model, title=scenario.title)
        figures.append(str(save_figure(fig, out / "model.png", **kw)))
        for i in range(min(args.plot_modes, modes.n_modes)):
            fig = block_mode_figure(model, modes, i)
            figures.append(str(save_figure(fig, out / f"mode-{i + 1}.png", **kw)))
    d = modes.to_dict()
    doc = {"scenario": str(args.scenario), "title": scenario.title,
           "total_mass": d["total_mass"], "rigid_mass": d["rigid_mass"], "modes": d["modes"],
           "captured_ratio": d["captured_ratio"], "n_modes": d["n_modes"],
           "cutoff_hz": None if n_modes else cutoff,
           "model": model.describe(), "solver": d["solver"],
           "timings": {"build": t_build, "modes": t_modes},
           "figures": figures, "warnings": caught, "cautions": list(CAUTIONS)}
    if getattr(args, "json", False):
        print_json(doc)
        return 0
    desc = doc["model"]
    print(f"{scenario.title}: {desc['n_elements']} {desc['element']} elements, "
          f"{desc['n_dof']} DOFs, {desc['support']['kind']} base; "
          f"driven mass x {d['total_mass']['x']:.6g} kg, y {d['total_mass']['y']:.6g} kg, "
          f"z {d['total_mass']['z']:.6g} kg")
    rigid = d["rigid_mass"]
    if any(rigid[k] > 0 for k in rigid):
        most = {k: 100 * (1 - rigid[k] / d["total_mass"][k]) if d["total_mass"][k] > 0 else 100
                for k in rigid}
        print(f"moving rigidly with the base (needs no mode): x {rigid['x']:.6g} kg, "
              f"y {rigid['y']:.6g} kg, z {rigid['z']:.6g} kg; the shares below are of the "
              f"driven mass, so all modes together reach x {most['x']:.1f} %, "
              f"y {most['y']:.1f} %, z {most['z']:.1f} %")
    rows = []
    for m in d["modes"]:
        r, c = m["effective_mass_ratio"], m["cumulative_ratio"]
        pct = [f"{100 * v:.2f}" for v in (m["damping"], r["x"], r["y"], r["z"],
                                             c["x"], c["y"], c["z"])]
        rows.append([m["mode"], f"{m['frequency']:.4g}",
                     "inf" if m["period"] is None else f"{m['period']:.4g}", *pct,
                     m["dominant_direction"]])
    print(table(rows, ["mode", "f [Hz]", "T [s]", "damping %", "mx %", "my %", "mz %",
                       "cum x %", "cum y %", "cum z %", "dir"]))
    print(f"{d['n_modes']} modes in {t_modes:.2f} s (model built in {t_build:.2f} s, "
          f"{d['solver']})")
    for f in figures:
        print(f"figure: {f}")
    for w in caught:
        print(f"warning: {w}")
    print(SCREENING_NOTE)
    return 0


def register(subparsers, parents) -> None:
    """Add ``modes`` to the ``groundshake`` command line."""
    p = subparsers.add_parser(
        "modes", parents=parents, help="natural modes of the block model (no motion needed)",
        description="Build the block model of a scenario and list its lowest natural modes: "
                    "frequency, period, damping, effective modal mass per direction and "
                    "cumulative share (SI units).")
    p.add_argument("scenario", metavar="SCENARIO", help="scenario file (TOML)")
    p.add_argument("--plot", metavar="DIR", help="write figures of the model and the first "
                   "mode shapes into DIR")
    p.add_argument("--plot-modes", type=int, default=4, metavar="N",
                   help="number of mode shapes to draw with --plot (default 4)")
    p.add_argument("--modes", type=int, metavar="N",
                   help="a fixed number of modes (default: the scenario's analysis settings)")
    p.add_argument("--cutoff", type=float, metavar="HZ",
                   help="all modes up to this frequency (default: analysis.cutoff_hz)")
    p.set_defaults(func=cmd_modes)
