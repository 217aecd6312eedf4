"""Physically impossible requests are refused with a clear message, not computed.

Each refusal must be a :class:`~plantside.errors.InputRangeError` (or, from a scenario
file, a :class:`~plantside.errors.ScenarioError`) that names the field and states the
allowed range, so the dashboard and the command line can show it beside the input.

Physics behind each refusal (sources beside each case):

- a cooling supply at or above the zone temperature removes no sensible heat
  (Q = m c_p (t_zone - t_supply), ASHRAE Handbook Fundamentals 2017 Ch. 1 Eq. 30 for c_p);
  the model demands at least 0.5 K below the zone cooling set point (project rule);
- a coil cannot leave air at a dew point below its apparatus dew point, and the apparatus
  dew point cannot fall below what its cooling medium gives (``apparatus_dew_point_min``);
  bypass-factor line of condition: common practice (Carrier, "Handbook of Air
  Conditioning System Design", 1965, Part 1 Ch. 8, from memory);
- airflow must be positive (a mass flow of zero carries no load: the coil and zone
  equations divide by it);
- outdoor air cannot exceed the supply air (mass balance of the mixing box).

The zone's ventilation need is the user's figure (``ventilation_airflow_required``, from
ASHRAE 62.1 or the local code): the ventilation tests check that outdoor air below it at the
lowest airflow is refused, and that a fixed minimum outdoor airflow is held at every airflow.
"""

from __future__ import annotations

import re
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from plantside.air.coils import (
    cooling_coil_leaving_humidity_ratio,
    cooling_coil_load,
    heating_coil_load,
)
from plantside.air.mixing import mixed_state, mixed_state_from_flows
from plantside.air_handler.year import (
    AirHandlerSettings,
    air_handler_hours,
    design_point,
    hourly_year,
)
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel, zone_loads_for_weather
from plantside.climate.bundled import load_bundled_climate
from plantside.constants import STANDARD_AIR_DENSITY
from plantside.errors import InputRangeError, ScenarioError
from plantside.study.scenario import loads_scenario

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
SI_SCENARIO = SCENARIOS / "linden_office_si.toml"
ZONE = ZoneLoadModel(cooling_design_sensible=60.0, cooling_design_latent=10.0)
#: A hot, humid design state at sea level: 35 °C, 20 g/kg, 101,325 Pa (fictional).
HOT_HUMID = (35.0, 0.020, 101_325.0)


def _range_numbers(text: str) -> list[float]:
    return [float(x) for x in re.findall(r"-?\d+(?:\.\d+)?", text)]


def assert_refused(call, field: str, *, low=None, high=None):
    """``call()`` raises InputRangeError naming ``field`` and stating the allowed range."""
    with pytest.raises(InputRangeError) as caught:
        call()
    error = caught.value
    assert error.field == field, (error.field, str(error))
    assert field in str(error), str(error)
    assert error.allowed, f"no allowed range stated: {error}"
    numbers = _range_numbers(error.allowed)
    for bound in (low, high):
        if bound is not None:
            assert any(abs(n - bound) < 1e-9 for n in numbers), (bound, error.allowed)
    return error


# ---------------------------------------------------------------------------------------
# supply air warmer than the zone in cooling
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("supply", [23.6, 24.0, 26.0, 40.0])
def test_supply_air_at_or_above_the_zone_is_refused(supply):
    # Zone cooling set point 24 °C: the supply must be 4 to 23.5 °C (0.5 K below the zone,
    # project rule; 4 °C is the lowest a chilled-water coil gives, common practice).
    assert_refused(
        lambda: AirHandlerSettings(zone_cooling_drybulb=24.0, supply_drybulb=supply),
        "supply_drybulb",
        low=4.0,
        high=23.5,
    )


def test_supply_limit_follows_the_zone_set_point():
    # The limit moves with the zone: 22 °C supply is fine in a 26 °C zone, refused in 22 °C.
    AirHandlerSettings(zone_cooling_drybulb=26.0, supply_drybulb=22.0)
    assert_refused(
        lambda: AirHandlerSettings(zone_cooling_drybulb=22.0, supply_drybulb=22.0),
        "supply_drybulb",
        high=21.5,
    )


def test_supply_reset_above_the_zone_is_refused():
    assert_refused(
        lambda: AirHandlerSettings(supply_drybulb=13.0, supply_reset_drybulb=24.5),
        "supply_reset_drybulb",
        high=23.5,
    )


