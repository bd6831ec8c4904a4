"""Unit slips are caught: far outside any real value is an error naming the key and the
likely slip; unusual but possible is a GroundshakeWarning.

Sources of the values called real or impossible here (each also beside its case):
- concrete E 27-44 GPa (EN 1992-1-1:2004 Table 3.1); no material stiffer than diamond,
  about 1.1e12 Pa (from memory), so a higher E is a rigid idealisation (a warning);
- concrete 2400 kg/m³, steel 7850 kg/m³ (EN 1991-1-1:2002 Tables A.1, A.4);
- soil shear-wave velocity: soft soil below 180 m/s, rock above 760 m/s (ASCE 7-16 Table
  20.3-1);
- 5 % damping is the reference of design spectra (ASCE 7-16 §11.4, EN 1998-1 §3.2.2.2);
  a ratio of 0.05 typed where percent is asked gives 0.05 % (arithmetic);
- ASCE 7-16 design values in g; 9.81 m/s² = 1 g (standard gravity 9.80665 m/s², CGPM 1901);
  EN 1998-1 ag in g; mapped TL values 4-16 s (ASCE 7-16 Figs. 22-14 to 22-17);
- exit status 2 for bad input, one line on stderr (the project's CLI contract).
"""
from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning, InputError
from groundshake._plausible import RANGES, judge

from _tables import (assert_slip_is_an_error, assert_unusual_value_warns, block_scenario,
                     equipment, error_of, line_of, parse_case, part, soil)

BASE = block_scenario(
    "Plausibility cases (invented)", [part("pad", (6, 4, 1))], element_size=0.5,
    support=soil(),
    after=["[damping]\nratio_percent = 5\n",
           equipment("transformer", 18000, mount=(3, 2), footprint=(2, 1.5), cg_height=1.2),
           "[floor_spectra]\ndamping_percent = [2, 5]\n"])


def test_the_base_case_is_quiet(tmp_path):
    with warnings.catch_warnings():
        warnings.simplefilter("error")          # typical values: no warning at all
        parse_case(BASE, tmp_path)


# (old, new, key in the message, suggestion in the message, source)
ERRORS = [
    ("youngs_modulus = 30e9", "youngs_modulus = 30", "materials.concrete.youngs_modulus",
     "did you mean 30e9", "GPa typed as Pa: concrete E ≈ 30 GPa, EN 1992-1-1 Table 3.1"),
    ("youngs_modulus = 30e9", "youngs_modulus = 30000", "materials.concrete.youngs_modulus",
     "did you mean 30000e6", "MPa typed as Pa (EN 1992-1-1 Table 3.1: 30 000 MPa)"),
    ("density = 2400", "density = 2.4", "materials.concrete.density",
     "did you mean 2400", "t/m³ typed as kg/m³ (EN 1991-1-1 Table A.1: 24 kN/m³)"),
    ("shear_wave_velocity = 250.0", "shear_wave_velocity = 0.25", "support.shear_wave_velocity",
     "did you mean 250", "km/s typed as m/s (ASCE 7-16 Table 20.3-1)"),
    ("density = 1900.0", "density = 1.9", "support.density", "did you mean 1900",
     "t/m³ typed as kg/m³ (soils 1.6-2.2 t/m³, from memory)"),
    ("density = 1900.0", "density = 18600.0", "support.density", "did you mean 1897",
     "unit weight 18.6 kN/m³ typed as density: 18600 / 9.80665 = 1897 kg/m³"),
    ("ratio_percent = 5", "ratio_percent = 0.05", "damping.ratio_percent", "did you mean 5 %",
     "a ratio typed for percent: 0.05 × 100 = 5 % (ASCE 7-16 §11.4)"),
    ("damping_percent = [2, 5]", "damping_percent = [0.02, 0.05]", "floor_spectra.damping_percent",
     "did you mean 2 %", "ratios typed for percent (arithmetic)"),
    ("mass = 18000.0", "mass = 0.08", "equipment[0].mass", "did you mean 80 kg",
     "an 80 kg pump typed in tonnes; 0.08 kg is no anchored equipment (common practice)"),
    ("size = [6.0, 4.0, 1.0]", "size = [6000.0, 4000.0, 1000.0]", "parts[0].size[0]",
     "did you mean 6 m", "a 6 m pad typed in mm: 6000 × 1e-3 = 6 m (arithmetic); no "
     "foundation block is kilometres long (common practice)"),
    ("cg_height = 1.2", "cg_height = 1200", "equipment[0].cg_height", "did you mean 1.2 m",
     "1.2 m typed in mm (arithmetic); no anchored equipment's CG is 1.2 km up"),
]


@pytest.mark.parametrize("old,new,key,hint,source", ERRORS, ids=[c[1] for c in ERRORS])
def test_impossible_values_are_errors_naming_key_line_and_slip(tmp_path, old, new, key, hint,
                                                               source):
    assert_slip_is_an_error(BASE, old, new, key, hint, tmp_path)


