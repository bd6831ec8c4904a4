"""Atomic writers: a failed write leaves the previous file or folder as it was
(common practice: write to a temporary name in the same folder, then rename)."""
import os
import stat

import pytest

from groundshake._atomic import atomic_directory, atomic_path, atomic_savefig, atomic_write_text


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


@pytest.fixture
def umask():
    """Set the process umask for one test, then put the old one back."""
    old = os.umask(0o022)

    def set_mask(mask):
        os.umask(mask)
    yield set_mask
    os.umask(old)


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
@pytest.mark.parametrize("mask", [0o022, 0o027, 0o077, 0o002])
def test_outputs_get_the_mode_a_plain_open_gives(tmp_path, umask, mask):
    umask(mask)
    # What open() and mkdir() give under this umask (POSIX open(2): mode & ~umask),
    # measured here rather than written down.
    plain_file = tmp_path / "plain.txt"
    plain_file.write_text("x")
    plain_dir = tmp_path / "plain-dir"
    plain_dir.mkdir()
    want_file = stat.S_IMODE(plain_file.stat().st_mode)
    want_dir = stat.S_IMODE(plain_dir.stat().st_mode)
    assert want_file == 0o666 & ~mask and want_dir == 0o777 & ~mask   # POSIX open(2), mkdir(2)

    text = atomic_write_text(tmp_path / "report.html", "<html></html>")
    with atomic_path(tmp_path / "table.csv") as tmp:
        tmp.write_text("a,b\n")
    with atomic_directory(tmp_path / "out") as d:
        (d / "summary.json").write_text("{}")
    assert stat.S_IMODE(text.stat().st_mode) == want_file
    assert stat.S_IMODE((tmp_path / "table.csv").stat().st_mode) == want_file
    assert stat.S_IMODE((tmp_path / "out").stat().st_mode) == want_dir
    assert stat.S_IMODE((tmp_path / "out" / "summary.json").stat().st_mode) == want_file


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_replacing_a_file_keeps_its_mode(tmp_path, umask):
    umask(0o022)
    p = tmp_path / "shared.csv"
    p.write_text("old")
    os.chmod(p, 0o664)     # open(p, "w") on an existing file keeps its mode (POSIX open(2))
    atomic_write_text(p, "new")
    assert p.read_text() == "new"
    assert stat.S_IMODE(p.stat().st_mode) == 0o664
    d = tmp_path / "out"
    with atomic_directory(d) as tmp:
        (tmp / "a").write_text("1")
    os.chmod(d, 0o775)
    with atomic_directory(d, overwrite=True) as tmp:
        (tmp / "a").write_text("2")
    assert stat.S_IMODE(d.stat().st_mode) == 0o775


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_saved_figures_get_the_plain_mode(tmp_path, umask):
    matplotlib = pytest.importorskip("matplotlib")
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    umask(0o022)
    fig = plt.figure()
    try:
        path = atomic_savefig(fig, tmp_path / "fig.png")
    finally:
        plt.close(fig)
    assert stat.S_IMODE(path.stat().st_mode) == 0o644   # 0666 & ~0022 (POSIX open(2))


@pytest.mark.skipif(os.name != "posix", reason="POSIX permission bits")
def test_a_command_output_is_readable_by_the_group_under_umask_022(tmp_path, umask, capsys):
    import numpy as np

    from groundshake.cli import main

    umask(0o022)
    rec = tmp_path / "sine.csv"          # invented test record (a 2 Hz sine), m/s²
    t = np.arange(0, 4, 0.01)
    rec.write_text("# units: m/s2\ntime [s],acc [m/s2]\n"
                   + "".join(f"{a:.2f},{b:.6f}\n" for a, b in zip(t, np.sin(4 * np.pi * t))))
    out = tmp_path / "spectra.csv"
    assert main(["spectrum", str(rec), "--raw", "-o", str(out), "--quiet"]) == 0
    assert stat.S_IMODE(out.stat().st_mode) == 0o644       # 0666 & ~0022 (POSIX open(2))
