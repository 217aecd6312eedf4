"""Design points of the air handler: breakdown, state points, governing condition.

Sources: ASHRAE Handbook Fundamentals 2017 (SI) Ch. 14 (the three cooling design
conditions: dry bulb with mean coincident wet bulb, dew point with mean coincident dry
bulb, enthalpy with mean coincident dry bulb) and Ch. 1 (states, checked with
psychrolib 2.5). Common practice (no source): for units with much outdoor air the dew
point or enthalpy condition, not the dry-bulb one, often sets the coil; bad settings
must name the field and its allowed range.
"""

from __future__ import annotations

from dataclasses import replace
from types import SimpleNamespace

import psychrolib
import pytest
from air_handler_cases import synthetic_weather
from plantside.air import moist_air as ma
from plantside.air_handler.year import (
    AirHandlerSettings,
    cooling_design_points,
    design_point,
    heating_design_point,
)
from plantside.climate.design_conditions import design_conditions_from_weather
from plantside.errors import InputRangeError

P = 101325.0  # Pa, ASHRAE 2017 Ch. 1 Table 1


@pytest.fixture(scope="module")
def weather():
    return synthetic_weather()


# --- design points ---------------------------------------------------------------------------
def _condition(kind, drybulb, humidity_ratio, percent=0.4):
    return SimpleNamespace(
        kind=kind,
        percent=percent,
        drybulb=drybulb,
        humidity_ratio=humidity_ratio,
        pressure=P,
        label=f"{kind} {percent} %",
    )


HUMID_CONDITIONS = [
    # dry bulb / MCWB; dew point / MCDB; enthalpy / MCDB of a fictional humid site
    _condition("cooling", 34.0, float(ma.humidity_ratio_from_wet_bulb(34.0, 24.5, P))),
    _condition("dehumidification", 28.0, float(ma.humidity_ratio_from_dew_point(25.0, P))),
    _condition("enthalpy", 30.5, float(ma.humidity_ratio_from_enthalpy(30.5, 80.0))),
    _condition("heating", -8.0, 0.0015, percent=99.6),
]


def test_design_point_breakdown_and_state_points(office_zone, vav_unit):
    point = design_point(vav_unit, office_zone, HUMID_CONDITIONS[0])
    assert point.kind == "cooling" and point.label == "cooling 0.4 %"
    assert list(point.states.index) == [
        "outdoor",
        "recovered",
        "return",
        "mixed",
        "coil_entering",
        "coil_leaving",
        "supply",
        "zone",
    ]
    states = point.states
    assert states.loc["supply", "drybulb_C"] == pytest.approx(13.0)
    assert states.loc["outdoor", "drybulb_C"] == 34.0
    # state-point properties against psychrolib
    rh = psychrolib.GetRelHumFromHumRatio(34.0, states.loc["outdoor", "humidity_ratio_kgkg"], P)
    assert states.loc["outdoor", "relative_humidity"] == pytest.approx(rh, rel=1e-6)
    assert states.loc["outdoor", "wet_bulb_C"] == pytest.approx(24.5, abs=1e-4)
    # the zone model at its design dry bulb (33 °C): 34 °C gives a little more sensible
    assert point.loads["zone_sensible_kW"] > 60.0
    assert point.loads["coil_total_kW"] == pytest.approx(
        point.loads["coil_sensible_kW"] + point.loads["coil_latent_kW"]
    )
    assert point.economizer_mode == "locked_out"


def test_governing_cooling_condition(office_zone, vav_unit):
    # A 100 % outdoor-air unit in a humid climate: dew-point or enthalpy condition governs.
    doas = AirHandlerSettings(
        supply_airflow=3.0,
        all_outdoor_air=True,
        fan_control="constant_volume",
        supply_fan_power=3.0,
    )
    summary = cooling_design_points(doas, office_zone, HUMID_CONDITIONS)
    assert set(summary.points) == {"cooling", "dehumidification", "enthalpy"}
    assert summary.governing in ("dehumidification", "enthalpy")
    assert summary.governing_latent == "dehumidification"
    assert summary.table["governing"].sum() == 1
    table = summary.table
    assert table.loc[summary.governing, "coil_total_kW"] == table["coil_total_kW"].max()
    # A mostly recirculating unit with a large sensible zone load: the dry-bulb condition.
    # (at the airflow the load asks for: at the scheduled 12 m³/s the coil load is mostly
    # airflow x mixed-air enthalpy, and the enthalpy condition governs)
    recirculating = replace(
        vav_unit, supply_airflow=12.0, minimum_outdoor_air_fraction=0.05, design_airflow="load"
    )
    big = replace(office_zone, cooling_design_sensible=120.0, cooling_design_latent=2.0)
    assert cooling_design_points(recirculating, big, HUMID_CONDITIONS).governing == "cooling"
    # with too little design airflow the zone runs warm: said plainly
    small = cooling_design_points(replace(recirculating, supply_airflow=8.0), big, HUMID_CONDITIONS)
    assert small.points["cooling"].loads["zone_sensible_unmet_kW"] > 0
    assert any("airflow" in c for c in small.points["cooling"].cautions)
    with pytest.raises(InputRangeError, match="no enthalpy"):
        cooling_design_points(doas, office_zone, HUMID_CONDITIONS[:2])


