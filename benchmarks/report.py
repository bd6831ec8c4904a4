"""Time to build report.html from a run's output folder, per stage of the report.

    python benchmarks/report.py [OUTPUT_DIR]

Without a folder it uses the invented output folder of tests/_report_fixture.py
(INVENTED TEST DATA). Prints CPU seconds for reading the files (the reference), for
each figure and for the whole report, and their ratios to the reference.
"""
from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main(argv: list[str]) -> int:
    from groundshake.report import _report as R
    from groundshake.report._load import load_output

    if argv:
        folder = Path(argv[0])
    else:
        sys.path.insert(0, str(HERE.parent / "tests"))
        from _report_fixture import make_output_folder

        folder = make_output_folder(Path(tempfile.mkdtemp()) / "run")
    c = time.process_time()
    load_output(folder)
    t_load = time.process_time() - c
    figures: list[tuple[str, float]] = []
    original = R._Builder._fig

    def timed(self, make, caption, fid=""):
        c0 = time.process_time()
        out = original(self, make, caption, fid)
        figures.append((fid or caption[:48], time.process_time() - c0))
        return out

    R._Builder._fig = timed
    try:
        c = time.process_time()
        html = R.render_report(folder, progress=False)
        t_all = time.process_time() - c
    finally:
        R._Builder._fig = original
    print(f"folder: {folder}")
    print(f"read the files (reference): {t_load:8.3f} s CPU")
    for name, t in figures:
        print(f"  figure {name:<50s} {t:7.3f} s  ({t / max(t_load, 1e-9):6.1f}x reference)")
    print(f"whole report:               {t_all:8.3f} s CPU ({t_all / max(t_load, 1e-9):.1f}x "
          f"reference), {len(html) / 1e6:.2f} MB, {len(figures)} figures")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
