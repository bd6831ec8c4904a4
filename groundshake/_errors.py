"""Errors and warnings of groundshake.

One base error, :class:`GroundshakeError`; the specific errors also inherit the
builtin they stand for, so ``except ValueError`` keeps working for callers that
do not know this package.

An error of bad input carries a neutral message and the library parameter it is
about (``param="highpass_hz"``, optionally ``value=``). The caller that knows where
the value came from puts the location in front with :meth:`GroundshakeError.located`:
the scenario loader gives the file, line and key (``"case.toml:12:
processing.highpass_hz"``), the command line the option (``"--highpass"``). Without a
location the message starts with the parameter's own name, as a Python caller wrote
it. ``str(error)`` is always the one final line.
"""
from __future__ import annotations

import copy
from typing import Any

__all__ = [
    "GroundshakeError",
    "InputError",
    "RecordError",
    "ScenarioError",
    "ScenarioRecordError",
    "ModelTooLargeError",
    "GroundshakeWarning",
]


class GroundshakeError(Exception):
    """Base class of every error groundshake raises on purpose.

    Parameters
    ----------
    message : str
        What is wrong and what is allowed, without the location
        (``"given 80; allowed a number < 50 [Hz]"``).
    param : str, optional
        The library parameter the message is about (``"highpass_hz"``); callers map it
        to a scenario key or a command-line option.
    value : object, optional
        The value given, for callers that want to show it their own way.
    where : str, optional
        The location put in front of the message (default: ``param``).
    sep : str
        What joins the location and the message (``": "``; ``" = "`` for messages that
        start with the value, as the plausibility checks' ``"2.4 kg/m³ is below ..."``).

    Attributes
    ----------
    message, param, value, where, sep
        As given; :meth:`located` returns a copy with another ``where``.
    """

    def __init__(self, message: str = "", *, param: str | None = None, value: Any = None,
                 where: str | None = None, sep: str = ": ") -> None:
        super().__init__(message)
        self.message = str(message)
        self.param = param
        self.value = value
        self.where = where
        self.sep = sep

    @property
    def location(self) -> str | None:
        """What is shown in front of the message: ``where``, else ``param``, else None."""
        return self.where if self.where is not None else self.param

    def __str__(self) -> str:
        where = self.location
        return f"{where}{self.sep}{self.message}" if where else self.message

    def located(self, where: str, *, cls: type[GroundshakeError] | None = None,
                **attrs: Any) -> GroundshakeError:
        """A copy of this error with ``where`` in front of its message.

        Parameters
        ----------
        where : str
            The location: ``"FILE:LINE: key.path"`` or ``"--option"``.
        cls : type, optional
            The class of the copy (default: this error's own), e.g. ``ScenarioError``
            for a library error found while loading a scenario.
        **attrs
            More attributes to set on the copy (``key=``, ``line=``, ``file=``).
        """
        new_cls = cls or type(self)
        new = new_cls.__new__(new_cls)
        new.args = self.args
        new.__dict__.update(copy.copy(self.__dict__))
        new.where = where
        new.__dict__.update(attrs)
        return new

    def __reduce__(self):
        # Rebuilt without calling __init__, so subclasses with other signatures and every
        # attribute (param, value, where, key, line, file ...) survive pickling.
        return (_rebuild, (type(self), self.args, dict(self.__dict__)))


def _rebuild(cls, args, state):
    err = cls.__new__(cls)
    err.args = args
    err.__dict__.update(state)
    return err


class InputError(GroundshakeError, ValueError):
    """Bad user input: the final message names the file, line, key or option and what is
    allowed (see :meth:`GroundshakeError.located`)."""


class RecordError(InputError):
    """A record file that cannot be read or used."""


class ScenarioError(InputError):
    """A scenario file that does not validate."""


class ScenarioRecordError(ScenarioError, RecordError):
    """A record file a scenario names that cannot be read or used, shown at the scenario's
    file, line and key: both a :class:`ScenarioError` and a :class:`RecordError`."""


class ModelTooLargeError(GroundshakeError, MemoryError):
    """The model would not fit in memory; the message carries the estimate."""


class GroundshakeWarning(UserWarning):
    """Doubtful-but-legal input or a result outside a method's range of validity."""
