"""A corpus of broken record files, each with the message it must produce.

Contract (DESIGN.md "Errors", and the Unix convention of status 2 for bad input —
common practice): one line on stderr naming the file (and the line where it applies),
exit status 2, no traceback, and the input left byte for byte as it was (the time per
case is printed by benchmarks/bad_inputs.py, not asserted here). The expected fragments are in tests/data/bad/records/expected.tsv.
"""
from __future__ import annotations

import hashlib
import shlex
from pathlib import Path

import pytest

from groundshake.cli import main

HERE = Path(__file__).parents[1] / "data" / "bad" / "records"


def _cases():
    for line in (HERE / "expected.tsv").read_text().splitlines():
        if not line.strip() or line.startswith("#"):
            continue
        name, extra, fragment = line.split("\t")
        yield pytest.param(name, extra, fragment, id=Path(name).name + (extra and " " + extra))


@pytest.mark.parametrize("name,extra,fragment", list(_cases()))
def test_bad_record_gives_one_line_and_status_2(name, extra, fragment, capsys):
    path = (HERE / name).resolve()
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    status = main(["info", str(path), *shlex.split(extra)])
    err = capsys.readouterr().err.strip().splitlines()
    assert status == 2
    assert len(err) == 1 and err[0].startswith("groundshake: error: ")
    assert fragment in err[0]
    assert "Traceback" not in err[0]
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before   # input never changed
