"""Spectrum-compatible motions: adjust a recorded motion to a target spectrum.

Time-domain corrective wavelets (Lilhanand & Tseng 1988; Abrahamson 1992) with the
tapered-cosine wavelet of Al Atik & Abrahamson (2010), several damping values at
once, with convergence and acceptance reports.
"""
from ._acceptance import AcceptanceCriteria, acceptance_checks
from ._match import (MatchResult, default_band, match_record_to_target, match_spectrum,
                     match_spectrum_report, pad_seconds)
from ._measures import husid, motion_measures

__all__ = ["AcceptanceCriteria", "MatchResult", "acceptance_checks", "default_band", "husid",
           "match_record_to_target", "match_spectrum", "match_spectrum_report",
           "motion_measures", "pad_seconds"]
