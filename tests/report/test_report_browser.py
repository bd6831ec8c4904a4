"""The report renders in a real browser: headless Chromium draws the demo report to a
PNG (not blank, figures drawn), its DOM holds every section, and it prints to PDF.

Sources: Chromium itself as the independent renderer (Debian's package; `.ci/run`
installs it); the PNG signature (ISO/IEC 15948 §5.2) and matplotlib's PNG reader as an
independent decoder; the PDF header "%PDF-" (ISO 32000-1 §7.5.2); a blank page is one
uniform colour (definition); the report sections listed in issues 6 and 16; exact unit definitions of NIST SP 811
Appendix B (1 kip = 4448.2216152605 N, 1 in = 0.0254 m) and standard gravity 9.80665 m/s²
(CGPM 1901) for the unit checks; pypdf-free page counting by the PDF page-object
dictionaries ("/Type /Page", ISO 32000-1 §7.7.3.3).
"""
from __future__ import annotations

import re
import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest

from _report_fixture import demo_run, parsed

pytestmark = [pytest.mark.browser, pytest.mark.slow]

SECTION_IDS = ["summary", "model", "modes", "response", "anchorage", "floor-spectra",
               "motion", "inputs", "provenance"]


def _chromium() -> str | None:
    for name in ("chromium", "chromium-browser", "google-chrome", "chrome"):
        path = shutil.which(name)
        if path:
            return path
    return None


def _flags(profile: Path) -> list[str]:
    return ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
            "--disable-component-update", "--disable-sync", "--no-first-run",
            "--disable-extensions", "--hide-scrollbars", f"--user-data-dir={profile}"]


@pytest.fixture(scope="module")
def report_file(tmp_path_factory) -> Path:
    if _chromium() is None:
        pytest.skip("chromium is not installed (apt-get install chromium); .ci/run installs it")
    status, _, folder = demo_run()
    assert status == 0
    return folder / "results" / "report.html"


def _run(args: list[str], profile: Path) -> subprocess.CompletedProcess:
    return subprocess.run([_chromium(), *_flags(profile), *args], capture_output=True,
                          text=True, timeout=240)


@pytest.fixture(scope="module")
def rendered(report_file, tmp_path_factory):
    """One Chromium run: the screenshot and the DOM as Chromium parsed it."""
    tmp = tmp_path_factory.mktemp("chromium")
    shot = tmp / "report.png"
    r = _run([f"--screenshot={shot}", "--dump-dom", "--window-size=1280,4000",
              report_file.as_uri()], tmp / "profile")
    return shot, r


def test_headless_screenshot_is_not_blank(rendered):
    from matplotlib.image import imread

    shot, r = rendered
    assert shot.is_file(), r.stderr[-2000:]
    assert shot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"       # PNG spec §5.2
    img = imread(str(shot))                                     # matplotlib's decoder
    assert img.shape[0] == 4000 and img.shape[1] == 1280        # the window asked for
    rgb = img[..., :3].reshape(-1, 3)
    lum = rgb @ np.array([0.2126, 0.7152, 0.0722])
    assert lum.std() > 0.05                                     # not one uniform colour
    # text, tables and figures: well over a few colours, and a real share of inked pixels
    colours = np.unique((rgb * 255).astype(np.uint8), axis=0)
    assert len(colours) > 200
    assert (lum < 0.85).mean() > 0.01
    print(f"screenshot: {shot}")                                # for a human to look at (-s)


def test_headless_dom_has_every_section(rendered):
    _, r = rendered
    dom = r.stdout
    assert "<html" in dom, r.stderr[-2000:]
    for sid in SECTION_IDS:
        assert f'<section id="{sid}">' in dom, sid              # issue 6 sections, as parsed
    assert dom.count("<img ") >= 8                              # the figures were kept


def test_prints_to_pdf(report_file, tmp_path):
    pdf = tmp_path / "report.pdf"
    r = _run([f"--print-to-pdf={pdf}", "--no-pdf-header-footer", report_file.as_uri()],
             tmp_path / "profile")
    assert pdf.is_file(), r.stderr[-2000:]
    data = pdf.read_bytes()
    assert data[:5] == b"%PDF-"                                 # ISO 32000-1 §7.5.2
    assert len(data) > 50_000                                   # pages with figures, not empty
    pages = len(re.findall(rb"/Type\s*/Page(?![s\w])", data))   # ISO 32000-1 §7.7.3.3 page objects
    assert 1 <= pages <= 12                                     # issue 16: the demo prints in ≤ 12 pages
    print(f"printed pages: {pages}")


