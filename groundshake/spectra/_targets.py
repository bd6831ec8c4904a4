"""Target spectra to compare with: code-shaped curves the user parameterises, or a table.

Target syntax (ours), as accepted by ``parse_target`` and the CLI's ``--target``:

- ``asce7:sds=1.0,sd1=0.6,tl=8`` — ASCE 7-16 §11.4.6 design spectrum; SDS and SD1 in g,
  TL in s; 5 % damping.
- ``en1998:type=1,ground=C,ag=0.3[,damping=5]`` — EN 1998-1:2004 §3.2.2.2 horizontal
  elastic spectrum, type 1 or 2, ground A-E; ag (design ground acceleration on
  ground A) in g; damping in percent (η correction).
- ``PATH`` — a CSV table of two columns: period [s] and PSA [g]; a header line and
  ``#`` comments are allowed; interpolated log-log, undefined outside its range.
- ``PATH[:damping=PCT][,channel=C]`` where PATH is a CSMIP Volume 3 file (recognised by
  its content) — the published spectrum's PSA, (2π/T)·PSV, as a target; damping in
  percent (default 5, one the file publishes); ``channel`` the channel number as
  printed (``Chan  2``) or its orientation as written (``360``, ``Up``), needed when the
  file holds more than one channel. Interpolated log-log, undefined outside the
  published periods.
"""
from __future__ import annotations

import csv
import math
import os
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Callable

import numpy as np

from .._constants import STANDARD_GRAVITY
from .._errors import GroundshakeWarning, InputError
from .._plausible import check_value

if TYPE_CHECKING:  # pragma: no cover
    from ..records.io.csmip import PublishedSpectrum

__all__ = ["TargetSpectrum", "parse_target", "asce7_spectrum", "en1998_spectrum",
           "table_spectrum", "published_target", "volume3_target", "target_ratio",
           "EN1998_GROUND"]

G = STANDARD_GRAVITY  # m/s² per g

#: EN 1998-1 Tables 3.2 and 3.3: ground type -> (S, TB, TC, TD) [-, s, s, s].
EN1998_GROUND = {
    1: {"A": (1.00, 0.15, 0.4, 2.0), "B": (1.20, 0.15, 0.5, 2.0), "C": (1.15, 0.20, 0.6, 2.0),
        "D": (1.35, 0.20, 0.8, 2.0), "E": (1.40, 0.15, 0.5, 2.0)},
    2: {"A": (1.00, 0.05, 0.25, 1.2), "B": (1.35, 0.05, 0.25, 1.2), "C": (1.50, 0.10, 0.25, 1.2),
        "D": (1.80, 0.10, 0.30, 1.2), "E": (1.60, 0.05, 0.25, 1.2)},
}


@dataclass(frozen=True, eq=False)
class TargetSpectrum:
    """A target PSA curve.

    Attributes
    ----------
    label : str
        Short description for legends and reports.
    damping : float
        Damping ratio the curve is meant for.
    kind : str
        ``"asce7"``, ``"en1998"``, ``"table"`` or ``"published"`` (a published
        spectrum, e.g. of a CSMIP Volume 3 file).
    parameters : dict
        The parameters as entered (in the units of the spec: g, s, percent).
    period_range : (float, float) or None
        Shortest and longest period [s] where the curve is defined (a table's first
        and last rows, a published spectrum's periods); None for a code shape, defined
        at every period.
    """

    label: str
    damping: float
    kind: str
    parameters: dict
    _fn: Callable[[np.ndarray], np.ndarray] = field(repr=False)
    period_range: tuple[float, float] | None = None

    def psa(self, periods) -> np.ndarray:
        """Target pseudo-acceleration [m/s²] at ``periods`` [s] (≥ 0), shape of periods.

        NaN where the target is undefined (outside a table's periods).
        """
        t = np.asarray(periods, dtype=float)
        if np.any(~np.isfinite(t) | (t < 0)):
            raise InputError(f"target {self.label}: periods must be finite and >= 0 s")
        return self._fn(t) * G

    def ratio(self, psa, periods) -> np.ndarray:
        """Computed PSA [m/s²] (..., n_periods) divided by this target at ``periods``."""
        return np.asarray(psa, dtype=float) / self.psa(periods)

    def to_dict(self) -> dict:
        return {"label": self.label, "kind": self.kind, "damping_percent": 100 * self.damping,
                "parameters": dict(self.parameters)}


