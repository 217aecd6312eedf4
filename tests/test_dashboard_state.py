"""The dashboard driven from Python: every control, messages, pinning, exports.

The reference for every figure is the model itself, called directly
(``plantside.air_handler.year``, ``plantside.climate.design_conditions``): the dashboard
must show what the model says for the inputs on show, no more, no less. The
physical direction of each change is checked too, with its source beside it.
"""

from __future__ import annotations

import datetime
import html
import io
import json
import math
import re
import tomllib
from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from plantside.air_handler.year import cooling_design_points, hourly_year
from plantside.climate.bundled import BUNDLED_CLIMATES, load_bundled_climate
from plantside.climate.design_conditions import design_conditions_from_weather
from plantside.dashboard.app import CHARTS, Dashboard, first_recirculating_unit
from plantside.dashboard.state import (
    PART_LOAD_THRESHOLD,
    DashboardState,
    condition_text,
    display_text,
)
from plantside.errors import InputRangeError
from plantside.study.scenario import dumps_scenario, load_scenario, loads_scenario
from plantside.units import tons_from_kw

EXAMPLE = Path(__file__).resolve().parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"


@pytest.fixture(scope="module")
def scenario():
    return load_scenario(EXAMPLE)


@pytest.fixture
def dashboard(scenario):
    return Dashboard(scenario, view="air_handler")


def model_figures(scenario, index, percent=0.4, climate=None, **changes):
    """Design summary and hourly year of one air handler straight from the model."""
    spec = scenario.air_handlers[index]
    settings = replace(spec.settings, **changes)
    weather = load_bundled_climate(climate or scenario.climate)
    conditions = design_conditions_from_weather(weather)
    zone = scenario.zone_loads(index, weather)  # the zone model with the site's sun attached
    summary = cooling_design_points(settings, zone, conditions.conditions, percent=percent)
    year = hourly_year(settings, weather, zone)
    return summary, year


def upload_value(name: str, data) -> tuple:
    """What a FileUpload widget holds after the page sent one file."""
    content = data.encode() if isinstance(data, str) else data
    return (
        {
            "name": name,
            "type": "text/csv",
            "size": len(content),
            "content": memoryview(content),
            "last_modified": datetime.datetime(2024, 1, 1, tzinfo=datetime.UTC),
        },
    )


def chart_rows(dashboard, name):
    """Every data row the browser receives for chart ``name`` (inline and named datasets)."""
    spec = dashboard.charts[name].spec
    rows = []
    for values in spec.get("datasets", {}).values():
        rows.extend(values)

    def walk(node):
        if isinstance(node, dict):
            data = node.get("data")
            if isinstance(data, dict) and isinstance(data.get("values"), list):
                rows.extend(data["values"])
            for value in node.values():
                walk(value)
        elif isinstance(node, list):
            for value in node:
                walk(value)

    walk({k: v for k, v in spec.items() if k != "datasets"})
    return rows


def breakdown_rows(dashboard):
    return {
        row["component"]: row["load"]
        for row in chart_rows(dashboard, "design")
        if "component" in row and row.get("scenario", "B") == "B"
    }


# --------------------------------------------------------------------------- the controls
def test_opens_on_the_model_result(dashboard, scenario):
    index = first_recirculating_unit(scenario)
    summary, year = model_figures(scenario, index)
    figures = dashboard.state.result.figures
    governing = summary.points[summary.governing].loads
    assert figures.design_coil_load == pytest.approx(governing["coil_total_kW"], rel=1e-9)
    assert figures.design_zone_load == pytest.approx(
        governing["zone_sensible_kW"] + governing["zone_latent_kW"], rel=1e-9
    )
    assert figures.peak_coil_load == pytest.approx(year["coil_total_kW"].max(), rel=1e-9)
    assert figures.cooling_energy == pytest.approx(year["coil_total_kW"].sum(), rel=1e-9)
    capacity = governing["coil_total_kW"] * (1 + scenario.cooling_margin_percent / 100)
    assert figures.recommended_capacity == pytest.approx(capacity, rel=1e-9)
    above = int((year["coil_total_kW"] > PART_LOAD_THRESHOLD * capacity).sum())
    assert figures.hours_above_threshold == above
    # the example scenario is written in IP: the design chart shows tons
    # (1 ton = 3.516853 kW, AHRI 550/590 and NIST SP 811)
    rows = breakdown_rows(dashboard)
    assert rows["Coil load"] == pytest.approx(governing["coil_total_kW"] / 3.516853, rel=1e-6)


def test_outdoor_air_slider_moves_figures_and_charts_as_the_model_says(dashboard, scenario):
    index = dashboard.state.inputs.air_handler
    before = dashboard.state.result.figures
    sweep_before = chart_rows(dashboard, "sweep")
    dashboard.controls.widgets["outdoor_air_fraction"].value = 40.0
    assert dashboard.state.inputs.outdoor_air_fraction == pytest.approx(0.40)
    summary, year = model_figures(
        scenario, index, minimum_outdoor_air_fraction=0.40, minimum_outdoor_airflow=None
    )
    after = dashboard.state.result.figures
    assert after.design_coil_load == pytest.approx(
        summary.points[summary.governing].loads["coil_total_kW"], rel=1e-9
    )
    assert after.cooling_energy == pytest.approx(year["coil_total_kW"].sum(), rel=1e-9)
    # More outdoor air at a hot, humid design condition adds ventilation load
    # m_oa (h_outdoor - h_return) to the coil (ASHRAE Handbook Fundamentals 2017 Ch. 1,
    # Eq. 32 enthalpy; the mixing balance): the design coil load rises.
    assert after.design_coil_load > before.design_coil_load
    assert breakdown_rows(dashboard)["Ventilation latent"] > 0
    # the sweep chart's marker follows the slider
    markers = [r for r in chart_rows(dashboard, "sweep") if r.get("outdoor_air_percent") == 40.0]
    assert markers, "the current setting is marked on the outdoor-air sweep"
    assert chart_rows(dashboard, "sweep") != sweep_before