def test_supply_above_the_zone_in_a_scenario_names_the_file_field():
    text = SI_SCENARIO.read_text(encoding="utf-8")
    assert "supply_drybulb = 13.0" in text
    bad = text.replace("supply_drybulb = 13.0", "supply_drybulb = 25.0", 1)
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(bad, "office.toml", SCENARIOS)
    assert caught.value.field == "air_handler[1].supply_drybulb"
    assert "4 to 23.5" in str(caught.value)


def test_supply_above_the_zone_in_an_ip_scenario_says_the_file_unit():
    # In an IP file the number is °F; the message says the model's SI range and the unit
    # the file is read in (80 °F = 26.7 °C is above a 75 °F = 23.9 °C zone).
    text = (SCENARIOS / "quillon_clinic.toml").read_text(encoding="utf-8")
    match = re.search(r"^supply_drybulb = [\d.]+", text, flags=re.MULTILINE)
    assert match, "the IP example scenario sets supply_drybulb"
    bad = text[: match.start()] + "supply_drybulb = 80.0" + text[match.end() :]
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(bad, "clinic.toml", SCENARIOS)
    assert caught.value.field.endswith(".supply_drybulb")
    assert "°F" in str(caught.value)


def test_dashboard_refuses_supply_above_the_zone_and_keeps_the_result():
    # The dashboard's own range check (non-browser; the page is tested elsewhere): the
    # value is refused with the range, nothing is recomputed, the last result stays.
    from plantside.dashboard.state import DashboardState
    from plantside.study.scenario import load_scenario

    state = DashboardState(load_scenario(SI_SCENARIO))
    before = state.result
    assert state.set("supply_air_temperature", 26.0) is False
    message = state.messages["supply_air_temperature"]
    assert "Supply air temperature" in message and "23.5" in message, message
    assert state.result is before


# ---------------------------------------------------------------------------------------
# a coil asked for a dew point below its apparatus dew point limit
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("model", "field"),
    [("apparatus_dew_point", "apparatus_dew_point"), ("leaving_dew_point", "leaving_dew_point")],
)
@pytest.mark.parametrize("asked", [2.9, 0.0, -4.0])
def test_dew_point_below_the_coil_limit_is_refused(model, field, asked):
    # apparatus_dew_point_min = 3 °C: a fixed apparatus or leaving dew point below it
    # cannot be produced by the coil's cooling medium.
    assert_refused(
        lambda: AirHandlerSettings(coil_model=model, apparatus_dew_point_min=3.0, **{field: asked}),
        field,
        low=3.0,
    )


def test_apparatus_dew_point_at_or_above_the_supply_is_refused():
    # A coil cannot cool air below its apparatus dew point: ADP must be below the supply.
    assert_refused(
        lambda: AirHandlerSettings(
            coil_model="apparatus_dew_point", supply_drybulb=12.0, apparatus_dew_point=12.5
        ),
        "apparatus_dew_point",
        high=12.0,
    )


def test_coil_model_without_its_dew_point_is_refused():
    assert_refused(lambda: AirHandlerSettings(coil_model="leaving_dew_point"), "leaving_dew_point")


def test_design_point_needing_an_adp_below_the_limit_is_refused():
    # Bypass-factor line (common practice): t_adp = (t_leave - BF t_enter) / (1 - BF).
    # Supply 6 °C from a mix near 27 °C with BF 0.3 needs t_adp ~ (6 - 0.3 x 27) / 0.7,
    # about -3 °C: below the 3 °C the coil can produce.
    settings = AirHandlerSettings(
        supply_drybulb=6.0, preheat_drybulb=4.0, bypass_factor=0.3, apparatus_dew_point_min=3.0
    )
    error = assert_refused(lambda: design_point(settings, ZONE, HOT_HUMID), "apparatus_dew_point")
    text = str(error)
    assert "apparatus_dew_point_min" in text and "3 °C" in text, text
    needed = float(re.search(r"apparatus dew point of (-?\d+\.\d) °C", text).group(1))
    assert needed < 3.0
    # The same unit at a reachable supply temperature computes.
    design_point(replace(settings, supply_drybulb=13.0), ZONE, HOT_HUMID)


