"""The generated reference pages in docs/reference/ are current (docs/generate.py writes
them from the argparse parsers, the scenario spec, a demo run's output folder and each
stage's ``__all__``), and the documents the tests and the README point to exist."""
from __future__ import annotations

import importlib.util
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def _generator():
    spec = importlib.util.spec_from_file_location("docs_generate", ROOT / "docs" / "generate.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def generator():
    return _generator()


@pytest.mark.parametrize("page", ["cli.md", "scenario.md", "api.md"])
def test_reference_page_is_current(generator, page):
    # drift check: the committed page equals what the generator writes from the code
    text = {"cli.md": generator.cli_reference, "scenario.md": generator.scenario_reference,
            "api.md": generator.api_reference}[page]()
    committed = (ROOT / "docs" / "reference" / page).read_text(encoding="utf-8")
    assert committed == text, f"docs/reference/{page} is stale: run python docs/generate.py"


@pytest.mark.slow
def test_outputs_page_is_current(generator, demo_run):
    status, _, folder = demo_run
    assert status == 0
    text = generator.outputs_reference(folder / "results")
    committed = (ROOT / "docs" / "reference" / "outputs.md").read_text(encoding="utf-8")
    assert committed == text, "docs/reference/outputs.md is stale: run python docs/generate.py"


def test_links_between_documents_resolve():
    # every relative Markdown link in README, CONTRIBUTING and docs/ names an existing file
    pages = [ROOT / "README.md", ROOT / "CONTRIBUTING.md", *sorted((ROOT / "docs").rglob("*.md"))]
    broken = []
    for page in pages:
        if not page.is_file():
            continue
        for target in re.findall(r"\]\(([^)#\s]+)(?:#[^)]*)?\)", page.read_text(encoding="utf-8")):
            if "://" in target or target.startswith("mailto:"):
                continue
            if not (page.parent / target).exists():
                broken.append(f"{page.relative_to(ROOT)} -> {target}")
    assert broken == []


def test_cited_reference_sheet_is_in_the_repository():
    # the tests cite "docs/references.md §N"; each cited section exists in that file
    sheet = (ROOT / "docs" / "references.md").read_text(encoding="utf-8")
    sections = set(re.findall(r"^## (\d+)\.", sheet, re.M))
    cited = set()
    for test in (ROOT / "tests").rglob("*.py"):
        cited |= set(re.findall(r"docs/references\.md §(\d+)", test.read_text(encoding="utf-8")))
    assert cited and cited <= sections


def test_tutorial_scenario_is_valid_and_has_the_mass_it_describes():
    # the TOML of docs/getting-started.md, read as if saved in the repository's top folder
    text = (ROOT / "docs" / "getting-started.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```toml\n(.*?)```", text, re.S)
    assert len(blocks) == 1
    from groundshake.scenario import parse_scenario_text

    scen = parse_scenario_text(blocks[0], source="my-first.toml", base_dir=ROOT)
    # the plinth's mass ρ·V = 2400 kg/m³ × 3 × 2 × 0.8 m³ (closed form) and the pump's 3 t
    assert scen.parts[0].size == (3.0, 2.0, 0.8)
    assert 2400.0 * 3.0 * 2.0 * 0.8 + scen.equipment[0].mass == pytest.approx(14520.0)


def test_readme_python_example_names_exist():
    # the README's short Python example imports only public names that exist (STYLE.md
    # point 11: documented examples must work; the run itself is the tutorial's test)
    import ast
    import importlib

    text = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.*?)```", text, re.S)
    assert len(blocks) == 1
    tree = ast.parse(blocks[0])
    found = 0
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            module = importlib.import_module(node.module)
            for alias in node.names:
                assert hasattr(module, alias.name), f"{node.module}.{alias.name}"
                found += 1
    assert found >= 4


def test_readme_is_a_front_door():
    # issue 15: the README is at most 200 lines; the docs tree holds the rest
    lines = (ROOT / "README.md").read_text(encoding="utf-8").splitlines()
    assert len(lines) <= 200