def test_supply_temperature_slider_follows_the_model(dashboard, scenario):
    index = dashboard.state.inputs.air_handler
    slider = dashboard.controls.widgets["supply_air_temperature"]
    assert dashboard.state.inputs.unit_system == "IP"
    slider.value = 58.0  # °F
    supply = (58.0 - 32.0) / 1.8
    assert dashboard.state.inputs.supply_air_temperature == pytest.approx(supply)
    summary, year = model_figures(scenario, index, supply_drybulb=supply)
    figures = dashboard.state.result.figures
    assert figures.design_coil_load == pytest.approx(
        summary.points[summary.governing].loads["coil_total_kW"], rel=1e-9
    )
    assert figures.peak_coil_load == pytest.approx(year["coil_total_kW"].max(), rel=1e-9)
    states = dashboard.state.result.unit.design.governing.states
    # the model holds the set point to its humidity-balance iteration (well under 0.001 K)
    assert states.loc["supply", "drybulb_C"] == pytest.approx(supply, abs=1e-3)
    # the psychrometric chart's supply point moved with it (°F on show)
    process = [r for r in chart_rows(dashboard, "psychrometric") if r.get("point") == "Supply"]
    assert any(r["drybulb"] == pytest.approx(58.0, abs=2e-3) for r in process)


@pytest.mark.parametrize(
    ("control", "value", "changes"),
    [
        ("economizer", "none", {"economizer": "none"}),
        ("economizer", "differential_enthalpy", {"economizer": "differential_enthalpy"}),
        ("economizer_integrated", False, {"economizer_integrated": False}),
        ("fan_control", "constant_volume", {"fan_control": "constant_volume"}),
        ("bypass_factor", 0.2, {"coil_model": "bypass_factor", "bypass_factor": 0.2}),
    ],
)
def test_each_choice_gives_the_model_year(dashboard, scenario, control, value, changes):
    index = dashboard.state.inputs.air_handler
    dashboard.controls.widgets[control].value = value
    assert getattr(dashboard.state.inputs, control) == value
    assert not any(dashboard.state.messages.values())
    summary, year = model_figures(scenario, index, **changes)
    result = dashboard.state.result
    pd.testing.assert_series_equal(
        result.unit.hourly["coil_total_kW"], year["coil_total_kW"], check_exact=False, rtol=1e-9
    )
    assert result.figures.design_coil_load == pytest.approx(
        summary.points[summary.governing].loads["coil_total_kW"], rel=1e-9
    )


def test_economizer_changes_the_year_not_the_design(dashboard):
    before = dashboard.state.result
    dashboard.controls.widgets["economizer"].value = "none"
    after = dashboard.state.result
    # At the cooling design condition (hot) the economizer is at its high limit, so the
    # design point is unchanged; in the year the free-cooling hours vanish and the coil
    # energy rises (ASHRAE 90.1-2019 section 6.5.1: economizers save cooling energy).
    assert after.figures.design_coil_load == pytest.approx(before.figures.design_coil_load)
    assert after.figures.cooling_energy > before.figures.cooling_energy
    modes = {r["mode"] for r in chart_rows(dashboard, "year") if "mode" in r}
    assert "free_cooling" not in modes


def test_design_condition_recomputes_design_only(dashboard, scenario):
    index = dashboard.state.inputs.air_handler
    years = [u.hourly for u in dashboard.state.result.units]
    year_spec = dashboard.charts["year"].spec
    dashboard.controls.widgets["design_percent"].value = 2.0
    assert dashboard.state.last_update["recomputed"] == ()
    assert all(u.hourly is y for u, y in zip(dashboard.state.result.units, years, strict=True))
    assert dashboard.charts["year"].spec is year_spec  # not redrawn
    summary, _ = model_figures(scenario, index, percent=2.0)
    figures = dashboard.state.result.figures
    assert figures.governing_condition == summary.points[summary.governing].label
    assert "2 %" in figures.governing_condition
    # a 2 % condition is milder than the 0.4 % one (ASHRAE Fundamentals 2017 Ch. 14)
    summary_04, _ = model_figures(scenario, index, percent=0.4)
    assert figures.design_coil_load < summary_04.points[summary_04.governing].loads["coil_total_kW"]


def test_climate_dropdown_changes_site_design_and_year(dashboard, scenario):
    index = dashboard.state.inputs.air_handler
    other = next(name for name in BUNDLED_CLIMATES if name != scenario.climate)
    dashboard.controls.widgets["climate"].value = other
    summary, year = model_figures(scenario, index, climate=other)
    result = dashboard.state.result
    assert result.climate.weather.site == other
    assert result.figures.design_coil_load == pytest.approx(
        summary.points[summary.governing].loads["coil_total_kW"], rel=1e-9
    )
    assert result.figures.cooling_energy == pytest.approx(year["coil_total_kW"].sum(), rel=1e-9)
    assert other in dashboard.header.value


