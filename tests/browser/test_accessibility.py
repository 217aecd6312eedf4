"""Both served dashboard pages, checked for accessibility in headless Chromium.

axe-core (Deque's rules engine, carried by the ``axe-playwright-python`` package) runs
its WCAG 2.x rules on each page as it is drawn: no violation of impact "serious" or
"critical" is allowed; the "minor" and "moderate" ones are printed. Then the keyboard:
Tab reaches every control the page shows (slider handles, selects, the checkbox,
toggle buttons, upload and pin buttons), the arrow keys move a slider and a select,
Space picks a toggle button, and every slider handle carries its label as its
accessible name. Also what a sighted user must see: a help line under each control,
upload buttons without ipywidgets' "(0)" counter, and, for an air handler without an
economizer, a line saying so instead of a greyed choice.

References: W3C WCAG 2.1 (SC 1.3.1, 1.4.3, 1.4.11, 2.1.1, 2.4.7, 3.3.2, 4.1.2) as
axe-core 4.x implements them; the server and browser are those of ``conftest.py``.
"""

from __future__ import annotations

import re

import pytest
from test_dashboard_browser import WIDGET_TIMEOUT_MS, open_dashboard

pytestmark = pytest.mark.browser

PAGES = ("air_handler.ipynb", "plant.ipynb")
#: axe-core impact levels that fail the test.
BLOCKING = ("serious", "critical")
#: Rules with findings of impact "moderate" or "minor" that were fixed and must not come
#: back (axe-core 4.x rule ids): content outside every landmark (the page's box is now
#: role="main", Voila template), and the landmarks and headings around it.
FIXED_RULES = (
    "region",
    "landmark-one-main",
    "landmark-unique",
    "landmark-no-duplicate-main",
    "heading-order",
    "empty-heading",
    "page-has-heading-one",
)
#: Most Tab presses to go once round the page (about 40 stops on these pages).
MAX_TABS = 160

#: What the focused element is: its control's plantside class, its kind and its name.
_FOCUSED = """
() => {
  const el = document.activeElement;
  if (!el || el === document.body) { return null; }
  const control = el.closest('[class*="plantside-"]');
  const classes = control ? [...control.classList].filter(c => c.startsWith('plantside-')) : [];
  const kind = el.classList.contains('noUi-handle') ? 'slider' : el.tagName.toLowerCase();
  return {
    control: classes.join(' '),
    kind: kind,
    name: el.getAttribute('aria-label') || el.innerText || '',
    pressed: el.classList.contains('mod-active'),
  };
}
"""


def axe_violations(page) -> list[dict]:
    from axe_playwright_python.sync_playwright import Axe

    return Axe().run(page).response["violations"]


def tab_round(page) -> list[dict]:
    """Press Tab from the top of the page until focus comes round again; the stops met."""
    page.evaluate("() => { document.activeElement && document.activeElement.blur(); }")
    page.mouse.click(2, 2)  # focus the document itself, at its start
    stops = []
    seen = set()
    for _ in range(MAX_TABS):
        page.keyboard.press("Tab")
        focused = page.evaluate(_FOCUSED)
        if focused is None:
            continue
        key = (focused["control"], focused["kind"], focused["name"])
        if key in seen and len(stops) > 5:
            break
        seen.add(key)
        stops.append(focused)
    return stops


def tab_to(page, predicate, what: str) -> dict:
    """Press Tab until the focused element satisfies ``predicate``; fail naming ``what``."""
    for _ in range(MAX_TABS):
        page.keyboard.press("Tab")
        focused = page.evaluate(_FOCUSED)
        if focused and predicate(focused):
            return focused
    raise AssertionError(f"Tab never reached {what}")


def reached(stops, control: str, kind: str) -> bool:
    return any(control in s["control"].split() and s["kind"] == kind for s in stops)


