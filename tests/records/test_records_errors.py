"""Bad input to ``info`` and ``correct``: exit status 2, one line on stderr naming the
file (and line), no traceback, input unchanged.

Sources: the exit-status convention of Unix command-line tools (2 = usage/input error,
common practice) and the error contract in CONTRIBUTING.md; the expected line numbers
and values are those written into each test file by the test itself.
"""
from __future__ import annotations

import hashlib
from pathlib import Path

import numpy as np
import pytest

from groundshake.cli import main
from groundshake.records import Record, write_record


def _digest(p: Path) -> str | None:
    return hashlib.sha256(p.read_bytes()).hexdigest() if p.exists() else None


def _rows(n=40, dt=0.01):
    return [f"{i * dt!r},{float(np.sin(i / 3.0))!r}" for i in range(n)]


def _check_refused(capsys, argv, path: Path, *must_contain: str, names_file: bool = True):
    before = _digest(path)
    status = main(argv)
    err = capsys.readouterr().err
    assert status == 2  # bad input -> exit status 2 (common practice)
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, err  # exactly one line on stderr
    assert "Traceback" not in err
    if names_file:
        assert str(path) in lines[0]  # names the file
    for text in must_contain:
        assert text in lines[0], lines[0]
    assert _digest(path) == before  # the input is never changed
    return lines[0]


CASES = {
    # name: (file content as bytes, extra CLI args, text the message must hold)
    "empty": (b"", [], ["empty"]),
    "blank": (b"\n  \n\n", [], ["empty"]),
    "header only": (b"time [s],acc [g]\n# nothing else\n", [], ["only a header"]),
    "unknown text format": (b'{"acc": [1, 2, 3]}\n', [], ["format neither ObsPy"]),
    "non-numeric": (("time,acc [g]\n" + "\n".join(_rows(20)) + "\n0.2,abc\n").encode(), [],
                    [":22:", "'abc'"]),
    "nan": (("time,acc [g]\n" + "\n".join(_rows(20)) + "\n0.2,nan\n").encode(), [],
            [":22:", "nan"]),
    "inf": (("time,acc [g]\n" + "\n".join(_rows(20)) + "\n0.2,-inf\n").encode(), [],
            [":22:", "inf"]),
    "too few": (("time,acc [g]\n" + "\n".join(_rows(15)) + "\n").encode(), [], ["15 samples", "16"]),
    "time repeats": (("t,a [g]\n" + "\n".join(_rows(20)) + "\n0.19,1.0\n").encode(), [],
                     [":22:", "repeats or runs backwards"]),
    "time backwards": (("t,a [g]\n" + "\n".join(_rows(20)) + "\n0.1,1.0\n").encode(), [],
                       [":22:", "repeats or runs backwards"]),
    "uneven steps": (("t,a [g]\n" + "\n".join(_rows(20)) + "\n0.2015,1.0\n" +
                      "\n".join(f"{0.2015 + 0.01 * k!r},0.5" for k in range(1, 20)) + "\n").encode(),
                     [], [":22:", "1 %", "--resample"]),
    "ragged rows": (("time,acc [g]\n" + "\n".join(_rows(20)) + "\n0.2,1.0,3.0\n").encode(), [],
                    [":22:", "3 values"]),
    "empty cell": (("time,acc [g]\n" + "\n".join(_rows(20)) + "\n0.2,,1.0\n").encode(), [],
                   [":22:", "''"]),
    "garbage bytes": (bytes(range(256)) * 8, [], ["not a record"]),
    "no units": (("t,a\n" + "\n".join(_rows(20)) + "\n").encode(), [], ["does not state its units",
                                                                          "--units"]),
    "unknown units in header": (("# units: furlongs/fortnight2\n" + "\n".join(_rows(20))).encode(),
                                [], ["unknown units", "furlongs"]),
    "unknown units option": (("t,a\n" + "\n".join(_rows(20)) + "\n").encode(), ["--units", "stone"],
                             ["unknown units", "'stone'"]),
    "one column no dt": (("# units: g\n" + "\n".join(str(i) for i in range(20))).encode(), [],
                         ["time step", "--dt"]),
}


@pytest.mark.parametrize("command", ["info", "correct"])
@pytest.mark.parametrize("case", sorted(CASES))
def test_bad_input(tmp_path, capsys, case, command):
    content, extra, texts = CASES[case]
    path = tmp_path / "input.txt"
    path.write_bytes(content)
    argv = [command, str(path), *extra]
    if command == "correct":
        argv += ["-o", str(tmp_path / "out.csv")]
    _check_refused(capsys, argv, path, *texts)
    assert not (tmp_path / "out.csv").exists()  # nothing written on refusal


@pytest.mark.parametrize("command", ["info", "correct"])
def test_missing_file(tmp_path, capsys, command):
    path = tmp_path / "nowhere.mseed"
    argv = [command, str(path)] + (["-o", str(tmp_path / "o.csv")] if command == "correct" else [])
    _check_refused(capsys, argv, path, "no such file")


def test_mseed_without_units(tmp_path, capsys):
    path = tmp_path / "r.mseed"
    write_record(Record(acc=np.sin(np.arange(100) / 5.0), dt=0.01), path)
    _check_refused(capsys, ["info", str(path)], path, "--units")
    assert main(["info", str(path), "--units", "m/s2"]) == 0  # and with units it reads


def test_uneven_steps_accepted_with_resample(tmp_path, capsys):
    path = tmp_path / "u.csv"
    path.write_text("t,a [g]\n" + "\n".join(_rows(20)) + "\n0.2015,1.0\n" +
                    "\n".join(f"{0.2015 + 0.01 * k!r},0.5" for k in range(1, 20)) + "\n")
    assert main(["info", str(path), "--resample", "--json"]) == 0  # interpolated, so accepted
    capsys.readouterr()


def test_debug_shows_traceback(tmp_path):
    path = tmp_path / "empty.csv"
    path.write_text("")
    from groundshake import InputError

    with pytest.raises(InputError):  # --debug lets the exception through (CONTRIBUTING.md)
        main(["--debug", "info", str(path)])


def test_correct_refuses_to_overwrite_input(tmp_path, capsys):
    path = tmp_path / "in.csv"
    write_record(Record(acc=np.sin(np.arange(200) / 5.0), dt=0.01), path)
    _check_refused(capsys, ["correct", str(path), "-o", str(path)], path, "input")
    _check_refused(capsys, ["correct", str(path), "-o", str(tmp_path / "o.csv"), "--plot",
                            str(path)], path, "--plot")


def test_correct_rejects_bad_options(tmp_path, capsys):
    path = tmp_path / "in.csv"
    write_record(Record(acc=np.sin(np.arange(200) / 5.0), dt=0.01), path)
    out = str(tmp_path / "o.csv")
    line = _check_refused(capsys, ["correct", str(path), "-o", out, "--baseline-order", "9"],
                          path, "--baseline-order", names_file=False)  # names the option
    assert "0-6" in line
    line = _check_refused(capsys, ["correct", str(path), "-o", out, "--lowpass", "80"], path,
                          "Nyquist")
    _check_refused(capsys, ["correct", str(path), "-o", str(tmp_path / "o.xyz")], path,
                   "unknown output format", "o.xyz", names_file=False)  # names the output