def test_unit_system_switches_display_only_and_keeps_values(dashboard, scenario):
    slider = dashboard.controls.widgets["supply_air_temperature"]
    slider.value = 57.0  # °F
    exact = dashboard.state.inputs.supply_air_temperature
    result = dashboard.state.result
    # reference: the model itself at the settings on show (57 °F supply air)
    index = dashboard.state.inputs.air_handler
    settings = dashboard.state.current_scenario().air_handlers[index].settings
    weather = load_bundled_climate(scenario.climate)
    conditions = design_conditions_from_weather(weather)
    zone = scenario.zone_loads(index, weather)  # the zone with the site's sun attached
    summary = cooling_design_points(settings, zone, conditions.conditions, percent=0.4)
    model_coil = summary.points[summary.governing].loads["coil_total_kW"]
    assert result.figures.design_coil_load == pytest.approx(model_coil, rel=1e-9)
    dashboard.controls.widgets["unit_system"].value = "SI"
    assert dashboard.state.result is result  # nothing recomputed
    assert dashboard.state.result.figures.design_coil_load == pytest.approx(model_coil, rel=1e-9)
    assert dashboard.state.last_update["recomputed"] == ()
    assert "[°C]" in dashboard.controls.labels["supply_air_temperature"].value
    assert slider.value == pytest.approx(exact)  # 57 °F = 13.89 °C, unrounded
    # the slider spans what the model accepts, now in °C (AirHandlerSettings: supply_drybulb
    # 4 °C to zone_cooling_drybulb - 0.5 K; the range the controls commit gave the slider)
    zone = settings.zone_cooling_drybulb
    assert (slider.min, slider.max) == pytest.approx((4.0, zone - 0.5))
    assert "kW" in dashboard.figures.value and "tons" not in dashboard.figures.value
    coil_si = breakdown_rows(dashboard)["Coil load"]
    assert coil_si == pytest.approx(dashboard.state.result.figures.design_coil_load, rel=1e-6)
    dashboard.controls.widgets["unit_system"].value = "IP"
    assert slider.value == pytest.approx(57.0)
    assert dashboard.state.inputs.supply_air_temperature == exact
    assert breakdown_rows(dashboard)["Coil load"] == pytest.approx(
        float(tons_from_kw(coil_si)), rel=1e-6
    )
    # back in IP: still the model's SI figures of 57 °F, unchanged by the display
    assert dashboard.state.result.figures.design_coil_load == pytest.approx(model_coil, rel=1e-9)
    assert dashboard.state.result.figures == result.figures


def test_air_handler_choice_shows_its_own_controls(scenario):
    dashboard = Dashboard(scenario, view="air_handler")
    choice = dashboard.air_handler_choice
    dashboard.controls.widgets["outdoor_air_fraction"].value = 45.0
    other = next(i for i in range(len(scenario.air_handlers)) if i != choice.value)
    choice.value = other
    assert dashboard.state.inputs.air_handler == other
    assert dashboard.state.result.unit.name == scenario.air_handlers[other].settings.name
    shown = dashboard.controls.widgets["outdoor_air_fraction"].value
    assert shown != pytest.approx(45.0)
    assert scenario.air_handlers[other].settings.name in dashboard.header.value


# --------------------------------------------------------------------------- bad input
def test_unreachable_supply_temperature_keeps_last_result_and_input(dashboard):
    controls = dashboard.controls
    controls.widgets["outdoor_air_fraction"].value = 30.0
    controls.widgets["bypass_factor"].value = 0.30
    good = dashboard.state.result
    good_spec = dashboard.charts["design"].spec
    # with a bypass factor of 0.3 a 44 °F supply needs an apparatus dew point below the
    # coil's lowest: t_leaving = BF t_entering + (1 - BF) ADP (the bypass-factor relation,
    # ASHRAE Handbook Fundamentals; the model refuses it)
    controls.widgets["supply_air_temperature"].value = 44.0
    state = dashboard.state
    assert state.result is good, "the last valid result stays on show"
    assert dashboard.charts["design"].spec is good_spec
    message = controls.messages["supply_air_temperature"].value
    assert "apparatus dew point" in message and "plantside-message" in message
    assert "last valid result" in dashboard.status.value
    # nothing the user set is lost
    assert state.inputs.supply_air_temperature == pytest.approx((44.0 - 32) / 1.8)
    assert state.inputs.bypass_factor == pytest.approx(0.30)
    assert controls.widgets["supply_air_temperature"].value == pytest.approx(44.0)
    assert controls.widgets["outdoor_air_fraction"].value == pytest.approx(30.0)
    # moving another control keeps the message beside the bad one and loses nothing
    controls.widgets["economizer_integrated"].value = False
    assert state.result is good
    assert state.inputs.economizer_integrated is False
    assert "apparatus dew point" in controls.messages["supply_air_temperature"].value
    # fixing the one bad control recovers, with everything else as set
    controls.widgets["supply_air_temperature"].value = 56.0
    assert not any(state.messages.values())
    assert state.result is not good
    assert state.result.inputs.unit == state.inputs.unit
    assert state.inputs.economizer_integrated is False
    assert controls.messages["supply_air_temperature"].value == ""
    assert "current inputs" in dashboard.status.value


@pytest.mark.parametrize(
    ("control", "value"),
    [
        ("outdoor_air_fraction", float("nan")),
        ("outdoor_air_fraction", 7.5),
        ("supply_air_temperature", -40.0),
        ("bypass_factor", "0.1; import os"),
        ("economizer", "open_the_dampers"),
        ("fan_control", None),
        ("economizer_integrated", "yes"),
        ("design_percent", 5.0),
        ("climate", "../../etc/passwd"),
        ("unit_system", ["SI"]),
        ("air_handler", 99),
    ],
)
def test_values_a_visitor_could_send_are_refused_with_a_message(scenario, control, value):
    state = DashboardState(scenario, air_handler=1)
    before_inputs, before_result = state.inputs, state.result
    assert state.set(control, value) is False
    assert state.inputs == before_inputs
    assert state.result is before_result
    assert state.messages[control]
    # the message names the control and what is allowed
    text = state.messages[control].lower()
    assert any(
        word in text
        for word in (
            "allowed",
            "outside",
            "not one of",
            "must",
            "expected",
            "does not exist",
            "unit system",
        )
    )


def test_widget_values_out_of_range_never_reach_the_model(dashboard):
    slider = dashboard.controls.widgets["outdoor_air_fraction"]
    slider.value = 1e9  # ipywidgets clamps to the slider's range
    assert 0.0 <= dashboard.state.inputs.outdoor_air_fraction <= 1.0
    kept = dashboard.state.inputs.outdoor_air_fraction
    slider.value = float("nan")  # a page can send NaN; the slider does not clamp it
    assert dashboard.state.inputs.outdoor_air_fraction == kept
    assert "outside" in dashboard.controls.messages["outdoor_air_fraction"].value
    assert slider.value == pytest.approx(100 * kept)  # the slider shows the kept value again
    with pytest.raises(Exception):  # noqa: B017 - a traitlets error for an unknown option
        dashboard.controls.widgets["economizer"].value = "not-a-control"
    assert dashboard.state.inputs.economizer in (
        "none",
        "fixed_drybulb",
        "differential_drybulb",
        "fixed_enthalpy",
        "differential_enthalpy",
    )


