"""The HTML report built from a run's output folder (invented folders from
_report_fixture.py — INVENTED TEST DATA).

Sources: the HTML Living Standard (WHATWG) for what a self-contained page is (data: URLs,
RFC 2397; no external src/href) parsed by Python's html.parser as an independent
parser; the PNG specification (ISO/IEC 15948 §5.2, §11.2.2 signature and IHDR); OWASP's
XSS prevention rule 1 (escape & < > " ' before putting untrusted text in HTML; from
memory); ASCE 7-16 §13.3.1 (Fp and its bounds, §13.3.1.2 vertical force); Python's
tomllib (TOML 1.0) for the scenario echo; elementary solid geometry for face counts;
the definition of a demand/capacity ratio (common practice); the four cautions of the
trade listed in issue 6.
"""
from __future__ import annotations

import csv

import base64
import html
import re
import struct
import tomllib
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest

from groundshake._errors import InputError
from groundshake.report import CAUTIONS, SECTIONS, fp_force, write_report
from groundshake.report._figures import exterior_faces, voxel_grid
from groundshake.report._html import esc, toml_text

from _report_fixture import (HOSTILE_EQUIPMENT, HOSTILE_SENSOR, HOSTILE_STATION,
                             HOSTILE_TITLE, make_output_folder)

SECTION_IDS = ["inputs", "model", "modes", "results", "anchorage", "floor-spectra",
               "warnings", "cautions", "provenance"]


