"""The "How this is worked out" disclosures in headless Chromium (issue 14).

The derivations of a study (plant and air handlers, figures and charts) on one page, as
the dashboard's widgets and the report hold them: each opens from the keyboard (Tab to
its summary, Enter), nothing is wider than a 1280 px window, and axe-core (WCAG 2.1 A
and AA rules, as ``test_accessibility.py`` runs it) finds no serious violation.
Screenshots at 1280 and 1920 px go to ``tests/browser/.screenshots`` (ignored by git).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from plantside.charts.derivation_html import report_derivations
from plantside.charts.study_frames import CHARTS, study_chart_views
from plantside.study.figures import first_recirculating_unit
from plantside.study.run import run_study
from plantside.study.scenario import load_scenario
from plantside.study.water_side_run import run_water_side
from test_accessibility import BLOCKING, axe_violations

pytestmark = pytest.mark.browser

CLINIC = Path(__file__).resolve().parents[2] / "example_data" / "scenarios" / "quillon_clinic.toml"
SCREENSHOTS = Path(__file__).resolve().parent / ".screenshots"


@pytest.fixture(scope="module")
def page_file(tmp_path_factory):
    result = run_study(load_scenario(CLINIC))
    render = report_derivations(result, "IP", water_side=run_water_side(result), opened=False)
    parts = [render("figures", None, None), render("water", None, None)]
    shown = first_recirculating_unit(result.scenario)
    for key, view in study_chart_views(result, "Quillon", shown):
        parts += [f"<h2>{'Plant' if key is None else view.unit.name}</h2>"]
        parts += [render(name, key, view) for name in CHARTS]
    path = tmp_path_factory.mktemp("derivations") / "derivations.html"
    path.write_text(
        "<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'><title>Derivations</title>"
        "</head><body style='font-family:sans-serif;margin:16px'><main><h1>Derivations</h1>"
        f"{''.join(parts)}</main></body></html>",
        encoding="utf-8",
    )
    return path


def test_disclosures_open_from_the_keyboard_and_fit(new_page, page_file):
    page = new_page(1280, 800)
    page.goto(page_file.as_uri())
    count = page.locator("details.ps-derivation").count()
    assert count >= 8 + 1 + 4 * len(CHARTS)
    # Tab reaches the first summary; Enter opens it, Enter again closes it
    page.keyboard.press("Tab")
    focused = page.evaluate("() => document.activeElement.tagName.toLowerCase()")
    assert focused == "summary"
    page.keyboard.press("Enter")
    assert page.evaluate("() => document.querySelector('details.ps-derivation').open")
    page.keyboard.press("Enter")
    assert not page.evaluate("() => document.querySelector('details.ps-derivation').open")
    # every one open: nothing wider than the window (long steps wrap)
    page.evaluate("() => document.querySelectorAll('details').forEach(d => { d.open = true; })")
    widths = page.evaluate(
        "() => [document.documentElement.scrollWidth, document.documentElement.clientWidth]"
    )
    assert widths[0] <= widths[1], widths
    SCREENSHOTS.mkdir(parents=True, exist_ok=True)
    page.screenshot(path=str(SCREENSHOTS / "derivations-1280.png"))
    wide = new_page(1920, 1080)
    wide.goto(page_file.as_uri())
    wide.evaluate("() => document.querySelectorAll('details').forEach(d => { d.open = true; })")
    wide.screenshot(path=str(SCREENSHOTS / "derivations-1920.png"))
    serious = [v for v in axe_violations(page) if v["impact"] in BLOCKING]
    assert not serious, [(v["id"], v["help"]) for v in serious]