def test_bad_weather_upload_shows_message_and_keeps_everything(dashboard):
    state = dashboard.state
    before = state.result
    text = "hour,drybulb_C,dew_point_C\n1,25.0,12.0\n2,abc,12.0\n3,26.0,40.0\n"
    upload = dashboard.controls.widgets["weather_upload"]
    upload.value = upload_value("bad year.csv", text)
    message = dashboard.controls.messages["climate"].value
    assert "bad year.csv" in message and "row" in message
    assert state.result is before
    assert state.inputs.climate == before.inputs.climate


def port_calder_csv() -> bytes:
    """Port Calder's year as a weather CSV (0.01 K, 1e-6 kg/kg, 1 Pa; no location)."""
    weather = load_bundled_climate("Port Calder")
    table = pd.DataFrame(
        {
            "hour": np.arange(1, weather.hours + 1),
            "drybulb_C": np.round(weather.drybulb, 2),
            "humidity_ratio_kgkg": np.round(weather.humidity_ratio, 6),
            "pressure_Pa": np.round(weather.pressure),
        }
    )
    return table.to_csv(index=False).encode()


def test_good_weather_upload_becomes_the_climate(scenario):
    # A weather CSV does not say where it was recorded, and the glazed zones' solar gain
    # needs the sun's position: the scenario's site gives it (site.latitude, ...; README),
    # here Port Calder's own, so the upload is Port Calder's year at Port Calder.
    weather = load_bundled_climate("Port Calder")
    placed = replace(
        scenario,
        latitude=weather.latitude,
        longitude=weather.longitude,
        time_zone=weather.time_zone,
    )
    dashboard = Dashboard(placed, view="air_handler")
    upload = dashboard.controls.widgets["weather_upload"]
    upload.value = upload_value("my site.csv", port_calder_csv())
    state = dashboard.state
    assert state.messages["climate"] == ""
    assert state.inputs.climate == "upload: my site.csv"
    assert state.result.climate.source == "upload: my site.csv"
    assert dashboard.controls.widgets["climate"].value == "upload: my site.csv"
    index = state.inputs.air_handler
    # reference: the model on Port Calder's year at the site, with the clear-sky optical
    # depths a CSV does not carry left to the solar model's defaults, as for a
    # scenario's site.weather_file
    clear_sky = replace(weather, beam_optical_depth=None, diffuse_optical_depth=None)
    zone = placed.zone_loads(index, clear_sky)
    year = hourly_year(placed.air_handlers[index].settings, clear_sky, zone)
    # the file holds Port Calder rounded to 0.01 K: same year within the rounding
    assert state.result.figures.cooling_energy == pytest.approx(
        year["coil_total_kW"].sum(), rel=2e-3
    )


def test_weather_upload_for_glazed_zones_needs_the_site_location(dashboard):
    # the Quillon site is a bundled climate without site.latitude: an uploaded year cannot
    # place the sun on the glazed zones, so it is refused with the fields to give
    # (README: give site.latitude, site.longitude for a weather CSV), nothing changed
    state = dashboard.state
    before = state.result
    upload = dashboard.controls.widgets["weather_upload"]
    upload.value = upload_value("my site.csv", port_calder_csv())
    message = state.messages["climate"]
    assert "site.latitude" in message and "site.time_zone" in message
    assert state.result is before
    assert state.inputs.climate == before.inputs.climate
    assert "upload: my site.csv" not in state.uploaded
    assert "upload: my site.csv" not in dict(dashboard.controls.widgets["climate"].options).values()


# --------------------------------------------------------------------------- pin A, compare B
def test_pin_shows_a_beside_b(dashboard):
    figures_a = dashboard.state.result.figures
    dashboard.controls.widgets["pin"].click()
    assert dashboard.state.pinned is not None
    dashboard.controls.widgets["outdoor_air_fraction"].value = 50.0
    assert "ps-pinned" in dashboard.figures.value
    for name in CHARTS:
        scenarios = {r.get("scenario") for r in chart_rows(dashboard, name)}
        assert {"A", "B"} <= scenarios, name
    rows = [r for r in chart_rows(dashboard, "design") if r.get("component") == "Coil load"]
    by = {r["scenario"]: r["load"] for r in rows}
    assert by["A"] == pytest.approx(float(tons_from_kw(figures_a.design_coil_load)), rel=1e-6)
    assert by["B"] > by["A"]
    dashboard.controls.widgets["unpin"].click()
    assert dashboard.state.pinned is None
    assert "ps-pinned" not in dashboard.figures.value


# --------------------------------------------------------------------------- exports
def test_chart_exports_are_valid_stamped_png_and_svg(dashboard):
    sent = []
    dashboard.download.send = lambda content, buffers=None: sent.append((content, buffers))
    dashboard.controls.widgets["outdoor_air_fraction"].value = 35.0
    name = dashboard.export_chart("design", "png")
    assert name.endswith("design-coil-load.png")
    png = bytes(sent[-1][1][0])
    assert png[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948)
    width = int.from_bytes(png[16:20], "big")
    assert width >= 1400, "report resolution"
    name = dashboard.export_chart("sweep", "svg")
    svg = bytes(sent[-1][1][0]).decode()
    assert svg.lstrip().startswith("<svg") and svg.rstrip().endswith("</svg>")
    assert "outdoor air 35 %" in svg  # the stamp names the inputs
    assert sent[-1][0]["mime"] == "image/svg+xml"


