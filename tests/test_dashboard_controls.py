"""The dashboard's controls: no control changes a setting the page does not show.

Every test drives the real :class:`~plantside.dashboard.app.Dashboard` through its
widgets; what a browser sends is simulated with ``widget.set_state(...)``, the path
ipywidgets takes for a comm message from the page. References are the model's own
settings and results (``AirHandlerSettings`` ranges, ``run_air_handler``) and the
unit conversions of ``plantside.units`` (°F = 1.8 °C + 32, exact by definition).
"""

from __future__ import annotations

import re
from dataclasses import replace
from pathlib import Path

import pytest
from plantside.dashboard.app import Dashboard
from plantside.dashboard.state import DESIGN_KINDS, DashboardState, condition_text
from plantside.study.scenario import load_scenario, loads_scenario

EXAMPLE = Path(__file__).resolve().parents[1] / "core" / "plantside" / "data"
EXAMPLE_FILE = EXAMPLE / "example_scenario.toml"


def fahrenheit(celsius):
    return 1.8 * celsius + 32.0  # definition of the degree Fahrenheit


@pytest.fixture(scope="module")
def scenario():
    return load_scenario(EXAMPLE_FILE)


def index_of(scenario, predicate):
    return next(i for i, spec in enumerate(scenario.air_handlers) if predicate(spec.settings))


class Sent:
    """Records the state the kernel sends to the page (stands in for the widget's comm)."""

    def __init__(self, widget):
        self.states = []
        widget._send = lambda msg, buffers=None: self.states.append(msg.get("state", {}))


# ------------------------------------------------------------------ 1: coil model
def test_bypass_factor_never_switches_a_dew_point_coil(scenario):
    index = index_of(scenario, lambda s: s.coil_model == "leaving_dew_point")
    dashboard = Dashboard(scenario, view="plant", air_handler=index)
    controls, state = dashboard.controls, dashboard.state
    spec = scenario.air_handlers[index].settings
    # the control that sets this coil is shown with the scenario's value (°F on show)
    ldp = controls.widgets["leaving_dew_point"]
    assert not ldp.disabled
    assert controls.boxes["leaving_dew_point"].layout.display != "none"
    assert ldp.value == pytest.approx(fahrenheit(spec.leaving_dew_point))
    # moving the bypass factor changes the bypass factor only, never the coil model
    controls.widgets["bypass_factor"].value = 0.11
    settings = state.current_scenario().air_handlers[index].settings
    assert settings.coil_model == "leaving_dew_point"
    assert settings.leaving_dew_point == pytest.approx(spec.leaving_dew_point)
    assert settings.bypass_factor == pytest.approx(0.11)
    # the leaving dew point control moves the model's leaving dew point
    ldp.value = 48.0
    settings = state.current_scenario().air_handlers[index].settings
    assert settings.coil_model == "leaving_dew_point"
    assert settings.leaving_dew_point == pytest.approx((48.0 - 32.0) / 1.8)
    assert state.result.units[index].study.settings.leaving_dew_point == pytest.approx(
        (48.0 - 32.0) / 1.8
    )


def test_leaving_dew_point_is_hidden_and_refused_for_a_bypass_factor_coil(scenario):
    index = index_of(scenario, lambda s: s.coil_model == "bypass_factor")
    dashboard = Dashboard(scenario, view="air_handler", air_handler=index)
    controls = dashboard.controls
    assert controls.widgets["leaving_dew_point"].disabled
    assert controls.boxes["leaving_dew_point"].layout.display == "none"
    before = dashboard.state.inputs
    assert not dashboard.state.set("leaving_dew_point", 10.0)
    assert dashboard.state.inputs == before
    assert "does not apply" in dashboard.state.messages["leaving_dew_point"]


def test_bypass_factor_is_disabled_for_an_apparatus_dew_point_coil(scenario):
    index = index_of(scenario, lambda s: not s.all_outdoor_air)
    spec = scenario.air_handlers[index]
    settings = replace(spec.settings, coil_model="apparatus_dew_point", apparatus_dew_point=9.0)
    specs = list(scenario.air_handlers)
    specs[index] = replace(spec, settings=settings)
    changed = replace(scenario, air_handlers=tuple(specs))
    dashboard = Dashboard(changed, view="air_handler", air_handler=index)
    slider = dashboard.controls.widgets["bypass_factor"]
    assert slider.disabled
    assert "apparatus dew point" in dashboard.controls.labels["bypass_factor"].value
    assert not dashboard.state.set("bypass_factor", 0.2)
    assert dashboard.state.current_scenario().air_handlers[index].settings == settings


