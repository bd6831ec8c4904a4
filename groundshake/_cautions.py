"""The engineering cautions carried by every summary and report."""
from __future__ import annotations

__all__ = ["CAUTIONS", "SCREENING_NOTE"]

#: Printed in every summary.json, report and terminal summary.
CAUTIONS: tuple[str, ...] = (
    "Linear-elastic model: no sliding, uplift, cracking, bolt yielding or soil nonlinearity "
    "is represented; where the results suggest any of these, the linear answer no longer holds.",
    "Screening, not design: these results support a decision on whether closer study is "
    "needed; they are not a design and not a code check.",
    "Results depend on the input record and on how it was processed (baseline, filters, "
    "scaling); a different record or processing choice can change them materially.",
    "Verify against the governing codes (local building code and the applicable equipment "
    "qualification standard) and have a licensed engineer review before any use in design.",
    "Capacities entered by the user are compared with demands as given; the comparison is "
    "not a capacity check under any code.",
)

SCREENING_NOTE = "For screening only — not a design or a code check."
