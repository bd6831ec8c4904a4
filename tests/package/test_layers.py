"""The package's layers and its import graph (docs/architecture.md).

Every import of a groundshake module — at the top of a file or inside a function — is read
from the source with the standard library's ``ast`` and checked against the layer order:

    records → processing → spectra → matching;  scenario;  linalg → model → dynamics → results;
    plots (figures);  pipeline (the application layer);  report;  suite;  cli

A module may import its own stage, the shared base modules and the stages below it. Today's
exceptions are listed by name below, as an allow-list that may only shrink: a new violation
fails, and so does an entry that no longer happens (delete it when it is fixed). The same
holds for import cycles between modules (Tarjan's strongly connected components, the
textbook graph algorithm; Tarjan 1972, SIAM J. Comput. 1(2)).
"""
from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[2] / "groundshake"

# Modules at the package root that every stage may use (no groundshake imports of their own
# beyond each other).
BASE = {"_errors", "_atomic", "_cautions", "_constants", "_progress", "_plausible", "_jit_cache",
        "_json", "_grid", "_toml", "__init__"}

# Stage -> the stages it may import (besides itself and BASE).
ALLOWED: dict[str, set[str]] = {
    "records": set(),
    # sparse linear algebra (factorizations, mass solves, memory estimate) under the model
    "linalg": set(),
    "processing": {"records"},
    "spectra": {"records", "processing"},
    "matching": {"records", "processing", "spectra"},
    "scenario": {"records", "processing", "spectra", "matching"},
    "model": {"scenario", "linalg"},
    "dynamics": {"model", "scenario", "spectra", "linalg"},
    "results": {"dynamics", "model", "scenario", "records", "processing", "spectra",
                "matching", "linalg"},
    # figures of every stage: may read the data stages' objects, never the other way round
    "plots": {"records", "processing", "spectra", "matching", "scenario", "linalg", "model",
              "dynamics", "results"},
    "pipeline": {"records", "processing", "spectra", "matching", "scenario", "linalg",
                 "model", "dynamics", "results", "plots", "report"},
    # the report reads a run's output folder through the output contract only, and draws
    # what it read through plots
    "report": {"plots"},
    # many records through one model, over the application layer
    "suite": {"pipeline"},
    "cli": {"records", "processing", "spectra", "matching", "scenario", "linalg", "model",
            "dynamics", "results", "plots", "pipeline", "report", "suite"},
}
ALLOWED["cli"] |= {"cli"}

# Single modules a stage may import beyond ALLOWED: the output contract, which the report
# reads a run through.
ALLOWED_MODULES: dict[str, set[str]] = {
    "report": {"groundshake.results._schema"},
}

# Today's layer violations, "importer -> imported module" (function-level imports included).
# Shrink only; each entry names work left for the application-layer and cli/ moves.
LAYER_ALLOW: set[str] = set()

# Today's import cycles, each as the sorted tuple of its modules. Shrink only.
CYCLE_ALLOW: set[tuple[str, ...]] = set()


def module_name(path: Path) -> str:
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def stage_of(module: str) -> str:
    """The layer of a module: its folder, 'cli' for command modules, 'base' for shared ones."""
    parts = module.split(".")
    if len(parts) == 1:
        return "base"
    if parts[1] == "cli":
        return "cli"
    if len(parts) == 2 and not (PACKAGE / parts[1]).is_dir():
        return "base" if parts[1] in BASE else parts[1]
    if parts[-1] == "_cli":
        return "cli"
    return parts[1]