# ------------------------------------------------------------------ 2: pinned comparison
def test_pinned_a_is_compared_on_the_same_air_handler(scenario):
    dashboard = Dashboard(scenario, view="plant", air_handler=1)
    state = dashboard.state
    dashboard.controls.widgets["pin"].click()
    other = 0
    dashboard.air_handler_choice.value = other
    pinned = state.pinned_result()
    assert pinned.unit.name == scenario.air_handlers[other].settings.name
    assert state.result.unit.name == pinned.unit.name
    # nothing was moved: A's unit charts are B's, row for row (one study, one unit)
    frames = dashboard._combined("sweep", state.inputs.unit_system)
    for frame in frames.values():
        if "scenario" in frame:
            a = frame[frame["scenario"] == "A"].drop(columns="scenario").reset_index(drop=True)
            b = frame[frame["scenario"] == "B"].drop(columns="scenario").reset_index(drop=True)
            assert a.equals(b)


# ------------------------------------------------------------------ 3: export stamps
def test_plant_stamp_names_every_changed_unit_and_a_and_b(scenario):
    first = index_of(scenario, lambda s: not s.all_outdoor_air)
    oa = index_of(scenario, lambda s: s.all_outdoor_air)
    dashboard = Dashboard(scenario, view="plant", air_handler=first)
    controls = dashboard.controls
    assert "all air handlers as in the scenario file" in dashboard.stamp()
    controls.widgets["pin"].click()
    controls.widgets["supply_air_temperature"].value = 57.0
    dashboard.air_handler_choice.value = oa
    stamp = dashboard.stamp()
    name = scenario.air_handlers[first].settings.name
    a_part, b_part = stamp.split(" · B: ")
    assert "A: " in a_part and "all air handlers as in the scenario file" in a_part
    assert f"{name}: supply 57.0 °F (file: supply 55.0 °F)" in b_part
    # the 100 % outdoor-air unit shown has no economizer and its coil holds a dew point
    oa_text = b_part.split("air handler shown ")[1].split(";")[0]
    assert "economizer" not in oa_text.lower() and "leaving dew point" in oa_text


# ------------------------------------------------------------------ 4: cautions name the unit
def test_cautions_name_their_air_handler(scenario):
    dashboard = Dashboard(scenario, view="plant")
    names = tuple(spec.settings.name for spec in scenario.air_handlers)
    assert dashboard.state.result.cautions
    for text in dashboard.state.result.cautions:
        assert text.startswith(tuple(f"{name}: " for name in names)), text


# ------------------------------------------------------------------ 7: unreachable supply
def test_unreachable_supply_says_the_lowest_reachable_in_the_numbers_on_show(scenario):
    index = index_of(scenario, lambda s: s.coil_model == "bypass_factor")
    dashboard = Dashboard(scenario, view="air_handler", air_handler=index)
    slider = dashboard.controls.widgets["supply_air_temperature"]
    slider.value = 43.0
    message = dashboard.controls.messages["supply_air_temperature"].value
    text = re.sub(r"<[^>]+>", " ", message)
    lowest = float(re.search(r"Lowest reachable supply air temperature: ([\d.]+) °F", text)[1])
    # the design condition as the page writes it (the cards' function, the same rounding),
    # not SI figures rounded and converted again
    conditions = dashboard.state.result.climate.conditions
    shown = [condition_text(conditions.cooling(kind, 0.4), "IP") for kind in DESIGN_KINDS]
    assert any(f"at {condition} with" in text for condition in shown), text
    assert f"allowed: {lowest:.1f} °F to" in text
    # the limit is the model's: the quoted lowest is accepted, one step (1 °F) below refused
    slider.value = 60.0
    slider.value = lowest
    assert dashboard.state.messages["supply_air_temperature"] == ""
    slider.value = lowest - 1.0
    assert "Lowest reachable" in dashboard.state.messages["supply_air_temperature"]


# ------------------------------------------------------------------ 13: ranges are the model's
def test_slider_ranges_are_what_the_model_accepts(scenario):
    for index, spec in enumerate(scenario.air_handlers):
        dashboard_state = DashboardState(scenario, air_handler=index)
        low, high = dashboard_state.control_range("supply_air_temperature")
        # AirHandlerSettings: supply_drybulb 4 °C to zone_cooling_drybulb - 0.5 K
        assert (low, high) == pytest.approx((4.0, spec.settings.zone_cooling_drybulb - 0.5))
    dashboard = Dashboard(scenario, view="air_handler", air_handler=1)
    slider = dashboard.controls.widgets["supply_air_temperature"]
    zone = scenario.air_handlers[1].settings.zone_cooling_drybulb
    assert (slider.min, slider.max) == pytest.approx((fahrenheit(4.0), fahrenheit(zone - 0.5)))
    assert dashboard.controls.widgets["bypass_factor"].max == pytest.approx(0.5)