def test_hourly_csv_and_scenario_toml(dashboard, scenario):
    dashboard.controls.widgets["outdoor_air_fraction"].value = 25.0
    dashboard.controls.widgets["unit_system"].value = "SI"
    table = pd.read_csv(io.BytesIO(dashboard.hourly_csv()), comment="#", index_col="hour")
    assert len(table) == 8760
    np.testing.assert_allclose(
        table["coil_total_kW"].to_numpy(),
        dashboard.state.result.unit.hourly["coil_total_kW"].to_numpy(),
        rtol=1e-5,
        atol=1e-6,
    )
    text = dashboard.scenario_toml()
    tomllib.loads(text)
    again = loads_scenario(text, "saved.toml")
    index = dashboard.state.inputs.air_handler
    settings = again.air_handlers[index].settings
    assert settings.minimum_outdoor_air_fraction == pytest.approx(0.25)
    assert settings.minimum_outdoor_airflow is None
    # saved while viewing SI, the I-P study stays I-P: the units on screen are a view
    # setting; its airflows are written in cfm as the file has them (4,500 cfm, not
    # 2,123.76 L/s; NIST SP 811 factor), numbers to six significant digits
    assert str(again.unit_system) == "IP"
    saved = tomllib.loads(text)
    assert saved["unit_system"] == "IP"
    written = [unit["supply_airflow"] for unit in saved["air_handler"]]
    in_file = [unit["supply_airflow"] for unit in tomllib.loads(EXAMPLE.read_text())["air_handler"]]
    assert written == in_file
    # and it opens in the dashboard with the same results
    reopened = Dashboard(again, view="air_handler", air_handler=index)
    assert reopened.state.result.figures.design_coil_load == pytest.approx(
        dashboard.state.result.figures.design_coil_load, rel=1e-6
    )


def test_scenario_upload_replaces_the_study_and_refuses_paths(dashboard):
    good = (
        dashboard.scenario_toml().replace(dashboard.state.scenario.title, "Uploaded copy").encode()
    )
    upload = dashboard.controls.widgets["scenario_upload"]
    upload.value = upload_value("copy.toml", good)
    assert dashboard.state.scenario.title == "Uploaded copy"
    assert "Uploaded copy" in dashboard.header.value
    evil = (
        good.decode()
        .replace(f'climate = "{dashboard.state.inputs.climate}"', 'weather_file = "/etc/passwd"')
        .encode()
    )
    upload.value = upload_value("evil.toml", evil)
    assert "weather_file" in dashboard.controls.messages["scenario"].value
    assert dashboard.state.scenario.title == "Uploaded copy"
    broken = b"title = 'x'\nunit_system = 'SI'\n[[air_handler]]\nsupply_drybulb = 'cold'\n"
    upload.value = upload_value("broken.toml", broken)
    assert "broken.toml" in dashboard.controls.messages["scenario"].value


# --------------------------------------------------------------------------- the plant view
def test_plant_view_sums_every_air_handler(scenario):
    dashboard = Dashboard(scenario, view="plant")
    result = dashboard.state.result
    gain = 1 + scenario.distribution_gain_percent / 100  # plant load = (1 + g) x sum of coils
    total = sum(u.hourly["coil_total_kW"].to_numpy() for u in result.units)
    np.testing.assert_allclose(result.coil_load, gain * total, rtol=1e-12)
    assert result.figures.peak_coil_load == pytest.approx(gain * total.max(), rel=1e-12)
    # moving one air handler's control recomputes only its year
    dashboard.controls.widgets["outdoor_air_fraction"].value = 35.0
    assert dashboard.state.last_update["recomputed"] == (dashboard.state.inputs.air_handler,)
    # the curves reach the coincident peak (load-duration curve starts at the peak hour); on
    # the plant page the curve is the plant load (coils plus distribution gain)
    curves = [r for r in chart_rows(dashboard, "distribution") if r.get("series") == "Plant load"]
    peak = max(r["load"] for r in curves)
    assert peak == pytest.approx(
        float(tons_from_kw(dashboard.state.result.figures.peak_coil_load)), rel=1e-6
    )


def test_plant_design_breakdown_names_the_distribution_gain(scenario):
    dashboard = Dashboard(scenario, view="plant")
    loads = dashboard.state.result.design_loads
    rows = breakdown_rows(dashboard)
    # the plant's pump and pipe gain: g % of the coil loads (scenario plant section)
    gain = (
        scenario.distribution_gain_percent
        / 100
        * (loads["coil_total_kW"] / (1 + 0.01 * scenario.distribution_gain_percent))
    )
    assert gain > 0
    assert rows["Distribution gain"] == pytest.approx(float(tons_from_kw(gain)), rel=1e-6)
    assert "Other" not in rows


def test_no_chart_carries_the_hourly_year(dashboard):
    for name in CHARTS:
        spec = dashboard.charts[name].spec
        for values in spec.get("datasets", {}).values():
            assert len(values) < 1000, name
        assert len(chart_rows(dashboard, name)) < 5000, name
        assert len(json.dumps(spec)) < 400_000, name


def test_all_headline_figures_are_finite(dashboard):
    figures = dashboard.state.result.figures
    for value in (
        figures.design_zone_load,
        figures.design_coil_load,
        figures.coil_to_zone_ratio,
        figures.peak_coil_load,
        figures.cooling_energy,
        figures.recommended_capacity,
    ):
        assert math.isfinite(value) and value > 0


# --------------------------------------------------------------------------- supply set points
def lowest_reachable_supply(scenario, index, percent=0.4) -> float:
    """Lowest supply air temperature [°C] at which the model's design points solve.

    The scenario's leaving dew point limit and preheat set point follow the supply down
    (as the dashboard carries them); bisection to 1 mK between the model's 4 °C floor
    (AirHandlerSettings) and the scenario's own supply air temperature.
    """
    spec = scenario.air_handlers[index]
    weather = load_bundled_climate(scenario.climate)
    conditions = design_conditions_from_weather(weather).conditions
    zone = scenario.zone_loads(index, weather)

    def reached(supply):
        settings = replace(
            spec.settings,
            supply_drybulb=supply,
            leaving_dew_point=min(spec.settings.leaving_dew_point, supply),
            preheat_drybulb=min(spec.settings.preheat_drybulb, supply),
        )
        try:
            cooling_design_points(settings, zone, conditions, percent=percent)
        except InputRangeError as error:
            assert error.field == "apparatus_dew_point", error
            return False
        return True

    bad, good = 4.0, float(spec.settings.supply_drybulb)
    assert reached(good)
    if reached(bad):
        return bad
    while good - bad > 1e-3:
        middle = 0.5 * (bad + good)
        bad, good = (bad, middle) if reached(middle) else (middle, good)
    return good


