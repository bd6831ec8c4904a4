"""Speed of reading, correcting and measuring a long record, against plain-library references.

Prints wall times and the ratio to a reference computed in the same process:
reading CSV vs numpy.loadtxt, reading MiniSEED vs obspy.read, correction vs a bare
scipy sosfiltfilt of the same length, intensity measures vs one numpy FFT.
Then reading each strong-motion format of tests/data/strong-motion/, as seconds per MB
against the delimited-text reader on a CSV of the same record (seconds per MB too).
Run: python benchmarks/records.py [seconds_of_record]
"""
from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from scipy import signal


def _best(fn, repeat=3):
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def main(seconds: float = 600.0) -> None:
    import obspy

    from groundshake.processing import correct_record, fourier_amplitude, intensity_measures
    from groundshake.records import Record, read_record, write_record

    dt = 0.005
    n = int(seconds / dt) + 1
    rng = np.random.default_rng(0)
    rec = Record(acc=rng.standard_normal(n), dt=dt, name="bench", units="m/s2")
    with tempfile.TemporaryDirectory() as tmp:
        csv, ms = Path(tmp) / "b.csv", Path(tmp) / "b.mseed"
        write_record(rec, csv)
        write_record(rec, ms)
        rows = []
        t = _best(lambda: read_record(csv))
        ref = _best(lambda: np.loadtxt(csv, delimiter=",", comments="#", skiprows=5))
        rows.append(("read CSV", t, "numpy.loadtxt", ref))
        t = _best(lambda: read_record(ms, units="m/s2"))
        ref = _best(lambda: obspy.read(str(ms)))
        rows.append(("read MiniSEED", t, "obspy.read", ref))
    corrected = correct_record(rec)
    t = _best(lambda: correct_record(rec))
    sos = signal.butter(4, 0.1, btype="highpass", output="sos", fs=1 / dt)
    x = np.zeros(corrected.n)
    ref = _best(lambda: signal.sosfiltfilt(sos, x, padtype=None))
    rows.append(("correct_record", t, "sosfiltfilt alone", ref))
    t = _best(lambda: intensity_measures(corrected))
    ref = _best(lambda: np.fft.rfft(corrected.acc, 1 << int(np.ceil(np.log2(corrected.n)))))
    rows.append(("intensity_measures", t, "one rfft", ref))
    t = _best(lambda: fourier_amplitude(corrected.acc, dt))
    rows.append(("fourier_amplitude (200 KO centres)", t, "one rfft", ref))
    print(f"record: {n} samples ({seconds:g} s at {1 / dt:g} Hz); corrected {corrected.n} samples")
    print(f"{'step':36s} {'time [s]':>9s}  {'reference':18s} {'ref [s]':>8s} {'ratio':>7s}")
    for name, tt, rname, rr in rows:
        print(f"{name:36s} {tt:9.4f}  {rname:18s} {rr:8.4f} {tt / rr:7.1f}")
    formats()


def formats() -> None:
    """Seconds per MB of each strong-motion reader vs the text reader on the same record."""
    import warnings

    from groundshake.records import read_record, write_record
    from groundshake.records.io import detect

    folder = Path(__file__).resolve().parent.parent / "tests" / "data" / "strong-motion"
    files = sorted(p for p in folder.iterdir() if p.suffix.lower() != ".md")
    print(f"\n{'reading':58s} {'MB':>5s} {'s/MB':>7s} {'text s/MB':>9s} {'ratio':>6s}")
    with tempfile.TemporaryDirectory() as tmp, warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for path in files:
            module = detect(path)
            if module is None or module.__name__.endswith((".text", ".obspy_formats")):
                continue
            try:
                recs = read_record(path)
            except Exception:  # spectra files (CSMIP V3) are not records
                continue
            mb = path.stat().st_size / 1e6
            t = _best(lambda: read_record(path))
            csv = Path(tmp) / f"{path.stem}.csv"  # the same samples as delimited text
            write_record(recs[0] if len({(r.n, r.dt) for r in recs}) > 1 else recs, csv)
            ref = _best(lambda: read_record(csv)) / (csv.stat().st_size / 1e6)
            label = f"{module.FORMAT[:26]}: {path.name[:30]}"
            print(f"{label:58s} {mb:5.2f} {t / mb:7.3f} {ref:9.3f} {t / mb / ref:6.2f}")


if __name__ == "__main__":
    main(float(sys.argv[1]) if len(sys.argv) > 1 else 600.0)