def test_hours_needing_an_adp_below_the_limit_are_flagged_in_the_year():
    # Over a year the same request is not refused hour by hour: the hours are counted in
    # a caution the dashboard shows.
    weather = load_bundled_climate("Port Calder")
    settings = AirHandlerSettings(supply_drybulb=6.0, preheat_drybulb=4.0, bypass_factor=0.3)
    year = hourly_year(settings, weather, ZONE)
    cautions = [c for c in year.attrs["cautions"] if "apparatus dew point below" in c]
    assert cautions, year.attrs["cautions"]
    assert re.match(r"\d+ cooling hours need an apparatus dew point below 3 °C", cautions[0])


def test_coil_function_refuses_a_leaving_dew_point_above_the_leaving_dry_bulb():
    # Supersaturated leaving air is impossible (ASHRAE Handbook Fundamentals 2017 Ch. 1:
    # the dew point of air is at most its dry bulb).
    assert_refused(
        lambda: cooling_coil_leaving_humidity_ratio(
            27.0, 0.011, 13.0, 101_325.0, leaving_dew_point=14.0
        ),
        "leaving_dew_point",
    )
    assert_refused(
        lambda: cooling_coil_leaving_humidity_ratio(
            27.0, 0.011, 13.0, 101_325.0, apparatus_dew_point=13.5
        ),
        "apparatus_dew_point",
    )


# ---------------------------------------------------------------------------------------
# zero or negative airflow
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("airflow", [0.0, -0.001, -5.0, float("nan"), float("inf"), 501.0])
def test_zero_negative_or_absurd_supply_airflow_is_refused(airflow):
    assert_refused(lambda: AirHandlerSettings(supply_airflow=airflow), "supply_airflow", high=500)


@pytest.mark.parametrize("fraction", [0.0, 0.049, -0.3, 1.01])
def test_minimum_airflow_fraction_outside_its_range_is_refused(fraction):
    assert_refused(
        lambda: AirHandlerSettings(minimum_airflow_fraction=fraction),
        "minimum_airflow_fraction",
        low=0.05,
        high=1.0,
    )


def test_negative_outdoor_airflow_or_more_than_the_supply_is_refused():
    # Mass balance of the mixing box: 0 <= outdoor air <= supply air.
    assert_refused(
        lambda: AirHandlerSettings(supply_airflow=5.0, minimum_outdoor_airflow=-0.1),
        "minimum_outdoor_airflow",
        low=0.0,
        high=5.0,
    )
    assert_refused(
        lambda: AirHandlerSettings(supply_airflow=5.0, minimum_outdoor_airflow=5.5),
        "minimum_outdoor_airflow",
        high=5.0,
    )
    assert_refused(
        lambda: AirHandlerSettings(minimum_outdoor_air_fraction=1.2),
        "minimum_outdoor_air_fraction",
        high=1.0,
    )


def test_zero_airflow_in_a_scenario_names_the_file_field():
    text = SI_SCENARIO.read_text(encoding="utf-8")
    assert "supply_airflow = 4200.0" in text
    for value in ("0", "-4200.0", "nan", "inf"):
        bad = text.replace("supply_airflow = 4200.0", f"supply_airflow = {value}", 1)
        with pytest.raises(ScenarioError) as caught:
            loads_scenario(bad, "office.toml", SCENARIOS)
        assert caught.value.field == "air_handler[1].supply_airflow", str(caught.value)


def test_physics_functions_refuse_negative_or_zero_flows():
    assert_refused(lambda: cooling_coil_load(-1.0, 27.0, 0.011, 13.0, 0.009, 10.0), "mass_flow")
    assert_refused(lambda: heating_coil_load(-1.0, 10.0, 30.0, 0.005), "mass_flow")
    assert_refused(
        lambda: mixed_state_from_flows(0.0, 30.0, 0.015, 0.0, 24.0, 0.009),
        "mass_flow_1 + mass_flow_2",
    )
    assert_refused(lambda: mixed_state(-0.1, 30.0, 0.015, 24.0, 0.009), "outdoor_fraction")