class _Visible(HTMLParser):
    """The text a reader sees: everything but <style>, <script> and the inside of a
    closed <details> (its <summary> stays visible); tables' header cells collected."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.text: list[str] = []
        self.headers: list[str] = []
        self._th = False

    def handle_starttag(self, tag, attrs):
        self.stack.append(tag)
        self._th = tag == "th"

    def handle_endtag(self, tag):
        while self.stack:
            if self.stack.pop() == tag:
                break
        self._th = False

    def _hidden(self) -> bool:
        if "style" in self.stack or "script" in self.stack:
            return True
        if "details" in self.stack:
            i = len(self.stack) - 1 - self.stack[::-1].index("details")
            return "summary" not in self.stack[i:]
        return False

    def handle_data(self, data):
        if not self._hidden():
            self.text.append(data)
            if self._th:
                self.headers.append(data)


def _visible(dom: str) -> _Visible:
    return parsed(_Visible(), dom)


def _keys(tree) -> set[str]:
    """Every mapping key anywhere in ``tree`` (dicts and lists nested at any depth)."""
    out = set()

    def walk(d):
        if isinstance(d, dict):
            for k, v in d.items():
                out.add(str(k))
                walk(v)
        elif isinstance(d, list):
            for v in d:
                walk(v)
    walk(tree)
    return out


def _summary_keys(summary: dict) -> set[str]:
    return _keys({k: v for k, v in summary.items() if k != "scenario"})


def test_reader_sees_words_units_and_no_round_off(rendered, report_file):
    import json

    _, r = rendered
    v = _visible(r.stdout)
    text = " ".join(" ".join(v.text).split())
    summary = json.loads((report_file.parent / "summary.json").read_text())
    scenario_keys = _keys(summary.get("scenario") or {})
    # no JSON-style keys of summary.json in what a reader sees (scenario keys may be named:
    # they are what a user types)
    snake = {k for k in _summary_keys(summary) if "_" in k} - scenario_keys
    shown = sorted(k for k in snake if re.search(rf"(?<![\w.]){re.escape(k)}(?![\w])", text))
    assert shown == [], shown
    # engineering units are present in the headings and the summary
    for unit in ("[kN]", "[Hz]", "[mm]", "[MPa]", "[g]", "[%]"):
        assert unit in " ".join(v.headers) or unit in text, unit
    assert "kN·m" in text and "kPa" in text
    # no round-off shown as a result: no power-of-ten notation below 1e-9
    sup = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
    tiny = re.findall(r"×10\^?[−⁻-]([\d⁰¹²³⁴⁵⁶⁷⁸⁹]+)", text)
    assert not [e for e in tiny if int(e.translate(sup)) >= 9], tiny
    assert not re.search(r"\de-(?:0*[1-9]\d)", text)         # nor 1e-27 style
    # the first page's summary table: its answers, in words, with units
    first = text.split("Summary", 2)[-1][:4000]
    for words in ("Peak base shear, x", "Peak overturning moment about x", "Mode 1 frequency",
                  "Largest bolt demand / entered capacity", "Warnings of this run"):
        assert words in first, words
    # the base shear on the first page equals summary.json in kN (1 kN = 1000 N, SI)
    bs = summary["peaks"]["base_shear"]["x"] / 1e3
    assert f"{bs:.3g}" in first


@pytest.fixture(scope="module")
def us_report(report_file, tmp_path_factory):
    from groundshake.report import write_report

    return write_report(report_file.parent, path=tmp_path_factory.mktemp("us") / "us.html",
                        progress=False, units="us")


def test_us_customary_units_on_request(us_report, report_file, tmp_path):
    import json

    r = _run(["--dump-dom", us_report.as_uri()], tmp_path / "profile")
    v = _visible(r.stdout)
    text = " ".join(" ".join(v.text).split())
    heads = " ".join(v.headers)
    for unit in ("[kip]", "[in]", "[psi]", "[g]"):
        assert unit in heads or unit in text, unit
    assert "kip·ft" in text and "ksf" in text
    assert "[kN]" not in heads and "[mm]" not in heads
    summary = json.loads((report_file.parent / "summary.json").read_text())
    kip = summary["peaks"]["base_shear"]["x"] / 4448.2216152605  # NIST SP 811: 1 kip
    assert f"{kip:.3g}" in text

