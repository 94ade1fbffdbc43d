"""The HTML report opens in a real browser (headless Chromium) without console
errors (a Content-Security-Policy violation — anything the page tried to load,
or a script the policy does not allow — is logged as one), renders to a
non-blank screenshot, and its one inline script runs.

Skips when Chromium is not installed, except when the environment variable
``CI`` is set: CI installs it, so its absence there is a failure.
"""

from __future__ import annotations

import os
import shutil
import subprocess

import pytest

from audit.report.html import write_html

CHROMIUM_NAMES = ("chromium", "chromium-browser", "google-chrome")


def _chromium() -> str:
    for name in CHROMIUM_NAMES:
        path = shutil.which(name)
        if path:
            return path
    if os.environ.get("CI"):
        pytest.fail("Chromium is required in CI (apt-get install chromium) but was not found")
    pytest.skip("Chromium not installed (Debian: apt-get install chromium); set CI to make this fail")


def _run(browser, tmp_path, *args):
    cmd = [browser, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
           "--disable-component-update", "--disable-sync", "--no-first-run",
           f"--user-data-dir={tmp_path / 'profile'}", "--enable-logging=stderr", "--v=0", *args]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=120)


@pytest.mark.parametrize("which", ["rich", "hostile"])
def test_report_renders_in_chromium(tmp_path, rich_result, hostile_result, which):
    browser = _chromium()
    result = rich_result if which == "rich" else hostile_result
    page = tmp_path / "report.html"
    write_html(result, page)
    png = tmp_path / "shot.png"
    run = _run(browser, tmp_path, f"--screenshot={png}", "--window-size=1200,3000", page.as_uri())
    assert png.exists(), run.stderr[-2000:]
    console = [line for line in run.stderr.splitlines()
               if "CONSOLE" in line or "Refused to" in line or "Content Security Policy" in line]
    assert console == [], console

    # not blank: a white page has zero variance; the banner, tables and figures
    # give a grey-level standard deviation of tens of units (0-255 scale)
    from matplotlib import image

    pixels = image.imread(png)
    gray = pixels[..., :3].mean(axis=2) * 255
    assert gray.std() > 10, gray.std()
    # and the verdict banner's colour (Okabe–Ito vermillion, #D55E00) is on screen
    rgb = (pixels[..., :3] * 255).round()
    assert ((abs(rgb[..., 0] - 0xD5) < 8) & (abs(rgb[..., 1] - 0x5E) < 8)
            & (abs(rgb[..., 2] - 0x00) < 8)).sum() > 100

    dom = _run(browser, tmp_path, "--dump-dom", page.as_uri()).stdout
    assert "Verdict: FAIL" in dom
    # the sorting script ran under the page's policy (allowed by its hash, nothing else):
    # it marks each sortable heading of the flagged-rows table
    assert dom.count('aria-sort="none"') >= 5, dom[:300]
    assert dom.lower().count("<script") == 1


def test_console_scan_catches_a_blocked_load(tmp_path):
    """Negative control: a page under the report's policy that tries to load an
    image produces the console line the test above looks for."""
    browser = _chromium()
    page = tmp_path / "bad.html"
    page.write_text("<!DOCTYPE html><meta http-equiv=\"Content-Security-Policy\" "
                    "content=\"default-src 'none'; style-src 'unsafe-inline'\">"
                    "<p>x</p><img src=\"http://example.invalid/x.png\">", encoding="utf-8")
    run = _run(browser, tmp_path, f"--screenshot={tmp_path / 'bad.png'}", page.as_uri())
    assert any("CONSOLE" in line for line in run.stderr.splitlines())
