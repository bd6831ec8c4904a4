"""The TOML value writer, read back by the standard library's TOML 1.0 reader (tomllib)."""
from __future__ import annotations

import datetime as dt
import math
import tomllib

import pytest

from groundshake._toml import short_float, toml_key, toml_value


@pytest.mark.parametrize("v", [0.1, -1.0 / 3.0, 1e-300, 1e308, 30e9, 5e-324, -0.0, 2.5])
def test_exact_floats_read_back_bit_for_bit(v):
    # tomllib is the reference reader (Python standard library, TOML 1.0)
    got = tomllib.loads(f"a = {toml_value(v, exact=True)}")["a"]
    assert got == v and math.copysign(1.0, got) == math.copysign(1.0, v)


@pytest.mark.parametrize("v, text", [(30e9, "30e9"), (118.75e6, "118.75e6"), (2400.0, "2400.0"),
                                     (0.2, "0.2"), (1.5e-5, "15e-6"), (0.0, "0.0")])
def test_short_floats_in_engineering_powers(v, text):
    # engineering notation: exponents in multiples of three (common practice)
    assert short_float(v) == text
    assert tomllib.loads(f"a = {text}")["a"] == pytest.approx(v, rel=1e-12)


def test_strings_keys_tables_and_dates_read_back():
    tree = {"plain": "a \"quoted\" \\ line\nnext\x7f", "odd key": [1, 2.5, True],
            "t": {"inner key": "x", "n": float("inf")}, "when": dt.date(2024, 5, 1)}
    text = "".join(f"{toml_key(k)} = {toml_value(v, exact=True)}\n" for k, v in tree.items())
    assert tomllib.loads(text) == tree
    assert toml_key("bare_key-1") == "bare_key-1" and toml_key("has space") == '"has space"'
    assert toml_value({"a": None, "b": [None, 1]}) == "{ b = [1] }"
