"""report.html: self-contained, and laid out for real in headless Chromium."""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from lxml import html as lxml_html

sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
from batch_helpers import FAKE, FIXTURES, write_lines  # noqa: E402

from normform.batch.runner import clean  # noqa: E402

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.fixture(scope="module")
def report(tmp_path_factory) -> Path:
    tmp = tmp_path_factory.mktemp("report")
    src = write_lines(tmp / "in.txt", 150, extra=[b"Bad \xff byte line, 1999", b"Doe, Has doi:99.x bad id, 2000",
                                                  b"<script>alert(1)</script>, Title & more, 1990",
                                                  b"Quillby, Counting Dyck words, J. A, 1980",
                                                  b"Quillby, Counting  Dyck-words., J. B, 1980"])
    clean([str(src), str(FIXTURES / "entries")], tmp / "out", toolkit=FAKE, jobs=1, quiet=True)
    return tmp / "out" / "report.html"


def test_report_is_self_contained_and_escapes_input(report):
    text = report.read_text("utf-8")
    tree = lxml_html.fromstring(text)
    # no external resources of any kind
    for el in tree.iter():
        for attr in ("src", "href"):
            value = el.get(attr)
            if value is not None:
                assert value.startswith("#"), (el.tag, attr, value)
    assert not tree.xpath("//link") and not tree.xpath("//script[@src]")
    assert "@import" not in text and "url(" not in text
    assert "<script>alert(1)</script>" not in text           # input text is escaped
    assert tree.xpath("//svg[@id='chart-confidence']//rect") and tree.xpath("//svg[@id='chart-fields']")
    assert len(tree.xpath("//table[@id='table']/tbody/tr")) == 159
    assert tree.xpath("//tr[@data-badid='1']")                # the invalid DOI row is filterable
    assert tree.xpath("//section[@class='cluster']")
    assert len(tree.xpath("//td[@class='math']/math")) == 3  # 3 formulas in the entry fixtures
    assert "@media print" in text


# Test-only script: write layout sizes of the key elements into the DOM.
PROBE = """<script>
(function () {
  function size(sel) { var el = document.querySelector(sel); if (!el) return null;
    var r = el.getBoundingClientRect(); return [r.width, r.height]; }
  var out = {table: size('#table'), hist: size('#chart-confidence'), fields: size('#chart-fields'),
             math: size('td.math math'), frac: size('td.math math mfrac'), cluster: size('section.cluster'),
             mathDisplay: getComputedStyle(document.querySelector('td.math math')).display,
             rows: document.querySelectorAll('#table tbody tr').length,
             dupLinks: document.querySelectorAll('#table a.dup').length};
  document.getElementById('f-review').checked = true;
  document.getElementById('f-review').dispatchEvent(new Event('change'));
  out.reviewShown = Array.prototype.filter.call(document.querySelectorAll('#table tbody tr'),
                                                function (r) { return !r.hidden; }).length;
  var pre = document.createElement('pre'); pre.id = 'layout-probe';
  pre.textContent = JSON.stringify(out); document.body.appendChild(pre);
})();
</script></body>"""


def _chromium(tmp: Path, *args: str) -> subprocess.CompletedProcess:
    flags = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
             "--disable-component-update", "--disable-sync", "--no-first-run",
             f"--user-data-dir={tmp / 'profile'}", "--window-size=1400,1600"]
    return subprocess.run([CHROMIUM, *flags, *args], capture_output=True, text=True, timeout=120)


@pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed (CI installs Debian's chromium)")
def test_report_lays_out_in_headless_chromium(report, tmp_path):
    shot = tmp_path / "report.png"
    done = _chromium(tmp_path, f"--screenshot={shot}", report.as_uri())
    assert shot.exists() and shot.stat().st_size > 10_000, done.stderr[-2000:]
    keep = Path("/tmp/normform-batch-report.png")     # for a human look
    shutil.copy(shot, keep)

    probe = tmp_path / "probe.html"
    probe.write_text(report.read_text("utf-8").replace("</body>", PROBE), encoding="utf-8")
    done = _chromium(tmp_path, "--dump-dom", probe.as_uri())
    m = re.search(r'<pre id="layout-probe">(.*?)</pre>', done.stdout, re.S)
    assert m, done.stderr[-2000:]
    sizes = json.loads(m.group(1).replace("&quot;", '"').replace("&amp;", "&"))
    for name in ("table", "hist", "fields", "math", "frac", "cluster"):
        width, height = sizes[name]
        assert width > 0 and height > 0, (name, sizes)
    # MathML is laid out natively (Chromium >= 109 implements MathML Core)
    assert sizes["frac"][1] > 15, sizes
    assert sizes["rows"] == 159 and sizes["dupLinks"] > 0
    review_rows = sum(1 for line in (report.parent / "needs-review.jsonl").open())
    assert sizes["reviewShown"] == review_rows


@pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed (CI installs Debian's chromium)")
def test_report_prints_without_the_controls(report, tmp_path):
    pdf = tmp_path / "report.pdf"
    done = _chromium(tmp_path, f"--print-to-pdf={pdf}", "--no-pdf-header-footer", report.as_uri())
    assert pdf.exists(), done.stderr[-2000:]
    data = pdf.read_bytes()
    pages = len(re.findall(rb"/Type\s*/Page[^s]", data))
    # the print stylesheet starts every duplicate cluster on a new page, after the table
    assert pages >= 3, pages
    text = report.read_text("utf-8")
    print_css = text[text.index("@media print"):]
    assert ".filters" in print_css and "display: none" in print_css
    assert "break-before: page" in print_css