def test_supply_slider_carries_the_scenario_set_points_tied_to_it(scenario):
    # OA-1 of the example has a leaving dew point limit of 50 °F and preheat to 45 °F
    # (scenario file); the model accepts a leaving dew point at most the supply dry bulb
    # and a preheat set point at most the supply dry bulb (AirHandlerSettings ranges). A
    # supply below both must still be accepted: both are carried down with it.
    index = next(
        i
        for i, spec in enumerate(scenario.air_handlers)
        if spec.settings.coil_model == "leaving_dew_point"
    )
    # The coil now leaves on its own process line at the leaving dew point, which follows
    # the supply down: the lowest supply it reaches at design is the model's (about 7 °C,
    # 44.6 °F, at 0.4 %), so 43 °F is no longer reachable. Take the lowest reachable
    # supply from the model itself, on the 0.1 °F the cautions show, and check it is still
    # below both set points, so both are carried.
    lowest = lowest_reachable_supply(scenario, index)
    chosen = math.ceil((lowest * 1.8 + 32.0) * 10.0) / 10.0  # °F
    preheat_f = scenario.air_handlers[index].settings.preheat_drybulb * 1.8 + 32.0
    assert chosen < preheat_f - 0.05
    dashboard = Dashboard(scenario, view="air_handler", air_handler=index)
    slider = dashboard.controls.widgets["supply_air_temperature"]
    slider.value = chosen
    state = dashboard.state
    assert not any(state.messages.values()), state.messages
    supply = state.inputs.supply_air_temperature
    assert supply == pytest.approx((chosen - 32.0) / 1.8)
    settings = state.current_scenario().air_handlers[index].settings
    assert settings.leaving_dew_point == pytest.approx(supply)
    assert settings.preheat_drybulb == pytest.approx(supply)
    # the model's own result for the carried settings
    summary, _ = model_figures(
        scenario, index, supply_drybulb=supply, leaving_dew_point=supply, preheat_drybulb=supply
    )
    assert state.result.figures.design_coil_load == pytest.approx(
        summary.points[summary.governing].loads["coil_total_kW"], rel=1e-9
    )
    # the page says what was carried, in the units on show
    cautions = dashboard.model_cautions.value
    assert f"leaving dew point limit (50.0 °F) is taken as {chosen:.1f} °F" in cautions
    assert "preheat set point (45.0 °F)" in cautions
    # and the slider's top end is accepted too
    slider.value = slider.max
    assert not any(state.messages.values()), state.messages
    assert "taken as" not in dashboard.model_cautions.value


def test_supply_slider_raises_the_cold_weather_reset_with_it():
    # the SI example resets the supply to 16 °C at cold outdoor conditions (scenario file);
    # the model accepts a reset only at or above the supply set point
    state = DashboardState(load_scenario(EXAMPLE.parent / "linden_office_si.toml"))
    assert state.set("supply_air_temperature", 18.0), state.messages
    settings = state.current_scenario().air_handlers[state.inputs.air_handler].settings
    assert settings.supply_reset_drybulb == pytest.approx(18.0)
    assert any("cold-weather supply reset (16.0 °C)" in note for note in state.carried_notes())


def test_a_conflict_with_a_hidden_set_point_names_the_supply_control(scenario):
    index = first_recirculating_unit(scenario)
    spec = scenario.air_handlers[index]
    settings = replace(
        spec.settings,
        coil_model="apparatus_dew_point",
        apparatus_dew_point=9.0,
        apparatus_dew_point_min=9.0,
    )
    specs = list(scenario.air_handlers)
    specs[index] = replace(spec, settings=settings)
    state = DashboardState(replace(scenario, air_handlers=tuple(specs)), air_handler=index)
    # an apparatus dew point must be >= its minimum and below the supply dry bulb
    # (AirHandlerSettings ranges): 9.2 °C leaves no room for both
    assert not state.set("supply_air_temperature", 9.2)
    message = state.messages["supply_air_temperature"]
    assert message.startswith("Supply air temperature"), message
    assert "apparatus dew point" in message


# --------------------------------------------------------------------------- units on show
def _visible_text(markup: str) -> str:
    return html.unescape(re.sub(r"<[^>]+>", " ", markup))


@pytest.mark.parametrize("view", ["air_handler", "plant"])
def test_every_figure_on_the_page_is_in_the_units_on_show(scenario, view):
    dashboard = Dashboard(scenario, view=view)
    dashboard.controls.widgets["pin"].click()  # the pinned "A" lines too
    dashboard.controls.widgets["outdoor_air_fraction"].value = 40.0
    condition = dashboard.state.result.figures.governing
    for system, wrong, right in (
        ("IP", ("°C", "kW", "kJ/kg", "MWh", "g/kg"), ("°F", "tons")),
        ("SI", ("°F", "tons", "Btu/lb", "ton·h", "gr/lb"), ("°C", "kW")),
    ):
        dashboard.controls.widgets["unit_system"].value = system
        page = " ".join(
            _visible_text(w.value)
            for w in (
                dashboard.figures,
                dashboard.mini_figures,
                dashboard.model_cautions,
                *dashboard.controls.messages.values(),
            )
        )
        page += " " + dashboard.stamp()
        for unit in wrong:
            assert unit not in page, (system, unit, page)
        for unit in right:
            assert unit in page, (system, unit)
        # the governing condition reads as the model's state converted, e.g. 35 °C = 95 °F
        # (t_F = 1.8 t_C + 32, NIST SP 811) and enthalpy on the I-P scale
        shown = condition_text(condition, system)
        assert shown in _visible_text(dashboard.figures.value)
        assert f"governing {shown}" in dashboard.stamp()
        drybulb = condition.drybulb if system == "SI" else 1.8 * condition.drybulb + 32
        assert f"{drybulb:.1f} {'°C' if system == 'SI' else '°F'}" in shown


