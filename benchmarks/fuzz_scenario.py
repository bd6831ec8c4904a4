"""Long fuzzing profile of the scenario loader (issue 8): prints inputs and uncaught exceptions.

Runs the strategies of tests/scenario/test_scenario_fuzz.py (mutated valid scenarios as trees and as
TOML text, random trees, character-level edits of a valid file) for many more examples than
CI does. The only allowed outcomes are a Scenario or a ScenarioError; anything else is
counted as uncaught and its first few are shown. Also times the corpus of broken scenarios.

    python benchmarks/fuzz_scenario.py [EXAMPLES_PER_SURFACE]   # default 2600 (4 surfaces)
"""
from __future__ import annotations

import collections
import resource
import sys
import tempfile
import time
import traceback
import warnings
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path[:0] = [str(HERE.parent / "tests"), str(HERE.parent / "tests" / "scenario")]

from hypothesis import HealthCheck, Phase, given, settings  # noqa: E402

import test_scenario_fuzz as fz  # noqa: E402
from groundshake._errors import ScenarioError  # noqa: E402
from groundshake.scenario import Scenario, load_scenario, parse_scenario_text  # noqa: E402


def main(n: int) -> int:
    folder = fz.make_site(Path(tempfile.mkdtemp(prefix="gs-fuzz-")))
    counts = collections.Counter()
    uncaught: list[str] = []

    def record(surface: str, call) -> None:
        counts[surface, "inputs"] += 1
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            try:
                result = call()
            except ScenarioError as e:
                counts[surface, "error"] += 1
                if "\n" in str(e):
                    counts[surface, "multi-line message"] += 1
                return
            except Exception:  # noqa: BLE001 - this is what we are counting
                counts[surface, "uncaught"] += 1
                if len(uncaught) < 5:
                    uncaught.append(f"[{surface}] " + traceback.format_exc(limit=3))
                return
        counts[surface, "valid" if isinstance(result, Scenario) else "uncaught"] += 1

    profile = settings(max_examples=n, deadline=None, database=None,
                       phases=[Phase.generate], suppress_health_check=list(HealthCheck))

    @profile
    @given(tree=fz.mutated_scenarios())
    def mutated(tree):
        record("mutated trees", lambda: Scenario.from_dict(tree, source="fuzz.toml",
                                                          base_dir=folder))

    @profile
    @given(tree=fz.random_trees)
    def random_trees(tree):
        record("random trees", lambda: Scenario.from_dict(tree, source="fuzz.toml",
                                                         base_dir=folder))

    @profile
    @given(tree=fz.mutated_scenarios())
    def as_text(tree):
        if isinstance(tree, dict):
            text = fz.to_toml(tree)
            record("mutated trees as TOML text",
                   lambda: parse_scenario_text(text, source="fuzz.toml", base_dir=folder))

    @profile
    @given(text=fz.edited_texts())
    def edited(text):
        record("edited TOML text",
               lambda: parse_scenario_text(text, source="fuzz.toml", base_dir=folder))

    t0 = time.perf_counter()
    for run in (mutated, random_trees, as_text, edited):
        run()
    elapsed = time.perf_counter() - t0

    surfaces = sorted({s for s, _ in counts})
    total = sum(counts[s, "inputs"] for s in surfaces)
    bad = sum(counts[s, "uncaught"] for s in surfaces)
    print(f"scenario loader fuzz: {total} inputs in {elapsed:.1f} s "
          f"({1e3 * elapsed / max(total, 1):.2f} ms each, generation included)")
    for s in surfaces:
        print(f"  {s:28s} inputs {counts[s, 'inputs']:6d}  valid {counts[s, 'valid']:6d}  "
              f"ScenarioError {counts[s, 'error']:6d}  uncaught {counts[s, 'uncaught']:3d}  "
              f"multi-line messages {counts[s, 'multi-line message']:3d}")
    print(f"uncaught exceptions: {bad}")
    for u in uncaught:
        print(u)
    print(f"peak resident memory: {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MiB")

    corpus = sorted((HERE.parent / "tests" / "data" / "bad" / "scenarios").glob("*.toml"))
    worst = 0.0
    for p in corpus:
        t = time.perf_counter()
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                load_scenario(p)
        except ScenarioError:
            pass
        worst = max(worst, time.perf_counter() - t)
    print(f"corpus: {len(corpus)} broken scenarios, slowest answer {1e3 * worst:.1f} ms "
          f"(goal < 5 s each)")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main(int(sys.argv[1]) if len(sys.argv) > 1 else 2600))