class _Dom(HTMLParser):
    """Collect every start tag and its attributes (stdlib parser, independent of us)."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict]] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_data(self, data):
        self.text.append(data)


def _dom(text: str) -> _Dom:
    d = _Dom()
    d.feed(text)
    d.close()
    return d


@pytest.fixture(scope="module")
def plain(tmp_path_factory):
    out = make_output_folder(tmp_path_factory.mktemp("plain") / "run")
    path = write_report(out, progress=False)
    return out, path.read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def hostile(tmp_path_factory):
    out = make_output_folder(tmp_path_factory.mktemp("hostile") / "run", hostile=True,
                             files=("histories", "modes"))
    return write_report(out, progress=False).read_text(encoding="utf-8")


def test_report_is_self_contained(plain):
    _, text = plain
    dom = _dom(text)
    names = [t for t, _ in dom.tags]
    # WHATWG HTML: these elements would fetch or run something from outside the file
    for bad in ("script", "link", "iframe", "object", "embed", "base"):
        assert bad not in names, bad
    for tag, attrs in dom.tags:
        for key in ("src", "href", "srcset", "action", "poster", "data"):
            v = attrs.get(key)
            if v is None:
                continue
            # only in-page anchors and embedded data: URLs (RFC 2397) are allowed
            assert v.startswith("#") or v.startswith("data:image/"), (tag, key, v[:60])
    assert "http:" not in text and "https:" not in text      # nothing to fetch
    assert not re.search(r"url\(\s*['\"]?(?!data:)", text)  # CSS fetches nothing
    assert "@media print" in text                             # CSS Media Queries: print sheet


def test_images_are_embedded_png(plain):
    _, text = plain
    imgs = [a["src"] for t, a in _dom(text).tags if t == "img"]
    # Inputs (3 records, spectra), model, modes, stress, histories, floor spectra, envelope
    assert len(imgs) >= 10
    for src in imgs:
        assert src.startswith("data:image/png;base64,")
        raw = base64.b64decode(src.split(",", 1)[1], validate=True)
        assert raw[:8] == b"\x89PNG\r\n\x1a\n"                  # PNG spec §5.2 signature
        assert raw[12:16] == b"IHDR"                            # PNG spec §11.2.2: first chunk
        w, h = struct.unpack(">II", raw[16:24])
        assert 200 <= w <= 2000 and 100 <= h <= 6000


def test_every_section_present_in_order(plain):
    _, text = plain
    ids = [a.get("id") for t, a in _dom(text).tags if t == "section"]
    assert ids == SECTION_IDS                                   # issue 6, "Sections"
    assert [s for s, _ in SECTIONS] == SECTION_IDS
    for sid in SECTION_IDS:                                     # the table of contents links them
        assert f'href="#{sid}"' in text


def test_cautions_of_the_trade(plain):
    _, text = plain
    m = re.search(r'<section id="cautions">(.*?)</section>', text, re.S)
    body = html.unescape(re.sub(r"<[^>]+>", " ", m.group(1))).lower()
    # issue 6 "Cautions": the four of the trade
    for words in (("linear-elastic", "sliding", "uplift", "soil nonlinearity"),
                  ("screening, not design",),
                  ("record", "processed"),
                  ("governing code", "licensed engineer")):
        for w in words:
            assert w in body, w
    for c in CAUTIONS:                                          # every caution, escaped
        assert esc(c) in text
    assert "invented folder for tests" in body                  # the run's own cautions too


def test_capacity_comparison_never_called_a_code_check(plain):
    _, text = plain
    words = html.unescape(re.sub(r"<[^>]+>", " ", text)).lower()
    hits = [m.start() for m in re.finditer(r"code check", words)]
    assert hits                                                 # the disclaimer is there
    for i in hits:                                              # common practice: always negated
        assert re.search(r"\bnot\b", words[max(0, i - 40):i]), words[max(0, i - 60):i + 12]


def test_bolt_demand_over_capacity(plain):
    _, text = plain
    m = re.search(r'<section id="anchorage">(.*?)</section>', text, re.S)
    body = m.group(1)
    # D/C = demand / capacity (common practice): bolt 2, 95 kN over 80 kN entered
    assert f"{95e3 / 80e3:.4g}" in body
    assert f"{22e3 / 50e3:.4g}" in body                         # bolt 4 shear 22 kN / 50 kN
    over = re.findall(r'<tr class="over">(.*?)</tr>', body, re.S)
    assert len(over) == 1 and "above entered capacity" in over[0]
    assert "not a code check" in html.unescape(body)
    # The largest ratio is also in the key figures at the top
    head = text.split("<main>")[0]
    assert f"{95e3 / 80e3:.3g}" in head


def test_fp_force_asce7_13_3_1():
    w = 18000 * 9.80665
    # ASCE 7-16 §13.3.1: 0.4·1·1·W·1/2.5 = 0.16 W, below the floor 0.3·SDS·Ip·W
    f = fp_force(weight=w, sds=1.0, ap=1.0, rp=2.5, ip=1.0, z_over_h=0.0)
    assert f["fp_formula"] == pytest.approx(0.16 * w, rel=1e-12)
    assert f["fp"] == pytest.approx(0.3 * w, rel=1e-12)
    assert f["fv"] == pytest.approx(0.2 * w, rel=1e-12)       # §13.3.1.2: 0.2·SDS·Wp
    # 0.4·2.5·1·W·3/(2.5/1) = 1.2 W  (within 0.3 W .. 1.6 W)
    f = fp_force(weight=w, sds=1.0, ap=2.5, rp=2.5, ip=1.0, z_over_h=1.0)
    assert f["fp"] == pytest.approx(1.2 * w, rel=1e-12)
    # 0.4·2.5·1.5·W·3/(1.5/1.5) = 4.5 W, held at the ceiling 1.6·1.5·1 W = 2.4 W
    f = fp_force(weight=w, sds=1.5, ap=2.5, rp=1.5, ip=1.5, z_over_h=1.0)
    assert f["fp_max"] == pytest.approx(1.6 * 1.5 * 1.5 * w, rel=1e-12)
    assert f["fp"] == pytest.approx(f["fp_max"], rel=1e-12)


def test_hostile_text_is_escaped(hostile):
    text = hostile
    for s in (HOSTILE_TITLE, HOSTILE_EQUIPMENT, HOSTILE_SENSOR, HOSTILE_STATION):
        assert s not in text                                    # OWASP rule 1: never raw
        assert html.escape(s, quote=True) in text               # ...but shown, escaped
    dom = _dom(text)
    tags = [t for t, _ in dom.tags]
    assert "script" not in tags and "iframe" not in tags
    for t, a in dom.tags:
        assert not any(k.startswith("on") for k in a), (t, a)   # no event-handler attributes
        if t == "img":
            assert a["src"].startswith("data:image/png;base64,")
    # the title shows as text (html.parser decodes it back to the original string)
    assert HOSTILE_TITLE in "".join(dom.text)
    ids = [a.get("id") for t, a in dom.tags if t == "section"]
    assert ids == SECTION_IDS                                   # a "</section>" name cannot end one


def test_missing_files_leave_notes_not_errors(tmp_path):
    out = make_output_folder(tmp_path / "run", files=())
    text = write_report(out, progress=False).read_text(encoding="utf-8")
    ids = [a.get("id") for t, a in _dom(text).tags if t == "section"]
    assert ids == SECTION_IDS
    for stem in ("histories", "records", "modes", "element_peaks"):
        assert f"{stem}.csv was not in the output folder" in text


def test_no_summary_is_an_input_error(tmp_path):
    with pytest.raises(InputError, match="summary.json"):
        write_report(tmp_path)
    (tmp_path / "summary.json").write_text("{not json", encoding="utf-8")
    with pytest.raises(InputError, match="not valid JSON"):
        write_report(tmp_path)


def test_report_write_is_atomic(tmp_path, monkeypatch):
    out = make_output_folder(tmp_path / "run", files=())
    first = write_report(out, progress=False)
    before = first.read_bytes()
    from groundshake.report import _report

    def boom(self, bodies):
        raise RuntimeError("interrupted while writing")

    monkeypatch.setattr(_report._Builder, "page", boom)
    with pytest.raises(RuntimeError):
        write_report(out, progress=False)
    # rename-into-place (POSIX rename is atomic; common practice): old report intact,
    # no temporary file left behind
    assert first.read_bytes() == before
    assert sorted(p.name for p in out.iterdir() if p.name.startswith(".")) == []


def test_scenario_echo_round_trips_through_tomllib(plain):
    out, text = plain
    import json
    scen = json.loads((out / "summary.json").read_text())["scenario"]
    echo = toml_text(scen)
    back = tomllib.loads(echo)                                  # TOML 1.0 via Python's tomllib

    def drop_none(v):
        if isinstance(v, dict):
            return {k: drop_none(x) for k, x in v.items() if x is not None}
        if isinstance(v, list):
            return [drop_none(x) for x in v]
        return v

    assert back == drop_none(scen)
    assert "# lowpass_hz: not set" in echo                      # a default shown, not dropped
    assert esc("# rotary_inertia: not set") in text


def test_stress_figure_caption_names_the_largest_value(plain):
    out, text = plain
    data = np.genfromtxt(out / "element_peaks.csv", delimiter=",", names=True)
    vm = data[data.dtype.names[3]]
    top = vm.max() / 1e6                                        # numpy on the CSV, in MPa
    cap = re.search(r'<figure id="fig-stress">.*?<figcaption>(.*?)</figcaption>', text, re.S)
    assert cap and "MPa" in cap.group(1)
    assert f"{top:.4g} MPa" in html.unescape(cap.group(1))


def test_exterior_face_counts():
    X, Y, Z = np.meshgrid(np.arange(4.0), np.arange(3.0), np.arange(2.0), indexing="ij")
    full = np.ones((3, 2, 1), bool)
    v, cell, normal = exterior_faces(full, (X, Y, Z))
    # a 3 x 2 x 1 box of unit cubes: 2(3·2 + 2·1 + 3·1) = 22 unit faces (solid geometry)
    assert len(v) == 22
    assert np.allclose(np.abs(np.cross(v[:, 1] - v[:, 0], v[:, 3] - v[:, 0])).sum(axis=1), 1.0)
    X, Y, Z = np.meshgrid(np.arange(3.0), np.arange(3.0), np.arange(3.0), indexing="ij")
    cube = np.ones((2, 2, 2), bool)
    cube[1, 1, 1] = False
    v, cell, normal = exterior_faces(cube, (X, Y, Z))
    # a 2x2x2 cube with one corner cube removed keeps its surface: 24 unit faces
    assert len(v) == 24
    assert cube[tuple(cell.T)].all()                            # each face belongs to a filled cell
    # outward normals: as many faces look +x as −x (closed surface; Gauss)
    assert (normal == 0).sum() == (normal == 3).sum()


def test_voxel_grid_recovers_a_box_grid():
    xs, ys, zs = np.array([0, 1.0, 2.5]), np.array([0, 2.0]), np.array([0, 0.4, 1.2])
    cx, cy, cz = (0.5 * (a[1:] + a[:-1]) for a in (xs, ys, zs))
    C = np.stack(np.meshgrid(cx, cy, cz, indexing="ij"), -1).reshape(-1, 3)
    N = np.stack(np.meshgrid(xs, ys, zs, indexing="ij"), -1).reshape(-1, 3)
    g = voxel_grid(C, N)
    # the grid is the node coordinates by construction
    assert np.allclose(g.xs, xs) and np.allclose(g.zs, zs) and g.filled.all()
    assert voxel_grid(C + [0.3, 0, 0], N) is None               # centres off the cell middles


def test_fp_given_by_the_run_is_shown_beside_the_time_history(tmp_path):
    import json

    out = make_output_folder(tmp_path / "run", files=())
    s = json.loads((out / "summary.json").read_text())
    s["equipment"]["transformer"]["fp"] = {"fp": 52955.9, "fv": 35303.9, "peak_tension": 40e3,
                                           "peak_shear": 20e3, "time_history_peak_tension": 95e3,
                                           "time_history_peak_shear": 22e3}
    (out / "summary.json").write_text(json.dumps(s))
    text = write_report(out, progress=False).read_text(encoding="utf-8")
    body = re.search(r'<section id="anchorage">(.*?)</section>', text, re.S).group(1)
    # ratio = time-history peak / static value (definition of the comparison)
    assert f"{95e3 / 40e3:.4g}" in body and f"{22e3 / 20e3:.4g}" in body
    assert "52956" in body                                      # Fp itself, in N, 4 digits
    assert "not a code check" in html.unescape(body)


def test_corrected_record_is_drawn_on_the_original_time(tmp_path):
    import csv as _csv
    import json

    from groundshake.report._load import load_output
    from groundshake.report._report import _Builder

    out = make_output_folder(tmp_path / "run", files=())
    dt = 0.01
    raw_t = np.arange(1001) * dt                 # 10 s as read
    cor_t = np.arange(1601) * dt                 # 3 s of zeros padded at each end
    with open(out / "records.csv", "w", newline="") as fh:
        w = _csv.writer(fh)
        w.writerow(["time [s]", "x raw time [s]", "x raw acc [m/s2]", "x corrected time [s]",
                    "x corrected acc [m/s2]"])
        for k in range(cor_t.size):
            r = [raw_t[k], 0.1] if k < raw_t.size else ["", ""]
            w.writerow([cor_t[k], *r, cor_t[k], 0.1])
    b = _Builder(load_output(out))
    t = b.f.table("records")
    cols = {("acc", "raw"): 2, ("acc", "corrected"): 4}
    time_for = lambda i, comp, state: t.column(i - 1)           # noqa: E731
    # Boore (2005): the pads are equal at both ends, so the lead pad is half the extra
    assert b.pad_before("x", cols, time_for) == pytest.approx(3.0, abs=1e-9)
    s = json.loads((out / "summary.json").read_text())
    s["records"][0]["direction"] = "x"
    s["records"][0]["pad_before_s"] = 2.5                       # stated: taken as given
    (out / "summary.json").write_text(json.dumps(s))
    assert _Builder(load_output(out)).pad_before("x", cols, time_for) == 2.5


def test_fixture_grid_counts(tmp_path):
    out = make_output_folder(tmp_path / "o")
    with open(out / "element_peaks.csv", newline="") as fh:
        n_el = sum(1 for _ in csv.reader(fh)) - 1
    with open(out / "mode_shapes.csv", newline="") as fh:
        n_nodes = sum(1 for _ in csv.reader(fh)) - 1
    # 12 x 8 x 2 mat cells + 4 x 4 x 2 pedestal cells (structured grid counting)
    assert n_el == 12 * 8 * 2 + 4 * 4 * 2
    # mat nodes (13 x 9 x 3) + pedestal nodes above the mat's top (5 x 5 x 2)
    assert n_nodes == 13 * 9 * 3 + 5 * 5 * 2
