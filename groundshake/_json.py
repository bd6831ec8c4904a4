"""JSON for every machine output (summary.json, suite.json, ``--json``): numpy values and
dataclass-likes made plain, non-finite numbers as null (JSON has no NaN; RFC 8259 §6)."""
from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

__all__ = ["to_jsonable", "json_dumps"]


def to_jsonable(obj: Any) -> Any:
    """Convert numpy scalars/arrays, tuples and dataclass-likes to JSON types.

    Non-finite floats become ``None`` (JSON has no NaN).
    """
    if isinstance(obj, dict):
        return {str(k): to_jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [to_jsonable(v) for v in obj]
    if isinstance(obj, np.ndarray):
        return to_jsonable(obj.tolist())
    if isinstance(obj, (np.bool_, bool)):
        return bool(obj)
    if isinstance(obj, (np.integer,)):
        return int(obj)
    if isinstance(obj, (float, np.floating)):
        f = float(obj)
        return f if math.isfinite(f) else None
    if hasattr(obj, "to_dict"):
        return to_jsonable(obj.to_dict())
    return obj


def json_dumps(obj: Any, *, indent: int | None = 2) -> str:
    """Deterministic JSON text (sorted keys off: insertion order is the schema order)."""
    return json.dumps(to_jsonable(obj), indent=indent, allow_nan=False, ensure_ascii=False)
