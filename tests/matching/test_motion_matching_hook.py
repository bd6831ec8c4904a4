"""The scenario hook: `[motion] match_target = true` matches each horizontal component
to the target before the run.

Checks: the matched horizontal motion's 5 % spectrum, computed by the independent
scipy first-order-hold reference (scipy.signal.cont2discrete(method="foh") + dlsim),
lies within the default tolerance band of the ASCE 7-16 §11.4.6 shape at periods
inside the matching band; the vertical is left as corrected (the target is a
horizontal spectrum — common practice); the report travels into the motion.
"""
from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pytest

from _blocks import concrete_block
from _oracles import psa_foh

from groundshake._errors import GroundshakeWarning
from groundshake.pipeline import build_motion
from groundshake.scenario import parse_scenario_text

ROOT = Path(__file__).resolve().parents[2]




def test_match_target_in_the_scenario(tmp_path):
    rec = (ROOT / "records" / "demo-h1.csv").as_posix()
    up = (ROOT / "records" / "demo-up.csv").as_posix()
    text = f"""title = "hook test (invented)"
[motion]
x = {{ file = "{rec}" }}
z = {{ file = "{up}" }}
target = "asce7:sds=0.8,sd1=0.4,tl=8"
match_target = true
""" + concrete_block()
    scen = parse_scenario_text(text, source=str(tmp_path / "s.toml"), base_dir=tmp_path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", GroundshakeWarning)
        motion = build_motion(scen)
    report = motion.matching["x"]
    assert "z" not in motion.matching and any("motion.z" in n for n in motion.notes)
    from groundshake.spectra import parse_target

    target = parse_target("asce7:sds=0.8,sd1=0.4,tl=8")
    for T in (0.1, 0.3, 1.0, 2.0):
        psa = psa_foh(motion.acc[0], motion.dt, T, 0.05)
        want = float(target.psa(np.array([T]))[0])
        # the match's own tolerance plus room for the coarser check grid (common practice:
        # a matched record is within about 10 % of the target across the band)
        assert psa == pytest.approx(want, rel=0.10), (T, psa, want, report.get("status"))
