"""The corpus of broken scenarios in tests/data/bad/scenarios/.

Each file says on its second line (``# expect: ...``) the fragment its error must
contain; the line numbers there were counted by hand in the file, the physical limits
are those of tests/scenario/test_scenario_errors.py (ν < 0.5 incompressibility, E > 0, damping
below critical, HHT-α in [−1/3, 0] after Hilber, Hughes & Taylor 1977), the geometry
rules are issue 4's (parts touch face to face, equipment on a top face, sensors in the
model), and the TOML syntax cases follow Python's tomllib (the reference parser).
Issue 8: every case must give status 2 with its message; the CLI half runs through
``groundshake.cli.main`` for each command that takes a scenario and exists.
"""
from __future__ import annotations

import time
import warnings
from pathlib import Path

import pytest

from groundshake._errors import ScenarioError
from groundshake.scenario import load_scenario

CORPUS = Path(__file__).resolve().parents[1] / "data" / "bad" / "scenarios"
FILES = sorted(CORPUS.glob("*.toml"))


def _expected(path: Path) -> str:
    line = path.read_text(encoding="utf-8", errors="replace").splitlines()[1]
    assert line.startswith("# expect: "), path.name
    return line[len("# expect: "):]


def test_corpus_is_there():
    names = {p.stem for p in FILES}
    # The cases issue 8 names explicitly.
    for must in ("poisson-ratio-half", "youngs-modulus-zero", "sensor-outside",
                 "equipment-off-top-face", "overlapping-parts", "mesh-too-fine"):
        assert must in names


@pytest.mark.parametrize("path", FILES, ids=[p.stem for p in FILES])
def test_corpus_case(path):
    fragment = _expected(path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(ScenarioError) as info:
            load_scenario(path)
    message = str(info.value)
    assert message.startswith(f"{path}:")  # names the file
    if fragment.startswith(":"):  # ":LINE: key: ..." right after the file name
        assert message.startswith(f"{path}{fragment}"), message
    assert fragment in message, message
    assert "\n" not in message  # one line


def _commands():
    from groundshake.cli import build_parser
    parser = build_parser()
    sub = next(a for a in parser._actions if a.__class__.__name__ == "_SubParsersAction")
    return set(sub.choices)


@pytest.mark.parametrize("path", FILES, ids=[p.stem for p in FILES])
def test_corpus_through_the_cli(path, capsys, tmp_path):
    from groundshake.cli import main
    commands = _commands()
    argvs = []
    if "modes" in commands:
        argvs.append(["modes", str(path)])
    if "run" in commands:
        argvs.append(["run", str(path), "-o", str(tmp_path / "out")])
    if not argvs:
        pytest.skip("no scenario command registered yet")
    fragment = _expected(path)
    for argv in argvs:
        t0 = time.perf_counter()
        status = main(["--quiet", *argv])
        elapsed = time.perf_counter() - t0
        err = capsys.readouterr().err
        # DESIGN.md: bad input → status 2, one line on stderr naming file/line/key, no traceback.
        assert status == 2, (argv, err)
        assert fragment in err, (argv, err)
        assert "Traceback" not in err
        assert not (tmp_path / "out").exists()  # nothing written for a bad scenario
        print(f"{path.name} via {argv[0]}: {elapsed:.2f} s")