def target_ratio(spectrum, target: TargetSpectrum) -> np.ndarray:
    """PSA of a :class:`Spectrum` divided by the target, shape of ``spectrum.psa``."""
    return target.ratio(spectrum.psa, spectrum.periods)


def asce7_spectrum(sds: float, sd1: float, tl: float) -> TargetSpectrum:
    """ASCE 7-16 §11.4.6 design response spectrum (5 % damping).

    Parameters
    ----------
    sds, sd1 : float
        Design spectral accelerations at short periods and at 1 s [g], > 0.
    tl : float
        Long-period transition period [s], > 0.

    Notes
    -----
    T0 = 0.2·SD1/SDS, Ts = SD1/SDS; Sa = SDS(0.4 + 0.6T/T0) for T < T0, SDS up to Ts,
    SD1/T up to TL, SD1·TL/T² beyond.
    """
    for nm, v in (("sds", sds), ("sd1", sd1), ("tl", tl)):
        if not (math.isfinite(v) and v > 0):
            raise InputError(f"target asce7: {nm}={v!r}; must be a number > 0")
    for nm, v in (("sds", sds), ("sd1", sd1), ("tl", tl)):
        check_value(nm, v, where="target asce7: ", stacklevel=3)   # unit slips (m/s² for g)
    t0, ts = 0.2 * sd1 / sds, sd1 / sds

    def fn(t):
        t = np.asarray(t, dtype=float)
        safe = np.where(t > 0, t, 1.0)   # t = 0 never reaches the 1/T branches
        return np.select([t < t0, t <= ts, t <= tl],
                         [sds * (0.4 + 0.6 * t / t0), np.full_like(t, sds), sd1 / safe],
                         sd1 * tl / safe ** 2)

    return TargetSpectrum(label=f"ASCE 7-16 SDS={sds:g} g, SD1={sd1:g} g, TL={tl:g} s",
                          damping=0.05, kind="asce7",
                          parameters={"sds": sds, "sd1": sd1, "tl": tl}, _fn=fn)


def en1998_spectrum(spectrum_type: int, ground: str, ag: float,
                    damping_percent: float = 5.0) -> TargetSpectrum:
    """EN 1998-1:2004 §3.2.2.2 horizontal elastic response spectrum.

    Parameters
    ----------
    spectrum_type : {1, 2}
        Type 1 (larger, distant events) or type 2 (Ms ≤ 5.5).
    ground : {"A", "B", "C", "D", "E"}
        Ground type (Table 3.1).
    ag : float
        Design ground acceleration on type A ground [g] (γI·agR), > 0.
    damping_percent : float
        Viscous damping [%]; η = √(10/(5+ξ)) ≥ 0.55.

    Notes
    -----
    Se = ag·S[1 + T/TB(2.5η - 1)] to TB; 2.5·ag·S·η to TC; ·TC/T to TD; ·TC·TD/T²
    beyond (the standard defines it to 4 s; it is continued past 4 s here, with a
    warning when used there).
    """
    if spectrum_type not in (1, 2):
        raise InputError(f"target en1998: type={spectrum_type!r}; allowed: 1, 2")
    g = str(ground).upper()
    if g not in EN1998_GROUND[spectrum_type]:
        raise InputError(f"target en1998: ground={ground!r}; allowed: A, B, C, D, E")
    if not (math.isfinite(ag) and ag > 0):
        raise InputError(f"target en1998: ag={ag!r}; must be a number of g > 0")
    check_value("ag", ag, where="target en1998: ", stacklevel=3)   # unit slips (m/s² for g)
    if not (math.isfinite(damping_percent) and 0 <= damping_percent < 100):
        raise InputError(f"target en1998: damping={damping_percent!r}; allowed: percent in [0, 100)")
    s, tb, tc, td = EN1998_GROUND[spectrum_type][g]
    eta = max(math.sqrt(10.0 / (5.0 + damping_percent)), 0.55)
    top = 2.5 * ag * s * eta

    def fn(t):
        t = np.asarray(t, dtype=float)
        if np.any(t > 4.0):
            warnings.warn("EN 1998-1 defines the elastic spectrum up to 4 s; the TD branch "
                          "is continued beyond it", GroundshakeWarning, stacklevel=3)
        safe = np.where(t > 0, t, 1.0)   # t = 0 never reaches the 1/T branches
        return np.select([t <= tb, t <= tc, t <= td],
                         [ag * s * (1 + t / tb * (2.5 * eta - 1)), np.full_like(t, top),
                          top * tc / safe], top * tc * td / safe ** 2)

    return TargetSpectrum(
        label=f"EN 1998-1 type {spectrum_type}, ground {g}, ag={ag:g} g, {damping_percent:g} %",
        damping=damping_percent / 100.0, kind="en1998",
        parameters={"type": spectrum_type, "ground": g, "ag": ag, "damping": damping_percent},
        _fn=fn)


