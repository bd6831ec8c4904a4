"""Model and modes as plain data (dicts, lists, numbers, numpy arrays) for workers.

A suite's workers receive only arrays and plain data. Our own data classes are
taken apart field by field (``{"__class__": "groundshake.model....", ...}``) and
put together again on the worker, for classes inside the ``groundshake`` package
only; sparse matrices travel as their CSR arrays. A model's factorization is kept
beside it, not in a field, so it does not travel: each worker makes its own once, if
it needs one.
"""
from __future__ import annotations

import dataclasses
import importlib
import os
from typing import Any

import numpy as np
import scipy.sparse as sp

__all__ = ["to_plain", "from_plain"]

def to_plain(obj: Any) -> Any:
    """Plain-data form of ``obj`` (see the module notes)."""
    if isinstance(obj, np.ndarray) or obj is None or isinstance(obj, (bool, int, float, str)):
        return obj
    if isinstance(obj, (np.generic,)):
        return obj.item()
    if sp.issparse(obj):
        m = sp.csr_matrix(obj)
        return {"__sparse__": "csr", "data": m.data, "indices": m.indices, "indptr": m.indptr,
                "shape": list(m.shape)}
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        cls = type(obj)
        if not cls.__module__.startswith("groundshake."):
            raise TypeError(f"{cls.__qualname__}: not a groundshake data class")
        fields = {f.name: to_plain(getattr(obj, f.name)) for f in dataclasses.fields(obj)}
        return {"__class__": f"{cls.__module__}:{cls.__qualname__}", "fields": fields}
    if isinstance(obj, dict):
        return {"__dict__": [[to_plain(k), to_plain(v)] for k, v in obj.items()]}
    if isinstance(obj, tuple):
        return {"__tuple__": [to_plain(v) for v in obj]}
    if isinstance(obj, list):
        return [to_plain(v) for v in obj]
    if isinstance(obj, os.PathLike):
        return str(obj)
    raise TypeError(f"{type(obj).__qualname__}: cannot be sent to a worker as plain data")


def from_plain(data: Any) -> Any:
    """Inverse of :func:`to_plain`; only builds classes of the groundshake package."""
    if isinstance(data, list):
        return [from_plain(v) for v in data]
    if not isinstance(data, dict):
        return data
    if "__sparse__" in data:
        return sp.csr_matrix((data["data"], data["indices"], data["indptr"]),
                             shape=tuple(data["shape"]))
    if "__tuple__" in data:
        return tuple(from_plain(v) for v in data["__tuple__"])
    if "__dict__" in data:
        return {from_plain(k): from_plain(v) for k, v in data["__dict__"]}
    if "__class__" in data:
        module, _, qual = data["__class__"].partition(":")
        if not module.startswith("groundshake.") or "." in qual:
            raise TypeError(f"{data['__class__']}: not a groundshake data class")
        cls = getattr(importlib.import_module(module), qual)
        if not dataclasses.is_dataclass(cls):
            raise TypeError(f"{data['__class__']}: not a data class")
        kwargs = {k: from_plain(v) for k, v in data["fields"].items()}
        init = {f.name for f in dataclasses.fields(cls) if f.init}
        obj = cls(**{k: v for k, v in kwargs.items() if k in init})
        for k, v in kwargs.items():
            if k not in init:
                object.__setattr__(obj, k, v)
        return obj
    return {k: from_plain(v) for k, v in data.items()}