def test_impossible_outdoor_states_are_refused_by_the_hour_model():
    # Humidity above saturation at the dry bulb (ASHRAE Handbook Fundamentals 2017 Ch. 1
    # Eq. 20 at saturation), and a pressure no site has.
    settings = AirHandlerSettings()
    loads = HourlyZoneLoads(sensible=[30.0], latent=[5.0])
    assert_refused(
        lambda: air_handler_hours(settings, [20.0], [0.030], [101_325.0], loads),
        "outdoor_humidity_ratio",
    )
    assert_refused(
        lambda: air_handler_hours(settings, [20.0], [0.010], [10_000.0], loads), "pressure"
    )
    assert_refused(
        lambda: air_handler_hours(settings, [np.nan], [0.010], [101_325.0], loads),
        "outdoor_drybulb",
    )


# ---------------------------------------------------------------------------------------
# outdoor air and the zone's ventilation need
# ---------------------------------------------------------------------------------------
def test_fixed_minimum_outdoor_airflow_is_held_at_every_airflow():
    # A ventilation floor without a stated need: a fixed minimum outdoor airflow. With
    # variable volume the outdoor-air fraction rises as the supply falls, so the outdoor
    # mass flow never drops below it (DEVELOPERS.md, "The air-handler contract").
    weather = load_bundled_climate("Korva Plains")
    settings = AirHandlerSettings(
        supply_airflow=6.0,
        fan_control="variable_volume",
        minimum_airflow_fraction=0.3,
        minimum_outdoor_airflow=1.5,
        economizer="none",
    )
    year = hourly_year(settings, weather, zone_loads_for_weather(ZONE, weather))
    operating = year["operating"].to_numpy()
    floor = 1.5 * STANDARD_AIR_DENSITY  # m³/s of standard air x 0.075 lb/ft³ (common practice)
    outdoor = year["outdoor_mass_flow_kgs"].to_numpy()[operating]
    supply = year["supply_mass_flow_kgs"].to_numpy()[operating]
    assert np.all(outdoor >= np.minimum(floor, supply) * (1 - 1e-9))
    # ...including the hours at the lowest airflow, where a fraction-based minimum of
    # the same design value (1.5 / 6 = 25 %) would give only 0.3 x 1.5 = 0.45 m³/s.
    lowest = supply <= 0.3 * 6.0 * STANDARD_AIR_DENSITY * (1 + 1e-9)
    assert lowest.any()
    assert np.all(outdoor[lowest] >= floor * (1 - 1e-9))


@pytest.mark.parametrize(
    ("changes", "field", "allowed_number"),
    [
        # VAV, fraction-based: 0.2 x (0.3 x 6 m³/s) = 0.36 m³/s at the lowest airflow,
        # below 1.0 m³/s; at least 1.0 / 1.8 = 0.556 is needed.
        ({"minimum_outdoor_air_fraction": 0.2}, "minimum_outdoor_air_fraction", 0.556),
        # A fixed minimum below the need.
        ({"minimum_outdoor_airflow": 0.8}, "minimum_outdoor_airflow", 1.0),
        # Constant volume, fraction-based: 0.1 x 6 = 0.6 m³/s.
        (
            {"fan_control": "constant_volume", "minimum_outdoor_air_fraction": 0.1},
            "minimum_outdoor_air_fraction",
            0.167,
        ),
    ],
)
def test_outdoor_air_below_the_ventilation_floor_is_refused(changes, field, allowed_number):
    # The zone needs 1.0 m³/s of outdoor air (ventilation_airflow_required, e.g. from the
    # ASHRAE 62.1 ventilation rate procedure); outdoor air is checked at the lowest supply
    # airflow, where a fraction-based minimum gives the least.
    settings = dict(
        supply_airflow=6.0,
        fan_control="variable_volume",
        minimum_airflow_fraction=0.3,
        ventilation_airflow_required=1.0,
    )
    settings.update(changes)
    error = assert_refused(lambda: AirHandlerSettings(**settings), field)
    assert "ventilation_airflow_required" in str(error), str(error)
    assert any(abs(n - allowed_number) < 1e-3 for n in _range_numbers(error.allowed)), error


def test_outdoor_air_at_the_ventilation_floor_is_held_every_hour():
    # Accepted settings (0.6 x 1.8 = 1.08 m³/s >= 1.0 m³/s at the lowest airflow) give at
    # least the need in every operating hour of a year, economizer or not.
    weather = load_bundled_climate("Port Calder")
    settings = AirHandlerSettings(
        supply_airflow=6.0,
        fan_control="variable_volume",
        minimum_airflow_fraction=0.3,
        minimum_outdoor_air_fraction=0.6,
        ventilation_airflow_required=1.0,
    )
    year = hourly_year(settings, weather, zone_loads_for_weather(ZONE, weather))
    operating = year["operating"].to_numpy()
    outdoor = year["outdoor_mass_flow_kgs"].to_numpy()[operating]
    assert np.all(outdoor >= 1.0 * STANDARD_AIR_DENSITY * (1 - 1e-9))


