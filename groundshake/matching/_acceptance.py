"""Acceptance checks of a matched motion, with user-set criteria.

The default limits are values commonly used in practice; each says where it comes
from. They are screening aids: whether a motion is acceptable for a given use is
decided under the governing standard, not by this module.
"""
from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np

from .._errors import InputError
from ._measures import husid, motion_measures

__all__ = ["AcceptanceCriteria", "acceptance_checks"]


@dataclass(frozen=True)
class AcceptanceCriteria:
    """Limits for the acceptance checks (ratios, not percent).

    Attributes
    ----------
    max_shortfall : float
        Largest allowed shortfall below the target at any period, as a fraction of the
        target. Default 0.10: USNRC SRP 3.7.1 (Rev. 4) spectral-matching criterion
        "not more than 10 % below the target at any one frequency" (from memory).
    max_excess : float
        Largest allowed excess above the target, as a fraction. Default 0.30: the same
        SRP 3.7.1 criterion "not more than 30 % above the target" (from memory).
    max_adjacent_below : int
        Most adjacent periods allowed below the target. Default 9: SRP 3.7.1, which
        counts on a grid of 100 points per frequency decade (from memory).
    max_husid_change : float
        Largest allowed max |ΔH(t)| between the normalised Husid curves before and
        after. Default 0.15: our own choice (no published limit known to us); the
        method is meant to keep the record's build-up of energy, and matches of
        synthetic and recorded motions to code shapes here moved it by 0.05-0.13.
    max_final_velocity_ratio : float
        |final velocity| / PGV allowed before a last baseline correction is applied.
        Default 0.01 (common practice: velocity "near zero" at the end; our number).
    max_final_displacement_ratio : float
        |final displacement| / PGD allowed before the baseline correction. Default
        0.05 (common practice; our number).
    """

    max_shortfall: float = 0.10
    max_excess: float = 0.30
    max_adjacent_below: int = 9
    max_husid_change: float = 0.15
    max_final_velocity_ratio: float = 0.01
    max_final_displacement_ratio: float = 0.05

    def __post_init__(self) -> None:
        for name, value in asdict(self).items():
            if not (np.isfinite(value) and value >= 0):
                raise InputError(f"acceptance criteria: {name}={value!r}; allowed: a number >= 0")

    def to_dict(self) -> dict:
        return asdict(self)


def _longest_run(mask: np.ndarray) -> int:
    """Longest run of True along the last axis (vectorized), max over leading axes."""
    m = np.asarray(mask, dtype=bool).reshape(-1, np.shape(mask)[-1])
    if m.size == 0:
        return 0
    padded = np.pad(m.astype(np.int8), ((0, 0), (1, 1)))
    d = np.diff(padded, axis=1)
    starts = np.nonzero(d == 1)
    ends = np.nonzero(d == -1)
    if starts[0].size == 0:
        return 0
    return int(np.max(ends[1] - starts[1]))


def acceptance_checks(*, psa: np.ndarray, target_psa: np.ndarray, acc_before: np.ndarray,
                      acc_after: np.ndarray, dt: float,
                      criteria: AcceptanceCriteria | None = None) -> dict:
    """Acceptance figures and pass/fail flags of a matched motion.

    Parameters
    ----------
    psa, target_psa : ndarray, shape (n_damping, n_periods)
        Pseudo-spectral acceleration of the matched motion and the target [m/s²], on
        the periods of the band.
    acc_before, acc_after : ndarray, shape (n,)
        Acceleration before and after matching on the same time grid [m/s²].
    dt : float
        Time step [s].
    criteria : AcceptanceCriteria, optional
        Limits; the defaults are documented on :class:`AcceptanceCriteria`.

    Returns
    -------
    dict
        ``largest_shortfall``, ``largest_excess`` (fractions of the target),
        ``points_below`` (count), ``longest_run_below``, ``husid_max_change``,
        ``measures`` {"before", "after"} (see ``motion_measures``), ``checks`` {name:
        bool}, ``passed`` (all checks), ``criteria``.
    """
    criteria = criteria or AcceptanceCriteria()
    ratio = np.asarray(psa, dtype=float) / np.asarray(target_psa, dtype=float)
    shortfall = float(max(0.0, np.max(1.0 - ratio)))
    excess = float(max(0.0, np.max(ratio - 1.0)))
    below = ratio < 1.0
    run = _longest_run(below)
    h_before = husid(acc_before, dt)
    h_after = husid(acc_after, dt)
    dh = float(np.max(np.abs(h_after - h_before)))
    before = motion_measures(acc_before, dt)
    after = motion_measures(acc_after, dt)
    checks = {
        "shortfall": shortfall <= criteria.max_shortfall,
        "excess": excess <= criteria.max_excess,
        "adjacent_below": run <= criteria.max_adjacent_below,
        "husid_change": dh <= criteria.max_husid_change,
    }
    return {
        "largest_shortfall": shortfall,
        "largest_excess": excess,
        "points_below": int(np.count_nonzero(below)),
        "points_total": int(below.size),
        "longest_run_below": run,
        "husid_max_change": dh,
        "measures": {"before": before, "after": after},
        "checks": checks,
        "passed": all(checks.values()),
        "criteria": criteria.to_dict(),
    }