# (old, new, key in the warning, source)
WARNINGS = [
    ("youngs_modulus = 30e9", "youngs_modulus = 5e8", "materials.concrete.youngs_modulus",
     "below masonry and timber, a few GPa (from memory), above soils"),
    ("density = 2400", "density = 9000", "materials.concrete.density",
     "heavier than steel, 7850 kg/m³ (EN 1991-1-1 Table A.4)"),
    ("shear_wave_velocity = 250.0", "shear_wave_velocity = 40.0", "support.shear_wave_velocity",
     "softer than soft clay (ASCE 7-16 Table 20.3-1, class E < 180 m/s)"),
    ("mass = 18000.0", "mass = 18.0", "equipment[0].mass",
     "18 t typed as kg? possible for a small cabinet, so only a warning (common practice)"),
    ("ratio_percent = 5", "ratio_percent = 0.4", "damping.ratio_percent",
     "below the 0.5 % rarely undercut by real structures (common practice)"),
]


@pytest.mark.parametrize("old,new,key,source", WARNINGS, ids=[c[1] for c in WARNINGS])
def test_unusual_values_warn(tmp_path, old, new, key, source):
    assert_unusual_value_warns(BASE, old, new, key, tmp_path)


def test_unusual_mass_warning_offers_tonnes(tmp_path):
    text = BASE.replace("mass = 18000.0", "mass = 18.0", 1)
    with pytest.warns(GroundshakeWarning, match="did you mean 18000 kg"):   # 18 t = 18000 kg
        parse_case(text, tmp_path)


def test_zero_damping_is_allowed(tmp_path):
    # An undamped spectrum is a legitimate request (Chopra, Dynamics of Structures, §6.2).
    text = BASE.replace("damping_percent = [2, 5]", "damping_percent = [0, 5]", 1)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        s = parse_case(text, tmp_path)
    assert s.floor_spectra.damping_percent == (0.0, 5.0)


def test_every_range_is_ordered():
    # error bound < warning bound < warning bound < error bound, where given
    for name, r in RANGES.items():
        bounds = [b for b in (r.error_below, r.warn_below, r.warn_above, r.error_above)
                  if b is not None]
        assert bounds == sorted(bounds) and len(set(bounds)) == len(bounds), name


@pytest.mark.parametrize("quantity,value,level", [
    ("youngs_modulus", 30e9, "ok"),        # concrete (EN 1992-1-1 Table 3.1)
    ("youngs_modulus", 210e9, "ok"),       # steel (EN 1993-1-1 §3.2.6)
    ("youngs_modulus", 2e12, "warn"),      # stiffer than diamond (from memory): only a
                                           # deliberately rigid block, so a warning
    ("density", 7850.0, "ok"),             # steel (EN 1991-1-1 Table A.4)
    ("shear_wave_velocity", 1500.0, "ok"),  # rock, class B/A boundary (ASCE 7-16 Table 20.3-1)
    ("shear_wave_velocity", 250e3, "error"),  # mm/s typed as m/s
    ("sds", 1.0, "ok"), ("sd1", 0.6, "ok"), ("tl", 8.0, "ok"),  # ASCE 7-16 maps
    ("ag", 0.3, "ok"),                     # EN 1998-1 zones
    ("damping_percent", 5.0, "ok"), ("damping_percent", 0.0, "ok"),
    ("damping_percent", 0.05, "error"),    # 5 % typed as the ratio 0.05
])
def test_judge_levels(quantity, value, level):
    assert judge(quantity, value)[0] == level


# --- targets --------------------------------------------------------------------------------

def test_asce7_target_in_m_per_s2_is_an_error():
    from groundshake.spectra import parse_target

    with pytest.raises(InputError, match=r"sds = 9\.81 g .*did you mean 1 g"):  # 9.81 m/s² = 1 g
        parse_target("asce7:sds=9.81,sd1=0.6,tl=8")
    with pytest.warns(GroundshakeWarning, match=r"sds = 2\.8 g"):   # above mapped values, possible
        parse_target("asce7:sds=2.8,sd1=0.6,tl=8")
    with pytest.raises(InputError, match=r"tl = 8000 s"):            # ms typed for s
        parse_target("asce7:sds=1.0,sd1=0.6,tl=8000")


def test_en1998_ag_in_m_per_s2_is_an_error():
    from groundshake.spectra import parse_target

    # 2.94 m/s² = 0.2998 g (standard gravity)
    with pytest.raises(InputError, match=r"ag = 2\.94 g .*did you mean 0\.2998 g"):
        parse_target("en1998:type=1,ground=C,ag=2.94")


