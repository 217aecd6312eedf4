"""The dashboard's controls, as a screen reader and a keyboard user meet them (kernel side).

What the page draws from these widgets is checked in the browser with axe-core
(``tests/browser/test_accessibility.py``); here, that every control carries what the
page needs: a name (a ``<label for>`` through ipywidgets' description, or the
:class:`~plantside.dashboard.controls.AccessibleName` that names a slider handle), a
help line that is on the page rather than in a tooltip nobody sees, no greyed economizer
choice for a unit that has none, and upload buttons without ipywidgets' "(0)" counter.
Reference: WCAG 2.1 SC 1.3.1 (Info and Relationships), SC 3.3.2 (Labels or Instructions),
SC 4.1.2 (Name, Role, Value); the rules of ``DEVELOPERS.md`` ("no control may change a
setting the user cannot see").
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
from plantside.dashboard.app import Dashboard
from plantside.dashboard.controls import SLIDERS, AccessibleName
from plantside.study.scenario import load_scenario

EXAMPLE_FILE = Path(__file__).resolve().parents[1] / "core" / "plantside" / "data"
EXAMPLE_FILE = EXAMPLE_FILE / "example_scenario.toml"
CSS = Path(__file__).resolve().parents[1] / "core" / "plantside" / "dashboard" / "dashboard.css"


@pytest.fixture(scope="module")
def scenario():
    return load_scenario(EXAMPLE_FILE)


@pytest.fixture(scope="module")
def plant(scenario):
    return Dashboard(scenario, view="plant")


def _text(html: str) -> str:
    return re.sub(r"<[^>]+>", "", html).strip()


def test_every_control_box_shows_its_help_on_the_page(plant):
    controls = plant.controls
    assert controls.boxes, "the dashboard lays out its control boxes"
    for name, box in controls.boxes.items():
        help_line = controls.helps[name]
        assert help_line in box.children, name
        assert _text(help_line.value), f"{name} has no help line"
    # a slider's help is its spec's help, shown on the page (a tooltip on a hidden label
    # never appeared)
    for name, spec in SLIDERS.items():
        assert _text(controls.helps[name].value) == spec.help
        assert not controls.widgets[name].tooltip


def test_help_lines_have_ids_unique_on_the_page(scenario):
    first = Dashboard(scenario, view="plant").controls
    second = Dashboard(scenario, view="air_handler").controls
    ids = [
        re.search(r"id='([^']+)'", c.helps[name].value).group(1)
        for c in (first, second)
        for name in c.boxes
    ]
    assert len(ids) == len(set(ids))


def test_every_control_is_named_for_a_screen_reader(plant):
    controls = plant.controls
    for name, box in controls.boxes.items():
        namer = controls.names[name]
        assert isinstance(namer, AccessibleName) and namer in box.children
        assert namer.label == _text(controls.labels[name].value), name
    # selects are named by a <label for> (the description), shown off screen
    for name in ("climate", "economizer"):
        widget = controls.widgets[name]
        assert widget.description, name
        assert "plantside-sr-label" in widget._dom_classes
    assert plant.air_handler_choice.description
    assert "plantside-sr-label" in plant.air_handler_choice._dom_classes
    # the climate's description is a help line, not the select's title (a title alone is
    # no label)
    assert not controls.widgets["climate"].tooltip
    # the checkbox reads its own description
    assert controls.widgets["economizer_integrated"].description


def test_slider_names_follow_the_units_on_show(scenario):
    dashboard = Dashboard(scenario, view="air_handler")
    controls = dashboard.controls
    assert controls.names["supply_air_temperature"].label.endswith("[°F]")  # an IP example
    controls.widgets["unit_system"].value = "SI"
    assert controls.names["supply_air_temperature"].label.endswith("[°C]")


def test_the_page_cannot_rename_a_control(plant):
    namer = plant.controls.names["outdoor_air_fraction"]
    before = namer.label
    namer.set_state({"label": "something else"})
    assert namer.label == before


def test_a_unit_without_economizer_shows_a_line_not_a_greyed_choice(scenario):
    index = next(i for i, a in enumerate(scenario.air_handlers) if a.settings.all_outdoor_air)
    dashboard = Dashboard(scenario, view="plant", air_handler=index)
    controls = dashboard.controls
    name = dashboard.state.names[index]
    # the choice is not on the page at all; one line says why
    assert controls.widgets["economizer"].layout.display == "none"
    assert controls.helps["economizer"].layout.display == "none"
    assert controls.boxes["economizer_integrated"].layout.display == "none"
    line = _text(controls.labels["economizer"].value)
    assert line.startswith("Economizer: none") and name in line and "100 % outdoor-air" in line
    # and it still takes nothing from the page
    assert controls.widgets["economizer"].disabled
    # a unit with an economizer shows the choice again
    other = next(i for i, a in enumerate(scenario.air_handlers) if not a.settings.all_outdoor_air)
    dashboard.air_handler_choice.value = other
    assert controls.widgets["economizer"].layout.display != "none"
    assert controls.boxes["economizer_integrated"].layout.display != "none"
    assert _text(controls.labels["economizer"].value) == "Economizer control"


def test_upload_buttons_show_their_title_without_the_counter(plant):
    css = CSS.read_text()
    for name in ("weather_upload", "scenario_upload"):
        widget = plant.controls.widgets[name]
        # ipywidgets writes "<description> (<count>)" into the button; the style sheet
        # shows the title instead, and the page names the button by it
        assert widget.tooltip == widget.description
        assert not re.search(r"\(\d+\)", widget.tooltip)
        assert "plantside-upload" in widget._dom_classes
    assert re.search(r"\.plantside-upload \{ font-size: 0 !important; \}", css)
    assert re.search(r"\.plantside-upload::before \{ content: attr\(title\)", css)


def test_every_slider_holds_a_number_for_every_air_handler(scenario):
    # a slider sent NaN is not drawn on the page (noUiSlider needs a start value), and
    # stays an error box when a unit that has the setting is chosen
    dashboard = Dashboard(scenario, view="plant")
    for index in range(len(scenario.air_handlers)):
        dashboard.air_handler_choice.value = index
        for name in SLIDERS:
            slider = dashboard.controls.widgets[name]
            assert math.isfinite(slider.value), (index, name, slider.value)
            assert slider.min <= slider.value <= slider.max, (index, name)
