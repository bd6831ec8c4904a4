"""The HTML report built from a run's output folder (invented folders from
test_report_fixture.py — INVENTED TEST DATA).

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
from groundshake.report import CAUTIONS, SECTIONS, write_report
from groundshake.results._anchorage import fp_comparison
from groundshake.report._figures import exterior_faces
from groundshake.report._html import esc, toml_text

from _report_fixture import (HOSTILE_EQUIPMENT, HOSTILE_SENSOR, HOSTILE_STATION,
                                 HOSTILE_TITLE, make_output_folder, parsed)

SECTION_IDS = ["summary", "model", "modes", "response", "anchorage", "floor-spectra",
               "motion", "inputs", "provenance"]


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
    return parsed(_Dom(), text)


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
    # model, mode shapes, stress, 2 history figures, floor spectra, 3 records, ground spectra
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
    m = re.search(r'<section id="summary">(.*?)</section>', text, re.S)   # on the first page
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
    # D/C = demand / capacity (common practice): bolt 2, 95 kN over 80 kN entered, 3 digits
    assert f"{95e3 / 80e3:.3g}" in body
    assert f"{22e3 / 50e3:.3g}" in body                         # bolt 4 shear 22 kN / 50 kN
    over = re.findall(r'<tr class="over">(.*?)</tr>', body, re.S)
    assert len(over) == 1 and "ABOVE the capacity entered" in over[0]
    assert "not a code check" in html.unescape(body)
    # The largest ratio is on the first page's summary, highlighted, and in words
    first = re.search(r'<section id="summary">(.*?)</section>', text, re.S).group(1)
    assert f"{95e3 / 80e3:.3g}" in first
    assert "Bolt 2 of transformer: tension demand is 1.19 times the capacity entered" in \
        html.unescape(first)


def test_fp_comparison_asce7_13_3_1():
    w = 18000 * 9.80665
    kw = dict(anchors=np.array([[-1.0, -0.6], [1.0, -0.6], [1.0, 0.6], [-1.0, 0.6]]),
              mass=18000.0, cg_height=1.6, dead_load_factor=1.0)
    # ASCE 7-16 §13.3.1: 0.4·1·1·W·1/2.5 = 0.16 W, below the floor 0.3·SDS·Ip·W
    f = fp_comparison(weight=w, sds=1.0, ap=1.0, rp=2.5, ip=1.0, z_over_h=0.0, **kw)
    assert f["fp_unbounded"] == pytest.approx(0.16 * w, rel=1e-12)
    assert f["fp"] == pytest.approx(0.3 * w, rel=1e-12)
    assert f["fv"] == pytest.approx(0.2 * w, rel=1e-12)       # §13.3.1.2: 0.2·SDS·Wp
    # 0.4·2.5·1·W·3/(2.5/1) = 1.2 W  (within 0.3 W .. 1.6 W)
    f = fp_comparison(weight=w, sds=1.0, ap=2.5, rp=2.5, ip=1.0, z_over_h=1.0, **kw)
    assert f["fp"] == pytest.approx(1.2 * w, rel=1e-12)
    # 0.4·2.5·1.5·W·3/(1.5/1.5) = 4.5 W, held at the ceiling 1.6·1.5·1.5 W
    f = fp_comparison(weight=w, sds=1.5, ap=2.5, rp=1.5, ip=1.5, z_over_h=1.0, **kw)
    assert f["fp"] == pytest.approx(1.6 * 1.5 * 1.5 * w, rel=1e-12)


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
    for stem in ("histories", "records", "modes", "element_peaks", "mesh"):
        assert f"{stem}." in text and "was not in the output folder" in text


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
    # the report's appendix is re-runnable: TOML that parses, without the notes key
    m = re.search(r"<details><summary>The scenario as run.*?<pre>(.*?)</pre></details>", text, re.S)
    shown = tomllib.loads(html.unescape(m.group(1)))            # TOML 1.0 via tomllib
    assert "notes" not in shown and shown["title"] == scen["title"]


def test_stress_figure_caption_names_the_largest_value(plain):
    out, text = plain
    data = np.genfromtxt(out / "element_peaks.csv", delimiter=",", names=True)
    vm = data[data.dtype.names[3]]
    top = vm.max() / 1e6                                        # numpy on the CSV, in MPa
    cap = re.search(r'<figure id="fig-stress">.*?<figcaption>(.*?)</figcaption>', text, re.S)
    assert cap and "MPa" in cap.group(1)
    assert f"{top:.3g}\u202fMPa" in html.unescape(cap.group(1))  # 3 significant digits


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


def test_fp_given_by_the_run_is_shown_beside_the_time_history(tmp_path):
    import json

    out = make_output_folder(tmp_path / "run", files=())
    s = json.loads((out / "summary.json").read_text())
    s["equipment"]["transformer"]["fp"] = {"fp": 52955.9, "fv": 35303.9, "peak_tension": 40e3,
                                           "peak_shear": 20e3, "time_history_peak_tension": 95e3,
                                           "time_history_peak_shear": 22e3}
    (out / "summary.json").write_text(json.dumps(s))
    text = write_report(out, progress=False).read_text(encoding="utf-8")
    body = html.unescape(re.search(r'<section id="anchorage">(.*?)</section>', text, re.S).group(1))
    # ratio = time-history peak / static value (definition of the comparison), 3 digits
    assert f"ratio {95e3 / 40e3:.3g}" in body and f"ratio {22e3 / 20e3:.3g}" in body
    assert ">53<" in body.replace("\u202f", "")               # Fp 52 956 N = 53 kN (SI prefix)
    assert "not a code check" in body


def test_corrected_record_is_drawn_on_the_original_time(tmp_path):
    """records.csv holds one as-read time column (the output contract): the raw series
    starts at 0 s, the corrected one at minus its 1-s lead pad (INVENTED folder)."""
    from unittest import mock

    import groundshake.report._figures as F

    out = make_output_folder(tmp_path / "run", files=("records",))
    seen = {}

    def spy(rows, title=""):
        seen.setdefault(title, rows)
        return None

    with mock.patch.object(F, "record_figure", spy):
        write_report(out, progress=False)
    rows = seen["direction x"]
    (t_raw, a_raw), (t_cor, a_cor) = rows[0][2], rows[0][3]
    ok = np.isfinite(a_raw)
    assert t_raw[ok][0] == pytest.approx(0.0)                   # first sample as read
    assert t_cor[0] == pytest.approx(-1.0)                      # the pad, at negative time


def test_report_command_in_us_units(tmp_path, capsys):
    """`groundshake report DIR --report-units us` rewrites the report in kip, kip·ft, in and
    psi (NIST SP 811, App. B: 1 kip = 4448.2216152605 N) from the same SI files."""
    from groundshake.cli import main

    out = make_output_folder(tmp_path / "run")
    assert main(["report", str(out), "--quiet"]) == 0
    si = (out / "report.html").read_text(encoding="utf-8")
    assert main(["report", str(out), "--force", "--quiet", "--report-units", "us"]) == 0
    us = (out / "report.html").read_text(encoding="utf-8")
    assert "[kN]" in si and "[kip]" not in si
    assert "[kip]" in us and "[kN]" not in us and "kip·ft" in html.unescape(us)
    body = html.unescape(re.sub(r"<[^>]+>", " ", us))
    assert f"{3.1e5 / 4448.2216152605:.3g}" in body                # base shear x, kip
    assert main(["report", str(out), "--force", "--report-units", "metric"]) == 2  # argparse
    capsys.readouterr()


def test_matching_results_are_shown_when_a_target_was_matched(tmp_path):
    """With summary motion.matching (the matching stage's report), the Ground motion part
    shows the acceptance checks in words with their limits and a before/after figure
    (INVENTED folder; values as the matching stage writes them, fractions of the target)."""
    import json

    out = make_output_folder(tmp_path / "run", files=())
    s = json.loads((out / "summary.json").read_text())
    per = list(np.geomspace(0.05, 4.0, 12))
    s["motion"] = {"matching": {"x": {
        "status": "converged", "converged": True, "tolerance": 0.05, "max_misfit": 0.049,
        "iterations": [{"iteration": k} for k in range(9)], "target": "invented target",
        "periods": per, "target_psa": [[2.0] * 12], "psa_before": [[1.0] * 12],
        "psa_after": [[2.05] * 12],
        "acceptance": {"largest_shortfall": 0.034, "largest_excess": 0.35, "longest_run_below": 3,
                       "husid_max_change": 0.11,
                       "checks": {"shortfall": True, "excess": False, "adjacent_below": True,
                                  "husid_change": True},
                       "criteria": {"max_shortfall": 0.1, "max_excess": 0.3,
                                    "max_adjacent_below": 9, "max_husid_change": 0.15}}}}}
    (out / "summary.json").write_text(json.dumps(s))
    text = write_report(out, progress=False).read_text(encoding="utf-8")
    body = html.unescape(re.sub(r"<[^>]+>", " ", re.search(
        r'<section id="motion">(.*?)</section>', text, re.S).group(1)))
    body = " ".join(body.split())
    assert "converged after 9 iterations" in body
    # fractions of the target shown in percent (×100, definition): 3.4 % and 35 %
    assert "largest shortfall below the target 3.4 % at most 10 % yes" in body
    assert "largest excess above the target 35 % at most 30 % NO" in body
    assert 'id="fig-matching"' in text
    over = re.findall(r'<tr class="over">(.*?)</tr>', text, re.S)
    assert any("excess" in o for o in over)                     # the failed check is marked


def test_an_older_output_folder_is_said_so_on_the_first_page(tmp_path):
    """A folder without the contract's version (written before it) still gives a report,
    which says on its first page that tables and figures may be missing (INVENTED folder)."""
    import json

    out = make_output_folder(tmp_path / "run")
    s = json.loads((out / "summary.json").read_text())
    del s["schema"]
    (out / "summary.json").write_text(json.dumps(s))
    (out / "modes.csv").write_text("mode,frequency [Hz]\n1,7.9\n")   # an old, short table
    text = write_report(out, progress=False).read_text(encoding="utf-8")
    first = html.unescape(re.search(r'<section id="summary">(.*?)</section>', text, re.S).group(1))
    assert "older output contract" in first and "run the scenario again" in first
    ids = [a.get("id") for t, a in _dom(text).tags if t == "section"]
    assert ids == SECTION_IDS                                   # every part still there