def test_condition_text_converts_every_kind():
    # one fictional state, converted by hand: 35 °C = 95 °F, 24 °C = 75.2 °F (NIST SP 811);
    # 0.0150 kg/kg = 105 gr/lb (7000 gr/lb). Its enthalpy on each scale from psychrolib
    # (SI: dry air at 0 °C, I-P: dry air at 0 °F; ASHRAE Handbook Fundamentals Ch. 1 Eq. 32)
    import psychrolib
    from plantside.climate.design_conditions import DesignCondition

    psychrolib.SetUnitSystem(psychrolib.SI)
    enthalpy_si = psychrolib.GetMoistAirEnthalpy(35.0, 0.015) / 1000.0  # 73.70 kJ/kg
    psychrolib.SetUnitSystem(psychrolib.IP)
    enthalpy_ip = psychrolib.GetMoistAirEnthalpy(95.0, 0.015)  # 39.35 Btu/lb
    psychrolib.SetUnitSystem(psychrolib.SI)

    states = {
        kind: DesignCondition(
            kind=kind,
            percent=0.4,
            drybulb=35.0,
            humidity_ratio=0.015,
            pressure=101325.0,
            dew_point=20.0,
            wet_bulb=24.0,
            enthalpy=enthalpy_si,
            label="",
            coincident_hours=10,
            coincident_band=1.0,
        )
        for kind in ("cooling", "dehumidification", "enthalpy")
    }
    assert condition_text(states["cooling"], "IP") == "cooling 0.4 %: 95.0 °F DB / 75.2 °F MCWB"
    assert condition_text(states["cooling"], "SI") == "cooling 0.4 %: 35.0 °C DB / 24.0 °C MCWB"
    assert condition_text(states["dehumidification"], "IP") == (
        "dehumidification 0.4 %: 68.0 °F DP / 105.0 gr/lb / 95.0 °F MCDB"
    )
    text = condition_text(states["enthalpy"], "IP")
    shown = re.fullmatch(r"enthalpy 0\.4 %: (\d+\.\d) Btu/lb / 95\.0 °F MCDB", text)
    assert shown is not None, text
    # tolerance: 0.05 display rounding + up to 0.03 Btu/lb between psychrolib's SI and
    # I-P equations (their specific heats are rounded differently) in this range
    assert float(shown[1]) == pytest.approx(enthalpy_ip, abs=0.1)


def test_model_text_reads_in_the_units_on_show():
    # temperatures and powers in the model's SI messages; 1 ton = 3.516853 kW (AHRI 550/590)
    text = "supply 3 °C is outside 4 to 23.5 °C; 35.17 kW unmet; 12 kWh; 0.5 K"
    assert display_text(text, "SI") == text
    # energy too: 12 kWh = 3.41 ton·h (the command line's cautions of an I-P study use the
    # same function, so no kWh is left in them)
    assert display_text(text, "IP") == (
        "supply 37.4 °F is outside 39.2 to 74.3 °F; 10.0 tons unmet; 3.41 ton·h; 0.5 K"
    )


# --------------------------------------------------------------------------- the plant
def test_plant_option_chooser_sets_the_machines_and_names_them(scenario):
    state = DashboardState(scenario, view="plant")
    design = state.result.figures.design_coil_load
    assert state.option_names("cooling") == tuple(o.name for o in scenario.cooling_options)
    assert state.result.figures.option_name == scenario.cooling_options[0].name
    assert state.set("cooling_option", 1)
    chosen = scenario.cooling_options[1]
    figures = state.result.figures
    assert figures.option_name == chosen.name
    # each machine is its fraction of the plant design capacity (the scenario's definition
    # of an option; design capacity = design load x (1 + margin / 100))
    capacity = design * (1 + scenario.cooling_margin_percent / 100)
    np.testing.assert_allclose(
        figures.machine_capacities, np.asarray(chosen.capacity_fractions) * capacity, rtol=1e-12
    )
    assert figures.design_coil_load == design  # the option stages the plant, it does not size it
    assert state.last_update["recomputed"] == ()  # no year was recomputed for it
    # the stage lines and the efficiency chart name the option
    dashboard = Dashboard(scenario, view="plant")
    dashboard.state.set("cooling_option", 2)
    lines = {r["line"] for r in chart_rows(dashboard, "distribution") if r.get("line")}
    assert any(scenario.cooling_options[2].name in line for line in lines), lines
    title = dashboard.chart_specs["distribution"].to_dict()["title"]["text"]
    title = " ".join(title) if isinstance(title, list) else title
    assert scenario.cooling_options[2].name in title, title  # the title names the option
    assert scenario.cooling_options[2].name in dashboard.stamp()


@pytest.mark.parametrize(
    ("control", "value"),
    [
        ("cooling_option", 9),
        ("cooling_option", -1),
        ("cooling_option", True),
        ("cooling_option", "1"),
        ("heating_option", 5),
        ("cooling_margin_percent", 80.0),
        ("cooling_margin_percent", -1.0),
        ("cooling_margin_percent", float("nan")),
        ("cooling_margin_percent", True),
        ("heating_margin_percent", "10"),
    ],
)
def test_plant_controls_refuse_bad_values_and_keep_the_input(scenario, control, value):
    state = DashboardState(scenario, view="plant")
    before = state.inputs
    assert not state.set(control, value)
    assert state.inputs == before
    message = state.messages[control]
    kind = control.split("_")[0]
    assert kind in message.lower()  # names the field
    if "margin" in control and not isinstance(value, bool | str):
        assert "0 to 50 %" in message  # and the allowed range, in %


