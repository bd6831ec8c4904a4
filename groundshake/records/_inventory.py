"""Raw counts to acceleration with a station inventory (StationXML), and telling counts apart.

A MiniSEED file from a data centre usually holds the digitiser's counts. The
station's inventory gives, per channel, the overall sensitivity (counts per m/s²
at a stated frequency) and the full response. For an accelerometer (input units
m/s²) the sensitivity is divided out — its response is flat over the band of
strong-motion engineering (common practice); for any other sensor (a velocity
meter, m/s) ObsPy removes the full response with output acceleration.

Without an inventory, integer samples whose peak would be beyond any recorded
ground motion are taken for counts and refused (:func:`check_not_counts`).
"""
from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np

from .._errors import RecordError
from ._record import STANDARD_GRAVITY

__all__ = ["load_inventory", "apply_inventory", "check_not_counts", "COUNTS_PEAK"]

#: A peak beyond which integer samples are taken for raw counts [m/s²] (5 g).
COUNTS_PEAK = 5 * STANDARD_GRAVITY

_ACCELERATION_UNITS = {"M/S**2", "M/S2", "M/S/S", "M/SEC**2", "M/S^2", "M/SEC2"}


def load_inventory(path) -> Any:
    """Read a station inventory (StationXML, or any inventory format ObsPy reads).

    Parameters
    ----------
    path : str or path-like, or an ``obspy.Inventory``
        The file (an Inventory object is returned as it is).

    Returns
    -------
    obspy.Inventory

    Raises
    ------
    RecordError
        Missing file, or one ObsPy cannot read as an inventory.
    """
    if hasattr(path, "get_response"):
        return path
    import obspy

    p = Path(path)
    if not p.is_file():
        raise RecordError(f"{p}: no such inventory file (StationXML expected)",
                          param="inventory")
    try:
        return obspy.read_inventory(str(p))
    except Exception as e:  # ObsPy raises many kinds here
        raise RecordError(f"{p}: not a station inventory ObsPy can read (StationXML expected): "
                          f"{type(e).__name__}: {e}", param="inventory") from e


def apply_inventory(stream, inventory, *, where: str, inventory_name: str = "inventory"):
    """A copy of ``stream`` with counts turned into acceleration [m/s²].

    Parameters
    ----------
    stream : obspy.Stream
        Traces in counts, as read.
    inventory : obspy.Inventory
        Holds a response for every trace's id at its start time.
    where : str
        The record file, for messages.
    inventory_name : str
        The inventory file, for messages and provenance.

    Returns
    -------
    obspy.Stream
        float64 samples in m/s²; each trace's stats get ``groundshake_units``
        (``"m/s2"``), ``groundshake_note`` (what was removed, with the
        sensitivity and its units) and, where the inventory states them,
        ``groundshake_azimuth`` and ``groundshake_dip`` [deg].

    Raises
    ------
    RecordError
        No response for a trace in the inventory, or a response ObsPy cannot
        remove; the message names the trace and both files.
    """
    out = stream.copy()
    for tr in out:
        when = tr.stats.starttime
        try:
            response = inventory.get_response(tr.id, when)
        except Exception as e:
            raise RecordError(f"{where}: trace {tr.id} has no response in {inventory_name} at "
                              f"{when.isoformat()} ({e}); give the inventory of this station "
                              f"and channel", param="inventory") from e
        # ObsPy's Response: the sensitivity and its fields may be missing or None
        sens = getattr(response, "instrument_sensitivity", None)
        value = float(getattr(sens, "value", 0.0) or 0.0)
        input_units = str(getattr(sens, "input_units", "") or "").strip().upper()
        tr.data = np.asarray(tr.data, dtype=np.float64)
        if value > 0 and input_units in _ACCELERATION_UNITS:
            tr.data = tr.data / value
            note = (f"sensitivity {value:g} counts per m/s2 removed (at "
                    f"{float(getattr(sens, 'frequency', 0.0) or 0.0):g} Hz, {inventory_name})")
        else:
            try:
                tr.remove_response(inventory=inventory, output="ACC")
            except Exception as e:
                raise RecordError(f"{where}: trace {tr.id}: the response in {inventory_name} "
                                  f"could not be removed ({type(e).__name__}: {e})") from e
            note = (f"full instrument response removed, output acceleration "
                    f"(input units {input_units or 'unknown'}, {inventory_name})")
        tr.stats.groundshake_units = "m/s2"
        tr.stats.groundshake_note = note
        try:
            meta = inventory.get_channel_metadata(tr.id, when)
        except Exception:  # orientation is a bonus; the response was found
            meta = {}
        if meta.get("azimuth") is not None:
            tr.stats.groundshake_azimuth = float(meta["azimuth"])
        if meta.get("dip") is not None:
            tr.stats.groundshake_dip = float(meta["dip"])
    return out


def check_not_counts(data: np.ndarray, raw_dtype: np.dtype, factor_to_si: float, *,
                     label: str, units: str) -> None:
    """Refuse integer samples that, read in ``units``, would peak beyond 5 g (raw counts).

    Parameters
    ----------
    data : ndarray, shape (n,)
        Samples as stored.
    raw_dtype : numpy dtype
        Their type in the file (integer types mean a digitiser's counts).
    factor_to_si : float
        Factor from ``units`` to m/s².

    Raises
    ------
    RecordError
        Naming the file and the peak, with ``param="inventory"`` (an inventory is needed).
    """
    if np.dtype(raw_dtype).kind not in "iu" or data.size == 0:
        return
    peak = float(np.max(np.abs(data - np.mean(data)))) * factor_to_si
    if peak > COUNTS_PEAK:
        raise RecordError(f"{label}: integer samples peaking at {peak / STANDARD_GRAVITY:.3g} g "
                          f"when read as {units}: these look like raw counts; give the station's "
                          f"inventory (StationXML) to turn them into acceleration",
                          param="inventory")
