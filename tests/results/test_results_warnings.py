"""Automatic warnings of a run.

Sources (rules of thumb of the trade): elements no larger than about 1/10 of the
shear wavelength (Kuhlemeyer & Lysmer 1973, "1/8 to 1/10 of the wavelength", from
memory) at the highest frequency both modelled and carried by the record; a sampled
record carries nothing above its Nyquist frequency 1/(2·dt) (sampling theorem); 90 % of the mass in the retained modes
(ASCE 7-16 §12.9.1.1, docs/references.md §6); a linear soil-spring model needs the base to
stay in compression (common practice). Records are invented test signals.
"""
from __future__ import annotations

import math
import warnings

import numpy as np
import pytest

from groundshake._errors import GroundshakeWarning
from groundshake.dynamics import motion_from_arrays
from groundshake.pipeline import analyse
from groundshake.scenario import Scenario

from _tables import one_box


def soft_soil_block(**analysis) -> Scenario:
    return Scenario.from_dict(one_box(
        "warnings test (invented)",
        "soft", {"youngs_modulus": 2.0e8, "poisson_ratio": 0.25, "density": 2000.0},
        "b", (2.0, 2.0, 2.0),
        {"kind": "soil", "shear_wave_velocity": 60.0, "poisson_ratio": 0.3, "density": 1800.0},
        sensors=[{"name": "top", "at": [1.0, 1.0, 2.0]}],
        analysis={"cutoff_hz": 60.0, **analysis},
        floor_spectra={"damping_percent": [5], "periods": {"min": 0.05, "max": 1.0, "count": 8}},
    ))


@pytest.fixture(scope="module")
def warned():
    dt = 0.01
    t = np.arange(60) * dt                          # 0.6 s: short, ending on its peak
    ax = 25.0 * (t / t[-1]) ** 2                    # ramps up to the last sample
    with pytest.warns(GroundshakeWarning):
        res = analyse(soft_soil_block(modes=1), motion=motion_from_arrays({"x": ax}, dt),
                      progress=False)
    return res


def test_short_record_and_end_peak(warned):
    w = " | ".join(warned.summary["warnings"])
    T1 = warned.summary["modes"]["modes"][0]["period"]
    assert 0.6 < 10 * T1                             # precondition of the rule below
    assert "shorter than 10 periods of the lowest mode" in w
    assert "peak occurs at the end of the record" in w


def test_coarse_elements():
    dt = 0.005
    t = np.arange(600) * dt
    ax = 2.0 * np.sin(2 * np.pi * 2.0 * t) * np.sin(np.pi * t / t[-1]) ** 2
    with pytest.warns(GroundshakeWarning):
        res = analyse(soft_soil_block(), motion=motion_from_arrays({"x": ax}, dt), progress=False)
    w = " | ".join(res.summary["warnings"])
    vs = math.sqrt(2.0e8 / (2 * 1.25) / 2000.0)     # block shear-wave velocity, 200 m/s
    f_hi = res.summary["modes"]["modes"][-1]["frequency"]
    f_use = min(f_hi, 0.5 / dt)                      # modelled and carried by the record
    assert 0.5 > vs / (10 * f_use)                   # precondition: 0.5-m elements too coarse
    assert "10 elements per wavelength" in w         # ~10 elements per wavelength (rule of thumb)
    # the record's Nyquist frequency is above every mode: nothing lies outside its band
    assert "above the motion's usable band" not in w


def test_modes_above_the_record_band():
    dt = 0.05                                        # Nyquist 10 Hz
    t = np.arange(200) * dt
    ax = 2.0 * np.sin(2 * np.pi * 1.0 * t) * np.sin(np.pi * t / t[-1]) ** 2
    with pytest.warns(GroundshakeWarning):
        res = analyse(soft_soil_block(), motion=motion_from_arrays({"x": ax}, dt), progress=False)
    w = " | ".join(res.summary["warnings"])
    modes = res.summary["modes"]["modes"]
    # precondition: a mode holding ≥ 5 % of the x mass above the Nyquist frequency 1/(2 dt)
    # (sampling theorem: the record carries nothing there) yet below 33 Hz, where design
    # practice still counts on dynamic response (USNRC RG 1.60 zero-period end, from memory)
    assert any(0.5 / dt < m["frequency"] <= 33.0 and m["effective_mass_ratio"]["x"] >= 0.05
               for m in modes)
    assert "above the motion's usable band" in w
    # elements keyed to the band (10 Hz): 0.5 m < 200 m/s / (10 × 10 Hz), rule of thumb
    assert "elements per wavelength" not in w


def test_low_retained_mass_and_uplift(warned):
    w = " | ".join(warned.summary["warnings"])
    assert warned.summary["analysis"]["retained_mass_ratio"]["x"] < 0.9   # one mode kept
    assert "Retained modal mass below 90 %" in w                           # ASCE 7-16 §12.9.1.1
    c = warned.summary["base"]["contact"]
    # 25 m/s² sideways on a 2 m cube: overturning far beyond the weight's kern (common practice)
    assert c["uplift"] and c["min_pressure"] < 0
    assert "uplift" in w.lower()


def test_quiet_run_has_no_spurious_warnings():
    dt = 0.005
    t = np.arange(2000) * dt
    ax = 0.5 * np.sin(2 * np.pi * 1.0 * t) * np.sin(np.pi * t / t[-1]) ** 2
    scen = Scenario.from_dict({
        "materials": {"c": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "b", "material": "c", "origin": [0, 0, 0], "size": [2.0, 2.0, 1.0]}],
        "mesh": {"element_size": 0.25}, "support": {"kind": "fixed"},
        "analysis": {"cutoff_hz": 600.0}})
    res = analyse(scen, motion=motion_from_arrays({"x": ax}, dt), progress=False)
    w = " | ".join(res.summary["warnings"])
    # a stiff block, a gentle 10-s motion and a fine mesh: none of the rules apply
    assert "uplift" not in w.lower() and "end of the record" not in w
    assert "elements per wavelength" not in w


def test_high_pass_above_the_block_and_the_spectra(scenario_file):
    # the acausal low-cut removes the motion below its corner; spectra are usable to about
    # 1/(1.25 f_c) (Boore & Bommer 2005; Akkar & Bommer 2006, from memory). A slender
    # block on soil and the demo records (processed from their files) with a 4 Hz high-pass
    from groundshake.scenario import load_scenario

    path = scenario_file("[processing]\nhighpass_hz = 4.0\n"
                         "[floor_spectra]\ndamping_percent = [5]\n"
                         "[floor_spectra.periods]\nmin = 0.05\nmax = 2.0\ncount = 6\n"
                         "[analysis]\nmodes = 3\n", size=(1.0, 1.0, 6.0), element_size=0.5,
                         support="soil")
    with pytest.warns(GroundshakeWarning):
        res = analyse(load_scenario(path), progress=False)
    w = " | ".join(res.summary["warnings"])
    f1 = res.summary["modes"]["modes"][0]["frequency"]
    assert f1 < 1.25 * 4.0                           # precondition: the rocking mode is below
    assert "below 1.25 × the high-pass corner (4 Hz)" in w
    assert f"usable only to about {1 / (1.25 * 4.0):.3g} s" in w
    # the same block with the default 0.1 Hz corner: neither warning
    quiet = scenario_file("[floor_spectra]\ndamping_percent = [5]\n"
                          "[analysis]\nmodes = 3\n", size=(1.0, 1.0, 6.0), element_size=0.5,
                          support="soil")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        res = analyse(load_scenario(quiet), progress=False)
    w = " | ".join(res.summary["warnings"])
    assert "high-pass corner" not in w
