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
