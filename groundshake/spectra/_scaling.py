"""Amplitude scaling of a set of records to a target spectrum, and the averaging rule.

The rules below are written from memory of the standards (verify against the edition
that governs before relying on them); each is a period band relative to the structure's
fundamental period T and the share of the target that the set's mean spectrum must
reach everywhere in that band:

- ``"asce7-16"``: 0.2 T to 2.0 T, mean ≥ 90 % of the target (ASCE 7-16 §16.2.3, for
  maximum-direction spectra of the horizontal pairs; from memory);
- ``"asce7-10"``: 0.2 T to 1.5 T, mean ≥ 100 % of the target (ASCE 7-10 §16.1.3; from
  memory);
- ``"en1998"``: 0.2 T1 to 2 T1, mean ≥ 90 % of the elastic spectrum (EN 1998-1:2004
  §3.2.3.1.2(4); from memory).

Results of the set: the mean where at least 7 records are used, else the maximum
(EN 1998-1 §4.3.3.4.3; ASCE 7-10 §16.1.4; from memory).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Literal

import numpy as np

from .._errors import InputError

__all__ = ["SCALING_RULES", "ScaleFactors", "scale_to_target", "set_statistic"]

#: (band start × T, band end × T, share of the target the mean must reach, source)
SCALING_RULES = {
    "asce7-16": (0.2, 2.0, 0.9, "ASCE 7-16 §16.2.3 (from memory)"),
    "asce7-10": (0.2, 1.5, 1.0, "ASCE 7-10 §16.1.3 (from memory)"),
    "en1998": (0.2, 2.0, 0.9, "EN 1998-1:2004 §3.2.3.1.2(4) (from memory)"),
}


@dataclass(frozen=True, eq=False)
class ScaleFactors:
    """Scale factors of a record set.

    Attributes
    ----------
    factors : ndarray (n_records,)
        The factor of each record (its own factor times the set factor).
    own : ndarray (n_records,)
        Each record's own factor (1 for ``mode="set"``).
    set_factor : float
        The common factor that brings the mean spectrum to the rule's share of the target.
    band : (float, float)
        Periods [s] checked.
    share : float
        Share of the target the mean must reach.
    rule : str
    source : str
    least_ratio : float
        min over the band of mean scaled PSA / target (≥ ``share`` up to round-off).
    warnings : list of str
        Factors outside ``limits``.
    """

    factors: np.ndarray
    own: np.ndarray
    set_factor: float
    band: tuple[float, float]
    share: float
    rule: str
    source: str
    least_ratio: float
    warnings: list = field(default_factory=list)

    def to_dict(self) -> dict:
        return {"factors": [float(v) for v in self.factors], "own": [float(v) for v in self.own],
                "set_factor": self.set_factor, "band": list(self.band), "share": self.share,
                "rule": self.rule, "source": self.source, "least_ratio": self.least_ratio,
                "warnings": list(self.warnings)}


def scale_to_target(psa: np.ndarray, periods: np.ndarray, target_psa: np.ndarray, *,
                    period: float, rule: Literal["asce7-16", "asce7-10", "en1998"] = "asce7-16",
                    mode: Literal["set", "each"] = "each",
                    limits: tuple[float, float] = (0.25, 4.0)) -> ScaleFactors:
    """Amplitude factors that bring a record set's mean spectrum up to a target.

    Parameters
    ----------
    psa : ndarray (n_records, n_periods)
        Each record's spectrum [m/s²] (for a horizontal pair, the combined spectrum the
        rule asks for, e.g. the maximum direction or SRSS), at ``periods``.
    periods : ndarray (n_periods,)
        [s], increasing.
    target_psa : ndarray (n_periods,)
        The target [m/s²] at ``periods``.
    period : float
        Fundamental period T of the structure [s] (sets the band).
    rule : {"asce7-16", "asce7-10", "en1998"}
        See :data:`SCALING_RULES`.
    mode : {"set", "each"}
        ``"set"``: one common factor for all records. ``"each"``: each record first gets
        its own factor, the exponential of the mean log ratio target/record over the
        band (a least-squares fit in log spectral acceleration, common practice), then
        the common factor on top.
    limits : (float, float)
        Factors outside this range are reported in ``warnings`` (0.25–4, common practice).

    Returns
    -------
    ScaleFactors
        ``set_factor`` = max over the band of share·target / mean(own·psa): the least
        common factor for which the mean of the scaled spectra reaches the share of the
        target at every period of the band.

    Raises
    ------
    InputError
        Unknown rule or mode, a band with no periods, or spectra that are zero in it.
    """
    if rule not in SCALING_RULES:
        raise InputError(f"given {rule!r}; allowed "
                         + ", ".join(repr(r) for r in SCALING_RULES), param="rule", value=rule)
    if mode not in ("set", "each"):
        raise InputError(f"given {mode!r}; allowed 'set', 'each'", param="mode", value=mode)
    if not (math.isfinite(period) and period > 0):
        raise InputError(f"given {period!r}; allowed a number > 0 [s]", param="period",
                         value=period)
    a, b, share, source = SCALING_RULES[rule]
    band = (a * period, b * period)
    T = np.asarray(periods, dtype=float)
    S = np.atleast_2d(np.asarray(psa, dtype=float))
    tgt = np.asarray(target_psa, dtype=float)
    sel = (T >= band[0] * (1 - 1e-12)) & (T <= band[1] * (1 + 1e-12))
    if not np.any(sel):
        raise InputError(f"scaling: no period between {band[0]:.3g} and {band[1]:.3g} s "
                         f"({rule}: {a:g}T to {b:g}T for T = {period:g} s); give periods "
                         "that cover the band", param="periods")
    Sb, tb = S[:, sel], tgt[sel]
    if np.any(~(Sb > 0)) or np.any(~(tb > 0)):
        raise InputError("scaling: spectra and target must be > 0 over the band")
    own = (np.exp(np.mean(np.log(tb[None, :] / Sb), axis=1)) if mode == "each"
           else np.ones(S.shape[0]))
    mean = np.mean(own[:, None] * Sb, axis=0)
    f = float(np.max(share * tb / mean))
    factors = own * f
    least = float(np.min(f * mean / tb))
    warns = [f"record {i + 1}: scale factor {v:.3g} outside {limits[0]:g}–{limits[1]:g}"
             for i, v in enumerate(factors) if not limits[0] <= v <= limits[1]]
    return ScaleFactors(factors=factors, own=own, set_factor=f, band=band, share=share,
                        rule=rule, source=source, least_ratio=least, warnings=warns)


def set_statistic(n_records: int) -> tuple[str, str]:
    """How a set's results are taken: ``("mean", why)`` for 7 or more records, else
    ``("max", why)`` (EN 1998-1 §4.3.3.4.3; ASCE 7-10 §16.1.4; from memory)."""
    if n_records >= 7:
        return "mean", "7 or more records: the mean of the results (EN 1998-1 §4.3.3.4.3; " \
                       "ASCE 7-10 §16.1.4; from memory)"
    return "max", "fewer than 7 records: the largest of the results (EN 1998-1 §4.3.3.4.3; " \
                  "ASCE 7-10 §16.1.4; from memory)"
