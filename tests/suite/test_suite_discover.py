"""Record-set discovery and suite statistics.

Expected values come from the definitions themselves: sample mean and median, numpy's
percentile (linear interpolation, Hyndman & Fan 1996 type 7), and the log-normal
distribution (median exp(μ), 16th/84th percentiles exp(μ ∓ σ) — common practice for
suites of ground-motion results).
"""
import math

import numpy as np
import pytest

from groundshake._errors import InputError
from groundshake.suite._discover import discover_record_sets
from groundshake.pipeline import flatten_scalars, peak_statistics, scalar_statistics


def _touch(folder, *names):
    for n in names:
        (folder / n).write_text("0\n")


def test_folder_groups_by_component_word(tmp_path):
    _touch(tmp_path, "a-h1.mseed", "a-h2.mseed", "a-up.mseed", "b_x.sac", "b_y.sac")
    sets = discover_record_sets(str(tmp_path))
    assert [s.name for s in sets] == ["a", "b"]
    assert set(sets[0].files) == {"x", "y", "z"}
    assert set(sets[1].files) == {"x", "y"}


def test_single_component_scenario_gives_one_set_per_file(tmp_path):
    _touch(tmp_path, "r1.csv", "r2.csv", "r3.csv")
    sets = discover_record_sets(str(tmp_path), components=("x",))
    assert [s.name for s in sets] == ["r1", "r2", "r3"]
    assert all(list(s.files) == ["x"] for s in sets)


def test_folder_takes_every_reader_ending_and_gzip(tmp_path):
    # PEER .AT2, GeoNet .V2A and gzip-compressed files are record files; notes are not
    # (the endings come from the readers' EXTENSIONS)
    _touch(tmp_path, "p-h1.AT2", "p-h2.AT2", "g-x.V2A", "g-y.V2A", "m-x.csv.gz", "m-y.csv.gz",
           "notes.md", ".hidden.csv", "README.md")
    sets = discover_record_sets(str(tmp_path))
    assert [s.name for s in sets] == ["g", "m", "p"]
    assert all(set(s.files) == {"x", "y"} for s in sets)
    assert sets[1].files["x"].endswith("m-x.csv.gz")
    one = discover_record_sets(str(tmp_path / "m-x.csv.gz"), components=("x",))
    assert [s.name for s in one] == ["m-x"]


def test_glob_and_unknown_component(tmp_path):
    _touch(tmp_path, "a-h1.mseed", "a-h2.mseed", "c-foo.mseed")
    assert len(discover_record_sets(str(tmp_path / "a-*.mseed"))) == 1
    with pytest.raises(InputError, match="c-foo.mseed: cannot tell the component"):
        discover_record_sets(str(tmp_path))


def test_manifest_with_scales_and_line_numbers(tmp_path):
    _touch(tmp_path, "e1.mseed", "n1.mseed")
    (tmp_path / "m.csv").write_text("set,x,y,z,scale_x,scale_y,units\n"
                                    "one,e1.mseed,n1.mseed,,2.0,0.5,g\n")
    (s,) = discover_record_sets(str(tmp_path / "m.csv"))
    assert s.name == "one" and s.units == "g"
    assert s.scale == {"x": 2.0, "y": 0.5}
    (tmp_path / "bad.csv").write_text("set,x\nok,e1.mseed\n,n1.mseed\n")
    with pytest.raises(InputError, match=r"bad.csv:3: the set name is empty"):
        discover_record_sets(str(tmp_path / "bad.csv"))


def test_nothing_found(tmp_path):
    with pytest.raises(InputError, match="no record files"):
        discover_record_sets(str(tmp_path))
    with pytest.raises(InputError, match="no such folder"):
        discover_record_sets(str(tmp_path / "missing"))


def test_scalar_statistics_known_answers():
    s = scalar_statistics([1.0, 2.0, 3.0, 4.0, 5.0])
    assert s["mean"] == 3.0 and s["median"] == 3.0          # definition
    assert s["p16"] == pytest.approx(1.64)                   # type-7 percentile: 1 + 0.16*4
    assert s["p84"] == pytest.approx(4.36)
    assert s["std"] == pytest.approx(math.sqrt(2.5))         # sample std, ddof = 1
    ln = scalar_statistics([math.exp(-1), 1.0, math.exp(1)])
    assert ln["lognormal_median"] == pytest.approx(1.0)      # exp(mean of ln x)
    assert ln["beta"] == pytest.approx(1.0)                  # std of (-1, 0, 1)
    assert ln["lognormal_p84"] == pytest.approx(math.e)      # exp(μ + σ)
    assert "lognormal_median" not in scalar_statistics([-1.0, 1.0])


def test_peak_statistics_flattens_nested_trees():
    peaks = [{"base_shear": {"x": 1.0, "y": 2.0}, "anchors": [{"t": 3.0}]},
             {"base_shear": {"x": 3.0, "y": 4.0}, "anchors": [{"t": 5.0}], "flag": True}]
    st = peak_statistics(peaks)
    assert set(st) == {"base_shear.x", "base_shear.y", "anchors[0].t"}
    assert st["base_shear.x"]["mean"] == 2.0 and st["anchors[0].t"]["max"] == 5.0
    assert flatten_scalars({"a": [1, {"b": np.float64(2.5)}], "s": "text"}) == {"a[0]": 1.0, "a[1].b": 2.5}
