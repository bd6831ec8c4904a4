"""An invented run-output folder for the report tests (INVENTED TEST DATA, not a result
of any analysis): the files of the output contract (groundshake/results/_schema.py), with
plausible shapes and units, so the report can be tested without running the pipeline.

Sources of the checks in this file: counting of a structured hexahedral grid
(n_nodes = (nx+1)(ny+1)(nz+1) for a full box; common practice) and RFC 4180 (CSV).
"""
from __future__ import annotations

import csv
import json
from pathlib import Path

import numpy as np

from groundshake.results._schema import COLUMNS, HISTORY_BASE, header, history_label

HOSTILE_TITLE = "<script>alert(1)</script> pad & \"co\" 'quoted' $x$"
HOSTILE_EQUIPMENT = "<img src=x onerror=alert(2)>"
HOSTILE_SENSOR = "corner </section><b>bold</b>"
HOSTILE_STATION = "<iframe src=\"http://example.invalid\"></iframe>"


def parsed(parser, text: str):
    """``parser`` (an ``html.parser.HTMLParser``) after it has read all of ``text``."""
    parser.feed(text)
    parser.close()
    return parser


def _grid_lines():
    xs = np.linspace(0.0, 6.0, 13)
    ys = np.linspace(0.0, 4.0, 9)
    zs = np.array([0.0, 0.3, 0.6, 0.9, 1.2])
    return xs, ys, zs


def _cells():
    """Element centres: a 6 x 4 x 0.6 m mat and a 2 x 2 x 0.6 m pedestal on it."""
    xs, ys, zs = _grid_lines()
    cx, cy, cz = (0.5 * (a[1:] + a[:-1]) for a in (xs, ys, zs))
    X, Y, Z = np.meshgrid(cx, cy, cz, indexing="ij")
    mat = Z < 0.6
    ped = (Z > 0.6) & (X > 2.0) & (X < 4.0) & (Y > 1.0) & (Y < 3.0)
    keep = mat | ped
    return np.column_stack([X[keep], Y[keep], Z[keep]])


def _nodes(centres):
    xs, ys, zs = _grid_lines()
    h = np.array([0.25, 0.25, 0.15])
    corners = np.concatenate([centres + h * np.array(s) for s in
                              np.array(np.meshgrid([-1, 1], [-1, 1], [-1, 1])).T.reshape(-1, 3)])
    return np.unique(np.round(corners, 9), axis=0)


def _write_csv(path: Path, header, rows) -> None:
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(header)
        for r in rows:
            w.writerow(["" if (isinstance(v, float) and not np.isfinite(v)) else
                        (f"{v:.9g}" if isinstance(v, (float, np.floating)) else v) for v in r])


