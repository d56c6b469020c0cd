"""The HTML report: self-contained, carries the safety cautions, and renders in headless Chromium."""

import base64
import re
import struct
import subprocess
from pathlib import Path

import pytest

from perfchain.study.report import SAFETY
from perfchain.study.runner import run_study
from perfchain.study.schema import load_study

EXAMPLE = Path(__file__).resolve().parent.parent / "examples" / "kick_stage_storables.toml"
CHROMIUM = Path("/usr/bin/chromium")
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--enable-logging=stderr", "--v=0"]


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    out = tmp_path_factory.mktemp("report") / "out"
    path = run_study(load_study(EXAMPLE), out, study_text=EXAMPLE.read_text(), source=str(EXAMPLE),
                     max_list=2, progress=None)
    return path


def test_report_is_self_contained_with_safety_and_provenance(report):
    text = report.read_text(encoding="utf-8")
    assert " ".join(SAFETY.split()) in " ".join(text.split())
    assert "MMH is acutely toxic" in text or "MMH and UDMH are acutely toxic" in text
    for banned in ("<script", "http://", "https://", "<link", "@import", "url("):
        assert banned not in text.lower(), banned
    assert "Provenance" in text and "Cantera" in text and "nasa_gas.yaml" in text
    images = re.findall(r"src='data:image/png;base64,([A-Za-z0-9+/=]+)'", text)
    plots = list((report.parent / "plots").glob("*.png"))
    assert plots and len(images) == len(plots)
    for data in images:  # PNG header: width and height in the IHDR chunk (PNG spec, ISO/IEC 15948)
        raw = base64.b64decode(data)
        assert raw[:8] == b"\x89PNG\r\n\x1a\n"
        width, height = struct.unpack(">II", raw[16:24])
        assert width > 100 and height > 100


def _chromium(page: Path, tmp: Path, *extra) -> subprocess.CompletedProcess:
    return subprocess.run([str(CHROMIUM), *FLAGS, f"--user-data-dir={tmp / 'profile'}", *extra, page.as_uri()],
                          capture_output=True, text=True, timeout=120)


def _console(stderr: str) -> list[str]:
    return [ln for ln in stderr.splitlines() if ":CONSOLE" in ln or "Uncaught" in ln]


@pytest.mark.skipif(not CHROMIUM.exists(), reason="needs Debian's chromium package")
def test_report_renders_in_chromium_without_console_errors(report, tmp_path):
    # the check can fail: a page with a script error is caught the same way
    bad = tmp_path / "bad.html"
    bad.write_text("<html><body><script>undefinedFunction()</script></body></html>")
    assert _console(_chromium(bad, tmp_path, "--dump-dom").stderr)

    run = _chromium(report, tmp_path, "--dump-dom")
    assert run.returncode == 0
    assert _console(run.stderr) == []
    assert run.stdout.count("<img") >= 5 and "Safety." in run.stdout

    # laid-out sizes: a copy of the report with a probe script that logs each image's box
    # (the report itself has no scripts)
    probe = tmp_path / "probe.html"
    probe.write_text(report.read_text(encoding="utf-8").replace(
        "</body>", "<script>window.addEventListener('load',()=>{for(const i of document.images)"
        "{const r=i.getBoundingClientRect();console.log('IMG',i.naturalWidth,Math.round(r.width),"
        "Math.round(r.height))}})</script></body>"), encoding="utf-8")
    sizes = [tuple(int(v) for v in m) for m in
             re.findall(r'"IMG (\d+) (\d+) (\d+)"', _chromium(probe, tmp_path, "--dump-dom").stderr)]
    assert len(sizes) == len(list((report.parent / "plots").glob("*.png")))
    assert all(w > 0 and bw > 50 and bh > 50 for w, bw, bh in sizes), sizes

    shot = tmp_path / "shot.png"
    _chromium(report, tmp_path, f"--screenshot={shot}", "--window-size=1200,1600")
    raw = shot.read_bytes()
    assert raw[:8] == b"\x89PNG\r\n\x1a\n" and len(raw) > 20_000  # not a blank page

