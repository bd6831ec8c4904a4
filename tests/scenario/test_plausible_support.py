"""Plausibility of the foundation keys of [support]: friction coefficient, allowable
bearing pressure, Cv of the shear modulus, embedment depth, G/G0 as entered and the
level of shaking of the strain-compatible table.

Sources of the values called real, unusual or impossible (each also beside its case):
- base friction μ = tan δ about 0.25-0.7 for concrete on soil (NAVFAC DM-7.02 Table 1,
  from memory); 1.4 for monolithic concrete is the largest a code uses (ACI 318-19
  §22.9.4.2, from memory); tan 30° = 0.577 (arithmetic);
- presumptive bearing pressures 72-575 kPa (IBC 2018 Table 1806.2, from memory);
- Cv ≥ 0.5, 1.0 where the site is little investigated (ASCE 4-16 §5.1.7, from memory);
- G/G0 of ASCE 7-16 Table 19.2-1 from 1.0 to 0.05, columns S_DS/2.5 up to 0.8 g (from
  memory); 1 g = 9.80665 m/s² (standard gravity);
- foundation blocks embedded a few metres (common practice).
"""
from __future__ import annotations

import warnings

import pytest

from groundshake._errors import GroundshakeWarning
from groundshake._plausible import RANGES, judge

from _tables import (assert_slip_is_an_error, assert_unusual_value_warns, block_scenario,
                     parse_case, part, soil)

BASE = block_scenario(
    "Foundation plausibility cases (invented)", [part("pad", (6, 4, 1))], element_size=1.0,
    support=soil(extra="friction_coefficient = 0.5\nallowable_bearing_pressure = 200e3\n"
                       "variation = 0.5\nembedment_depth = 1.0\n"
                       'strain_compatible = { site_class = "D", shaking_g = 0.4 }\n'))


def test_typical_foundation_values_are_quiet(tmp_path):
    with warnings.catch_warnings():
        warnings.simplefilter("error")   # μ 0.5, 200 kPa, Cv 0.5, 1 m, class D at 0.4 g
        parse_case(BASE, tmp_path)


# (old, new, key in the message, suggestion in the message, source)
ERRORS = [
    ("friction_coefficient = 0.5", "friction_coefficient = 30", "support.friction_coefficient",
     "an angle in degrees is not μ", "φ = 30° typed for μ = tan 30° = 0.58 (arithmetic)"),
    ("friction_coefficient = 0.5", "friction_coefficient = 45", "support.friction_coefficient",
     "did you mean 0.45", "45 % typed for μ = 0.45 (NAVFAC DM-7.02 range, from memory)"),
    ("allowable_bearing_pressure = 200e3", "allowable_bearing_pressure = 200",
     "support.allowable_bearing_pressure", "did you mean 200000 Pa",
     "kPa typed as Pa: 200 kPa within 72-575 kPa (IBC 2018 Table 1806.2, from memory)"),
    ("allowable_bearing_pressure = 200e3", "allowable_bearing_pressure = 0.3",
     "support.allowable_bearing_pressure", "did you mean 300000 Pa",
     "MPa typed as Pa: 0.3 MPa = 300 kPa (IBC 2018 Table 1806.2, from memory)"),
    ("embedment_depth = 1.0", "embedment_depth = 1500", "support.embedment_depth",
     "did you mean 1.5", "mm typed as m: a block 1.5 m below grade (common practice)"),
    ("shaking_g = 0.4", "shaking_g = 9.81", "support.strain_compatible.shaking_g",
     "did you mean 1 g", "m/s² typed for g: 9.81 / 9.80665 = 1.0 g (standard gravity)"),
]


@pytest.mark.parametrize("old,new,key,hint,source", ERRORS, ids=[c[1] for c in ERRORS])
def test_impossible_values_are_errors_naming_key_line_and_slip(tmp_path, old, new, key, hint,
                                                               source):
    assert_slip_is_an_error(BASE, old, new, key, hint, tmp_path)


# (old, new, key in the warning, source)
WARNINGS = [
    ("friction_coefficient = 0.5", "friction_coefficient = 0.1", "support.friction_coefficient",
     "below soft clay's 0.25 (NAVFAC DM-7.02, from memory): possible on a greased plate"),
    ("friction_coefficient = 0.5", "friction_coefficient = 1.4", "support.friction_coefficient",
     "ACI 318-19 §22.9.4.2's monolithic 1.4 is no base on soil (from memory)"),
    ("allowable_bearing_pressure = 200e3", "allowable_bearing_pressure = 20e3",
     "support.allowable_bearing_pressure", "below the softest clay's 25-50 kPa (common practice)"),
    ("allowable_bearing_pressure = 200e3", "allowable_bearing_pressure = 2e7",
     "support.allowable_bearing_pressure", "20 MPa: above sound rock's few MPa (common practice)"),
    ("variation = 0.5", "variation = 0.2", "support.variation",
     "below the 0.5 of ASCE 4-16 §5.1.7 (from memory)"),
    ("variation = 0.5", "variation = 2.0", "support.variation",
     "above the 1.0 of ASCE 4-16 §5.1.7 for little-investigated sites (from memory)"),
    ("embedment_depth = 1.0", "embedment_depth = 15.0", "support.embedment_depth",
     "15 m: deeper than blocks are cast (common practice)"),
    ("shaking_g = 0.4", "shaking_g = 2.0", "support.strain_compatible.shaking_g",
     "past the table's last column, 0.8 g (ASCE 7-16 Table 19.2-1, from memory)"),
]


@pytest.mark.parametrize("old,new,key,source", WARNINGS, ids=[c[1] for c in WARNINGS])
def test_unusual_values_warn(tmp_path, old, new, key, source):
    assert_unusual_value_warns(BASE, old, new, key, tmp_path)


def test_entered_modulus_ratio_below_the_table_warns(tmp_path):
    text = BASE.replace('strain_compatible = { site_class = "D", shaking_g = 0.4 }',
                        "modulus_ratio = 0.02")
    # below 0.05, the smallest G/G0 of ASCE 7-16 Table 19.2-1 (from memory)
    with pytest.warns(GroundshakeWarning, match=r"support.modulus_ratio = 0.02 is unusually low"):
        parse_case(text, tmp_path)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        parse_case(text.replace("modulus_ratio = 0.02", "modulus_ratio = 0.5"), tmp_path)


def test_zero_cv_and_surface_base_are_quiet():
    # Cv = 0 (best estimate only) and a base at grade are choices, not slips
    assert judge("variation", 0.0) == ("ok", "")
    assert judge("embedment_depth", 0.0) == ("ok", "")
    for key in ("friction_coefficient", "allowable_bearing_pressure", "variation",
                "embedment_depth", "modulus_ratio", "shaking_g"):
        assert key in RANGES                   # one table (groundshake/_plausible.py)
