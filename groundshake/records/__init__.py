"""Reading and writing acceleration records; the :class:`Record` type."""
from ._read import MIN_SAMPLES, read_record
from ._record import STANDARD_GRAVITY, Record
from ._units import UNIT_NAMES, UNITS, canonical_units
from ._write import WRITE_FORMATS, write_record
from .io import READERS
from .io.csmip import read_csmip_spectra, read_csmip_v2_series

__all__ = ["Record", "STANDARD_GRAVITY", "read_record", "write_record", "UNITS", "UNIT_NAMES",
           "canonical_units", "MIN_SAMPLES", "WRITE_FORMATS", "READERS", "read_csmip_spectra",
           "read_csmip_v2_series"]
