"""Record readers, one module a format, behind one registry.

Each reader module ``groundshake.records.io.<name>`` has

- ``FORMAT`` (str): the format's name as people say it, e.g. ``"PEER NGA (.AT2)"``;
- ``EXTENSIONS`` (tuple of str): usual file extensions, lower case (informative only);
- ``is_format(path, head) -> bool``: decides from the content (``head`` = the first
  8192 bytes) and never raises;
- ``read(path, *, units=None, dt=None) -> list[Record]``: one Record per channel,
  ``acc`` in m/s², shape (n,). ``path`` is the file (str or path-like); ``units``
  (str, any spelling :func:`groundshake.records.canonical_units` knows) are the units
  of the file's values: where the header states units, a check (an error if they
  differ), else needed; ``dt`` [s] is a check against the step the file states (an
  error if it differs by more than 1e-6 relative) or, for a one-column text file, the
  step itself. Each reader's docstring says what it checks them against.

:data:`READERS` is the order they are asked in: strong-motion text formats first,
ObsPy's formats next, delimited text last. Modules are imported when first asked.

A gzip-compressed file (``record.AT2.gz``) is read as its content: :func:`read`
decompresses it once, and every reader sees the content (``head`` and what it reads
through ``_common.read_bytes``/``read_lines``); messages and ``source`` name the file
as given.
"""
from __future__ import annotations

import importlib
import inspect
from pathlib import Path
from types import ModuleType

from ..._errors import RecordError
from ._common import read_head, unpacked

__all__ = ["READERS", "HEAD_BYTES", "reader", "detect", "read", "formats_read", "record_suffixes"]

#: Reader modules in the order they are tried (names inside this package). The
#: strong-motion readers decide from content that no other format shares, so their order
#: among themselves does not matter; new ones go before "obspy_formats".
READERS: tuple[str, ...] = (
    "peer_at2",
    "esm",
    "usc",
    "afad",
    "unam",
    "renadic",
    "bhrc",
    "cwb",
    "csmip",
    "cosmos",
    "geonet",
    "usgs_smc",
    "obspy_formats",
    "text",
)

#: Bytes of the file's beginning handed to each ``is_format``.
HEAD_BYTES = 8192


def reader(name: str) -> ModuleType:
    """The reader module ``name`` (one of :data:`READERS`), imported on first use."""
    return importlib.import_module(f"{__name__}.{name}")


def formats_read() -> str:
    """The formats of every reader, in order, for messages (``"A; B; C"``)."""
    return "; ".join(reader(name).FORMAT for name in READERS)


def record_suffixes() -> frozenset[str]:
    """File-name endings (lower case, with the dot) that some reader names in its
    ``EXTENSIONS``, plus ``".ms"`` (a common short MiniSEED ending), ``".knt"`` and ``""``
    (K-NET's and KiK-net's plain names). A name ending in ``.gz`` counts by what is
    before it."""
    out = {".ms", ".knt", ""}
    for name in READERS:
        out.update(e.lower() for e in getattr(reader(name), "EXTENSIONS", ()))
    return frozenset(out)


def detect(path) -> ModuleType | None:
    """The first reader module whose ``is_format`` claims the file, or None.

    Parameters
    ----------
    path : str or path-like
        The file.

    Returns
    -------
    module or None
        None also when the file cannot be opened or is a gzip file that does not
        decompress. A gzip-compressed file is judged by its decompressed content.
    """
    path = Path(path)
    try:
        head = read_head(path, HEAD_BYTES)
    except (OSError, RecordError):  # unreadable, or a gzip file that does not decompress
        return None
    for name in READERS:
        module = reader(name)
        try:
            if module.is_format(path, head):
                return module
        except Exception:  # a detector must never raise; treat one that does as "no"
            continue
    return None


def read(path, *, units: str | None = None, dt: float | None = None, **options) -> list:
    """Read a record file with the reader that claims it.

    Parameters
    ----------
    path : str or path-like
        The file.
    units : str, optional
        Units of the file's values (checked against the header where it states them).
    dt : float, optional
        Time step [s] (checked against the header where it states one).
    **options
        Passed to the reader only if its ``read`` takes them (e.g. the delimited-text
        reader's ``resample``).

    Returns
    -------
    list of Record
        One per channel, ``acc`` in m/s².

    Raises
    ------
    RecordError
        No reader claims the file (the message lists the formats read), the reader
        that claims it fails (its message names the format), or a gzip-compressed
        file does not decompress.
    """
    path = Path(path)
    with unpacked(path):  # a .gz file: decompressed here, once, for detection and reading
        module = detect(path)
        if module is None:
            raise RecordError(f"{path}: not a record groundshake can read; formats read: "
                              f"{formats_read()}")
        params = inspect.signature(module.read).parameters
        extra = {k: v for k, v in options.items() if k in params}
        return module.read(path, units=units, dt=dt, **extra)
