"""Reading a run's output folder back: summary.json and the CSV tables.

The report depends only on the files a run writes (see docs/INTERNALS.md), never on
the objects that produced them, so it can be rebuilt from an output folder at any
time. Columns are found by the words in their headers (``words [unit]``), matched
case-insensitively, so small differences in naming do not break a figure; a file or
column that is missing leaves its figure out and adds a note, never an error.
"""
from __future__ import annotations

import csv
import io
import json
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Iterable

import numpy as np

from .._errors import InputError
from ..results._schema import CSV_FILES, SUMMARY_FILE  # the output contract

__all__ = ["Table", "OutputFolder", "load_output", "split_header", "label_words",
           "damping_of"]

_UNIT = re.compile(r"\s*[\[(]([^\])]*)[\])]\s*$")
_SPLIT = re.compile(r"[\s_:/,;|=]+")
_DAMPING = re.compile(r"(\d+(?:\.\d+)?)\s*(?:%|pct|percent)")



def split_header(header: str) -> tuple[str, str]:
    """Split ``"words [unit]"`` into ``("words", "unit")``; unit ``""`` if none."""
    m = _UNIT.search(header)
    if m:
        return header[:m.start()].strip(), m.group(1).strip()
    return header.strip(), ""


def label_words(label: str) -> list[str]:
    """Lower-case words of a header (unit removed), split on blanks and ``_:/,;|=``."""
    text, _ = split_header(label)
    return [w for w in _SPLIT.split(text.lower()) if w]


def damping_of(label: str) -> float | None:
    """The damping in percent named in a header (``"5%"``, ``"5 pct"``), else None."""
    m = _DAMPING.search(label.lower())
    return float(m.group(1)) if m else None


@dataclass(frozen=True, eq=False)
class Table:
    """One CSV file: its header and its cells as floats (NaN where empty or text).

    Attributes
    ----------
    path : Path
    header : list of str
        Column headers as written.
    data : ndarray, shape (n_rows, n_columns)
        Numeric cells; NaN for empty or non-numeric cells.
    text : list of list of str
        The cells as read when some are not numbers (empty when all are).
    """

    path: Path
    header: list[str]
    data: np.ndarray
    text: list[list[str]] = field(repr=False)

    @property
    def n_rows(self) -> int:
        return int(self.data.shape[0])

    def column(self, i: int) -> np.ndarray:
        """Column ``i`` as floats, shape (n_rows,)."""
        return self.data[:, i]

    def label(self, i: int) -> str:
        return split_header(self.header[i])[0]

    def unit(self, i: int) -> str:
        return split_header(self.header[i])[1]

    def find(self, *words: str, exclude: Iterable[str] = (), start: int = 0) -> list[int]:
        """Indices of the columns whose header holds every one of ``words``.

        A word may hold blanks (``"von mises"``): it must then appear as a run of
        words. ``exclude`` drops columns holding any of those words.
        """
        out = []
        for i in range(start, len(self.header)):
            ws = label_words(self.header[i])
            joined = " " + " ".join(ws) + " "
            if all(_has(joined, w) for w in words) and not any(_has(joined, w) for w in exclude):
                out.append(i)
        return out

    def first(self, *words: str, exclude: Iterable[str] = ()) -> int | None:
        found = self.find(*words, exclude=exclude)
        return found[0] if found else None


def _has(joined: str, word: str) -> bool:
    w = " ".join(_SPLIT.split(word.lower().strip()))
    return f" {w} " in joined


_EMPTY_CELL = re.compile(r"(?:(?<=,)|^)(?=,|$)", re.M)


def _read_table(path: Path) -> Table:
    raw = path.read_text(encoding="utf-8")
    head, _, body_text = raw.partition("\n")
    header = [h.strip() for h in next(csv.reader([head]))] if head.strip() else []
    if not header:
        raise InputError(f"{path}: empty CSV file (expected a header row)")
    n = len(header)
    if '"' not in body_text:               # fast path: plain numbers, some cells empty
        try:
            filled = _EMPTY_CELL.sub("nan", body_text.strip("\n"))
            data = np.loadtxt(io.StringIO(filled), delimiter=",", ndmin=2, dtype=float)
            if data.size == 0:
                data = np.zeros((0, n))
            if data.shape[1] == n:
                return Table(path=path, header=header, data=data, text=[])
        except ValueError:
            pass
    rows = list(csv.reader(io.StringIO(body_text)))
    body = [r for r in rows if any(c.strip() for c in r)]
    text = [(r + [""] * n)[:n] for r in body]
    data = np.full((len(text), n), np.nan)
    for j in range(n):
        col = [row[j] for row in text]
        try:
            data[:, j] = [float(c) if c.strip() else np.nan for c in col]
        except ValueError:
            for i, c in enumerate(col):
                try:
                    data[i, j] = float(c)
                except ValueError:
                    pass
    return Table(path=path, header=header, data=data, text=text)


@dataclass(frozen=True, eq=False)
class OutputFolder:
    """What a run left in its output folder.

    Attributes
    ----------
    path : Path
    summary : dict
        summary.json as read.
    tables : dict of str to Table
        The CSV files found, by stem (``"histories"``, ``"modes"``, ...).
    notes : list of str
        Files that were missing or could not be read (the report lists them).
    """

    path: Path
    summary: dict[str, Any]
    tables: dict[str, Table]
    notes: list[str]

    def table(self, name: str) -> Table | None:
        return self.tables.get(name)


def load_output(out_dir: str | Path) -> OutputFolder:
    """Read ``out_dir/summary.json`` and the CSV files beside it.

    Parameters
    ----------
    out_dir : path
        A folder written by ``groundshake run``.

    Returns
    -------
    OutputFolder

    Raises
    ------
    InputError
        If the folder or its summary.json is missing or summary.json is not JSON.
    """
    out = Path(out_dir)
    summary_path = out / SUMMARY_FILE
    if not out.is_dir():
        raise InputError(f"{out}: no such output folder")
    if not summary_path.is_file():
        raise InputError(f"{summary_path}: missing; the report is built from a run's output folder")
    try:
        summary = json.loads(summary_path.read_text(encoding="utf-8"))
    except (UnicodeDecodeError, json.JSONDecodeError) as e:
        raise InputError(f"{summary_path}: not valid JSON ({e})") from None
    if not isinstance(summary, dict):
        raise InputError(f"{summary_path}: expected a JSON object at the top level")
    tables: dict[str, Table] = {}
    notes: list[str] = []
    for stem in CSV_FILES:
        p = out / f"{stem}.csv"
        if not p.is_file():
            notes.append(f"{stem}.csv was not in the output folder; its figures are left out.")
            continue
        try:
            tables[stem] = _read_table(p)
        except (InputError, UnicodeDecodeError, csv.Error) as e:
            notes.append(f"{stem}.csv could not be read ({e}); its figures are left out.")
    return OutputFolder(path=out, summary=summary, tables=tables, notes=notes)