def test_ventilation_need_above_the_supply_airflow_is_refused():
    assert_refused(
        lambda: AirHandlerSettings(supply_airflow=2.0, ventilation_airflow_required=2.5),
        "ventilation_airflow_required",
        high=2.0,
    )


@pytest.mark.parametrize(
    ("scenario", "value", "expected_m3s"),
    [
        # cfm (1 cfm = 0.00047194745 m³/s, NIST SP 811); AHU-2 gives 0.2 x 0.3 x 14,000 =
        # 840 cfm at its lowest airflow, above the 500 cfm need
        ("quillon_clinic.toml", 500.0, 500.0 * 0.00047194745),
        # L/s; AHU-1 gives 0.21 x 0.3 x 4,200 = 265 L/s at its lowest airflow
        ("linden_office_si.toml", 200.0, 0.2),
    ],
)
def test_v2_ventilation_need_in_a_scenario_is_converted(scenario, value, expected_m3s):
    text = (SCENARIOS / scenario).read_text(encoding="utf-8")
    name = re.search(r'^name = "(AHU-[^"]*)"', text, flags=re.MULTILINE).group(0)
    text = text.replace(name, f"{name}\nventilation_airflow_required = {value}", 1)
    loaded = loads_scenario(text, scenario, SCENARIOS)
    unit = next(a.settings for a in loaded.air_handlers if a.settings.name in name)
    assert unit.ventilation_airflow_required == pytest.approx(expected_m3s, rel=1e-6)


# ---------------------------------------------------------------------------------------
# clear messages: exclusive bounds (E1, fixed in b60000d), wrong types (A1, fixed in c080f05)
# ---------------------------------------------------------------------------------------
def test_exclusive_bounds_are_stated_as_exclusive():
    # 'supply_airflow = 0 m³/s is outside the allowed range 0 to 500 m³/s' reads as if 0
    # were allowed. The message must say the bound is excluded.
    with pytest.raises(InputRangeError) as caught:
        AirHandlerSettings(supply_airflow=0.0)
    assert re.search(r"(above|greater than|more than|>)\s*0\b", str(caught.value)), str(
        caught.value
    )
    with pytest.raises(InputRangeError) as caught:
        AirHandlerSettings(
            coil_model="apparatus_dew_point", supply_drybulb=13.0, apparatus_dew_point=13.0
        )
    assert re.search(r"(below|less than|under|<)\s*13\b", str(caught.value)), str(caught.value)


@pytest.mark.parametrize("value", ["5", True])
def test_settings_refuse_a_number_field_given_as_text_or_flag(value):
    # AirHandlerSettings(supply_airflow="5") used to be accepted, then the hourly model
    # failed with numpy's UFuncNoLoopError: the refusal must come where the value enters.
    assert_refused(lambda: AirHandlerSettings(supply_airflow=value), "supply_airflow")


@pytest.mark.parametrize("end", ["high", "low"])
def test_defect_d1_dashboard_supply_range_is_what_the_model_accepts(end):
    # The SI example has a supply reset to 16 °C and preheat at 5 °C. The supply control
    # offers 4 to 23.5 °C; 23.5 °C is refused as "supply_reset_drybulb = 16 °C is outside
    # the allowed range 23.5 to 23.5 °C" and 4 °C as "preheat_drybulb = 5 °C is outside the
    # allowed range -20 to 4 °C": fields the page does not show. Either the range offered
    # excludes such values, or the message speaks of the control on the page.
    from plantside.dashboard.state import DashboardState
    from plantside.study.scenario import load_scenario

    state = DashboardState(load_scenario(SI_SCENARIO))
    state.set("bypass_factor", 0.0)  # keep the coil physics out of it
    low, high = state.supply_temperature_range()
    value = high if end == "high" else low
    if state.set("supply_air_temperature", value):
        return
    message = state.messages["supply_air_temperature"]
    assert "supply_reset_drybulb" not in message and "preheat_drybulb" not in message, message