@pytest.mark.parametrize("notebook", PAGES)
def test_axe_finds_no_serious_violation_and_every_control_is_named(
    dashboard_server, new_page, screenshots_folder, notebook
):
    page = new_page(1280, 800)
    open_dashboard(page, dashboard_server, notebook)
    page.wait_for_timeout(1000)  # the controls' names are set once the boxes are drawn
    # every widget is drawn, the hidden ones too (no "Click to show javascript error" box)
    assert page.locator(".jupyter-widgets-error-widget").count() == 0
    violations = axe_violations(page)
    print(f"\naxe-core on {notebook}: {len(violations)} rule(s) with findings")
    for violation in violations:
        targets = "; ".join(str(node["target"]) for node in violation["nodes"][:3])
        print(
            f"  {violation['impact']:>8}  {violation['id']} ({len(violation['nodes'])} nodes): "
            f"{violation['help']}  e.g. {targets}"
        )
    blocking = [v for v in violations if v["impact"] in BLOCKING or v["id"] in FIXED_RULES]
    assert not blocking, [(v["id"], v["impact"], v["nodes"][0]["html"][:200]) for v in blocking]

    # every slider handle is named by its label, and described by its help line
    handles = page.evaluate(
        """() => [...document.querySelectorAll('.plantside-control')]
              .filter(box => box.offsetParent !== null && box.querySelector('.noUi-handle'))
              .map(box => ({
                  label: box.querySelector('.plantside-label').innerText,
                  name: box.querySelector('.noUi-handle').getAttribute('aria-label'),
                  help: (document.getElementById(
                      box.querySelector('.noUi-handle').getAttribute('aria-describedby') || '-'
                  ) || {}).innerText || '',
              }))"""
    )
    assert len(handles) >= 3
    for handle in handles:
        assert handle["name"] == handle["label"], handle
        assert handle["help"], handle

    # every control box shows a help line a sighted user can read
    helps = page.evaluate(
        """() => [...document.querySelectorAll('.plantside-control')]
              .filter(box => box.offsetParent !== null)
              .map(box => {
                  const help = box.querySelector('.plantside-help');
                  const r = help ? help.getBoundingClientRect() : null;
                  return [box.querySelector('.plantside-label').innerText,
                          help ? help.innerText : '', r ? r.height : 0];
              })"""
    )
    assert len(helps) >= 10
    for label, text, height in helps:
        assert text and height > 8, (label, text, height)

    # the upload buttons show their title and no "(0)"; a screen reader hears the title
    uploads = page.evaluate(
        """() => [...document.querySelectorAll('.plantside-upload')].map(b => ({
              shown: getComputedStyle(b, '::before').content,
              text_size: getComputedStyle(b).fontSize,
              name: b.getAttribute('aria-label'),
              width: b.getBoundingClientRect().width,
          }))"""
    )
    assert len(uploads) == 2
    for upload in uploads:
        assert upload["text_size"] == "0px", upload  # the "description (0)" text takes no room
        shown = upload["shown"].strip('"')
        assert shown and not re.search(r"\(\d+\)", shown), upload
        assert upload["name"] == shown and upload["width"] > 60, upload
    # each chart's drawing is named by its title and subtitle, not "Vega visualization"
    names = page.evaluate(
        "() => [...document.querySelectorAll('.plantside-chart .vega-embed')]"
        ".map(e => e.getAttribute('aria-label') || '')"
    )
    assert len(names) >= 5
    for name in names:
        assert name and name != "Vega visualization" and len(name) > 20, name
    stem = notebook.removesuffix(".ipynb")
    page.screenshot(path=str(screenshots_folder / f"accessibility_{stem}_1280.png"))


