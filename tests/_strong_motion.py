"""Shared pieces of the reader tests: the real files' folder and a round trip through our writers."""
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
