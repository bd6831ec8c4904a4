"""Target spectra and suite statistics.

Sources:
- ASCE 7-16 §11.4.6 design spectrum; check values in docs/references.md §5 [C]
  (SDS = 1.0, SD1 = 0.6, TL = 8: 0.40, 0.70, 1.00, 0.50, 0.048 g).
- EN 1998-1:2004 §3.2.2.2, Tables 3.2/3.3 and η = √(10/(5+ξ)) ≥ 0.55; check values in
  docs/references.md §5 [C] (type 1, ground C, ag = 0.3 g: 0.345, 0.60375, 0.8625, 0.43125,
  0.115 g).
- Log-normal distribution (common practice; e.g. Benjamin & Cornell 1970): median =
  exp(mean ln), 16th/84th percentiles = exp(μ ∓ σ) since Φ(±1) = 0.8413/0.1587.
"""
import math
import warnings

import numpy as np
import pytest

from groundshake import GroundshakeWarning, InputError
from groundshake.spectra import parse_target, response_spectrum, spectrum_statistics, target_ratio

G = 9.80665


def test_asce7_check_values():
    t = parse_target("asce7:sds=1.0,sd1=0.6,tl=8")
    got = t.psa([0.0, 0.06, 0.3, 1.2, 10.0]) / G
    # ASCE 7-16 §11.4.6, docs/references.md §5 [C]
    np.testing.assert_allclose(got, [0.40, 0.70, 1.00, 0.50, 0.048], rtol=1e-12)
    # ASCE 7-16 §11.4.6: continuous at T0 = 0.12, Ts = 0.6 and TL = 8 s
    for tt in (0.12, 0.6, 8.0):
        lo, hi = t.psa([tt * (1 - 1e-9), tt * (1 + 1e-9)])
        assert lo == pytest.approx(hi, rel=1e-6)
    assert t.damping == 0.05                         # ASCE 7-16 §11.4.6 is for 5 %


def test_en1998_check_values():
    t = parse_target("en1998:type=1,ground=C,ag=0.3")
    got = t.psa([0.0, 0.1, 0.4, 1.2, 3.0]) / G
    # EN 1998-1 §3.2.2.2, docs/references.md §5 [C]
    np.testing.assert_allclose(got, [0.345, 0.60375, 0.8625, 0.43125, 0.115], rtol=1e-12)


def test_en1998_damping_correction_and_type_2():
    t10 = parse_target("en1998:type=2,ground=D,ag=0.2,damping=10")
    eta = math.sqrt(10 / 15)                          # EN 1998-1 eq. 3.6
    # EN 1998-1 Table 3.3, type 2 ground D: S = 1.8, plateau 2.5·ag·S·η from 0.1 to 0.3 s
    assert t10.psa(0.2) / G == pytest.approx(2.5 * 0.2 * 1.8 * eta, rel=1e-12)
    assert t10.damping == pytest.approx(0.10)
    t50 = parse_target("en1998:type=2,ground=D,ag=0.2,damping=50")
    # EN 1998-1 eq. 3.6: η is not taken below 0.55
    assert t50.psa(0.2) / G == pytest.approx(2.5 * 0.2 * 1.8 * 0.55, rel=1e-12)
    with pytest.warns(GroundshakeWarning, match="4 s"):
        t10.psa([5.0])                                # EN 1998-1 defines it to 4 s


def test_table_target(tmp_path):
    f = tmp_path / "target.csv"
    f.write_text("period_s,psa_g\n# invented demo table\n0.0,0.4\n0.1,1.0\n1.0,0.5\n4.0,0.1\n")
    t = parse_target("target.csv", base_dir=tmp_path)
    # DESIGN.md contract: two columns period [s], PSA [g]; rows themselves are exact
    np.testing.assert_allclose(t.psa([0.1, 1.0, 4.0]) / G, [1.0, 0.5, 0.1], rtol=1e-12)
    # log-log interpolation (common practice for spectra): midpoint in log T is the
    # geometric mean of the neighbours
    assert t.psa(math.sqrt(0.1 * 1.0)) / G == pytest.approx(math.sqrt(1.0 * 0.5), rel=1e-12)
    assert t.psa(0.05) / G == pytest.approx(0.7, rel=1e-12)   # linear from the T = 0 row
    assert np.isnan(t.psa(5.0))                               # undefined outside the table


