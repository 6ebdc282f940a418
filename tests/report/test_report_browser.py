"""The report in a real browser (headless Chromium): it renders, runs nothing, logs no error.

Skipped only when /usr/bin/chromium is missing (.ci/run installs it).
"""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest
from report_support import build

from knockproof.report.html import render_html

CHROMIUM = Path("/usr/bin/chromium")
pytestmark = pytest.mark.skipif(not CHROMIUM.exists(),
                                reason="headless Chromium (/usr/bin/chromium) is not installed")

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--hide-scrollbars", "--enable-logging=stderr", "--v=0"]


def chromium(page: Path, tmp_path: Path, *extra: str) -> subprocess.CompletedProcess[str]:
    profile = tmp_path / f"profile-{len(list(tmp_path.iterdir()))}"
    profile.mkdir()
    return subprocess.run(
        [str(CHROMIUM), *FLAGS, f"--user-data-dir={profile}", *extra, page.as_uri()],
        capture_output=True, text=True, timeout=120,
    )


def console_lines(stderr: str) -> list[str]:
    return [line for line in stderr.splitlines() if ":CONSOLE" in line]


def test_the_harness_sees_scripts_that_run(tmp_path):
    """A control page whose script does run: the checks below must be able to see it."""
    page = tmp_path / "control.html"
    page.write_text("<!DOCTYPE html><html><head><title>ok</title></head><body>"
                    "<img src=\"missing.png\" onerror=\"document.body.appendChild("
                    "document.createElement('kp-xss'));document.title='PWNED'\">"
                    "<script>noSuchFunction()</script></body></html>", encoding="utf-8")
    r = chromium(page, tmp_path, "--dump-dom")
    assert "<kp-xss>" in r.stdout
    assert "<title>PWNED</title>" in r.stdout
    assert any("Uncaught" in line for line in console_lines(r.stderr))


def test_report_renders_in_the_browser_and_runs_no_payload(hostile_file, tmp_path):
    b = build(hostile_file)
    page = tmp_path / "report.html"
    page.write_text(render_html(b.tree, b.analysis, b.review), encoding="utf-8")

    r = chromium(page, tmp_path, "--dump-dom")
    assert r.returncode == 0, r.stderr[-2000:]
    dom = r.stdout
    assert re.search(r'<svg[^>]*class="kp-riser', dom)
    assert len(re.findall(r'<svg[^>]*class="kp-plot"', dom)) >= 1
    assert 'id="verdict"' in dom and "qualified person" in dom
    assert "<kp-xss" not in dom
    title = re.search(r"<title>(.*?)</title>", dom, re.S)
    assert title is not None and "PWNED" != title.group(1).strip()
    assert title.group(1).startswith("Water-hammer screening: &lt;script&gt;")
    assert console_lines(r.stderr) == []  # no error, no refused inline handler, nothing

    shot = tmp_path / "report.png"
    r = chromium(page, tmp_path, f"--screenshot={shot}", "--window-size=1280,2400")
    assert r.returncode == 0, r.stderr[-2000:]
    data = shot.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 20_000
    assert console_lines(r.stderr) == []


def test_clinic_report_screenshot(clinic_html, tmp_path):
    page = tmp_path / "clinic.html"
    page.write_text(clinic_html, encoding="utf-8")
    shot = tmp_path / "clinic.png"
    r = chromium(page, tmp_path, f"--screenshot={shot}", "--window-size=1280,3000")
    assert r.returncode == 0, r.stderr[-2000:]
    assert shot.read_bytes()[:4] == b"\x89PNG"
    assert console_lines(r.stderr) == []
