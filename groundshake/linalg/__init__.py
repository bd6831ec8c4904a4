"""Sparse linear algebra under the model and its dynamics: factorizations reused for many
solves, solves with a mass matrix, and the memory estimate checked before a model is built.

Public names: :func:`factorize` (PARDISO where it loads, else scipy's SuperLU),
:class:`Factor`, :func:`pardiso_available`, :func:`mass_solve`, :func:`estimate_memory`,
:func:`available_memory`, :func:`check_memory`.
"""
from ._factor import Factor, factorize, pardiso_available
from ._mass import mass_solve
from ._memory import available_memory, check_memory, estimate_memory

__all__ = ["Factor", "factorize", "pardiso_available", "mass_solve", "estimate_memory",
           "available_memory", "check_memory"]
