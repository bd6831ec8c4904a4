"""Writing a run's output folder: the result files and the report, in one atomic step."""
from __future__ import annotations

import os
from pathlib import Path

from ..report import write_report
from ..results import write_outputs

__all__ = ["write_run"]


def write_run(results, out_dir: str | os.PathLike, *, overwrite: bool = False,
              report: bool = True, n_shapes: int = 6, progress: bool = True) -> Path:
    """Write a run's files and (unless ``report`` is false) ``report.html`` into ``out_dir``.

    Parameters
    ----------
    results : RunResults
        From :func:`groundshake.analyse`.
    out_dir : path
        The folder to create; it appears only when complete (``groundshake._atomic``), and
        an existing one is replaced only with ``overwrite``.
    report : bool
        Also write ``report.html`` from the files just written (inside the same step).
    n_shapes : int
        Mode shapes written to mode_shapes.csv.
    progress : bool
        Let the report draw its progress bar (only where the CLI switched bars on).

    Returns
    -------
    Path
        ``out_dir``.

    Raises
    ------
    FileExistsError
        ``out_dir`` exists and ``overwrite`` is false.
    """
    also = (lambda folder: write_report(folder, progress=progress)) if report else None
    return write_outputs(results, out_dir, overwrite=overwrite, n_shapes=n_shapes, also=also)
