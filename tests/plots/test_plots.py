"""The plotting package: figures returned, written only through its two writers, drawn from
the data they are given."""
from __future__ import annotations

import base64
from pathlib import Path

import numpy as np
import pytest

from groundshake.plots import (correction_figure, exterior_faces, save_figure,
                               spectra_overview_figure, to_data_uri)
from groundshake.plots._base import new_figure
from groundshake.processing import correct_record
from groundshake.records import read_record
from groundshake.spectra import response_spectrum

REPO = Path(__file__).resolve().parents[2]
PNG = b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948 §5.2)


def _small_figure():
    fig = new_figure(2.0, 1.5)
    fig.add_subplot().plot([0, 1], [0, 1])
    return fig


def test_save_figure_writes_the_format_of_the_extension_atomically(tmp_path):
    fig = _small_figure()
    assert save_figure(fig, tmp_path / "a.png").read_bytes()[:8] == PNG
    # SVG is XML (W3C SVG 1.1 §1.2): matplotlib writes the XML declaration first
    assert save_figure(fig, tmp_path / "a.svg").read_bytes().startswith(b"<?xml")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.png", "a.svg"]  # no temporaries


def test_data_uri_holds_png_data():
    uri = to_data_uri(_small_figure())
    head = "data:image/png;base64,"          # RFC 2397 data URL with base64 (RFC 4648)
    assert uri.startswith(head)
    assert base64.b64decode(uri[len(head):])[:8] == PNG


def test_face_finder_counts_the_faces_of_a_box():
    # a box of nx × ny × nz cells shows 2(nx·ny + ny·nz + nz·nx) faces (geometry)
    nx, ny, nz = 3, 2, 4
    corners = np.meshgrid(np.arange(nx + 1.0), np.arange(ny + 1.0), np.arange(nz + 1.0),
                          indexing="ij")
    verts, cell, normal = exterior_faces(np.ones((nx, ny, nz), bool), corners)
    assert len(verts) == 2 * (nx * ny + ny * nz + nz * nx)
    assert np.bincount(normal, minlength=6).tolist() == [ny * nz, nx * nz, nx * ny] * 2


@pytest.fixture(scope="module")
def h1():
    raw = read_record(REPO / "records" / "demo-h1.csv")[0]
    return raw, correct_record(raw)


def test_spectrum_overview_draws_psv_as_omega_times_sd(h1):
    _, rec = h1
    periods = np.geomspace(0.05, 4.0, 25)
    s = response_spectrum(rec.acc, rec.dt, periods, [0.02, 0.05], name="h1")
    fig = spectra_overview_figure([s])
    four = fig.axes[2]
    lines = [ln for ln in four.get_lines() if str(ln.get_label()).startswith("h1")]
    assert len(lines) == 2
    for j, ln in enumerate(lines):
        # pseudo-velocity PSV = ω·SD (Chopra, Dynamics of Structures, §6.6)
        np.testing.assert_allclose(ln.get_ydata(), 2 * np.pi / periods * s.sd[j], rtol=1e-12)
    # PSA in g on the other two panels (standard gravity 9.80665 m/s², CGPM 1901)
    lin = [ln for ln in fig.axes[0].get_lines() if str(ln.get_label()).startswith("h1")]
    np.testing.assert_allclose(lin[1].get_ydata(), s.psa[1] / 9.80665, rtol=1e-12)


def test_correction_figure_keeps_the_as_read_time_axis(h1):
    raw, rec = h1
    fig = correction_figure([raw], [rec])
    acc = fig.axes[0]
    by_label = {str(ln.get_label()): ln for ln in acc.get_lines()}
    read, corrected = by_label["as read"], by_label["corrected (with pads)"]
    # the corrected record starts its zero pad before the first sample as read (Boore
    # 2005 pads), so its first time is -pad_before_s on the file's axis
    assert corrected.get_xdata()[0] == pytest.approx(-rec.metadata["pad_before_s"], abs=1e-9)
    assert read.get_xdata()[0] == pytest.approx(raw.time[0], abs=1e-12)
    np.testing.assert_array_equal(read.get_ydata(), raw.acc)    # as read, m/s²


def test_face_finder_agrees_with_counting_empty_neighbours():
    # an outer face is a side of a filled cell whose neighbour is empty or outside the grid
    # (definition): counted here cell by cell, independently of the whole-array finder
    from groundshake._grid import grid_faces

    rng = np.random.default_rng(7)
    filled = rng.random((4, 3, 5)) < 0.6
    padded = np.pad(filled, 1)
    expected = {}
    for i, j, k in np.argwhere(filled):
        for axis in range(3):
            for sign in (-1, 1):
                nb = [i + 1, j + 1, k + 1]
                nb[axis] += sign
                if not padded[tuple(nb)]:
                    expected.setdefault(axis, set()).add((i, j, k, sign > 0))
    for axis in range(3):
        corners, cell, plus = grid_faces(filled, axis)
        assert {(*c, p) for c, p in zip(cell.tolist(), plus.tolist())} == expected.get(axis, set())
        assert len(cell) == len(expected.get(axis, ()))
        # the four corners lie on the face's plane: one grid line along `axis`
        assert np.all(corners[:, :, axis] == corners[:, :1, axis])
