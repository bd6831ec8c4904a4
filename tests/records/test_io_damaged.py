"""Damaged copies of the real strong-motion files: cut short, a header line garbled, a
line dropped. Each is either still read or refused with the project's InputError, and a
file cut short is refused with a message that names its format.

Sources: the error contract of this project (bad input raises InputError naming the
file, the format and the line; CONTRIBUTING.md); the real files of tests/data/strong-motion/.
The damage is made here with a fixed random seed.
"""
from __future__ import annotations

import random
import warnings

import pytest

from groundshake import InputError
from groundshake.records import read_record
from groundshake.records.io import detect

from _strong_motion import DATA

FILES = sorted(p.name for p in DATA.iterdir() if p.suffix.lower() not in (".md", ".v3"))
# the strong-motion text formats; ObsPy's (MiniSEED, K-NET) and the StationXML speak for
# themselves through ObsPy
TEXT_FILES = [n for n in FILES if n.rsplit(".", 1)[-1].lower() not in ("mseed", "xml")
              and not n.startswith("kiknet_")]


@pytest.mark.parametrize("name", TEXT_FILES)
def test_cut_short_names_the_format(tmp_path, name):
    lines = (DATA / name).read_bytes().splitlines(keepends=True)
    fmt = detect(DATA / name).FORMAT
    rng = random.Random(name)
    for cut in sorted({10, 25, 60, *(rng.randrange(10, 120) for _ in range(5))}):
        p = tmp_path / f"cut{cut}_{name}"
        p.write_bytes(b"".join(lines[:cut]))
        with pytest.raises(InputError) as e, warnings.catch_warnings():
            warnings.simplefilter("ignore")
            read_record(p)
        assert str(e.value).startswith(f"{fmt} file {p}"), str(e.value)  # names format and file


@pytest.mark.parametrize("name", FILES)
def test_garbled_or_missing_header_lines_never_crash(tmp_path, name):
    lines = (DATA / name).read_bytes().splitlines(keepends=True)
    rng = random.Random(f"garble {name}")
    for k in range(12):
        i = rng.randrange(0, min(len(lines), 60))
        if k % 2:
            damaged = lines[:i] + lines[i + 1:]  # a line dropped
        else:
            ln = bytearray(lines[i])
            j = rng.randrange(0, max(len(ln) - 3, 1))
            ln[j:j + 3] = b"x?#"  # three characters garbled
            damaged = lines[:i] + [bytes(ln)] + lines[i + 1:]
        p = tmp_path / f"d{k}_{name}"
        p.write_bytes(b"".join(damaged))
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                recs = read_record(p)
        except InputError as e:
            assert str(p) in str(e)  # the message names the file
        else:
            assert recs and all(r.n >= 16 for r in recs)  # still a usable record
