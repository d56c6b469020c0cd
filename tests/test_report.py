"""The HTML report: self-contained, carries the safety cautions, renders in headless Chromium and prints whole.

Printing is checked the way a reader meets it: Chromium prints the report to PDF, poppler's
pdftotext reads the PDF back, and every column header of the comparison table, every row label of
the design-point tables and the summary sentence must be in that text (a table cut at the page edge
loses them). The layout check lays the page out with its print rules at the width of an A4 page.
"""

import base64
import html as html_lib
import re
import shutil
import struct
import subprocess
from pathlib import Path

import pytest

from perfchain.study.report import SAFETY, comparison_hidden
from perfchain.study.runner import run_study
from perfchain.study.schema import load_study
from perfchain.study.summary import comparison_summary

EXAMPLE = Path(__file__).resolve().parent.parent / "examples" / "kick_stage_storables.toml"
CHROMIUM = Path("/usr/bin/chromium")
PDFTOTEXT = shutil.which("pdftotext")
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--enable-logging=stderr", "--v=0"]


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    out = tmp_path_factory.mktemp("report") / "out"
    from conftest import example_result

    path = run_study(load_study(EXAMPLE), out, study_text=EXAMPLE.read_text(), source=str(EXAMPLE),
                     max_list=2, progress=None, result=example_result(EXAMPLE.stem))
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



def _words(text: str) -> str:
    return " ".join(text.split())


def _section(text: str, key: str) -> str:
    """The HTML of one report section (from its h2 to the next h2)."""
    start = text.index(f"<h2 id='{key}'>")
    end = text.find("<h2 ", start + 5)
    return text[start:end if end > 0 else None]


def _headers(fragment: str, tag: str = "th") -> list[str]:
    cells = re.findall(rf"<{tag}[^>]*>(.*?)</{tag}>", fragment, flags=re.S)
    return [_words(html_lib.unescape(re.sub(r"<[^>]+>", " ", c))) for c in cells]


def test_report_has_summary_contents_and_no_raw_keys(report):
    text = report.read_text(encoding="utf-8")
    assert text.index("<h2 id='summary'>") < text.index("<h2 id=contents>") < text.index("<h2 id='engines'>")
    for key in ("summary", "engines", "comparisons", "vehicles", "provenance"):
        assert f"href='#{key}'" in text and f"id='{key}'" in text
    body = _section(text, "summary") + _section(text, "engines") + _section(text, "comparisons")
    heads = _headers(body)
    assert heads and not [h for h in heads if "_" in h]           # no raw column keys
    assert "First 60" not in text                                  # grids are pivots now
    assert "Searched optimum" in text and "&#9733;" in text
    assert not re.search(r"<tr><th>[^<]*</th><td>-</td>", _section(text, "engines"))   # no empty design rows


@pytest.fixture(scope="module")
def pdf_text(report, tmp_path_factory):
    if not CHROMIUM.exists() or PDFTOTEXT is None:
        pytest.skip("needs chromium and pdftotext (poppler-utils)")
    tmp = tmp_path_factory.mktemp("pdf")
    pdf = tmp / "report.pdf"
    run = subprocess.run([str(CHROMIUM), "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
                          "--disable-component-update", "--disable-sync", "--no-first-run",
                          f"--user-data-dir={tmp / 'profile'}", "--no-pdf-header-footer", f"--print-to-pdf={pdf}",
                          report.as_uri()], capture_output=True, text=True, timeout=180)
    assert pdf.is_file() and pdf.stat().st_size > 50_000, run.stderr[-500:]
    # -raw: the text in the order it was drawn, so a header wrapped inside its cell stays together
    out = subprocess.run([PDFTOTEXT, "-raw", str(pdf), "-"], capture_output=True, text=True, timeout=60)
    return _words(out.stdout)


def test_printed_report_keeps_every_comparison_and_design_point_header(report, pdf_text):
    text = report.read_text(encoding="utf-8")
    comparison = _section(text, "comparisons")
    heads = set(_headers(comparison.split("<figure")[0]))
    # the columns the issue saw cut off at the page edge (labels from perfchain.study.labels)
    assert {"Rank", "Propellants", "Delivered vacuum Isp (s)", "Density-Isp, vacuum (kg s/m^3)"} <= heads
    design = _section(text, "engines")
    rows = set(_headers(design.split("<h4>Optimum")[0], "th")) - {""}
    assert {"Throat diameter", "Delivered vacuum Isp", "Chamber temperature", "Sizing"} <= rows
    missing = [h for h in sorted(heads | rows) if h not in pdf_text]
    assert missing == []


def test_printed_report_states_the_summary_sentence(report, pdf_text):
    from conftest import example_result

    res = example_result(EXAMPLE.stem)
    for rows in res.comparisons.values():
        sentence = comparison_summary(rows, "si")["sentence"]
        assert "wins on" in sentence and _words(sentence) in pdf_text
        assert set(comparison_hidden(rows)) >= {"isp_ambient"}   # a vacuum comparison: ambient = vacuum


@pytest.mark.skipif(not CHROMIUM.exists(), reason="needs Debian's chromium package")
def test_print_layout_fits_an_a4_page_width(report, tmp_path):
    # the print rules applied on screen at the printable width of A4 (210 mm - 2 x 12 mm = 703 CSS px):
    # nothing may stick out sideways (a table or figure wider than the page would be cut in print)
    script = ("<script>window.addEventListener('load',()=>{"
              "const w=document.documentElement.clientWidth;let worst=0;"
              "for(const e of document.querySelectorAll('table,figure,img,pre'))"
              "{worst=Math.max(worst,e.getBoundingClientRect().right)}"
              "console.log('WIDTH',w,Math.round(worst),document.documentElement.scrollWidth)})</script></body>")

    def widths(page: str):
        probe = tmp_path / "a4.html"
        probe.write_text(page.replace("@media print{", "@media all{").replace("</body>", script), encoding="utf-8")
        run = _chromium(probe, tmp_path, "--dump-dom", "--window-size=703,1000")
        found = re.findall(r'"WIDTH (\d+) (\d+) (\d+)"', run.stderr)
        assert found, run.stderr[-400:]
        return [int(v) for v in found[0]]

    page = report.read_text(encoding="utf-8")
    width, right, scroll = widths(page.replace("<h2 id='inputs'>", "<table><tr><td style='min-width:1200px'>wide"
                                               "</td></tr></table><h2 id='inputs'>"))
    assert right > width   # the check can fail: a table wider than the page is caught
    width, right, scroll = widths(page)
    assert right <= width and scroll <= width, (width, right, scroll)