def table_spectrum(path: str | os.PathLike) -> TargetSpectrum:
    """A target from a CSV table of period [s] and PSA [g] (5 % damping assumed).

    Rows need not be sorted; a header line, blank lines and ``#`` comments are skipped.
    Between rows the curve is interpolated linearly in log(T)-log(PSA) (linearly in T
    below the first positive period when a T = 0 row is given); outside the table's
    periods it is undefined (NaN).
    """
    path = Path(path)
    rows = []
    try:
        with open(path, newline="", encoding="utf-8-sig") as fh:
            for lineno, rec in enumerate(csv.reader(fh), start=1):
                cells = [c.strip() for c in rec]
                if not cells or not cells[0] or cells[0].startswith("#"):
                    continue
                if len(cells) < 2:
                    raise InputError(f"{path}:{lineno}: need two columns (period s, PSA g), "
                                     f"got {rec!r}")
                try:
                    t, v = float(cells[0]), float(cells[1])
                except ValueError:
                    if not rows and lineno == 1:
                        continue  # header
                    raise InputError(f"{path}:{lineno}: {rec[:2]!r} are not numbers "
                                     "(period s, PSA g)") from None
                if not (math.isfinite(t) and t >= 0 and math.isfinite(v) and v > 0):
                    raise InputError(f"{path}:{lineno}: period {cells[0]} s and PSA {cells[1]} g; "
                                     "need period >= 0 and PSA > 0")
                rows.append((t, v))
    except UnicodeDecodeError:
        raise InputError(f"{path}: not a text CSV file") from None
    if len(rows) < 2:
        raise InputError(f"{path}: a target table needs at least two rows of period [s], PSA [g]")
    arr = np.array(sorted(rows))
    if np.any(np.diff(arr[:, 0]) <= 0):
        raise InputError(f"{path}: periods repeat; each period may appear once")
    tt, vv = arr[:, 0], arr[:, 1]
    check_value("target_psa", float(np.max(vv)), key="largest PSA", where=f"{path}: ",
                stacklevel=3)                                   # the table's unit is g
    return TargetSpectrum(label=f"table {path.name}", damping=0.05, kind="table",
                          parameters={"path": str(path), "rows": int(len(arr))},
                          _fn=_log_log(tt, vv), period_range=(float(tt[0]), float(tt[-1])))


def _log_log(tt: np.ndarray, vv: np.ndarray) -> Callable[[np.ndarray], np.ndarray]:
    """The curve through rows (tt [s] increasing, vv > 0): log-log between rows with
    T > 0, linear from a T = 0 row up to the first T > 0, NaN outside the rows."""
    pos = tt > 0

    def fn(t):
        t = np.asarray(t, dtype=float)
        out = np.full(t.shape, np.nan)
        lt = np.log(tt[pos])
        inside = (t >= tt[pos][0]) & (t <= tt[-1])
        if pos.sum() >= 2:
            out[inside] = np.exp(np.interp(np.log(t[inside]), lt, np.log(vv[pos])))
        elif pos.sum() == 1:
            out[t == tt[-1]] = vv[-1]
        if not pos[0]:                       # a T = 0 row: linear up to the first T > 0
            low = (t >= 0) & (t < tt[pos][0])
            out[low] = np.interp(t[low], tt[:2], vv[:2])
        return out

    return fn


