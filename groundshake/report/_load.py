"""Reading a run's output folder back: summary.json and the CSV tables.

The report depends only on the files a run writes, never on the objects that produced
them, so it can be rebuilt from an output folder at any time. File names and column
headers are those of the output contract (``groundshake/results/_schema.py``); columns
are looked up by their exact header. A file that is missing leaves its figure out and
adds a note, never an error.
"""
from __future__ import annotations

import csv
import io
import json
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from .._errors import InputError
from ..results._schema import FILES

__all__ = ["Table", "OutputFolder", "load_output", "split_header"]

_UNIT = re.compile(r"\s*[\[(]([^\])]*)[\])]\s*$")

#: The files a run writes (INTERNALS.md "Files in DIR").
CSV_FILES = tuple(k for k, v in FILES.items() if v.endswith(".csv"))


def split_header(header: str) -> tuple[str, str]:
    """Split ``"words [unit]"`` into ``("words", "unit")``; unit ``""`` if none."""
    m = _UNIT.search(header)
    if m:
        return header[:m.start()].strip(), m.group(1).strip()
    return header.strip(), ""


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

    def get(self, header: str) -> np.ndarray | None:
        """The column whose header is exactly ``header`` (as the contract writes it)."""
        try:
            return self.data[:, self.header.index(header)]
        except ValueError:
            return None

    def strings(self, header: str) -> list[str] | None:
        """A text column (e.g. ``direction``) by its exact header."""
        try:
            j = self.header.index(header)
        except ValueError:
            return None
        if self.text:
            return [r[j] for r in self.text]
        return [f"{v:g}" for v in self.data[:, j]]

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
    mesh: dict | None = None

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
    summary_path = out / "summary.json"
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
        p = out / FILES[stem]
        if not p.is_file():
            notes.append(f"{stem}.csv was not in the output folder; its figures are left out.")
            continue
        try:
            tables[stem] = _read_table(p)
        except (InputError, UnicodeDecodeError, csv.Error) as e:
            notes.append(f"{stem}.csv could not be read ({e}); its figures are left out.")
    mesh = None
    mp = out / FILES["mesh"]
    if mp.is_file():
        try:
            mesh = json.loads(mp.read_text(encoding="utf-8"))
        except (UnicodeDecodeError, json.JSONDecodeError) as e:
            notes.append(f"{FILES['mesh']} could not be read ({e}); the model figures are left out.")
    else:
        notes.append(f"{FILES['mesh']} was not in the output folder; the model figures are left out.")
    return OutputFolder(path=out, summary=summary, tables=tables, notes=notes, mesh=mesh)