def test_sizing_margin_sizes_the_plant_is_stamped_and_saved(scenario):
    state = DashboardState(scenario, view="plant")
    design = state.result.figures.design_coil_load
    assert state.inputs.cooling_margin_percent == scenario.cooling_margin_percent
    assert state.set("cooling_margin_percent", 25.0)
    figures = state.result.figures
    # design capacity = design load x (1 + margin / 100) (the scenario file's definition)
    assert figures.recommended_capacity == pytest.approx(design * 1.25, rel=1e-12)
    assert figures.design_coil_load == design
    assert state.last_update["recomputed"] == ()
    assert not state.stale
    assert "cooling margin 25 %" in state.result.inputs.stamp(state.scenario, True)
    saved = loads_scenario(dumps_scenario(state.current_scenario()), "saved.toml")
    assert saved.cooling_margin_percent == 25.0
    assert state.set("heating_margin_percent", 30.0)
    plants = state.plants()
    assert plants.heating.design_capacity == pytest.approx(plants.heating.design_load * 1.3)


def test_the_plants_are_those_of_the_study_of_the_saved_scenario(scenario):
    """The plant part of the page equals ``plantside design`` of the scenario it would save
    (the study's own run_study, not a second calculation)."""
    from plantside.study.run import run_study

    state = DashboardState(scenario, view="plant", air_handler=first_recirculating_unit(scenario))
    assert state.set("cooling_margin_percent", 20.0)
    assert state.set("design_percent", 1.0)
    assert state.set("outdoor_air_fraction", 0.4)
    plants = state.plants()
    study = run_study(state.current_scenario())
    for kind in ("cooling", "heating"):
        mine, theirs = getattr(plants, kind), getattr(study, kind)
        assert mine.design_load == pytest.approx(theirs.design_load, rel=1e-9), kind
        assert mine.design_capacity == pytest.approx(theirs.design_capacity, rel=1e-9), kind
        np.testing.assert_allclose(mine.hourly_load, theirs.hourly_load, rtol=1e-9, atol=1e-9)
        pd.testing.assert_frame_equal(mine.stage_hours, theirs.stage_hours)
    assert plants.cooling.design_load == pytest.approx(state.result.figures.design_coil_load)
    assert state.plants() is plants  # once per result


def test_plant_page_works_out_the_water_side_only_when_shown(scenario):
    dashboard = Dashboard(scenario, view="plant")
    assert dashboard.page_shown() == "Design & year"
    dashboard.controls.widgets["outdoor_air_fraction"].value = 40.0
    assert dashboard.state.last_update["ok"]
    # a slider move with the water side not on show leaves its year alone
    assert dashboard.water_side.water is None and dashboard.water_side.tables.value == ""
    assert dashboard.plant_panel.charts == {}
    dashboard.show_page("Water side")
    assert dashboard.pages.selected_index == 2
    assert dashboard.water_side.water is not None
    assert "Water side" in dashboard.water_side.tables.value
    shown = dashboard.water_side.water
    dashboard.controls.widgets["outdoor_air_fraction"].value = 45.0
    assert dashboard.water_side.water is not shown  # on show: follows every move
    # the page switch takes only a part that exists, and says so
    before = dashboard.page_choice.value
    dashboard.page_choice.set_state({"index": 9})
    assert dashboard.page_choice.value == before
    assert "not one of the parts" in dashboard.export_message.value


def test_plant_page_shows_cooling_and_heating_plants_as_the_study(scenario):
    from plantside.study.run import run_study

    dashboard = Dashboard(scenario, view="plant")
    dashboard.show_page("Plant: cooling | heating")
    assert set(dashboard.plant_panel.charts) == {"cooling", "heating"}
    study = run_study(dashboard.state.current_scenario())
    for kind, unit, convert in (
        ("cooling", "tons", tons_from_kw),
        # heating in MBH: 1 MBH = 1,000 Btu/h = 0.29307 kW (NIST SP 811, Btu_IT/h)
        ("heating", "MBH", lambda kw: kw / 0.29307107),
    ):
        plant = getattr(study, kind)
        text = dashboard.plant_panel.tables[kind].value
        assert f"{float(convert(plant.design_load)):,.0f} {unit}" in text, kind
        assert f"{float(convert(plant.design_capacity)):,.0f} {unit}" in text, kind
        for option in plant.options["option"]:
            assert option in text
        if kind == "heating":
            assert "tons" not in text  # heat is never in tons
    # the chooser: the chart titles and the stage lines name the option shown
    heating = scenario.heating_options[1].name
    dashboard.plant_controls.widgets["heating_option"].value = 1
    title = dashboard.plant_panel.chart_specs["heating"].to_dict()["title"]
    assert heating in " ".join(
        title["text"] if isinstance(title["text"], list) else [title["text"]]
    )
    assert f"{heating} (shown)" in dashboard.plant_panel.tables["heating"].value
    assert f"option {heating}" in dashboard.stamp()
    # exports of both plant charts, named by plant
    name = dashboard.export_plant_chart("heating", "svg")
    assert name.endswith("-heating-plant-load-duration.svg") and "plant" in name
    assert dashboard.export_plant_chart("cooling", "png").endswith(".png")


def test_margin_control_refuses_a_page_value_and_sends_back_the_kept_one(scenario):
    dashboard = Dashboard(scenario, view="plant")
    slider = dashboard.plant_controls.widgets["cooling_margin_percent"]
    for raw in (90.0, True, "10", float("inf")):
        slider.set_state({"value": raw})
        assert slider.value == scenario.cooling_margin_percent
        assert dashboard.state.inputs.cooling_margin_percent == scenario.cooling_margin_percent
        assert (
            "Cooling sizing margin"
            in dashboard.plant_controls.messages["cooling_margin_percent"].value
        )
    slider.value = 15.0
    assert dashboard.state.result.figures.recommended_capacity == pytest.approx(
        dashboard.state.result.figures.design_coil_load * 1.15, rel=1e-12
    )
    assert "+ 15 % margin" in dashboard.figures.value
    assert "cooling_margin_percent = 15" in dashboard.scenario_toml()
