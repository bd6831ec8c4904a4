"""Atomic writers: a failed write leaves the previous file or folder as it was
(common practice: write to a temporary name in the same folder, then rename)."""
import pytest

from groundshake._atomic import atomic_directory, atomic_write_text, atomic_path


def test_atomic_text_replaces(tmp_path):
    p = tmp_path / "a.txt"
    atomic_write_text(p, "one")
    atomic_write_text(p, "two")
    assert p.read_text() == "two"
    assert [q.name for q in tmp_path.iterdir()] == ["a.txt"]


def test_failed_write_keeps_old(tmp_path):
    p = tmp_path / "a.txt"
    p.write_text("old")
    with pytest.raises(RuntimeError):
        with atomic_path(p) as tmp:
            tmp.write_text("half")
            raise RuntimeError("boom")
    assert p.read_text() == "old"
    assert [q.name for q in tmp_path.iterdir()] == ["a.txt"]


def test_directory_interrupted_keeps_old(tmp_path):
    out = tmp_path / "out"
    with atomic_directory(out) as d:
        (d / "summary.json").write_text("{}")
    with pytest.raises(KeyboardInterrupt):
        with atomic_directory(out, overwrite=True) as d:
            (d / "summary.json").write_text("half")
            raise KeyboardInterrupt
    assert (out / "summary.json").read_text() == "{}"
    assert sorted(q.name for q in tmp_path.iterdir()) == ["out"]


def test_directory_refuses_overwrite(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    with pytest.raises(FileExistsError):
        with atomic_directory(out) as d:
            (d / "x").write_text("1")
    assert list(out.iterdir()) == []