def _resolve(importer: str, is_package: bool, node: ast.ImportFrom) -> str:
    if node.level == 0:
        return node.module or ""
    base = importer.split(".")
    if not is_package:
        base = base[:-1]
    if node.level > 1:
        base = base[: len(base) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


def _known(name: str) -> str | None:
    """The longest prefix of ``name`` that is a module or package of groundshake."""
    parts = name.split(".")
    while parts:
        p = PACKAGE.parent.joinpath(*parts)
        if p.with_suffix(".py").is_file() or (p / "__init__.py").is_file():
            return ".".join(parts)
        parts = parts[:-1]
    return None


def import_graph() -> dict[str, set[str]]:
    """Module -> groundshake modules it imports anywhere in its source."""
    graph: dict[str, set[str]] = {}
    for path in sorted(PACKAGE.rglob("*.py")):
        name = module_name(path)
        tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
        targets: set[str] = set()
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                found = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                mod = _resolve(name, path.name == "__init__.py", node)
                # "from . import x" may name a submodule
                found = [f"{mod}.{a.name}" for a in node.names] + [mod]
                found = [f for f in found if _known(f) == f] or [mod]
            else:
                continue
            for f in found:
                if f.split(".")[0] == "groundshake":
                    k = _known(f)
                    if k and k != name:
                        targets.add(k)
        graph[name] = targets
    return graph


def layer_violations(graph) -> set[str]:
    bad = set()
    for src, targets in graph.items():
        s = stage_of(src)
        if src in ("groundshake", "groundshake.__main__"):
            continue                      # the package façade and ``python -m groundshake``
        for t in targets:
            d = stage_of(t)
            if d == "base" or (d == s and s != "base") or t == "groundshake" \
                    or d in ALLOWED.get(s, set()) or t in ALLOWED_MODULES.get(s, set()):
                continue
            bad.add(f"{src} -> {t}")
    return bad


def cycles(graph) -> set[tuple[str, ...]]:
    """Strongly connected components with more than one module (Tarjan 1972)."""
    index, low, on, stack, out = {}, {}, set(), [], set()
    counter = [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in graph.get(v, ()):
            if w not in graph:
                continue
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.add(tuple(sorted(comp)))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def _package_cycles(graph):
    # a package's __init__ re-exporting its own modules is not a cycle between stages; keep
    # edges that leave a stage's folder, or stay inside it but between two private modules
    pruned = {}
    for src, targets in graph.items():
        keep = set()
        for t in targets:
            if src.count(".") >= 1 and t.startswith(src + "."):
                continue  # a package importing its own submodule
            keep.add(t)
        pruned[src] = keep
    return cycles(pruned)


@pytest.fixture(scope="module")
def graph():
    return import_graph()


def test_graph_reader_resolves_relative_and_nested_imports(graph):
    # sanity of the reader (Python language reference §5.7, relative imports):
    # records/_read.py has "from .._errors import ..." and "from .io._common import ..."
    assert {"groundshake._errors", "groundshake.records.io._common"} <= graph["groundshake.records._read"]
    for stage in ALLOWED:
        if (PACKAGE / stage).is_dir():
            assert f"groundshake.{stage}" in graph


def test_no_new_layer_violations(graph):
    # design rule (docs/architecture.md): lower stages never import higher ones
    found = layer_violations(graph)
    assert sorted(found - LAYER_ALLOW) == []


def test_layer_allow_list_only_shrinks(graph):
    # an allowed violation that no longer occurs must be deleted from the list
    found = layer_violations(graph)
    assert sorted(LAYER_ALLOW - found) == []


def test_no_new_import_cycles(graph):
    # design rule (docs/architecture.md): the import graph is acyclic, function-level
    # imports included
    found = _package_cycles(graph)
    assert sorted(found - CYCLE_ALLOW) == []
    assert sorted(CYCLE_ALLOW - found) == []


def import_fallbacks() -> list[str]:
    """'module: imported' for each own-module import inside a try that catches ImportError."""
    offenders = []
    for path in sorted(PACKAGE.rglob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if not isinstance(node, ast.Try):
                continue
            catches = {getattr(h.type, "id", None) for h in node.handlers}
            if not catches & {"ImportError", "ModuleNotFoundError"}:
                continue
            for stmt in ast.walk(ast.Module(body=node.body, type_ignores=[])):
                if isinstance(stmt, ast.ImportFrom) and (
                        stmt.level > 0 or (stmt.module or "").startswith("groundshake")):
                    offenders.append(f"{module_name(path)}: {'.' * stmt.level}{stmt.module or ''}")
    return sorted(offenders)


# `except ImportError` around the package's own modules today. Shrink only.
IMPORT_FALLBACK_ALLOW: list[str] = [
]


def test_no_import_error_fallback_around_own_modules():
    # design rule (issue 15): a failed import of the package's own code is an error, never a
    # silent fallback; optional third-party packages (pyamg, distributed) may fall back
    assert import_fallbacks() == sorted(IMPORT_FALLBACK_ALLOW)


# ----------------------------------------------------------------------------- matplotlib
PLOTTING = ("matplotlib", "mpl_toolkits")


def plotting_imports() -> dict[str, list[tuple[str, bool]]]:
    """Module -> [(imported plotting module, at module level?)] for every import of
    matplotlib or mpl_toolkits anywhere in its source (function-level imports included)."""
    found: dict[str, list[tuple[str, bool]]] = {}
    for path in sorted(PACKAGE.rglob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
        top = {id(n) for n in tree.body}
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                names = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom) and node.level == 0:
                names = [node.module or ""]
            else:
                continue
            for n in names:
                if n.split(".")[0] in PLOTTING:
                    found.setdefault(module_name(path), []).append((n, id(node) in top))
    return found


def test_only_plots_imports_matplotlib():
    # design rule (docs/architecture.md): one plotting package; the numerical stages
    # (records, processing, spectra, matching, scenario, model, dynamics, results), the
    # shared modules, the report, the pipeline, the suite and the commands draw through it
    outside = sorted(m for m in plotting_imports() if stage_of(m) != "plots")
    assert outside == []


def test_plots_imports_matplotlib_lazily():
    # design rule (docs/architecture.md): matplotlib is imported inside the functions
    # that draw, so importing a stage (or the report) loads no plotting library
    eager = sorted(f"{m}: {n}" for m, found in plotting_imports().items()
                   for n, at_top in found if at_top)
    assert eager == []


def test_importing_the_stages_loads_no_matplotlib():
    # the same rule, seen from a fresh interpreter (sys.modules, Python language reference
    # §5, the import system)
    import subprocess
    import sys

    stages = sorted(p.name for p in PACKAGE.iterdir()
                    if (p / "__init__.py").is_file() and p.name != "cli")
    code = ("import sys\n" + "".join(f"import groundshake.{s}\n" for s in stages)
            + "print(sorted(m for m in sys.modules if m.split('.')[0] in "
            + repr(PLOTTING) + "))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=PACKAGE.parent, check=True,
                         env={**__import__("os").environ, "PYTHONPATH": str(PACKAGE.parent)})
    assert out.stdout.strip() == "[]"


def test_shared_constants_have_one_home():
    # standard gravity and the axis names are declared once, in groundshake/_constants.py
    # (9.80665 m/s²: 3rd CGPM 1901); every other module imports them
    found = []
    for path in sorted(PACKAGE.rglob("*.py")):
        if path.name == "_constants.py" and path.parent == PACKAGE:
            continue
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Constant) and node.value == 9.80665:
                found.append(f"{path.relative_to(PACKAGE)}:{node.lineno}: 9.80665")
            if isinstance(node, ast.Assign) and any(
                    isinstance(t, ast.Name) and t.id in ("DIRECTIONS", "STANDARD_GRAVITY")
                    for t in node.targets):
                found.append(f"{path.relative_to(PACKAGE)}:{node.lineno}: assignment")
    assert not found, found
