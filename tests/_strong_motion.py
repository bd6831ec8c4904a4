"""Shared pieces of the reader tests: the real files' folder and a round trip through our writers.

The files are copies of public agency records (tests/data/strong-motion/SOURCES.md);
the tests never edit them.
"""
from __future__ import annotations

from pathlib import Path

import numpy as np

from groundshake.records import read_record, write_record

DATA = Path(__file__).parent / "data" / "strong-motion"


def round_trip(records, tmp_path: Path) -> None:
    """Write each record as MiniSEED and CSV with our writers, read both back, compare.

    MiniSEED is written with 64-bit floats and the CSV with ``repr(float)`` (shortest text
    that reads back to the same double, Python's float repr), so both must give back the
    very same samples and step.
    """
    for k, rec in enumerate(records):
        for ext in (".mseed", ".csv"):
            out = tmp_path / f"rt{k}{ext}"
            write_record(rec, out)
            (back,) = read_record(out, units="m/s2") if ext == ".mseed" else read_record(out)
            assert back.n == rec.n  # same number of samples
            assert back.dt == rec.dt  # same step, written exactly
            np.testing.assert_array_equal(back.acc, rec.acc)  # doubles round-trip exactly


def round_trip_sac(records, tmp_path: Path) -> None:
    """Write each record as SAC and read it back: SAC stores 32-bit floats (SAC format),
    so samples agree to float32 precision and the step to its shortest decimal."""
    for k, rec in enumerate(records):
        out = tmp_path / f"rt{k}.sac"
        write_record(rec, out)
        (back,) = read_record(out)
        assert back.n == rec.n
        assert abs(back.dt - rec.dt) <= 1e-6 * rec.dt
        np.testing.assert_allclose(back.acc, rec.acc, rtol=1e-6,
                                   atol=1e-6 * float(np.max(np.abs(rec.acc))))


def data_file(name: str) -> Path:
    """A real record file of tests/data/strong-motion."""
    return DATA / name


def head(path: Path) -> bytes:
    """The first 8192 bytes, as the registry hands them to ``is_format``."""
    with open(path, "rb") as fh:
        return fh.read(8192)


def other_files(name: str) -> list[Path]:
    """Every record file of tests/data/strong-motion except ``name`` (for detection checks)."""
    return [p for p in sorted(DATA.iterdir())
            if p.name != name and p.suffix.lower() not in (".md", ".xml")]