def test_target_table_in_m_per_s2_is_an_error(tmp_path):
    from groundshake.spectra import parse_target

    path = tmp_path / "target.csv"
    # A design shape of 1 g plateau written in m/s² (invented; 9.81 m/s² ≈ 1 g, ×2.5 plateau)
    path.write_text("period,psa\n0.1,24.5\n0.5,24.5\n2.0,6.1\n")
    with pytest.raises(InputError, match=r"target\.csv: largest PSA = 24\.5 g"):
        parse_target(str(path))


# --- command line ---------------------------------------------------------------------------

def _record(tmp_path: Path) -> Path:
    """An invented 2 Hz sine record, m/s² (test data only)."""
    dt = 0.01
    t = np.arange(0, 10, dt)
    lines = ["# invented test record", "# units: m/s2", f"# dt: {dt}", "time [s],acc [m/s2]"]
    lines += [f"{a:.2f},{b:.9g}" for a, b in zip(t, 0.5 * np.sin(2 * np.pi * 2.0 * t))]
    path = tmp_path / "sine.csv"
    path.write_text("\n".join(lines) + "\n")
    return path


@pytest.mark.parametrize("command", [
    ["spectrum", "{rec}", "--raw", "--damping", "0.05"],
    ["match", "{rec}", "--target", "asce7:sds=1.0,sd1=0.6,tl=8", "--damping", "0.05",
     "-o", "{out}"],
    ["spectrum", "{rec}", "--raw", "--target", "asce7:sds=9.81,sd1=0.6,tl=8"],
])
def test_cli_unit_slips_exit_2_with_one_line(tmp_path, capsys, command):
    from groundshake.cli import main

    rec = _record(tmp_path)
    argv = [a.format(rec=rec, out=tmp_path / "out.csv") for a in command]
    assert main(argv) == 2                                   # the CLI contract: bad input
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "did you mean" in err
    assert not (tmp_path / "out.csv").exists()


def test_modes_on_a_slipped_scenario_exits_2(tmp_path, capsys):
    from groundshake.cli import main

    path = tmp_path / "case.toml"
    path.write_text(BASE.replace("youngs_modulus = 30e9", "youngs_modulus = 30", 1))
    assert main(["modes", str(path)]) == 2                   # the CLI contract: bad input
    err = capsys.readouterr().err.strip()
    assert "materials.concrete.youngs_modulus = 30 Pa" in err and "30e9" in err



def test_scenario_target_slip_names_file_and_line(tmp_path):
    text = BASE + '\n[motion]\ntarget = "asce7:sds=9.81,sd1=0.6,tl=8"\n'
    # [motion] needs a component file that exists (invented test data; not read here)
    (tmp_path / "x.csv").write_text("# units: m/s2\n0,0\n0.01,0\n")
    text = text.replace("[motion]\n", '[motion]\nx = { file = "x.csv" }\n')
    msg = error_of(text, tmp_path)
    assert msg.startswith(f"case.toml:{line_of(text, 'target =')}: motion.target")
    assert "did you mean 1 g" in msg                     # 9.81 m/s² = 1 g (standard gravity)


def test_bolt_capacity_in_kn_typed_as_n_is_an_error(tmp_path):
    # anchor bolts carry tens of kN (an M10 bolt, from memory of EN 1992-4 / ACI 318-19
    # Ch. 17 examples); 20 N is 20 kN typed as N (arithmetic: 20 × 1e3)
    line = "capacity = { tension = 20, shear = 15 }"
    text = BASE.replace("cg_height = 1.2", "cg_height = 1.2\n" + line, 1)
    msg = error_of(text, tmp_path)
    assert msg.startswith(f"case.toml:{line_of(text, line)}: equipment[0].capacity.tension = 20 N")
    assert "did you mean 20000 N (kN typed as N)" in msg
    assert "\n" not in msg


@pytest.mark.parametrize("scale,warns", [(80.0, True), (-80.0, True), (0.05, True),
                                         (2.0, False), (-1.0, False)])
def test_record_scale_far_from_one_warns(tmp_path, scale, warns):
    # record selection keeps scale factors within about 0.25-4 (common practice; NIST GCR
    # 11-917-15, from memory); a factor beyond 10 (or below 0.1) is more likely a unit
    # conversion typed as a scale than a scaling meant, so it is named with file and line
    (tmp_path / "rec-x.csv").write_text("0.0\n")        # the loader checks existence only
    motion = f'[motion]\nx = {{ file = "rec-x.csv", units = "g", dt = 0.01, scale = {scale!r} }}\n'
    text = BASE.replace("[damping]", motion + "[damping]", 1)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        parse_case(text, tmp_path)
    mine = [str(w.message) for w in caught if "motion.x.scale" in str(w.message)]
    if warns:
        assert len(mine) == 1
        assert mine[0].startswith(f"case.toml:{line_of(text, 'scale =')}: motion.x.scale = ")
    else:
        assert mine == []