def published_target(spectrum: PublishedSpectrum, damping: float = 0.05) -> TargetSpectrum:
    """A published response spectrum's PSA as a target curve.

    Parameters
    ----------
    spectrum : PublishedSpectrum
        As read by :func:`groundshake.records.read_csmip_spectra`: ``periods`` shape
        (n_periods,) [s], increasing; ``damping`` shape (n_damping,) (ratios); ``psa``
        shape (n_damping, n_periods) [m/s²]; ``component`` and ``metadata``.
    damping : float
        Which of the published damping ratios to use (a ratio, 0.05 for 5 %).

    Returns
    -------
    TargetSpectrum
        PSA = (2π/T)·PSV of the chosen damping, log-log between the published periods,
        NaN outside them (``period_range``).

    Raises
    ------
    InputError
        The spectrum has no such damping (the message lists those it has), or a PSA
        that is not > 0 inside its periods.
    """
    k = np.flatnonzero(np.isclose(np.asarray(spectrum.damping, dtype=float), damping,
                                  rtol=0.0, atol=1e-9))
    meta = spectrum.metadata
    name = " ".join(str(v) for v in (meta.get("station", ""), spectrum.component) if v)
    if not k.size:
        have = ", ".join(f"{100 * d:g} %" for d in spectrum.damping)
        raise InputError(f"published spectrum {name}: no {100 * damping:g} % damping; "
                         f"allowed: {have}")
    tt = np.asarray(spectrum.periods, dtype=float)
    vv = np.asarray(spectrum.psa, dtype=float)[k[0]] / G
    if not np.all(np.isfinite(vv) & (vv > 0)):
        bad = int(np.flatnonzero(~(np.isfinite(vv) & (vv > 0)))[0])
        raise InputError(f"published spectrum {name}: PSA {vv[bad]:g} g at {tt[bad]:g} s; "
                         "a target needs PSA > 0 at every period")
    parameters = {"source": meta.get("source", ""), "component": spectrum.component,
                  "damping": 100 * float(damping), "rows": int(tt.size)}
    if "channel_number" in meta:
        parameters["channel"] = meta["channel_number"]
    return TargetSpectrum(label=f"published spectrum {name}, {100 * damping:g} %",
                          damping=float(damping), kind="published", parameters=parameters,
                          _fn=_log_log(tt, vv), period_range=(float(tt[0]), float(tt[-1])))


def volume3_target(path: str | os.PathLike, *, damping_percent: float = 5.0,
                   channel: str | int | None = None) -> TargetSpectrum:
    """A target from the published spectra of a CSMIP Volume 3 file.

    Parameters
    ----------
    path : path
        The Volume 3 file.
    damping_percent : float
        Damping of the published spectrum to use [%] (default 5).
    channel : int or str, optional
        The channel number as printed (``Chan  2``), or its orientation as written
        (``"360"``, ``"Up"``); needed when the file holds more than one channel.

    Returns
    -------
    TargetSpectrum
        See :func:`published_target`.

    Raises
    ------
    InputError
        The file does not parse, the channel is missing or unknown (the message lists
        the file's channels), or the damping is not published.
    """
    from ..records import read_csmip_spectra  # records are read here, one stage down

    path = Path(path)
    spectra = read_csmip_spectra(path)
    listing = ", ".join(f"{s.metadata.get('channel_number', '?')} ({s.component})"
                        for s in spectra)
    if channel is None:
        if len(spectra) != 1:
            raise InputError(f"target {path}: the Volume 3 file holds {len(spectra)} channels; "
                             f"choose one with channel=N (number or orientation): {listing}")
        chosen = spectra[0]
    else:
        text = str(channel).strip()
        by_number = [s for s in spectra if text.isdigit()
                     and s.metadata.get("channel_number") == int(text)]
        by_name = [s for s in spectra if s.component.strip().lower() == text.lower()]
        found = by_number or by_name
        if len(found) != 1:
            raise InputError(f"target {path}: channel={text!r} "
                             f"{'is not in the file' if not found else 'is ambiguous'}; "
                             f"allowed (number or orientation): {listing}")
        chosen = found[0]
    if not (math.isfinite(damping_percent) and 0 < damping_percent < 100):
        raise InputError(f"target {path}: damping={damping_percent!r}; allowed: percent in "
                         "(0, 100)")
    return published_target(chosen, damping_percent / 100.0)


_ASCE_KEYS = {"sds", "sd1", "tl"}
_EN_KEYS = {"type", "ground", "ag", "damping"}


def _parse_params(spec: str, body: str, allowed: set[str]) -> dict:
    out = {}
    for item in body.split(","):
        item = item.strip()
        if not item:
            continue
        if "=" not in item:
            raise InputError(f"target {spec!r}: {item!r} is not key=value")
        k, v = (s.strip() for s in item.split("=", 1))
        k = k.lower()
        if k not in allowed:
            raise InputError(f"target {spec!r}: unknown key {k!r}; allowed: "
                             + ", ".join(sorted(allowed)))
        if k in out:
            raise InputError(f"target {spec!r}: {k!r} given twice")
        out[k] = v
    return out


