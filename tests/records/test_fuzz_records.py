"""Fuzzing the delimited-text reader (hypothesis).

The contract (our own error design, after the STYLE guide's "validate at the boundary"):
any input file gives either valid records or the package's own RecordError — never
another exception. A valid record must honour the facts of the trade checked here:
finite samples, a positive time step, at least 16 samples (common practice for a usable
record), and unit conversion by the standard gravity 9.80665 m/s² (CGPM 1901).
A longer profile is in benchmarks/fuzz_records.py.
"""
from __future__ import annotations

import math
import warnings

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from groundshake._errors import GroundshakeError, GroundshakeWarning
from groundshake.records import read_record

FUZZ = settings(max_examples=100, deadline=None,
                suppress_health_check=[HealthCheck.function_scoped_fixture,
                                       HealthCheck.too_slow])


def _check_outcome(path, **kw):
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", GroundshakeWarning)
            recs = read_record(path, **kw)
    except GroundshakeError:
        return None
    for r in recs:
        assert np.all(np.isfinite(r.acc))
        assert r.dt > 0 and math.isfinite(r.dt)
        assert r.n >= 16
    return recs


@FUZZ
@given(data=st.binary(max_size=2048))
def test_random_bytes(tmp_path_factory, data):
    p = tmp_path_factory.mktemp("fz") / "r.csv"
    p.write_bytes(data)
    _check_outcome(p, units="m/s2", dt=0.01)
    _check_outcome(p)


_number = st.one_of(st.floats(allow_nan=True, allow_infinity=True, width=64),
                    st.floats(min_value=-1e300, max_value=1e300),
                    st.floats(min_value=-1e-300, max_value=1e-300),
                    st.integers(min_value=-10**20, max_value=10**20))
_sep = st.sampled_from([",", ";", " ", "\t", "  ", ", ", " ; ", "|"])


@FUZZ
@given(rows=st.lists(st.lists(_number, min_size=1, max_size=4), min_size=0, max_size=60),
       sep=_sep,
       header=st.lists(st.text(max_size=30), max_size=3),
       units=st.sampled_from([None, "g", "m/s2", "gal", "cm/s2", "furlong/s2"]),
       dt=st.one_of(st.none(), st.floats(min_value=-1, max_value=1)))
def test_random_numeric_tables(tmp_path_factory, rows, sep, header, units, dt):
    lines = [("# " + h.replace("\n", " ")) for h in header]
    lines += [sep.join(repr(v) if isinstance(v, float) else str(v) for v in r) for r in rows]
    p = tmp_path_factory.mktemp("fz") / "t.txt"
    p.write_text("\n".join(lines) + "\n", encoding="utf-8")
    _check_outcome(p, units=units, dt=dt)


@FUZZ
@given(values=st.lists(st.floats(min_value=-5, max_value=5), min_size=16, max_size=200),
       sep=st.sampled_from([",", ";", " ", "\t"]))
def test_valid_two_column_tables_read_back(tmp_path_factory, values, sep):
    # a clean table in g must come back as value × 9.80665 m/s² (CGPM 1901)
    dt = 0.01
    text = "time [s]" + sep + "acc [g]\n" + "\n".join(
        f"{i * dt:.6f}{sep}{v!r}" for i, v in enumerate(values))
    p = tmp_path_factory.mktemp("fz") / "ok.csv"
    p.write_text(text + "\n")
    (rec,) = read_record(p)
    np.testing.assert_allclose(rec.acc, np.asarray(values) * 9.80665, rtol=1e-12, atol=0)
    assert abs(rec.dt - dt) < 1e-9
