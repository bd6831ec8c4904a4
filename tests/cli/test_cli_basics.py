"""The CLI skeleton: exit codes and the error contract (common practice for Unix tools:
status 0 on success, 2 on a usage error)."""
import pytest

from groundshake import __version__
from groundshake.cli import main


def test_version(capsys):
    assert main(["--version"]) == 0
    assert __version__ in capsys.readouterr().out


def test_no_command_is_usage_error(capsys):
    assert main([]) == 2
    assert "usage" in capsys.readouterr().err.lower()


def test_unknown_command_is_usage_error(capsys):
    assert main(["no-such-command"]) == 2


def test_closed_pipe_is_not_an_error(tmp_path):
    # Unix convention (common practice): a consumer that stops reading early
    # (`groundshake info ... | head -1`) must not make the tool print a traceback
    import subprocess
    import sys
    from pathlib import Path

    rec = Path(__file__).resolve().parents[2] / "records" / "demo-h1.csv"
    cmd = (f'"{sys.executable}" -m groundshake info "{rec}" "{rec}" "{rec}" --json | head -c 10')
    res = subprocess.run(["bash", "-o", "pipefail", "-c", cmd], capture_output=True, text=True)
    assert "Traceback" not in res.stderr
    assert res.returncode == 0


def test_modes_json_gives_the_mass_of_the_block(run_cli, scenario_file):
    # conftest fixtures: a 2 x 2 x 1 m concrete block (2400 kg/m³) on soil springs, so every
    # node moves, with the demo motion
    res = run_cli("modes", scenario_file(support="soil"), "--json")
    assert res.status == 0, res.err
    # mass = ρ·V = 2400 kg/m³ × 4 m³ in each direction (closed form; a consistent mass
    # carries the whole ρV in each direction, docs/references.md §7); to round-off
    for d in "xyz":
        assert res.json["total_mass"][d] == pytest.approx(2400.0 * 4.0, rel=1e-9)