def _num(spec, key, text):
    try:
        v = float(text)
    except ValueError:
        raise InputError(f"target {spec!r}: {key}={text!r} is not a number") from None
    return v


def parse_target(spec: str, *, base_dir: str | os.PathLike | None = None) -> TargetSpectrum:
    """Build a :class:`TargetSpectrum` from a spec string (syntax in the module docs).

    Parameters
    ----------
    spec : str
        ``asce7:sds=..,sd1=..,tl=..``, ``en1998:type=..,ground=..,ag=..[,damping=..]``,
        a path to a CSV table, or a path to a CSMIP Volume 3 file with optional
        ``:damping=PCT,channel=N`` (relative paths against ``base_dir``).
    base_dir : path, optional
        Folder that relative table paths are resolved against (default: the current one).

    Raises
    ------
    InputError
        Unknown form or key, missing or bad value, unreadable table.
    """
    if not isinstance(spec, str) or not spec.strip():
        raise InputError(f"target: {spec!r}; give asce7:..., en1998:..., a CSV path or a "
                         "CSMIP Volume 3 path")
    s = spec.strip()
    head, sep, body = s.partition(":")
    kind = head.strip().lower()
    if sep and kind == "asce7":
        p = _parse_params(s, body, _ASCE_KEYS)
        missing = sorted(_ASCE_KEYS - set(p))
        if missing:
            raise InputError(f"target {s!r}: missing {', '.join(missing)}; "
                             "form: asce7:sds=G,sd1=G,tl=S")
        return asce7_spectrum(_num(s, "sds", p["sds"]), _num(s, "sd1", p["sd1"]),
                              _num(s, "tl", p["tl"]))
    if sep and kind == "en1998":
        p = _parse_params(s, body, _EN_KEYS)
        missing = sorted({"type", "ground", "ag"} - set(p))
        if missing:
            raise InputError(f"target {s!r}: missing {', '.join(missing)}; "
                             "form: en1998:type=1|2,ground=A..E,ag=G[,damping=PERCENT]")
        if p["type"] not in ("1", "2"):
            raise InputError(f"target {s!r}: type={p['type']!r}; allowed: 1, 2")
        return en1998_spectrum(int(p["type"]), p["ground"], _num(s, "ag", p["ag"]),
                               _num(s, "damping", p.get("damping", "5")))
    path, options = _file_and_options(s, base_dir)
    if not path.is_file():
        if sep and len(kind) > 1 and not path.exists():
            raise InputError(f"target {s!r}: unknown form {kind!r}; allowed: asce7:..., "
                             f"en1998:..., {_FILE_FORMS}")
        raise InputError(f"target {s!r}: no such file (a target is asce7:..., en1998:..., "
                         f"{_FILE_FORMS})")
    if _is_volume3(path):
        p = _parse_params(s, options, _V3_KEYS)
        return volume3_target(path, damping_percent=_num(s, "damping", p.get("damping", "5")),
                              channel=p.get("channel"))
    if options:
        raise InputError(f"target {s!r}: {options!r} are options of a CSMIP Volume 3 file; "
                         f"{path.name} is read as a CSV table of period [s], PSA [g], which "
                         "takes none")
    return table_spectrum(path)


_V3_KEYS = {"damping", "channel"}
_FILE_FORMS = ("a CSV file of period [s], PSA [g], or a CSMIP Volume 3 file "
               "(FILE[:damping=PCT,channel=N])")


def _file_and_options(spec: str, base_dir) -> tuple[Path, str]:
    """(file, options text) of ``PATH`` or ``PATH:key=value,...``; the whole spec is a
    path when such a file exists (a colon may belong to the path)."""
    def resolve(text: str) -> Path:
        p = Path(text)
        return Path(base_dir) / p if base_dir is not None and not p.is_absolute() else p

    whole = resolve(spec)
    head, sep, body = spec.rpartition(":")
    if not whole.exists() and sep and "=" in body and head.strip():
        return resolve(head.strip()), body
    return whole, ""


def _is_volume3(path: Path) -> bool:
    from ..records.io.csmip import is_volume3   # records are read here, one stage down
    try:
        with open(path, "rb") as fh:
            return is_volume3(fh.read(4096))
    except OSError:
        return False
