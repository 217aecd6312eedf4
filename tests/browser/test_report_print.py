"""The design report printed to PDF by headless Chromium, as a browser's "Print" does.

The report of the I-P clinic (``plantside report``) is opened from its file, with the
network cut off (every request that is not the file itself fails the test), laid out
for print (``emulate_media(media="print")``) at the width of a printed A4 or Letter page
and printed with ``page.pdf``. Checked: the PDF has at least as many pages as the
report has page-started sections (each view's charts and the inputs start a page) plus
the first; every chart and table fits the page's width, and every chart (with its
caption) the page's height, so ``break-inside: avoid`` keeps it whole; nothing is wider
than the page; the contents list is left out and the text is black. The first pages
are saved as PNG (``tests/browser/.screenshots/report-print-*.png``) to look at.

Page sizes: A4 210 x 297 mm (ISO 216), Letter 8.5 x 11 in (ANSI/ASME Y14.1); the
report's ``@page`` margin is 12 mm; CSS pixels are 96 per inch (CSS Values and Units
Level 3, "absolute lengths").
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from plantside.charts.study_frames import CHARTS
from plantside.cli.main import main

pytestmark = pytest.mark.browser

CLINIC = Path(__file__).parents[2] / "example_data" / "scenarios" / "quillon_clinic.toml"
SCREENSHOTS = Path(__file__).resolve().parent / ".screenshots"
PX_PER_MM = 96 / 25.4
MARGIN_MM = 12
#: Paper (width, height) [mm].
PAPER = {"A4": (210.0, 297.0), "Letter": (215.9, 279.4)}

_LAYOUT = """
() => {
  const box = el => { const r = el.getBoundingClientRect(); return [r.width, r.height]; };
  return {
    charts: [...document.querySelectorAll('figure.ps-chart')].map(f => ({
      name: f.id, svg: box(f.querySelector('svg')), figure: box(f),
    })),
    tables: [...document.querySelectorAll('table')].map(t => box(t)[0]),
    scrollWidth: document.documentElement.scrollWidth,
    toc: getComputedStyle(document.querySelector('nav.ps-toc')).display,
    colour: getComputedStyle(document.body).color,
    sections: document.querySelectorAll('.ps-section').length,
  };
}
"""


def pdf_pages(data: bytes) -> int:
    """Pages of a PDF: the /Count of its page tree root (ISO 32000-1, 7.7.3.2)."""
    counts = [int(n) for n in re.findall(rb"/Type\s*/Pages\b[^>]*?/Count\s+(\d+)", data)]
    counts += [int(n) for n in re.findall(rb"/Count\s+(\d+)[^>]*?/Type\s*/Pages\b", data)]
    assert counts, "no page tree in the PDF"
    return max(counts)


@pytest.fixture(scope="module")
def report_file(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("report") / "clinic-report.html"
    assert main(["report", str(CLINIC), "--out", str(out)]) == 0
    return out


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_report_prints_without_cutting_a_chart(report_file, new_page, tmp_path, paper):
    width_mm, height_mm = PAPER[paper]
    content_w = (width_mm - 2 * MARGIN_MM) * PX_PER_MM
    content_h = (height_mm - 2 * MARGIN_MM) * PX_PER_MM
    page = new_page(width=int(content_w), height=int(content_h))
    outside = []
    page.route(
        "**/*",
        lambda route: (
            route.continue_()
            if route.request.url.startswith("file://")
            else (outside.append(route.request.url), route.abort())
        ),
    )
    page.goto(report_file.as_uri())
    page.emulate_media(media="print")
    layout = page.evaluate(_LAYOUT)
    pdf = tmp_path / f"report-{paper}.pdf"
    page.pdf(path=str(pdf), format=paper, print_background=True)
    assert outside == []  # a self-contained file asks for nothing

    assert pdf.exists() and pdf.stat().st_size > 100_000
    pages = pdf_pages(pdf.read_bytes())
    # the first page, then a page for each view's charts and for the inputs at least
    assert layout["sections"] == 4 + 1
    charts = layout["charts"]
    assert len(charts) == 4 * len(CHARTS)
    assert pages >= 1 + layout["sections"]
    assert pages >= len(charts) // 2  # no page holds more than two of these charts
    print(f"{paper}: {pages} pages, {len(charts)} charts")

    for chart in charts:  # whole on one page: as wide as the page at most, and as tall
        assert chart["svg"][0] <= content_w + 0.5, chart
        assert 0 < chart["figure"][1] <= content_h, chart
    assert max(layout["tables"]) <= content_w + 0.5
    assert layout["scrollWidth"] <= int(content_w) + 1  # nothing runs off the page's side
    assert layout["toc"] == "none"
    assert layout["colour"] == "rgb(0, 0, 0)"

    if paper == "A4":  # the first pages, to look at
        SCREENSHOTS.mkdir(parents=True, exist_ok=True)
        for number in range(3):
            page.screenshot(
                path=str(SCREENSHOTS / f"report-print-{number + 1}.png"),
                full_page=True,
                clip={
                    "x": 0,
                    "y": number * content_h,
                    "width": content_w,
                    "height": content_h,
                },
            )


def test_report_accessibility(report_file, new_page):
    """axe-core on the report as a page: no serious or critical violation."""
    from axe_playwright_python.sync_playwright import Axe

    page = new_page(width=1280, height=800)
    page.goto(report_file.as_uri())
    violations = Axe().run(page).response["violations"]
    for violation in violations:
        print(violation["impact"], violation["id"], len(violation["nodes"]))
    assert not [v for v in violations if v["impact"] in ("serious", "critical")]
