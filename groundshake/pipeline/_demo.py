"""``groundshake demo``: the bundled example scenario on the bundled demo records.

The example scenario ships inside the package (``groundshake/data/examples``) and the
demo records are regenerated from their fixed seed
(:func:`groundshake.records.synthetic.make_demo_records`), so the demo works from an
installed package as well as from a checkout. Both are invented: a made-up site and
synthetic motion.
"""
from __future__ import annotations

import importlib.resources
from dataclasses import dataclass
from pathlib import Path

from .._atomic import atomic_write_text
from .._errors import InputError
from ..records.synthetic import make_demo_records
from ..scenario import load_scenario
from ._run import analyse
from ._write import write_run

__all__ = ["DEMO_SCENARIO", "DemoRun", "example_scenario_text", "run_demo"]

#: File name of the example the demo runs (the same as ``examples/`` in a checkout).
DEMO_SCENARIO = "transformer-pad.toml"


def example_scenario_text(name: str = DEMO_SCENARIO) -> str:
    """The text of a packaged example scenario (``groundshake/data/examples/NAME``)."""
    res = importlib.resources.files("groundshake").joinpath("data", "examples", name)
    try:
        return res.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise InputError(f"example scenario {name!r} is not in this installation "
                         "(groundshake/data/examples)") from None


@dataclass(frozen=True)
class DemoRun:
    """Where the demo put things: ``folder`` holds ``examples/``, ``records/`` and
    ``results/``; ``report`` is ``results/report.html``; ``summary`` the run's summary."""

    folder: Path
    scenario: Path
    results: Path
    report: Path
    summary: dict


def run_demo(out_dir: str | Path = "groundshake-demo", *, force: bool = False,
             progress: bool = True) -> DemoRun:
    """Run the bundled example on the bundled demo records into ``out_dir``.

    Layout: ``out_dir/examples/transformer-pad.toml`` (the packaged copy),
    ``out_dir/records/demo-*.mseed`` (regenerated, deterministic) and
    ``out_dir/results/`` (the run's output folder, written atomically, with
    ``report.html``).

    Parameters
    ----------
    out_dir : path
        The demo folder to create.
    force : bool
        Replace an existing demo folder's inputs and results.
    progress : bool
        Progress bars on stderr (only on a terminal).

    Raises
    ------
    InputError
        ``out_dir`` exists and ``force`` is false, or it is a file.
    """
    out = Path(out_dir)
    if out.exists() and not out.is_dir():
        raise InputError(f"{out} exists and is not a folder; allowed a folder to create",
                         param="out_dir")
    if out.exists() and any(out.iterdir()) and not force:
        raise InputError(f"{out} already exists; give it to replace the demo in it",
                         param="force")
    scen = out / "examples" / DEMO_SCENARIO
    atomic_write_text(scen, example_scenario_text())
    make_demo_records(out / "records")
    scenario = load_scenario(scen)
    results = analyse(scenario, progress=progress)
    prov = results.summary.setdefault("provenance", {})
    prov["command"] = f"groundshake demo -o {out}"
    res_dir = out / "results"
    write_run(results, res_dir, overwrite=True, progress=progress)
    report = res_dir / "report.html"
    return DemoRun(folder=out, scenario=scen, results=res_dir, report=report,
                   summary=results.summary)
