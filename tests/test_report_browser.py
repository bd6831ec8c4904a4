"""The report renders in a real browser: headless Chromium draws the demo report to a
PNG (not blank, figures drawn), its DOM holds every section, and it prints to PDF.

Sources: Chromium itself as the independent renderer (Debian's package; `.ci/run`
installs it); the PNG signature (ISO/IEC 15948 §5.2) and matplotlib's PNG reader as an
independent decoder; the PDF header "%PDF-" (ISO 32000-1 §7.5.2); a blank page is one
uniform colour (definition); the report sections listed in issue 6.
"""
from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

from _report_fixture import demo_run

pytestmark = [pytest.mark.browser, pytest.mark.slow]

SECTION_IDS = ["inputs", "model", "modes", "results", "anchorage", "floor-spectra",
               "warnings", "cautions", "provenance"]


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
