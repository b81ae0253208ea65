"""The HTML report in headless Chromium: no console errors, every figure decoded, table present.

Chromium is Debian's ``chromium`` package (``.ci/run`` installs it when missing). The test is
skipped, saying why, only where no Chromium binary exists. A screenshot of the report is kept
as a test artifact in ``$VALBAND_TEST_ARTIFACTS`` (default ``test-artifacts/`` at the
repository root).
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
          "--disable-background-networking", "--disable-component-update", "--disable-sync"]


def _chromium() -> str | None:
    for name in ("chromium", "chromium-browser", "google-chrome"):
        path = shutil.which(name)
        if path:
            return path
    return None


def _run(exe: str, url: str, tmp: Path, *extra: str) -> subprocess.CompletedProcess:
    profile = tmp / f"profile-{len(list(tmp.iterdir()))}"
    return subprocess.run([exe, *_FLAGS, f"--user-data-dir={profile}", "--enable-logging=stderr",
                           "--v=0", "--virtual-time-budget=5000", *extra, url],
                          capture_output=True, text=True, timeout=180)


def _console_errors(stderr: str) -> list[str]:
    return [ln for ln in stderr.splitlines()
            if "CONSOLE" in ln and re.search(r"error|uncaught", ln, re.IGNORECASE)]


@pytest.fixture(scope="module")
def chromium():
    exe = _chromium()
    if exe is None:
        pytest.skip("no Chromium binary (install Debian's 'chromium' package; .ci/run does)")
    return exe


def test_console_error_detection_works(chromium, tmp_path):
    # the checker must see a console error when there is one (so a pass means something)
    page = tmp_path / "bad.html"
    page.write_text("<html><body><script>console.error('deliberate');"
                    "undefinedFunction();</script></body></html>")
    res = _run(chromium, page.as_uri(), tmp_path, "--dump-dom")
    assert _console_errors(res.stderr)


def test_report_in_headless_chromium(chromium, demo_run, tmp_path):
    out, summary = demo_run
    url = (out / "report.html").as_uri()
    dom = _run(chromium, url, tmp_path, "--dump-dom")
    assert dom.returncode == 0, dom.stderr[-2000:]
    assert not _console_errors(dom.stderr)
    body = re.search(r"<body[^>]*>", dom.stdout).group(0)
    loaded = int(re.search(r'data-figures-loaded="(\d+)"', body).group(1))
    total = int(re.search(r'data-figures-total="(\d+)"', body).group(1))
    assert total == len(list(out.rglob("*.png"))) and loaded == total
    assert '<h2 id="screening">Screening</h2>' in dom.stdout
    assert all(f">{r['name']}<" in dom.stdout for r in summary["screening"])
    artifacts = Path(os.environ.get("VALBAND_TEST_ARTIFACTS", REPO / "test-artifacts"))
    artifacts.mkdir(parents=True, exist_ok=True)
    shot = artifacts / "report-screenshot.png"
    res = _run(chromium, url, tmp_path, "--window-size=1280,2400", f"--screenshot={shot}")
    assert res.returncode == 0 and shot.read_bytes()[:4] == b"\x89PNG"