def test_design_points_from_the_design_condition_module(weather, office_zone, vav_unit):
    conditions = design_conditions_from_weather(weather)
    summary = cooling_design_points(vav_unit, office_zone, conditions, percent=1.0)
    assert summary.governing in ("cooling", "dehumidification", "enthalpy")
    heating = next(c for c in conditions.conditions if c.kind == "heating")
    point = heating_design_point(vav_unit, office_zone, heating)
    assert point.loads["heating_coil_kW"] > 0 and point.loads["coil_total_kW"] == 0


def test_heating_design_point(office_zone, vav_unit):
    point = heating_design_point(vav_unit, office_zone, HUMID_CONDITIONS[3])
    row = point.row
    # envelope loss only at the heating design dry bulb: -40 kW (office_zone.heating_design_load)
    assert row["zone_sensible_kW"] == pytest.approx(-40.0, rel=1e-6)
    assert point.economizer_mode == "heating"
    assert row["supply_drybulb_C"] > 21.0
    cp = 1.006 + 1.86 * row["coil_entering_humidity_ratio_kgkg"]
    heating = (
        row["supply_mass_flow_kgs"]
        * cp
        * (row["coil_leaving_drybulb_C"] - row["coil_entering_drybulb_C"])
    )
    assert row["heating_coil_kW"] == pytest.approx(heating, rel=1e-9)
    # preheat holds the mixed air at 5 °C or above
    assert row["mixed_drybulb_C"] >= 5.0 or row["preheat_kW"] > 0


# --- bad inputs -----------------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("field", "changes", "allowed"),
    [
        ("supply_airflow", {"supply_airflow": -1.0}, "0 to 500"),
        ("minimum_outdoor_air_fraction", {"minimum_outdoor_air_fraction": 1.2}, "0 to 1"),
        ("minimum_outdoor_airflow", {"minimum_outdoor_airflow": 6.0}, "0 to 5"),
        ("supply_drybulb", {"supply_drybulb": 25.0}, "4 to 23.5"),
        ("bypass_factor", {"bypass_factor": 1.2}, "0 to below 1"),
        ("bypass_factor", {"bypass_factor": -0.1}, "0 to below 1"),
        (
            "apparatus_dew_point",
            {"coil_model": "apparatus_dew_point", "apparatus_dew_point": 14.0},
            "to below 13",
        ),
        (
            "leaving_dew_point",
            {"coil_model": "leaving_dew_point", "leaving_dew_point": 15.0},
            "to 13",
        ),
        ("apparatus_dew_point", {"coil_model": "apparatus_dew_point"}, "below supply_drybulb"),
        ("economizer", {"economizer": "enthalpyish"}, "fixed_drybulb"),
        ("fan_control", {"fan_control": "vav"}, "variable_volume"),
        ("zone_heating_drybulb", {"zone_heating_drybulb": 26.0}, "5 to 24"),
        ("recovery_sensible_effectiveness", {"recovery_sensible_effectiveness": 1.5}, "0 to 0.95"),
    ],
)
def test_bad_settings_name_field_and_range(field, changes, allowed, vav_unit):
    with pytest.raises(InputRangeError) as info:
        replace(vav_unit, **changes)
    assert info.value.field == field
    assert allowed in str(info.value)


def test_apparatus_dew_point_the_coil_cannot_produce():
    # 100 % outdoor air at a very hot, humid state with a leaky coil (BF 0.3) and a 10 °C
    # supply: ADP = (10 - 0.3 x 40)/0.7 < 0 °C, below what a chilled-water coil can make.
    unit = AirHandlerSettings(
        supply_airflow=2.0, all_outdoor_air=True, bypass_factor=0.3, supply_drybulb=10.0
    )
    with pytest.raises(InputRangeError) as info:
        design_point(unit, (10.0, 2.0), (40.0, 0.02, P))
    assert info.value.field == "apparatus_dew_point"
    assert "at least 3 °C" in str(info.value)


@pytest.mark.parametrize("value", ["5", True, None])
def test_numbers_must_be_numbers(value, office_zone, vav_unit):
    # A number field given as text or true/false is refused where it enters.
    with pytest.raises(InputRangeError) as info:
        replace(vav_unit, supply_airflow=value)
    assert info.value.field == "supply_airflow"
    with pytest.raises(InputRangeError) as info:
        replace(vav_unit, all_outdoor_air="yes")
    assert info.value.field == "all_outdoor_air"
    with pytest.raises(InputRangeError) as info:
        replace(office_zone, cooling_design_sensible="60")
    assert info.value.field == "cooling_design_sensible"


@pytest.mark.parametrize(
    ("changes", "field", "allowed"),
    [
        # VAV at 30 % of 5 m³/s = 1.5 m³/s; 20 % of it is 0.3 m³/s of outdoor air
        ({}, "minimum_outdoor_air_fraction", "at least 0.333"),
        ({"minimum_outdoor_airflow": 0.4}, "minimum_outdoor_airflow", "at least 0.5 m³/s"),
        ({"all_outdoor_air": True, "minimum_airflow_fraction": 0.05}, "minimum_airflow_fraction",
         "at least 0.1"),
    ],
)  # fmt: skip
def test_outdoor_air_below_the_ventilation_need_is_refused(changes, field, allowed, vav_unit):
    with pytest.raises(InputRangeError) as info:
        replace(vav_unit, ventilation_airflow_required=0.5, **changes)
    assert info.value.field == field
    assert allowed in str(info.value) and "ventilation" in str(info.value)
    # enough outdoor air at the lowest airflow: accepted
    replace(vav_unit, ventilation_airflow_required=0.5, minimum_outdoor_air_fraction=0.34)
    replace(vav_unit, ventilation_airflow_required=0.5, minimum_outdoor_airflow=0.5)
