"""Reading and writing acceleration records; the :class:`Record` type."""
from ._record import STANDARD_GRAVITY, Record

__all__ = ["Record", "STANDARD_GRAVITY"]
