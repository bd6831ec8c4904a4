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

    rec = Path(__file__).resolve().parents[1] / "records" / "demo-h1.csv"
    cmd = (f'"{sys.executable}" -m groundshake info "{rec}" "{rec}" "{rec}" --json | head -c 10')
    res = subprocess.run(["bash", "-o", "pipefail", "-c", cmd], capture_output=True, text=True)
    assert "Traceback" not in res.stderr
    assert res.returncode == 0
