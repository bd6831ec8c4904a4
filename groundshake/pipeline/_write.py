"""Writing a run's output folder: the result files and the report, in one atomic step."""
from __future__ import annotations

import os
from pathlib import Path

from ..report import write_report
from ..results import write_outputs

__all__ = ["write_run"]


def write_run(results, out_dir: str | os.PathLike, *, overwrite: bool = False,
              report: bool = True, n_shapes: int = 6, progress: bool = True,
              report_units: str | None = None) -> Path:
    """Write a run's files and (unless ``report`` is false) ``report.html`` into ``out_dir``.

    Parameters are those of :func:`groundshake.results.write_outputs` (``results`` from
    :func:`groundshake.analyse`; ``out_dir`` appears only when complete, an existing one
    is replaced only with ``overwrite``; ``n_shapes`` mode shapes), plus ``report`` (also
    write ``report.html`` from the files just written, inside the same step) and
    ``progress`` (let the report draw its bar where the CLI switched bars on) and
    ``report_units`` ("si" or "us"; default the scenario's ``[report] units``). Returns
    ``out_dir``; raises ``FileExistsError`` as ``write_outputs`` does.
    """
    also = (lambda folder: write_report(folder, progress=progress, units=report_units)) \
        if report else None
    return write_outputs(results, out_dir, overwrite=overwrite, n_shapes=n_shapes, also=also)
