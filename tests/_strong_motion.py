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


def record_files() -> list[Path]:
    """Every record file of tests/data/strong-motion (for detection checks)."""
    return [p for p in sorted(DATA.iterdir()) if p.suffix.lower() not in (".md", ".xml")]


def assert_columns(records, table: np.ndarray, factor: float, *, dt: float | None = None) -> None:
    """Record k holds column k of ``table`` (values as written) times ``factor`` (to m/s²).

    The reader and this check multiply the same doubles by the same factor, so they agree
    to 1e-15 m/s² (far below any value written); with ``dt`` given, each record also has
    that step [s] and one sample per row.
    """
    assert len(records) == table.shape[1]
    for k, rec in enumerate(records):
        np.testing.assert_allclose(rec.acc, table[:, k] * factor, rtol=0, atol=1e-15)
        if dt is not None:
            assert rec.dt == dt and rec.n == table.shape[0]


def assert_channels(records, components, orientations, azimuths=None) -> None:
    """The records' components as written, their orientation ("horizontal"/"vertical"),
    and ``azimuth_deg`` (degrees from north) of those ``azimuths`` lists by index."""
    assert [r.component for r in records] == list(components)
    assert [r.metadata["orientation"] for r in records] == list(orientations)
    for k, deg in (azimuths or {}).items():
        assert records[k].metadata["azimuth_deg"] == deg


def assert_options_checked(path: Path, error: type, dt: tuple[float, str],
                           units: tuple[str, str]) -> None:
    """A ``dt`` [s] and ``units`` that contradict the file are refused with ``error``.

    ``dt`` and ``units`` are (value given, regex the message must match).
    """
    import pytest

    with pytest.raises(error, match=dt[1]):
        read_record(path, dt=dt[0])
    with pytest.raises(error, match=units[1]):
        read_record(path, units=units[0])


def assert_text_refused(path: Path, text: str, message: str) -> None:
    """A file of ``text`` written at ``path`` is refused with a RecordError matching ``message``."""
    import pytest

    from groundshake._errors import RecordError

    path.write_text(text)
    with pytest.raises(RecordError, match=message):
        read_record(path)
