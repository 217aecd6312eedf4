"""Zone humidity control and VAV terminal reheat: worked examples, balance, the clinic.

DEVELOPERS.md, "The air-handler model" (steps 3 and 10, the energy balance) is the
contract checked here. Every state of the worked examples is recomputed with psychrolib
(ASHRAE Handbook Fundamentals 2017 Ch. 1 equations), not with a second copy of the
model's formulas.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
import psychrolib
import pytest
from air_handler_cases import balance_residual
from hypothesis import given, settings
from hypothesis import strategies as st
from plantside.air_handler.year import (
    AirHandlerSettings,
    air_handler_hours,
    humidity_hours_above_limit,
)
from plantside.air_handler.zone_loads import HourlyZoneLoads
from plantside.errors import InputRangeError, ScenarioError
from plantside.study.run import heating_load_columns, run_study, study_summary
from plantside.study.scenario import loads_scenario
from test_air_handler_reheat import _line_problems

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
CLINIC = SCENARIOS / "quillon_clinic.toml"
P = 101325.0

#: A recirculating office unit (fictional): 4 m³/s standard air, 20 % outdoor air.
UNIT = AirHandlerSettings(
    supply_airflow=4.0,
    minimum_outdoor_air_fraction=0.2,
    supply_drybulb=13.0,
    economizer="none",
    preheat_drybulb=None,
    bypass_factor=0.1,
)


def _one_hour(sensible, latent, internal=0.0):
    return HourlyZoneLoads(
        sensible=np.array([sensible]),
        latent=np.array([latent]),
        internal_sensible=np.array([internal]),
        occupied=np.array([True]),
    )


def _h(t, w):
    """Moist-air enthalpy from psychrolib [kJ/kg dry air] (ASHRAE 2017 Ch. 1 Eq. 30)."""
    return psychrolib.GetMoistAirEnthalpy(t, w) / 1000.0


# --- zone humidity control, one hour by hand ---------------------------------------------
def test_humidity_control_hour_by_hand():
    """A mild, humid hour with a large latent load: the zone would float above 60 %.

    Hand calculation (psychrolib for every state; SI, sea level):

    1. Constant volume, 4 m³/s x 1.2014 kg/m³ of dry air; zone at 24 °C (cooling).
    2. Held zone humidity W_z = W(24 °C, 60 %) (psychrolib).
    3. Supply humidity W_2 = W_z - m_w / m, m_w = q_lat / (2501 + 1.86 t_z) (the zone's
       moisture balance, ASHRAE 2017 Ch. 1 Eq. 30's latent term).
    4. Coil entering W_1 = 0.8 W_z + 0.2 W_o (mixing, no economizer), t_1 from the row.
    5. Process line with BF = 0.1: Ws(t_adp) = (W_2 - BF W_1)/(1 - BF), t_adp = its dew
       point; t_2 = BF t_1 + (1 - BF) t_adp (bypass-factor line, common practice).
    6. Terminal reheat q = m (h(t_s, W_2) - h(t_2, W_2)) to the supply dry bulb t_s the
       zone needs (no fan): m (h(24 °C, W_2) - h(t_s, W_2)) = q_sensible.
    """
    control = replace(UNIT, fan_control="constant_volume", zone_relative_humidity_max=0.6)
    loads = _one_hour(50.0, 45.0)
    t_o, w_o = 26.0, psychrolib.GetHumRatioFromTDewPoint(22.0, P)
    free = air_handler_hours(
        replace(control, zone_relative_humidity_max=None), [t_o], [w_o], [P], loads
    )
    r = air_handler_hours(control, [t_o], [w_o], [P], loads)
    # without control the zone floats above 60 % (the case is built so)
    assert free["zone_relative_humidity"][0] > 0.65
    m = 4.0 * 1.2014  # standard air 0.075 lb/ft³, common practice (DEVELOPERS.md register)
    w_z = psychrolib.GetHumRatioFromRelHum(24.0, 0.6, P)
    # 1.2014 is 0.075 lb/ft³ rounded (1.20138): 2e-5 relative on the flows
    assert r["zone_relative_humidity"][0] == pytest.approx(0.6, abs=1e-6)
    assert r["zone_humidity_ratio_kgkg"][0] == pytest.approx(w_z, rel=1e-5)
    w2 = w_z - 45.0 / (2501.0 + 1.86 * 24.0) / m
    assert r["coil_leaving_humidity_ratio_kgkg"][0] == pytest.approx(w2, rel=1e-4)
    w1 = 0.8 * w_z + 0.2 * w_o
    assert r["coil_entering_humidity_ratio_kgkg"][0] == pytest.approx(w1, rel=1e-4)
    t1 = float(r["coil_entering_drybulb_C"][0])
    w_adp = (w2 - 0.1 * w1) / 0.9
    t_adp = psychrolib.GetTDewPointFromHumRatio(20.0, w_adp, P)
    t2 = 0.1 * t1 + 0.9 * t_adp
    # psychrolib's dew-point iteration stops near 1e-3 K
    assert r["coil_leaving_drybulb_C"][0] == pytest.approx(t2, abs=5e-3)
    assert r["apparatus_dew_point_C"][0] == pytest.approx(t_adp, abs=5e-3)
    # the supply is what the zone needs, raised above 13 °C at this load (constant
    # volume): m (h(24 °C, W_2) - h(t_s, W_2)) = q_sensible, psychrolib enthalpies
    t_s = float(r["supply_drybulb_C"][0])
    assert t_s > 13.0
    assert m * (_h(24.0, w2) - _h(t_s, w2)) == pytest.approx(50.0, rel=1e-3)
    assert t2 < t_s - 1.0  # driven colder than the supply it is reheated to
    reheat = m * (_h(t_s, w2) - _h(t2, w2))
    assert r["humidity_control_reheat_kW"][0] == pytest.approx(reheat, rel=2e-3)
    assert r["zone_sensible_kW"][0] == pytest.approx(50.0, rel=1e-4)
    assert r["zone_latent_kW"][0] == pytest.approx(45.0, rel=1e-4)
    # the coil removes more moisture than without control
    assert r["coil_latent_kW"][0] > free["coil_latent_kW"][0]
    residual, gross = balance_residual(r)
    assert abs(residual[0]) < 1e-3 * gross[0]  # the contract's 0.1 %


def test_control_off_where_the_zone_is_dry_enough():
    # a dry hour: the zone is below 60 % without control, so control changes nothing
    control = replace(UNIT, zone_relative_humidity_max=0.6)
    loads = _one_hour(30.0, 5.0)
    w_o = psychrolib.GetHumRatioFromTDewPoint(10.0, P)
    free = air_handler_hours(UNIT, [28.0], [w_o], [P], loads)
    r = air_handler_hours(control, [28.0], [w_o], [P], loads)
    assert free["zone_relative_humidity"][0] < 0.6
    assert r["humidity_control_reheat_kW"][0] == 0.0
    for key in ("coil_total_kW", "zone_humidity_ratio_kgkg", "coil_leaving_drybulb_C"):
        assert r[key][0] == free[key][0]


# --- VAV terminal reheat, one hour by hand ------------------------------------------------
def test_vav_terminal_reheat_at_minimum_airflow_by_hand():
    """Little cooling: the airflow is at its minimum and the terminal reheats.

    30 % of 4 m³/s standard air; supply held at 13 °C; the terminal adds what the zone
    does not need: q_rh = m (h(24 °C, W_s) - h(13 °C, W_s)) - q_room (psychrolib
    enthalpies, ASHRAE 2017 Ch. 1 Eq. 30).
    """
    unit = replace(UNIT, low_load_response="reheat")
    loads = _one_hour(5.0, 1.0)
    w_o = psychrolib.GetHumRatioFromTDewPoint(12.0, P)
    r = air_handler_hours(unit, [22.0], [w_o], [P], loads)
    m = 0.3 * 4.0 * 1.2014  # standard air 0.075 lb/ft³, common practice (1.20138 exactly)
    assert r["supply_mass_flow_kgs"][0] == pytest.approx(m, rel=1e-4)
    m = float(r["supply_mass_flow_kgs"][0])
    assert r["supply_drybulb_C"][0] == pytest.approx(13.0, abs=1e-6)
    w_s = float(r["supply_humidity_ratio_kgkg"][0])
    reheat = m * (_h(24.0, w_s) - _h(13.0, w_s)) - 5.0
    assert r["reheat_kW"][0] == pytest.approx(reheat, rel=1e-4)
    assert r["zone_sensible_kW"][0] == pytest.approx(5.0, rel=1e-4)
    # the other response raises the supply instead, with no reheat and less coil load
    raised = air_handler_hours(UNIT, [22.0], [w_o], [P], loads)
    assert raised["reheat_kW"][0] == 0.0
    assert raised["supply_drybulb_C"][0] > 13.0 + 1.0
    assert raised["coil_total_kW"][0] < r["coil_total_kW"][0]


def test_vav_terminal_reheat_in_a_heating_hour_by_hand():
    # A heating hour: the unit still supplies 13 °C (an economizer mixes down to it), the
    # terminal heats from there: q_rh = m (h(t_terminal, W_s) - h(13 °C, W_s)) with
    # t_terminal = t_z - q / (m c_p) <= heating_supply_drybulb_max (psychrolib enthalpies).
    unit = replace(UNIT, low_load_response="reheat", economizer="fixed_drybulb")
    loads = _one_hour(-20.0, 0.5)
    w_o = psychrolib.GetHumRatioFromTDewPoint(-2.0, P)
    r = air_handler_hours(unit, [5.0], [w_o], [P], loads)
    m = float(r["supply_mass_flow_kgs"][0])
    w_s = float(r["supply_humidity_ratio_kgkg"][0])
    assert r["supply_drybulb_C"][0] == pytest.approx(13.0, abs=1e-6)
    assert r["heating_coil_kW"][0] == 0.0  # the mix is held at 13 °C, no unit heating
    reheat = m * (_h(21.0, w_s) - _h(13.0, w_s)) + 20.0
    assert r["reheat_kW"][0] == pytest.approx(reheat, rel=1e-4)
    assert r["zone_sensible_kW"][0] == pytest.approx(-20.0, rel=1e-4)
    residual, gross = balance_residual(r)
    assert abs(residual[0]) < 1e-3 * gross[0]


def test_no_terminal_reheat_above_the_minimum_airflow():
    unit = replace(UNIT, low_load_response="reheat")
    loads = _one_hour(30.0, 3.0)  # needs more than the minimum airflow
    r = air_handler_hours(unit, [28.0], [0.010], [P], loads)
    assert r["airflow_fraction"][0] > 0.31
    assert r["reheat_kW"][0] == 0.0


# --- settings ----------------------------------------------------------------------------
def test_humidity_control_settings_are_checked_where_they_enter():
    with pytest.raises(InputRangeError, match="zone_relative_humidity_max"):
        AirHandlerSettings(zone_relative_humidity_max=0.65)  # above the 0.6 caution limit
    with pytest.raises(InputRangeError, match="zone_relative_humidity_max"):
        AirHandlerSettings(zone_relative_humidity_max=0.2)
    with pytest.raises(InputRangeError, match="leaving_dew_point"):
        AirHandlerSettings(
            coil_model="leaving_dew_point", leaving_dew_point=11.0, zone_relative_humidity_max=0.6
        )
    assert AirHandlerSettings(zone_relative_humidity_max=0.55).zone_relative_humidity_max == 0.55


def test_humidity_control_is_read_from_a_scenario_file():
    text = CLINIC.read_text(encoding="utf-8")
    text = text.replace(
        'name = "AHU-2 offices"', 'name = "AHU-2 offices"\nzone_relative_humidity_max = 0.55'
    )
    scenario = loads_scenario(text, base_dir=CLINIC.parent)
    assert scenario.air_handlers[1].settings.zone_relative_humidity_max == 0.55
    bad = text.replace("zone_relative_humidity_max = 0.55", "zone_relative_humidity_max = 0.9")
    with pytest.raises(ScenarioError, match="zone_relative_humidity_max"):
        loads_scenario(bad, base_dir=CLINIC.parent)


# --- the clinic: a year and the plant ----------------------------------------------------
@pytest.fixture(scope="module")
def clinic_text():
    return CLINIC.read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def clinic_studies(clinic_text):
    """The clinic as shipped (VAV terminal reheat), with the supply raised instead, and
    with the supply raised plus zone humidity control at 60 % on both recirculating units."""
    raised = clinic_text.replace(
        'low_load_response = "reheat"', 'low_load_response = "raise_supply_temperature"'
    )
    assert raised != clinic_text
    controlled = raised.replace(
        'low_load_response = "raise_supply_temperature"',
        'low_load_response = "raise_supply_temperature"\nzone_relative_humidity_max = 0.6',
    )
    return {
        name: run_study(loads_scenario(text, base_dir=CLINIC.parent))
        for name, text in (
            ("reheat", clinic_text),
            ("raised", raised),
            ("controlled", controlled),
        )
    }


def _plant_figures(study):
    summary = study_summary(study)
    hours = sum(u["hours_above_humidity_limit"] for u in summary["air_handlers"])
    return {
        "cooling_kWh": study.cooling.annual_energy,
        "heating_kWh": study.heating.annual_energy,
        "hours_above_60": hours,
        "summary": summary,
    }


def test_clinic_plant_effect_of_terminal_reheat_and_humidity_control(clinic_studies):
    reheat, raised, controlled = (
        _plant_figures(clinic_studies[k]) for k in ("reheat", "raised", "controlled")
    )
    # print the figures the report quotes (pytest -s)
    for name, f in (("reheat", reheat), ("raised", raised), ("controlled", controlled)):
        print(
            f"[clinic] {name}: cooling {f['cooling_kWh'] / 1000:.0f} MWh, heating "
            f"{f['heating_kWh'] / 1000:.0f} MWh, hours above 60 % RH {f['hours_above_60']}"
        )
    # Raising the supply temperature at low load lets the humid site's zones float above
    # 60 % for many hours; terminal reheat at a 55 °F supply keeps the coil dehumidifying
    # and pays for it in cooling and heating energy (the known cost of VAV reheat; ASHRAE
    # 90.1-2019 section 6.5.2.1 limits simultaneous heating and cooling for this reason,
    # from memory).
    assert raised["hours_above_60"] > 500
    assert reheat["hours_above_60"] < raised["hours_above_60"] / 10
    assert reheat["cooling_kWh"] > raised["cooling_kWh"]
    assert reheat["heating_kWh"] > raised["heating_kWh"]
    # Humidity control holds 60 % in every conditioning hour (the coil is never short of
    # capacity in this model) and costs cooling and heating (its terminal reheat)...
    assert controlled["hours_above_60"] == 0
    units = controlled["summary"]["air_handlers"][1:]
    assert all(u["hours_above_humidity_limit_without_control"] > 0 for u in units)
    # ... its count without control is the raised-supply clinic's own count
    raised_units = raised["summary"]["air_handlers"][1:]
    for unit, base in zip(units, raised_units, strict=True):
        assert (
            unit["hours_above_humidity_limit_without_control"]
            == (base["hours_above_humidity_limit"])
        )
        assert unit["annual_humidity_control_reheat_kWh"] > 0.0
    assert controlled["cooling_kWh"] > raised["cooling_kWh"]
    assert controlled["heating_kWh"] > raised["heating_kWh"]
    # ... and it dries the zones with less reheat than holding every zone at 55 °F
    assert controlled["heating_kWh"] < reheat["heating_kWh"]


def test_clinic_terminal_reheat_is_on_the_heating_plant_at_design_and_hourly(clinic_studies):
    study = clinic_studies["reheat"]
    assert "reheat_kW" in heating_load_columns
    assert "humidity_control_reheat_kW" in heating_load_columns
    for unit in study.air_handlers[1:]:
        assert unit.settings.low_load_response == "reheat"
        # at the heating design point the terminal does the heating above the 55 °F supply
        assert unit.heating_design.loads["reheat_kW"] > 0.0
        hourly = unit.hourly["reheat_kW"].to_numpy()
        assert np.all(hourly <= unit.heating_hourly + 1e-9)
        assert hourly.sum() > 0.0


def test_clinic_humidity_control_year_on_the_line_and_balanced(clinic_studies):
    study = clinic_studies["controlled"]
    for unit in study.air_handlers[1:]:
        frame = unit.hourly
        assert not _line_problems(frame, unit.name)
        operating = frame["operating"].to_numpy()
        residual, gross = balance_residual(frame[operating])
        assert np.all(np.abs(residual) <= 1e-3 * gross)  # the contract's 0.1 %
        hours = humidity_hours_above_limit(unit.settings, frame)
        assert hours.above_limit == 0 < hours.above_limit_without_control
        assert any("Zone humidity control at 60 %" in c for c in frame.attrs["cautions"])


# --- property ----------------------------------------------------------------------------
@settings(max_examples=60, deadline=None)
@given(
    t_o=st.floats(0.0, 38.0),
    dew=st.floats(-10.0, 26.0),
    sensible=st.floats(-40.0, 60.0),
    latent=st.floats(0.0, 30.0),
    rh_max=st.floats(0.4, 0.6),
    response=st.sampled_from(["raise_supply_temperature", "reheat"]),
    fan=st.sampled_from(["variable_volume", "constant_volume"]),
)
def test_property_control_holds_the_limit_on_the_line_and_balances(
    t_o, dew, sensible, latent, rh_max, response, fan
):
    dew = min(dew, t_o)
    w_o = psychrolib.GetHumRatioFromTDewPoint(dew, P)
    unit = replace(
        UNIT,
        supply_fan_power=3.0,
        fan_control=fan,
        low_load_response=response,
        zone_relative_humidity_max=rh_max,
    )
    loads = _one_hour(sensible, latent, internal=max(sensible, 0.0) / 2)
    r = air_handler_hours(unit, [t_o], [w_o], [P], loads)
    free = air_handler_hours(
        replace(unit, zone_relative_humidity_max=None), [t_o], [w_o], [P], loads
    )
    rh, rh_free = r["zone_relative_humidity"][0], free["zone_relative_humidity"][0]
    # held at or below the set point, unless the latent gain is more than the hour's
    # airflow can carry at any supply humidity: the coil would need an apparatus dew point
    # below what it can produce, and that is flagged (hourly_cautions)
    unreachable = r["apparatus_dew_point_required_C"][0] < unit.apparatus_dew_point_min
    assert rh <= rh_max + 1e-6 or unreachable
    assert rh <= rh_free + 1e-6  # never wetter than without control
    assert r["humidity_control_reheat_kW"][0] >= 0.0
    if rh_free <= rh_max - 1e-6:
        assert r["humidity_control_reheat_kW"][0] == 0.0
    residual, gross = balance_residual(r)
    assert abs(residual[0]) <= 1e-3 * gross[0]
    frame = pd.DataFrame({key: np.asarray(value).reshape(-1) for key, value in r.items()})
    assert not _line_problems(frame, "one hour")