def test_an_uploaded_scenario_is_shown_with_the_values_in_use(scenario):
    head, *units = EXAMPLE_FILE.read_text("utf-8").split("[[air_handler]]")
    units[1] = re.sub(r"supply_drybulb = 55\.0", "supply_drybulb = 68.0", units[1])
    units[1] = re.sub(r"bypass_factor = 0\.10", "bypass_factor = 0.40", units[1])
    text = "[[air_handler]]".join([head, *units])
    dashboard = Dashboard(scenario, view="air_handler", air_handler=1)
    assert dashboard.load_scenario_file("upload.toml", text.encode())
    dashboard.air_handler_choice.value = 1
    controls = dashboard.controls
    settings = dashboard.state.current_scenario().air_handlers[1].settings
    assert settings.supply_drybulb == pytest.approx((68.0 - 32.0) / 1.8)
    assert settings.bypass_factor == pytest.approx(0.40)
    assert controls.widgets["supply_air_temperature"].value == pytest.approx(68.0)
    assert controls.widgets["bypass_factor"].value == pytest.approx(0.40)
    # a value the dashboard's control cannot show is refused, naming field and range
    refused = text.replace("bypass_factor = 0.40", "bypass_factor = 0.70", 1)
    assert loads_scenario(refused, "x.toml")  # the model itself takes 0.7 (below 1)
    assert not dashboard.load_scenario_file("upload2.toml", refused.encode())
    message = dashboard.state.messages["scenario"]
    assert "bypass_factor = 0.70" in message and "0.00 to 0.50" in message


# ------------------------------------------------------------------ 14: what the page sends
@pytest.mark.parametrize("raw", [True, "1_0", "Infinity", 1e308, None, float("nan"), [5]])
def test_page_values_of_the_wrong_type_are_refused_and_pushed_back(scenario, raw):
    dashboard = Dashboard(scenario, view="air_handler", air_handler=1)
    slider = dashboard.controls.widgets["outdoor_air_fraction"]
    kept, before = slider.value, dashboard.state.inputs
    sent = Sent(slider)
    slider.set_state({"value": raw})
    assert slider.value == kept
    assert dashboard.state.inputs == before
    assert sent.states and sent.states[-1]["value"] == kept  # the page gets the kept value
    assert "plantside-message" in dashboard.controls.messages["outdoor_air_fraction"].value


def test_a_good_page_value_is_taken(scenario):
    dashboard = Dashboard(scenario, view="air_handler", air_handler=1)
    dashboard.controls.widgets["outdoor_air_fraction"].set_state({"value": 35})
    assert dashboard.state.inputs.outdoor_air_fraction == pytest.approx(0.35)
    dashboard.controls.widgets["fan_control"].set_state({"index": 0})
    assert dashboard.state.inputs.fan_control == "constant_volume"


def test_disabled_controls_take_nothing_from_the_page(scenario):
    oa = index_of(scenario, lambda s: s.all_outdoor_air)
    dashboard = Dashboard(scenario, view="air_handler", air_handler=oa)
    economizer = dashboard.controls.widgets["economizer"]
    assert economizer.disabled
    kept = economizer.index
    sent = Sent(economizer)
    target = [key for _, key in economizer.options].index("differential_enthalpy")
    economizer.set_state({"index": target})
    assert economizer.index == kept
    assert sent.states[-1]["index"] == kept
    assert "100 % outdoor-air" in dashboard.controls.messages["economizer"].value
    saved = dashboard.state.current_scenario().air_handlers[oa].settings
    assert saved.economizer == scenario.air_handlers[oa].settings.economizer
    # nor can the page enable a control
    economizer.set_state({"disabled": False})
    assert economizer.disabled


@pytest.mark.parametrize(
    ("name", "state"),
    [
        ("fan_control", {"index": None}),
        ("fan_control", {"index": 7}),
        ("fan_control", {"index": True}),
        ("economizer_integrated", {"value": 1}),
        ("design_percent", {"index": "0"}),
    ],
)
def test_refused_choices_keep_the_page_showing_the_kept_value(scenario, name, state):
    dashboard = Dashboard(scenario, view="air_handler", air_handler=1)
    widget = dashboard.controls.widgets[name]
    key = next(iter(state))
    kept, before = getattr(widget, key), dashboard.state.inputs
    sent = Sent(widget)
    widget.set_state(state)
    assert getattr(widget, key) == kept
    assert dashboard.state.inputs == before
    assert sent.states[-1][key] == kept
    assert dashboard.controls.messages[name].value


def test_a_value_within_half_a_step_of_the_one_in_use_is_shown_as_the_one_in_use():
    # Found by the widget fuzz: a message set the bypass factor to 5e-06 (off the 0.01
    # step), then 0.0 was within half a step of it, so the model kept 5e-06 while the
    # slider showed 0.0. The kept value must be the one on show.
    from plantside.dashboard.app import Dashboard
    from plantside.study.scenario import load_scenario

    scenario = Path(__file__).resolve().parents[1] / "example_data" / "scenarios"
    board = Dashboard(load_scenario(scenario / "quillon_clinic.toml"), air_handler=1)
    slider = board.controls.widgets["bypass_factor"]
    slider.set_state({"value": 5e-06})
    for sent in (0.0, 0.004):
        slider.set_state({"value": sent})
        assert slider.value == board.state.shown_value("bypass_factor") == 5e-06
