"""Errors and warnings of groundshake.

One base error, :class:`GroundshakeError`; the specific errors also inherit the
builtin they stand for, so ``except ValueError`` keeps working for callers that
do not know this package.
"""
from __future__ import annotations

__all__ = [
    "GroundshakeError",
    "InputError",
    "RecordError",
    "ScenarioError",
    "ModelTooLargeError",
    "GroundshakeWarning",
]


class GroundshakeError(Exception):
    """Base class of every error groundshake raises on purpose."""


class InputError(GroundshakeError, ValueError):
    """Bad user input: the message names the file, line or key and what is allowed."""


class RecordError(InputError):
    """A record file that cannot be read or used."""


class ScenarioError(InputError):
    """A scenario file that does not validate."""


class ModelTooLargeError(GroundshakeError, MemoryError):
    """The model would not fit in memory; the message carries the estimate."""


class GroundshakeWarning(UserWarning):
    """Doubtful-but-legal input or a result outside a method's range of validity."""