def make_output_folder(path, *, hostile: bool = False, capacity: bool = True,
                       files: tuple[str, ...] | None = None) -> Path:
    """Write an invented output folder at ``path`` and return it."""
    out = Path(path)
    out.mkdir(parents=True, exist_ok=True)
    title = HOSTILE_TITLE if hostile else "Invented pad for report tests"
    eq = HOSTILE_EQUIPMENT if hostile else "transformer"
    sensor = HOSTILE_SENSOR if hostile else "top corner"
    station = HOSTILE_STATION if hostile else "DEMO"
    dt, n = 0.01, 1500
    t = np.arange(n) * dt
    env = np.exp(-((t - 5.0) / 2.5) ** 2)
    ground = np.stack([2.0 * env * np.sin(2 * np.pi * 2.0 * t),
                       1.5 * env * np.sin(2 * np.pi * 2.7 * t + 0.4),
                       0.8 * env * np.sin(2 * np.pi * 5.0 * t)])
    centres = _cells()
    nodes = _nodes(centres)
    anchors = [[-1.0, -0.6], [1.0, -0.6], [1.0, 0.6], [-1.0, 0.6]]
    cap = {"tension": 80e3, "shear": 50e3} if capacity else None
    scenario = {
        "title": title,
        "motion": {c: {"file": f"../records/demo-{c}.mseed", "units": "m/s2", "scale": 1.0,
                       "dt": None, "trace": None} for c in "xyz"} | {"target": "asce7:sds=1.0,sd1=0.6,tl=8",
                                                                    "match_target": False},
        "processing": {"enabled": True, "mean_removal": "whole", "pre_event_s": 0.0,
                       "baseline_order": 1, "highpass_hz": 0.1, "lowpass_hz": None,
                       "filter_order": 4, "taper_percent": 5.0, "pad": True},
        "materials": {"concrete": {"youngs_modulus": 30e9, "poisson_ratio": 0.2, "density": 2400.0}},
        "parts": [{"name": "mat", "material": "concrete", "origin": [0.0, 0.0, 0.0],
                   "size": [6.0, 4.0, 0.6]},
                  {"name": "pedestal", "material": "concrete", "origin": [2.0, 1.0, 0.6],
                   "size": [2.0, 2.0, 0.6]}],
        "mesh": {"element_size": 0.5, "element": "hex8-incompatible", "mass": "consistent"},
        "support": {"kind": "soil", "shear_wave_velocity": 250.0, "poisson_ratio": 0.33,
                    "density": 1900.0, "radiation_damping": True, "springs": "lumped"},
        "damping": {"ratio_percent": 5.0, "rayleigh_hz": None},
        "equipment": [{"name": eq, "mass": 18000.0, "mount": [3.0, 2.0], "footprint": [2.4, 1.6],
                       "cg_height": 1.6, "frequency_hz": [9.0, 9.0, 20.0], "damping_percent": 3.0,
                       "rotary_inertia": None, "anchors": anchors, "dead_load_factor": 1.0,
                       "capacity": cap,
                       "fp": {"sds": 1.0, "ap": 1.0, "rp": 2.5, "ip": 1.0, "z_over_h": 0.0}}],
        "sensors": [{"name": sensor, "at": [6.0, 4.0, 0.6]}],
        "analysis": {"method": "modal", "cutoff_hz": 50.0, "modes": None, "hht_alpha": 0.0,
                     "solver": "auto"},
        "floor_spectra": {"damping_percent": [2.0, 5.0], "broadening_percent": 15.0,
                          "periods": {"min": 0.02, "max": 5.0, "count": 120}},
    }
    tension = [41e3, 95e3, 30e3, 12e3]
    shear = [20e3, 21e3, 19e3, 22e3]
    anchors_out = []
    for (px, py), a, v in zip(anchors, tension, shear):
        b = {"position": [px, py], "peak_tension": a, "peak_shear": v, "time_of_peak_tension": 5.0,
             "time_of_peak_shear": 5.1, "min_axial": -a}
        if capacity:
            b.update(dc_tension=a / 80e3, dc_shear=v / 50e3)
        anchors_out.append(b)
    f = np.array([7.9, 8.4, 12.5, 15.0, 22.0, 31.0])
    summary = {
        "title": title,
        "schema": {"version": 2},
        "peaks": {"base_shear": {"x": 3.1e5, "y": 2.4e5}, "base_axial": 1.1e5,
                  "overturning_moment": {"x": 4.0e5, "y": 5.2e5}, "torsion": 3.0e-8,
                  "relative_displacement": {d: {"value": 1.2e-4, "time": 5.0, "at": [6.0, 4.0, 0.6]}
                                            for d in "xyz"},
                  "von_mises": 1.9e6, "principal_tension": 1.2e6},
        "sensors": {sensor: {"position": [6.0, 4.0, 0.6],
                             "peak_absolute_acceleration": {"x": 2.6, "y": 2.0, "z": 1.1},
                             "peak_relative_displacement": {"x": 1.2e-4, "y": 9e-5, "z": 3e-5}}},
        "equipment": {eq: {"mass": 18000.0, "cg": [3.0, 2.0, 2.2], "damping": 0.03,
                           "frequency_hz": [9.0, 9.0, 20.0],
                           "peak_absolute_acceleration": {"x": 5.1, "y": 4.2, "z": 1.9},
                           "peak_relative_displacement": {"x": 1e-3, "y": 1e-3, "z": 1e-4},
                           "anchors": anchors_out}
                      | ({"capacity": {"tension": 80e3, "shear": 50e3}} if capacity else {})},
        "worst_dc": ({"value": 95e3 / 80e3, "equipment": eq, "bolt": 2} if capacity else None),
        "modes": {"n_modes": 6, "modes": [{"mode": k + 1, "frequency": float(f[k]),
                                           "period": float(1 / f[k]), "dominant_direction": "x"}
                                          for k in range(6)]},
        "warnings": ["Only 84 % of the mass in z is in the modes kept; the rest is carried by "
                     "the missing-mass term.", f"Sensor '{sensor}' sits on an edge."],
        "cautions": ["This is an invented folder for tests."],
        "scenario": scenario,
        "records": [{"direction": c, "name": f"{station}.{c}", "component": c,
                     "source": f"demo-{c}.mseed",
                     "measures": {"pga": float(np.max(np.abs(ground[k]))), "pgv": 0.2, "pgd": 0.05,
                                  "arias_intensity": 0.9, "d5_95": 6.1, "cav": 4.4},
                     "history": ["mean removed (whole record)", "baseline order 1 fitted to velocity",
                                 "Butterworth high-pass 0.1 Hz, order 4, acausal, padded"],
                     "metadata": {"station": station, "network": "XX"}}
                    for k, c in enumerate("xyz")],
        "model": {"n_nodes": int(len(nodes)), "n_elements": int(len(centres)),
                  "n_dof": 3 * len(nodes), "element": "hex8-incompatible",
                  "materials": {"concrete": {"youngs_modulus": 30e9, "poisson_ratio": 0.2,
                                             "density": 2400.0}},
                  "support": {"kind": "soil", "springs": {"k_x": 1.1e9, "k_z": 1.6e9}},
                  "base": {"area": 24.0, "lx": 6.0, "ly": 4.0}},
        "analysis": {"method": "modal", "n_modes": 6, "dt": dt, "n_steps": n, "cutoff_hz": 50.0},
        "stresses": {"von_mises": {"value": 1.9e6, "at": [3.0, 2.0, 1.2], "time": 5.0}},
        "base": {"peaks": {k: {"value": 1e5, "time": 5.0} for k in ("Fx", "Fy", "Fz", "Mx", "My", "Mz")}},
        "floor_spectra": {"broadening_percent": 15.0},
        "provenance": {"version": "0.1.0", "command": f"groundshake run pad.toml -o out  # {title}",
                       "date": "2026-01-01T00:00:00Z",
                       "inputs": {"pad.toml": "0" * 64, "demo-x.mseed": "1" * 64}},
    }
    (out / "summary.json").write_text(json.dumps(summary, indent=1), encoding="utf-8")
    want = set(files) if files is not None else None

    def keep(name):
        return want is None or name in want

    if keep("histories"):
        base = np.stack([1e5 * g for g in ground] + [2e5 * ground[1], 2e5 * ground[0],
                                                    1e4 * ground[2]])
        cols = [t, *ground, *base, *(1.3 * ground), *(2.1 * ground),
                *(ground[k] * 1e4 for k in (0, 1, 0, 1)),
                *(np.abs(ground[k]) * 5e3 for k in (1, 0, 1, 0))]
        head = ([header("time", "time")] + [history_label("ground acc", direction=c).header for c in "xyz"]
                + [c.header for c in HISTORY_BASE]
                + [history_label("abs acc", name=sensor, direction=c).header for c in "xyz"]
                + [history_label("abs acc", name=eq, direction=c).header for c in "xyz"]
                + [history_label("tension", name=eq, bolt=k).header for k in range(1, 5)]
                + [history_label("shear", name=eq, bolt=k).header for k in range(1, 5)])
        _write_csv(out / "histories.csv", head, np.column_stack(cols))
    if keep("records"):
        # one as-read time column (results/_schema.py): the corrected series has a 1-s pad
        # at each end (negative times and past the end), the raw series is blank there
        pad = int(round(1.0 / dt))
        tt = np.arange(-pad, n + pad) * dt
        head, cols = ["time [s]"], [tt]
        for k, c in enumerate("xyz"):
            raw = np.full(tt.size, np.nan)
            raw[pad:pad + n] = ground[k] + 0.05
            cor = np.zeros(tt.size)
            cor[pad:pad + n] = ground[k]
            for state, a in (("raw", raw), ("corrected", cor)):
                v = np.cumsum(np.nan_to_num(a)) * dt
                d_ = np.cumsum(v) * dt
                if state == "raw":
                    v[np.isnan(a)] = np.nan
                    d_[np.isnan(a)] = np.nan
                head += [f"{c} {state} acc [m/s2]", f"{c} {state} vel [m/s]", f"{c} {state} disp [m]"]
                cols += [a, v, d_]
        _write_csv(out / "records.csv", head, np.column_stack(cols))
    periods = np.geomspace(0.02, 5.0, 60)
    shape = 1.0 + 1.5 * np.exp(-np.log(periods / 0.3) ** 2)
    if keep("ground_spectra"):
        rows = []
        for c, pga in zip("xyz", (2.0, 1.5, 0.8)):
            for d in (0.02, 0.05):
                rows += [[c, d, p, pga * s_ * (1.2 if d == 0.02 else 1.0)] for p, s_ in zip(periods, shape)]
        rows += [["target", 0.05, p, 9.80665 * min(1.0, 0.6 / p)] for p in periods]
        _write_csv(out / "ground_spectra.csv", [c.header for c in COLUMNS["ground_spectra"]], rows)
    if keep("floor_spectra"):
        rows = []
        amp = 2.0 * shape * np.exp(-np.log(periods / 0.11) ** 2) + shape
        for pt in (f"{eq} mount", "envelope"):
            for c in "xyz":
                for d in (0.02, 0.05):
                    rows += [[pt, c, d, p, a, 1.05 * a] for p, a in zip(periods, amp)]
        _write_csv(out / "floor_spectra.csv", [c.header for c in COLUMNS["floor_spectra"]], rows)
    if keep("modes"):
        ratio = np.array([[62, 0, 0], [0, 60, 0], [0, 0, 1], [20, 0, 0], [0, 22, 0], [0, 0, 83.]]) / 100
        rot = np.array([[0, 30, 0], [40, 0, 0], [0, 0, 90], [0, 10, 0], [12, 0, 0], [0, 0, 1.]]) / 100
        rows = [[k + 1, f[k], 1 / f[k], 0.05, *ratio[k], *ratio[:k + 1].sum(axis=0), *rot[k],
                 "xyz"[int(np.argmax(ratio[k]))]] for k in range(6)]
        _write_csv(out / "modes.csv", [c.header for c in COLUMNS["modes"]], rows)
    xs, ys, zs = _grid_lines()
    cells = np.column_stack([np.searchsorted(xs, centres[:, 0]) - 1, np.searchsorted(ys, centres[:, 1]) - 1,
                             np.searchsorted(zs, centres[:, 2]) - 1])
    node_cells = np.column_stack([np.argmin(np.abs(nodes[:, [a]] - L[None, :]), axis=1)
                                  for a, L in enumerate((xs, ys, zs))])
    if keep("element_peaks"):
        x, y, z = centres.T
        vm = 2e5 + 3e5 * x * (1.2 - z) + 1e5 * y
        _write_csv(out / "element_peaks.csv", [c.header for c in COLUMNS["element_peaks"][:6]],
                   np.column_stack([centres, vm, 0.6 * vm, -0.8 * vm]))
    if keep("mode_shapes"):
        x, y, z = nodes.T
        r = np.column_stack([x - 3.0, y - 2.0])
        shapes = [np.column_stack([z, 0 * z, 0 * z]), np.column_stack([0 * z, z, 0 * z]),
                  np.column_stack([-r[:, 1], r[:, 0], 0 * z]),
                  np.column_stack([0 * z, 0 * z, np.sin(np.pi * x / 6.0)])]
        head = ["x [m]", "y [m]", "z [m]"] + [f"mode {m} u{c} [m]" for m in range(1, 5) for c in "xyz"]
        _write_csv(out / "mode_shapes.csv", head, np.column_stack([nodes, *shapes]))
    if keep("mesh"):
        mesh = {"schema_version": 2, "lines": {"x": xs.tolist(), "y": ys.tolist(), "z": zs.tolist()},
                "parts": ["mat", "pedestal"], "cells": cells.tolist(),
                "cell_part": (centres[:, 2] > 0.6).astype(int).tolist(),
                "node_cells": node_cells.tolist(),
                "equipment": [{"name": eq, "footprint_lo": [1.8, 1.2, 1.2], "footprint_hi": [4.2, 2.8, 1.2],
                               "cg": [3.0, 2.0, 2.8], "anchors": [[3 + a, 2 + b, 1.2] for a, b in anchors]}],
                "sensors": [{"name": sensor, "at": [6.0, 4.0, 0.6]}]}
        (out / "mesh.json").write_text(json.dumps(mesh), encoding="utf-8")
    return out


_DEMO_CACHE: dict[str, object] = {}


def demo_run():
    """Run ``groundshake demo`` once per test process (shared by the demo and browser
    tests); returns (exit status, stdout, demo folder)."""
    if "run" not in _DEMO_CACHE:
        import contextlib
        import io
        import tempfile

        from groundshake.cli import main

        folder = Path(tempfile.mkdtemp(prefix="groundshake-demo-test-")) / "demo"
        buf = io.StringIO()
        with contextlib.redirect_stdout(buf):
            status = main(["demo", "-o", str(folder), "--quiet"])
        _DEMO_CACHE["run"] = (status, buf.getvalue(), folder)
    return _DEMO_CACHE["run"]
