"""Cost of the output contract's extra products beside the modal solution they follow.

    python benchmarks/outputs.py [SCENARIO|""] [ELEMENT_SIZE]

Builds the model of the scenario (default: examples/transformer-pad.toml, an invented
site; ELEMENT_SIZE [m] overrides [mesh] element_size), computes its modes (the
reference), then times the rotational participation of every mode (three sparse
least-squares rigid-body vectors and one M·ι each) and the mesh description written to
mesh.json, and prints their ratios to the reference.
"""
from __future__ import annotations

import dataclasses
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main(argv: list[str]) -> int:
    from groundshake.dynamics import compute_modes
    from groundshake.model import build_model
    from groundshake.results._outputs import mesh_description, rotational_participation
    from groundshake.scenario import load_scenario

    scenario = load_scenario(argv[0] if argv and argv[0] else
                             HERE.parent / "examples" / "transformer-pad.toml")
    if len(argv) > 1:
        scenario = dataclasses.replace(
            scenario, mesh=dataclasses.replace(scenario.mesh, element_size=float(argv[1])))
    model = build_model(scenario)
    t = time.perf_counter()
    modes = compute_modes(model, cutoff_hz=scenario.analysis.cutoff_hz)
    t_modes = time.perf_counter() - t
    t = time.perf_counter()
    rotational_participation(model, modes)
    t_rot = time.perf_counter() - t
    t = time.perf_counter()
    mesh_description(model)
    t_mesh = time.perf_counter() - t
    print(f"{model.K.shape[0]} DOFs, {modes.frequency.size} modes")
    print(f"modes (reference):          {t_modes:8.3f} s")
    print(f"rotational participation:   {t_rot:8.3f} s  ({t_rot / t_modes:.3f}x reference)")
    print(f"mesh description:           {t_mesh:8.3f} s  ({t_mesh / t_modes:.3f}x reference)")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