def test_ratio_to_target():
    dt = 0.01
    acc = np.sin(2 * np.pi * np.arange(0, 10, dt))
    s = response_spectrum(acc, dt, [0.2, 0.5, 1.0], [0.05])
    t = parse_target("asce7:sds=1.0,sd1=0.6,tl=8")
    r = target_ratio(s, t)
    # definition of a ratio to target: computed PSA / target PSA
    np.testing.assert_allclose(r, s.psa / (t.psa(s.periods)), rtol=1e-14)
    assert r.shape == (1, 3)


@pytest.mark.parametrize("spec, match", [
    ("asce7:sds=1.0,sd1=0.6", "missing tl"),
    ("asce7:sds=1.0,sd1=0.6,tl=8,r=3", "unknown key 'r'"),
    ("asce7:sds=-1,sd1=0.6,tl=8", "sds"),
    ("asce7:sds=x,sd1=0.6,tl=8", "not a number"),
    ("en1998:type=3,ground=C,ag=0.3", "type"),
    ("en1998:type=1,ground=F,ag=0.3", "ground"),
    ("en1998:type=1,ground=C", "missing ag"),
    ("nz1170:z=0.4", "unknown form"),
    ("no-such-file.csv", "no such file"),
    ("", "target"),
])
def test_bad_targets(spec, match):
    with pytest.raises(InputError, match=match):
        parse_target(spec)


def test_bad_table(tmp_path):
    f = tmp_path / "t.csv"
    f.write_text("0.1,1.0\n0.5,abc\n")
    with pytest.raises(InputError, match=r"t.csv:2"):
        parse_target(str(f))
    f.write_text("0.1,1.0\n")
    with pytest.raises(InputError, match="at least two rows"):
        parse_target(str(f))


def test_statistics_on_constructed_lognormal_data():
    mu, sigma = np.log([0.5, 2.0]), np.array([0.3, 0.6])
    z = np.array([-1.0, 0.0, 1.0])[:, None]
    values = np.exp(mu + sigma * z)                  # sample mean of z 0, sample std 1
    st = spectrum_statistics(values, axis=0)
    # log-normal (common practice): median = exp(μ), p16/p84 = exp(μ ∓ σ)
    np.testing.assert_allclose(st["median"], np.exp(mu), rtol=1e-12)
    np.testing.assert_allclose(st["std_ln"], sigma, rtol=1e-12)
    np.testing.assert_allclose(st["p16"], np.exp(mu - sigma), rtol=1e-12)
    np.testing.assert_allclose(st["p84"], np.exp(mu + sigma), rtol=1e-12)
    # arithmetic mean of a log-normal sample and the envelope, by definition
    np.testing.assert_allclose(st["mean"], values.mean(axis=0), rtol=1e-12)
    np.testing.assert_allclose(st["max"], np.exp(mu + sigma), rtol=1e-12)
    np.testing.assert_allclose(st["min"], np.exp(mu - sigma), rtol=1e-12)
    assert np.all(st["count"] == 3)


def test_statistics_axis_and_nonpositive_values():
    v = np.array([[1.0, 4.0], [4.0, 0.0]])
    with pytest.warns(GroundshakeWarning, match="<= 0"):
        st = spectrum_statistics(v, axis=1)
    assert st["median"][0] == pytest.approx(2.0)     # geometric mean of 1 and 4
    assert np.isnan(st["median"][1]) and st["max"][1] == 4.0
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        one = spectrum_statistics(np.array([[2.0, 3.0]]))
    assert np.all(one["p16"] == one["median"])       # one record: no dispersion
    with pytest.raises(InputError):
        spectrum_statistics(np.array([]))
