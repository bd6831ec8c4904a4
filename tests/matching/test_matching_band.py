"""``match --target TABLE`` and the period band: a table that ends inside the default
band (0.05-4 s) clips the band with a note; an explicit band or periods outside the
table are errors naming the table's range; ``--help`` shows that asce7 needs tl.

Sources: the table is the ASCE 7-16 §11.4.6 design shape (SDS = 1 g, SD1 = 0.6 g) in
closed form, tabulated 0.05-2 s; standard gravity 9.80665 m/s² (CGPM 1901); the default
band 0.05-4 s with its short end at 10·dt (Phillips et al. 2012, the matching stage's
documented default); exit status 2 for bad input (the project's CLI contract). Record:
ObsPy's bundled K-NET test file (dt = 0.01 s, from its header).
"""
from __future__ import annotations

import json
import os

import numpy as np
import pytest

from groundshake.cli import main

spectra = pytest.importorskip("groundshake.spectra")


@pytest.fixture(scope="module")
def knet_path():
    obspy = pytest.importorskip("obspy")
    return os.path.join(os.path.dirname(obspy.__file__), "io", "nied", "tests", "data",
                        "test.knet")


@pytest.fixture()
def short_table(tmp_path):
    """ASCE 7-16 §11.4.6 shape with SDS = 1 g, SD1 = 0.6 g, tabulated only up to 2 s."""
    T = np.geomspace(0.05, 2.0, 25)
    t0, ts = 0.2 * 0.6 / 1.0, 0.6 / 1.0
    psa_g = np.where(T < t0, 1.0 * (0.4 + 0.6 * T / t0), np.where(T <= ts, 1.0, 0.6 / T))
    path = tmp_path / "short.csv"
    path.write_text("period_s,psa_g\n" + "".join(f"{float(t)!r},{float(a)!r}\n" for t, a in zip(T, psa_g)))
    return path


def test_default_band_is_clipped_to_the_table_with_a_note(knet_path, short_table, capsys):
    rc = main(["match", knet_path, "--target", str(short_table), "--json", "--quiet",
               "--max-iterations", "2"])
    assert rc in (0, 1)                                   # ran: converged or not, no input error
    captured = capsys.readouterr()
    assert "clipped" in captured.err and "0.05-2 s" in captured.err   # the table's range
    rec = json.loads(captured.out)["records"][0]
    # K-NET test file dt = 0.01 s, so the default band starts at 10·dt = 0.1 s; the table
    # ends at 2 s, so the band becomes 0.1-2 s.
    assert rec["periods"][0] == pytest.approx(0.1, rel=1e-9)
    assert rec["periods"][-1] == pytest.approx(2.0, rel=1e-9)
    assert np.all(np.isfinite(rec["target_psa"]))


@pytest.mark.parametrize("extra,range_text", [
    (["--band", "0.1,4"], "0.05-2 s"),
    (["--periods", "0.2,0.5,3.0"], "0.05-2 s"),
])
def test_explicit_band_outside_the_table_is_an_error(knet_path, short_table, capsys, extra,
                                                     range_text):
    rc = main(["match", knet_path, "--target", str(short_table), "--quiet", *extra])
    assert rc == 2                                        # the CLI contract: bad input
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1
    assert range_text in err and "outside" in err        # names the table's range


def test_band_inside_the_table_is_used_as_given(knet_path, short_table, capsys):
    rc = main(["match", knet_path, "--target", str(short_table), "--json", "--quiet",
               "--band", "0.2,1.5", "--max-iterations", "2"])
    assert rc in (0, 1)
    captured = capsys.readouterr()
    assert "clipped" not in captured.err
    rec = json.loads(captured.out)["records"][0]
    assert rec["periods"][0] == pytest.approx(0.2) and rec["periods"][-1] == pytest.approx(1.5)


def test_help_says_tl_is_required(capsys):
    try:
        rc = main(["match", "--help"])
    except SystemExit as stop:                            # argparse's own exit
        rc = stop.code
    assert rc == 0                                        # argparse: --help exits 0
    text = " ".join(capsys.readouterr().out.split())
    assert "asce7:sds=G,sd1=G,tl=S" in text and "[,tl" not in text
    assert "all three required" in text


def test_asce7_without_tl_is_an_error_that_says_so(knet_path, capsys):
    rc = main(["match", knet_path, "--target", "asce7:sds=1.0,sd1=0.6", "--quiet"])
    assert rc == 2                                        # the CLI contract: bad input
    assert "missing tl" in capsys.readouterr().err
