"""Suite sets from file names ending in a component code of the trade (hnz, ud1, 360, ...).

Sources: SEED channel codes (SEED manual, appendix A: the third letter Z vertical, N/E
north/east, 1/2 unoriented horizontals); K-NET/KiK-net component names UD1, NS1, EW1
(NIED file headers); azimuths clockwise from north, 360/0 north and 90 east, quadrant
bearing N28W = 332° (surveyors' convention, common practice). The axes of the existing
file-name rule: e → x, n → y (README "Suites of records").
"""
from __future__ import annotations

import pytest

from groundshake import InputError
from groundshake.suite import discover_record_sets


def _sets(tmp_path, names):
    for n in names:
        (tmp_path / n).write_text("0\n")
    return {s.name: {c: f.rsplit("/", 1)[-1] for c, f in s.files.items()}
            for s in discover_record_sets(str(tmp_path))}


def test_seed_and_knet_codes(tmp_path):
    got = _sets(tmp_path, ["ci-clc-hne.mseed", "ci-clc-hnn.mseed", "ci-clc-hnz.mseed",
                           "ngnh31-ew1.csv", "ngnh31-ns1.csv", "ngnh31-ud1.csv",
                           "st9-hn1.sac", "st9-hn2.sac"])
    # SEED: HNE east → x, HNN north → y, HNZ vertical → z
    assert got["ci-clc"] == {"x": "ci-clc-hne.mseed", "y": "ci-clc-hnn.mseed",
                             "z": "ci-clc-hnz.mseed"}
    # K-NET/KiK-net: EW1 → x, NS1 → y, UD1 → z
    assert got["ngnh31"] == {"x": "ngnh31-ew1.csv", "y": "ngnh31-ns1.csv",
                             "z": "ngnh31-ud1.csv"}
    # SEED 1/2: unoriented horizontals, first → x, second → y (as h1, h2)
    assert got["st9"] == {"x": "st9-hn1.sac", "y": "st9-hn2.sac"}


def test_azimuths_go_to_the_nearer_axis(tmp_path):
    got = _sets(tmp_path, ["w-360.v2", "w-090.v2", "w-up.v2", "q-n28w.txt", "q-s62w.txt"])
    # 360° is north → y, 90° east → x
    assert got["w"] == {"x": "w-090.v2", "y": "w-360.v2", "z": "w-up.v2"}
    # N28W = 332°: nearer north → y; S62W = 242°: nearer west → x
    assert got["q"] == {"x": "q-s62w.txt", "y": "q-n28w.txt"}


@pytest.mark.parametrize("name", ["rec-1.mseed", "rec-45.mseed", "rec-hn3.mseed"])
def test_what_cannot_be_told_is_refused(tmp_path, name):
    # a one-digit word is a set number; 45° is as near x as y; HN3 has no axis of its own
    with pytest.raises(InputError, match="cannot tell the component from the name"):
        _sets(tmp_path, [name])
