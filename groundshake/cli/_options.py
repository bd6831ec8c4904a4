"""Options that several commands share, each defined once (name, default, help).

A command adds one with :func:`add_option` and says only what differs for it (what the
option means there, a default it states in words, whether it is required)::

    add_option(p, "damping")
    add_option(p, "periods", default_text="30 per decade over the band")
    add_option(p, "target", what="target spectrum to match", required=True, repeat=True)

Each option's ``dest`` is the library parameter its value goes to (``units``, ``dt``,
``inventory``, ``output``, ``force``, ...), so that a library error's ``param`` finds the
option (:func:`groundshake.cli._common.options_named`).
"""
from __future__ import annotations

import argparse
from typing import Any

from ..records._units import UNIT_NAMES

__all__ = ["TARGET_FORMS", "add_option", "SHARED_OPTIONS"]

#: The forms of a target spectrum (``--target``, ``--scale-to``; groundshake.spectra.parse_target).
TARGET_FORMS = ("asce7:sds=G,sd1=G,tl=S (all three required; SDS, SD1 in g, TL in s), "
                "en1998:type=1|2,ground=A..E,ag=G[,damping=PCT], a CSV of period [s], PSA [g], "
                "or a CSMIP Volume 3 file FILE[:damping=PCT,channel=N] (its published PSA)")

#: name → (flags, argparse keywords, help with ``{what}`` / ``{default_text}`` fields,
#: default ``what``, default ``default_text``).
SHARED_OPTIONS: dict[str, tuple[tuple[str, ...], dict[str, Any], str, str, str]] = {
    "target": (("--target",), {"metavar": "SPEC"},
               "{what}: " + TARGET_FORMS, "target spectrum", ""),
    "damping": (("--damping",), {"default": "5", "metavar": "PCT"},
                "damping in percent of critical, comma-separated for several{what} "
                "(default 5)", "", ""),
    "periods": (("--periods",), {"metavar": "T,..."},
                "periods [s], comma-separated{what} (default: {default_text})", "", ""),
    "units": (("--units",), {"metavar": "U"},
              "units of {what} that do not state them: " + UNIT_NAMES, "files", ""),
    "dt": (("--dt",), {"type": float, "metavar": "S"},
           "time step [s] of one-column text {what}", "files", ""),
    "inventory": (("--inventory",), {"metavar": "FILE"},
                  "station inventory (StationXML) of {what} in raw counts (MiniSEED, SAC): "
                  "the instrument sensitivity (accelerometers) or full response is removed",
                  "records", ""),
    "output": (("-o", "--output"), {}, "{what}", "output", ""),
    "force": (("--force",), {"action": "store_true"}, "{what}", "replace the output if it exists",
              ""),
    "plot": (("--plot",), {"metavar": "PNG"}, "{what} (.png, .pdf or .svg)", "plot", ""),
    "report_units": (("--report-units",), {"choices": ("si", "us"), "default": None},
                     "display units of {what}: si (kN, mm, MPa, g) or us (kip, in, psi, g); "
                     "default {default_text}. Files stay SI", "the report",
                     "the scenario's [report] units"),
    "method": (("--method",), {"default": None}, "override [analysis] method", "", ""),
}


def add_option(p: argparse.ArgumentParser | Any, name: str, *, what: str | None = None,
               default_text: str | None = None, required: bool = False,
               repeat: bool = False, note: str | None = None, **kw: Any) -> argparse.Action:
    """Add the shared option ``name`` (a key of :data:`SHARED_OPTIONS`) to ``p``.

    Parameters
    ----------
    p : argparse.ArgumentParser or argument group
    name : str
        The option's ``dest``, e.g. ``"damping"``, ``"report_units"``.
    what : str, optional
        What the option is about in this command (fills its help).
    default_text : str, optional
        The default in words, where the command computes it.
    required, repeat : bool
        Required; taken once per use (``action="append"``).
    note : str, optional
        A last remark for this command, after a semicolon.
    **kw
        More argparse keywords for this command (``metavar``, ``choices``, ``default``).

    Returns
    -------
    argparse.Action
    """
    flags, base, text, what0, default0 = SHARED_OPTIONS[name]
    opts = {**base, **kw, "dest": name}
    if required:
        opts["required"] = True
    if repeat:
        opts["action"] = "append"
    opts["help"] = text.format(what=what0 if what is None else what,
                               default_text=default0 if default_text is None else default_text)
    if note:
        opts["help"] += f"; {note}"
    return p.add_argument(*flags, **opts)
