"""Helpers for the reader tests: the real files in tests/data/strong-motion and a round trip.

The files are copies of public agency records (tests/data/strong-motion/SOURCES.md);
the tests never edit them.
"""
from __future__ import annotations

from pathlib import Path

import numpy as np

from groundshake.records import read_record, write_record

DATA = Path(__file__).parent / "data" / "strong-motion"


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


def round_trip(records, tmp_path: Path) -> None:
    """Write through each of our writers and read back: same samples, step and order."""
    for suffix in (".csv", ".sac", ".mseed"):
        if suffix == ".sac":  # a SAC file holds one trace (SAC format)
            back = []
            for k, rec in enumerate(records):
                out = tmp_path / f"round{k}{suffix}"
                write_record(rec, out)
                back += read_record(out)
        else:
            out = tmp_path / f"round{suffix}"
            write_record(records, out)
            back = read_record(out, units="m/s2" if suffix == ".mseed" else None)
        assert len(back) == len(records)
        for a, b in zip(records, back):
            # SAC and MiniSEED store 32-bit floats (their format specifications)
            rtol = 1e-12 if suffix == ".csv" else 1e-6
            np.testing.assert_allclose(b.acc, a.acc, rtol=rtol, atol=rtol * np.abs(a.acc).max())
            assert abs(b.dt - a.dt) <= 1e-6 * a.dt