def test_every_control_works_from_the_keyboard(dashboard_server, new_page):
    page = new_page(1280, 800)
    open_dashboard(page, dashboard_server, "plant.ipynb")
    page.wait_for_timeout(1000)
    stops = tab_round(page)
    print(f"\nTab stops once round the plant page: {len(stops)}")
    expected = {
        "plantside-air-handler": "select",
        "plantside-outdoor-air-fraction": "slider",
        "plantside-supply-air-temperature": "slider",
        "plantside-bypass-factor": "slider",
        "plantside-economizer": "select",
        "plantside-fan-control": "button",
        "plantside-climate": "select",
        "plantside-weather-upload": "button",
        "plantside-design-percent": "button",
        "plantside-pin": "button",
        "plantside-unit-system": "button",
        "plantside-scenario-upload": "button",
    }
    missing = [f"{c} ({k})" for c, k in expected.items() if not reached(stops, c, k)]
    assert not missing, (missing, stops)
    assert any(s["kind"] == "input" for s in stops)  # the economizer-operation checkbox
    # the plant page's parts switch (the water side's tables are on their own part) and the
    # plant's option choosers and margin sliders
    for control, kind in (
        ("plantside-page-choice", "button"),
        ("plantside-cooling-option", "select"),
        ("plantside-cooling-margin-percent", "slider"),
        ("plantside-heating-option", "select"),
        ("plantside-heating-margin-percent", "slider"),
    ):
        assert reached(stops, control, kind), (control, stops)

    # an arrow key moves the outdoor-air slider, and the figures follow
    figures = page.inner_text(".plantside-figures")
    readout = page.inner_text(".plantside-outdoor-air-fraction .widget-readout")
    page.mouse.click(2, 2)
    tab_to(
        page,
        lambda f: "plantside-outdoor-air-fraction" in f["control"] and f["kind"] == "slider",
        "the outdoor-air slider",
    )
    page.keyboard.press("ArrowRight")
    page.wait_for_function(
        "(before) => document.querySelector("
        "'.plantside-outdoor-air-fraction .widget-readout').innerText !== before",
        arg=readout,
        timeout=WIDGET_TIMEOUT_MS,
    )
    page.wait_for_function(
        "(before) => document.querySelector('.plantside-figures').innerText !== before",
        arg=figures,
        timeout=WIDGET_TIMEOUT_MS,
    )
    assert (
        float(page.inner_text(".plantside-outdoor-air-fraction .widget-readout"))
        == float(readout) + 1
    )  # one step of 1 % (controls.SLIDERS)

    # Space on a toggle button picks it
    page.mouse.click(2, 2)
    focused = tab_to(
        page,
        lambda f: "plantside-fan-control" in f["control"] and not f["pressed"],
        "a fan-control button not chosen",
    )
    page.keyboard.press("Space")
    page.wait_for_function(
        "(name) => [...document.querySelectorAll('.plantside-fan-control button.mod-active')]"
        ".some(b => b.innerText === name)",
        arg=focused["name"],
        timeout=WIDGET_TIMEOUT_MS,
    )

    # the arrow keys choose another air handler; for a 100 % outdoor-air unit the
    # economizer choice leaves the page and one line says the unit has none
    page.mouse.click(2, 2)
    tab_to(page, lambda f: "plantside-air-handler" in f["control"], "the air-handler choice")
    selected = (
        "() => { const s = document.querySelector('.plantside-air-handler select');"
        " return s.options[s.selectedIndex].text; }"
    )
    for key in ("ArrowUp",) * 6 + ("ArrowDown",) * 6:  # the unit may be above or below
        if "OA-" in page.evaluate(selected):
            break
        page.keyboard.press(key)
    assert "OA-" in page.evaluate(selected)
    page.wait_for_function(
        "() => document.querySelector('.plantside-economizer').closest('.plantside-control')"
        ".querySelector('.plantside-label').innerText.startsWith('Economizer: none')",
        timeout=WIDGET_TIMEOUT_MS,
    )
    assert not page.is_visible(".plantside-economizer select")
    assert not page.is_visible("input[type=checkbox]")  # economizer operation, hidden too
    line = page.evaluate(
        "() => document.querySelector('.plantside-economizer').closest('.plantside-control')"
        ".querySelector('.plantside-label').innerText"
    )
    assert "100 % outdoor-air" in line, line
    # every control the other unit shows is drawn (a slider sent no number was an error box)
    page.mouse.click(2, 2)
    tab_to(page, lambda f: "plantside-air-handler" in f["control"], "the air-handler choice")
    for key in ("ArrowDown",) * 6:
        if "OA-" not in page.evaluate(selected):
            break
        page.keyboard.press(key)
    page.wait_for_function(
        "() => document.querySelector('.plantside-economizer').closest('.plantside-control')"
        ".querySelector('.plantside-label').innerText === 'Economizer control'",
        timeout=WIDGET_TIMEOUT_MS,
    )
    assert page.locator(".jupyter-widgets-error-widget").count() == 0


def test_plant_parts_with_a_pinned_have_no_landmark_or_heading_findings(
    dashboard_server, new_page, screenshots_folder
):
    """The plant, water-side and sweep parts of the plant page, with A pinned (the A and
    B columns of the plant figures): the same rules as above, and the A column shown."""
    from test_dashboard_browser import (
        _SETTLED,
        _show_part,
        figures_text,
        move_slider,
        wait_for_change,
    )

    for width, height in ((1280, 800), (1920, 1080)):
        page = new_page(width, height)
        open_dashboard(page, dashboard_server, "plant.ipynb")
        _show_part(page, "Plant: cooling")  # nothing pinned: one column of figures
        page.wait_for_selector(".ps-plant-figures", timeout=WIDGET_TIMEOUT_MS)
        assert page.locator(".ps-plant-figures th:has-text('A (pinned)')").count() == 0
        page.screenshot(path=str(screenshots_folder / f"a11y_plant_{width}.png"), full_page=True)
        _show_part(page, "Design & year")
        page.click(".plantside-pin")
        page.evaluate(_SETTLED, 500)  # the charts redrawn for the part shown again and the pin
        shown = figures_text(page)
        move_slider(page, "outdoor-air-fraction", presses=5)
        wait_for_change(page, shown)
        for part, check in (
            ("Plant: cooling", ".ps-plant-figures th:has-text('A (pinned)')"),
            ("Water side", ".ps-ab-note"),
            ("Sweep", ".plantside-sweep .ps-part-title"),
        ):
            _show_part(page, part)
            page.wait_for_selector(check, timeout=WIDGET_TIMEOUT_MS)
            page.wait_for_timeout(500)
            name = part.split(":")[0].lower().replace(" ", "_")
            page.screenshot(
                path=str(screenshots_folder / f"a11y_{name}_pinned_{width}.png"), full_page=True
            )
            violations = axe_violations(page)
            print(f"\naxe-core on the {part} part, A pinned, {width} px: {len(violations)} rule(s)")
            for violation in violations:
                print(f"  {violation['impact']:>8}  {violation['id']}: {violation['help']}")
            failing = [v for v in violations if v["impact"] in BLOCKING or v["id"] in FIXED_RULES]
            assert not failing, [(v["id"], v["nodes"][0]["html"][:200]) for v in failing]
        page.close()
