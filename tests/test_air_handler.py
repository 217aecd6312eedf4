"""The air handler: design points and the hourly year, against the outside world.

Sources, named beside each check:
- ASHRAE Handbook Fundamentals 2017 (SI), Ch. 1: Eq. 30 (enthalpy), Eq. 26 (specific
  volume), mixing and cooling-and-dehumidifying balances, q = m_da [(h1 - h2) - (W1 - W2) h_w].
- psychrolib 2.5 (independent scalar implementation of Ch. 1) for every state used to
  check a result.
- The trade's quick formulas at standard air (0.075 lb/ft³): q_s = 1.08 cfm ΔT [Btu/h, °F],
  q_l = 0.68 cfm ΔW [grains/lb], q_t = 4.5 cfm Δh [Btu/lb]: common practice (no source).
  Known error: 1.08 uses the dry-air specific heat (0.240 Btu/lb °F) where moist air has
  0.240 + 0.444 W (about 2 % more); 0.68 uses h_fg = 1061 Btu/lb where the latent heat at
  coil temperatures is about 1.5 % higher; 4.5 is exact per lb of dry air but ignores the
  condensate enthalpy (about 1 % for a humid 100 % outdoor-air coil).
- Facts of the trade (common practice): at 100 % outdoor air the coil load does not depend
  on the return air; at minimum outdoor air in mild weather the coil load approaches the
  zone load plus the ventilation load.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pandas as pd
import psychrolib
import pytest
from air_handler_cases import balance_residual, synthetic_weather
from hypothesis import given
from hypothesis import settings as hypothesis_settings
from hypothesis import strategies as st
from plantside.air import moist_air as ma
from plantside.air_handler.year import (
    ECONOMIZER_MODES,
    HOURLY_COLUMNS,
    SWEEP_COLUMNS,
    AirHandlerSettings,
    air_handler_hours,
    design_point,
    hourly_year,
    outdoor_air_sweep,
)
from plantside.air_handler.zone_loads import HourlyZoneLoads, zone_loads_for_weather
from plantside.constants import M3S_PER_CFM, STANDARD_AIR_DENSITY, W_PER_BTUH
from plantside.errors import InputRangeError

P = 101325.0  # Pa, ASHRAE 2017 Ch. 1 Table 1

# The published column names (DEVELOPERS.md, "The air-handler contract"): add, never rename.
CONTRACT_COLUMNS = """
month occupied operating economizer_mode outdoor_drybulb_C outdoor_humidity_ratio_kgkg
outdoor_enthalpy_kJkg pressure_Pa supply_mass_flow_kgs supply_airflow_m3s
supply_airflow_standard_m3s supply_airflow_actual_m3s airflow_fraction outdoor_air_fraction
outdoor_mass_flow_kgs recovery_fraction zone_drybulb_C zone_humidity_ratio_kgkg zone_enthalpy_kJkg
zone_relative_humidity return_drybulb_C return_humidity_ratio_kgkg return_enthalpy_kJkg
recovered_drybulb_C recovered_humidity_ratio_kgkg recovered_enthalpy_kJkg mixed_drybulb_C
mixed_humidity_ratio_kgkg mixed_enthalpy_kJkg coil_entering_drybulb_C
coil_entering_humidity_ratio_kgkg coil_entering_enthalpy_kJkg coil_leaving_drybulb_C
coil_leaving_humidity_ratio_kgkg coil_leaving_enthalpy_kJkg supply_drybulb_C
supply_humidity_ratio_kgkg supply_enthalpy_kJkg apparatus_dew_point_C bypass_factor coil_wet
coil_total_kW coil_sensible_kW coil_latent_kW condensate_kgs condensate_heat_kW preheat_kW
heating_coil_kW reheat_kW zone_sensible_kW zone_latent_kW zone_sensible_unmet_kW
zone_latent_unmet_kW plenum_gain_kW ventilation_sensible_kW ventilation_latent_kW fan_power_kW
fan_heat_kW economizer_effect_kW recovery_effect_kW dehumidification_reheat_kW
condenser_heat_recovered_kW coil_runaround_heat_kW humidity_control_reheat_kW
""".split()

CONFIGURATION_NAMES = [
    "vav_economizer_draw_through",
    "cv_blow_through_recovery_plenum_reheat",
    "outdoor_air_unit_dew_point_coil",
    "fixed_outdoor_airflow_fixed_adp_reset_occupied",
]


def _configurations(vav_unit):
    """The units of CONFIGURATION_NAMES, whose years every hour-by-hour check runs on."""
    return {
        "vav_economizer_draw_through": vav_unit,
        "cv_blow_through_recovery_plenum_reheat": replace(
            vav_unit,
            fan_control="constant_volume",
            fan_position="blow_through",
            recovery_sensible_effectiveness=0.7,
            recovery_latent_effectiveness=0.5,
            return_plenum_fraction=0.3,
            low_load_response="reheat",
            economizer="differential_enthalpy",
        ),
        "outdoor_air_unit_dew_point_coil": replace(
            vav_unit,
            supply_airflow=2.0,
            all_outdoor_air=True,
            coil_model="leaving_dew_point",
            leaving_dew_point=11.0,
            supply_drybulb=14.0,
        ),
        "fixed_outdoor_airflow_fixed_adp_reset_occupied": replace(
            vav_unit,
            minimum_outdoor_airflow=1.0,
            coil_model="apparatus_dew_point",
            apparatus_dew_point=9.0,
            supply_reset_drybulb=16.0,
            economizer="differential_drybulb",
            economizer_integrated=False,
            fan_schedule="occupied",
        ),
    }


@pytest.fixture(scope="module")
def weather():
    return synthetic_weather()


@pytest.fixture(scope="module")
def years(weather, office_zone, vav_unit):
    return {
        name: hourly_year(s, weather, office_zone) for name, s in _configurations(vav_unit).items()
    }


# --- columns and frame ------------------------------------------------------------------
from plantside.air_handler.unoccupied import UNOCCUPIED_COLUMNS  # noqa: E402


def test_hourly_frame_matches_contract(years, weather):
    frame = years["vav_economizer_draw_through"]
    # columns may be added after the contract's, never renamed or removed: the heat of the
    # hours the fan is off (plantside.air_handler.unoccupied) follows them
    assert list(frame.columns) == [
        *CONTRACT_COLUMNS,
        *UNOCCUPIED_COLUMNS,
        "zone_relative_humidity_without_control",
    ]
    assert tuple(CONTRACT_COLUMNS[1:]) == HOURLY_COLUMNS
    assert len(frame) == 8760 and frame.index.name == "hour"
    assert list(frame["economizer_mode"].cat.categories) == list(ECONOMIZER_MODES)
    assert frame.attrs["airflow_basis"] == "standard"
    assert frame.attrs["air_handler"] == "AHU-T" and frame.attrs["site"] == weather.site
    assert frame.attrs["humidity_iteration_change"] < 5e-5  # the model's pass tolerance


# --- energy balance, every hour of a year ---------------------------------------------------
@pytest.mark.parametrize("name", CONFIGURATION_NAMES)
def test_energy_balance_every_hour(years, name, office_zone):
    frame = years[name]
    operating = frame["operating"]
    residual, gross = balance_residual(frame[operating])
    # zone + ventilation + fan - economizer - recovery (- condensate) = coil, to 0.1 %
    assert (np.abs(residual) <= 1e-3 * gross + 1e-6).all()
    # the zone load given is the zone load met (or reported unmet), to 0.1 %
    loads = zone_loads_for_weather(office_zone, synthetic_weather())
    # heat served outside the unit while its fan is off (terminal heating) counts as met
    sensible = (
        frame["zone_sensible_kW"] - frame["terminal_heating_kW"] + frame["zone_sensible_unmet_kW"]
    )
    latent = frame["zone_latent_kW"] + frame["zone_latent_unmet_kW"]
    np.testing.assert_allclose(sensible, loads.sensible, rtol=1e-3, atol=1e-3)
    np.testing.assert_allclose(latent, loads.latent, rtol=1e-3, atol=1e-3)
    finite = frame.loc[operating, [c for c in frame.columns if c.endswith("_kW")]]
    assert np.isfinite(finite.to_numpy()).all()


def test_coil_load_is_mass_flow_times_enthalpy_difference(years):
    # ASHRAE 2017 Ch. 1 cooling and dehumidifying, enthalpies from psychrolib.
    frame = years["vav_economizer_draw_through"]
    cooling = frame[frame["coil_total_kW"] > 0.01].iloc[::7]
    assert len(cooling) > 200
    for _, row in cooling.iterrows():
        h1 = psychrolib.GetMoistAirEnthalpy(
            row["coil_entering_drybulb_C"], row["coil_entering_humidity_ratio_kgkg"]
        )
        h2 = psychrolib.GetMoistAirEnthalpy(
            row["coil_leaving_drybulb_C"], row["coil_leaving_humidity_ratio_kgkg"]
        )
        dw = row["coil_entering_humidity_ratio_kgkg"] - row["coil_leaving_humidity_ratio_kgkg"]
        h_w = 4.186 * row["coil_leaving_drybulb_C"]  # kJ/kg, liquid water
        q = row["supply_mass_flow_kgs"] * ((h1 - h2) / 1000.0 - dw * h_w)
        assert row["coil_total_kW"] == pytest.approx(q, rel=1e-3)
        # and the supply air takes up the zone load: m (h_return - h_supply)
        h_r = psychrolib.GetMoistAirEnthalpy(
            row["return_drybulb_C"], row["return_humidity_ratio_kgkg"]
        )
        h_s = psychrolib.GetMoistAirEnthalpy(
            row["supply_drybulb_C"], row["supply_humidity_ratio_kgkg"]
        )
        zone = row["zone_sensible_kW"] + row["zone_latent_kW"] + row["reheat_kW"]
        assert row["supply_mass_flow_kgs"] * (h_r - h_s) / 1000.0 == pytest.approx(zone, rel=1e-3)


def test_humidity_balance_closed_form_satisfies_every_equation(years):
    frame = years["vav_economizer_draw_through"]
    wet = frame[frame["coil_wet"]]
    assert len(wet) > 500
    bf = 0.1
    adp = (wet["coil_leaving_drybulb_C"] - bf * wet["coil_entering_drybulb_C"]) / (1 - bf)
    np.testing.assert_allclose(wet["apparatus_dew_point_C"], adp, atol=1e-3)
    w_adp = np.array([psychrolib.GetSatHumRatio(t, P) for t in adp])
    w_line = bf * wet["coil_entering_humidity_ratio_kgkg"] + (1 - bf) * w_adp
    w_sat = np.array([psychrolib.GetSatHumRatio(t, P) for t in wet["coil_leaving_drybulb_C"]])
    # bypass-factor line, capped at saturation (common practice; psychrolib saturation)
    np.testing.assert_allclose(
        wet["coil_leaving_humidity_ratio_kgkg"], np.minimum(w_line, w_sat), rtol=1e-4
    )
    # zone moisture balance: W_zone - W_supply = q_latent / (m h_g), h_g = 2501 + 1.86 t_zone
    operating = frame[frame["operating"]]
    pickup = operating["zone_latent_kW"] / (
        operating["supply_mass_flow_kgs"] * (2501.0 + 1.86 * operating["zone_drybulb_C"])
    )
    np.testing.assert_allclose(
        operating["zone_humidity_ratio_kgkg"] - operating["supply_humidity_ratio_kgkg"],
        pickup,
        rtol=1e-6,
        atol=1e-12,
    )
    # dry-coil hours: the air leaves as humid as it entered, and it was drier than the ADP
    dry = frame[(frame["coil_total_kW"] > 0.01) & ~frame["coil_wet"]]
    assert len(dry) > 50
    np.testing.assert_allclose(
        dry["coil_leaving_humidity_ratio_kgkg"], dry["coil_entering_humidity_ratio_kgkg"]
    )
    adp_dry = (dry["coil_leaving_drybulb_C"] - bf * dry["coil_entering_drybulb_C"]) / (1 - bf)
    w_adp_dry = np.array([psychrolib.GetSatHumRatio(t, P) for t in adp_dry])
    assert (dry["coil_entering_humidity_ratio_kgkg"] <= w_adp_dry * (1 + 1e-6)).all()


# --- the trade's quick formulas ---------------------------------------------------------------
def test_quick_formulas_at_standard_conditions():
    # 100 % outdoor air at sea level, standard airflow basis: 1 m³/s of standard air.
    settings = AirHandlerSettings(
        supply_airflow=1.0,
        fan_control="constant_volume",
        all_outdoor_air=True,
        bypass_factor=0.1,
        supply_drybulb=13.0,
    )
    outdoor = (32.0, float(ma.humidity_ratio_from_wet_bulb(32.0, 24.0, P)), P)
    point = design_point(settings, (30.0, 5.0), outdoor)
    row = point.row
    cfm = 1.0 / M3S_PER_CFM
    delta_f = 1.8 * (row["coil_entering_drybulb_C"] - row["coil_leaving_drybulb_C"])
    delta_gr = 7000.0 * (
        row["coil_entering_humidity_ratio_kgkg"] - row["coil_leaving_humidity_ratio_kgkg"]
    )
    delta_h = (row["coil_entering_enthalpy_kJkg"] - row["coil_leaving_enthalpy_kJkg"]) / 2.326

    def kw(btuh):
        return btuh * W_PER_BTUH / 1000.0

    sensible_quick = kw(1.08 * cfm * delta_f)
    latent_quick = kw(0.68 * cfm * delta_gr)
    total_quick = kw(4.5 * cfm * delta_h)
    w_leave = row["coil_leaving_humidity_ratio_kgkg"]
    # 1.08: exact / quick = (0.240 + 0.444 W)/0.240 (moist-air specific heat, common practice)
    expected_ratio = (0.240 + 0.444 * w_leave) / 0.240
    assert row["coil_sensible_kW"] / sensible_quick == pytest.approx(expected_ratio, rel=0.005)
    # 0.68: within 3 % (h_fg 1061 Btu/lb in the factor; 1.5 % higher at coil temperatures)
    assert row["coil_latent_kW"] == pytest.approx(latent_quick, rel=0.03)
    # 4.5: exact per lb of dry air at 0.075 lb/ft³; only the condensate enthalpy differs
    assert row["coil_total_kW"] + row["condensate_heat_kW"] == pytest.approx(total_quick, rel=1e-4)
    assert row["coil_total_kW"] == pytest.approx(total_quick, rel=0.015)
    assert row["supply_mass_flow_kgs"] == pytest.approx(STANDARD_AIR_DENSITY)


# --- facts of the trade ---------------------------------------------------------------------
def test_full_outdoor_air_coil_load_does_not_depend_on_return_air(vav_unit):
    hot = (34.0, float(ma.humidity_ratio_from_wet_bulb(34.0, 25.0, P)), P)
    # Constant volume with the supply held at its set point (reheat at the zones): a VAV
    # unit's airflow, or a unit that raises its supply temperature, follows the room load.
    doas = AirHandlerSettings(
        supply_airflow=3.0,
        all_outdoor_air=True,
        supply_fan_power=2.0,
        fan_control="constant_volume",
        low_load_response="reheat",
    )
    a = design_point(doas, (30.0, 2.0), hot)
    b = design_point(doas, (30.0, 15.0), hot)
    c = design_point(replace(doas, return_plenum_fraction=0.5), (30.0, 15.0), hot)
    assert b.row["zone_humidity_ratio_kgkg"] > a.row["zone_humidity_ratio_kgkg"] + 0.001
    for point in (b, c):
        assert point.loads["coil_total_kW"] == pytest.approx(a.loads["coil_total_kW"], rel=1e-9)
    # an integrated economizer at 100 % outdoor air (hot but below its high limit)
    mild_hot = (23.5, float(ma.humidity_ratio_from_wet_bulb(23.5, 18.0, P)), P)
    unit = replace(
        vav_unit, economizer="fixed_drybulb", supply_fan_power=0.0, fan_control="constant_volume"
    )
    d = design_point(unit, (40.0, 2.0), mild_hot)
    e = design_point(unit, (40.0, 12.0), mild_hot)
    assert d.economizer_mode == e.economizer_mode == "integrated"
    assert d.loads["coil_total_kW"] == pytest.approx(e.loads["coil_total_kW"], rel=1e-9)


def test_minimum_outdoor_air_mild_climate_approaches_zone_plus_ventilation(vav_unit):
    # Mild hour, dampers at minimum, no economizer, no fan: coil = zone + ventilation, the
    # ventilation evaluated independently with psychrolib from the outdoor and return states.
    unit = replace(vav_unit, economizer="none", supply_fan_power=0.0, fan_control="constant_volume")
    outdoor = (26.0, float(ma.humidity_ratio_from_relative_humidity(26.0, 0.55, P)), P)
    point = design_point(unit, (45.0, 6.0), outdoor)
    row = point.row
    assert point.economizer_mode == "minimum_outdoor_air"
    h_o = psychrolib.GetMoistAirEnthalpy(26.0, outdoor[1]) / 1000.0
    h_r = (
        psychrolib.GetMoistAirEnthalpy(row["return_drybulb_C"], row["return_humidity_ratio_kgkg"])
        / 1000.0
    )
    ventilation = row["outdoor_mass_flow_kgs"] * (h_o - h_r)
    zone = row["zone_sensible_kW"] + row["zone_latent_kW"]
    assert row["coil_total_kW"] == pytest.approx(zone + ventilation, rel=0.01)
    assert row["ventilation_sensible_kW"] + row["ventilation_latent_kW"] == pytest.approx(
        ventilation, rel=1e-4
    )


# --- airflow ------------------------------------------------------------------------------------
def test_standard_and_actual_airflow_at_altitude(vav_unit):
    # 1,500 m: standard atmosphere pressure (ASHRAE 2017 Ch. 1 Eq. 3), about 84.6 kPa.
    p = float(ma.pressure_from_altitude(1500.0))
    outdoor = (30.0, 0.008, p)
    standard = design_point(replace(vav_unit, fan_control="constant_volume"), (50.0, 5.0), outdoor)
    actual = design_point(
        replace(vav_unit, fan_control="constant_volume", airflow_basis="actual"),
        (50.0, 5.0),
        outdoor,
    )
    assert standard.row["supply_mass_flow_kgs"] == pytest.approx(5.0 * STANDARD_AIR_DENSITY)
    # actual: m = Q / v of saturated air at the 13 °C supply set point (psychrolib Eq. 26)
    v = psychrolib.GetMoistAirVolume(13.0, psychrolib.GetSatHumRatio(13.0, p), p)
    assert actual.row["supply_mass_flow_kgs"] == pytest.approx(5.0 / v, rel=1e-6)
    assert actual.row["supply_mass_flow_kgs"] < 0.87 * standard.row["supply_mass_flow_kgs"]
    assert actual.row["supply_airflow_m3s"] == pytest.approx(5.0)
    assert standard.row["supply_airflow_standard_m3s"] == pytest.approx(5.0)
    # the coil sees less air, so a smaller coil load for the same outdoor state
    assert actual.loads["coil_total_kW"] < standard.loads["coil_total_kW"]


def test_variable_volume_and_fixed_outdoor_airflow(vav_unit):
    loads = HourlyZoneLoads(sensible=[60.0, 30.0, 10.0, 2.0], latent=5.0)
    t = np.full(4, 28.0)
    w = np.full(4, 0.010)
    cv = air_handler_hours(replace(vav_unit, fan_control="constant_volume"), t, w, P, loads)
    vav = air_handler_hours(replace(vav_unit, minimum_outdoor_airflow=1.0), t, w, P, loads)
    np.testing.assert_allclose(cv["airflow_fraction"], 1.0)
    # VAV follows the room load, down to the 30 % minimum
    assert np.all(np.diff(vav["airflow_fraction"]) <= 1e-12)
    assert vav["airflow_fraction"][-1] == pytest.approx(0.3)
    # fixed 1.0 m³/s of outdoor air: its fraction of the supply grows as the airflow drops
    np.testing.assert_allclose(
        vav["outdoor_air_fraction"], np.minimum(1.0, 1.0 / vav["supply_airflow_m3s"]), rtol=1e-9
    )
    np.testing.assert_allclose(vav["outdoor_mass_flow_kgs"], 1.0 * STANDARD_AIR_DENSITY, rtol=1e-9)
    # constant-volume at part load: the supply air is delivered warmer (coil unloads)
    assert np.all(np.diff(cv["supply_drybulb_C"]) > 0)
    # a fraction setting keeps the same fraction at every airflow
    frac = air_handler_hours(vav_unit, t, w, P, loads)
    np.testing.assert_allclose(frac["outdoor_air_fraction"], 0.2)


def test_supply_reset_fan_heat_plenum_and_reheat(vav_unit):
    loads = HourlyZoneLoads(sensible=[40.0] * 3, latent=4.0, internal_sensible=[20.0] * 3)
    t = np.array([5.0, 15.5, 25.0])
    w = np.array([0.004, 0.007, 0.010])
    reset = replace(vav_unit, supply_reset_drybulb=16.0, economizer="none", supply_fan_power=0.0)
    r = air_handler_hours(reset, t, w, P, loads)
    # linear reset: 16 °C at or below 10 °C outdoor, 13 °C at or above 21 °C (halfway: 14.5)
    np.testing.assert_allclose(r["supply_drybulb_C"], [16.0, 14.5, 13.0], atol=1e-9)
    # draw-through fan: supply - coil leaving = fan heat / (m c_p)
    fan = replace(vav_unit, supply_fan_power=6.0, economizer="none")
    r = air_handler_hours(fan, t, w, P, loads)
    cp = 1.006 + 1.86 * r["supply_humidity_ratio_kgkg"]
    rise = r["fan_heat_kW"] / (r["supply_mass_flow_kgs"] * cp)
    np.testing.assert_allclose(r["supply_drybulb_C"] - r["coil_leaving_drybulb_C"], rise, rtol=1e-9)
    # blow-through: the rise is between the mixed air and the coil
    blow = air_handler_hours(replace(fan, fan_position="blow_through"), t, w, P, loads)
    cp = 1.006 + 1.86 * blow["mixed_humidity_ratio_kgkg"]
    rise = blow["fan_heat_kW"] / (blow["supply_mass_flow_kgs"] * cp)
    np.testing.assert_allclose(
        blow["coil_entering_drybulb_C"] - blow["mixed_drybulb_C"], rise, rtol=1e-6
    )
    # return plenum: half the internal gain goes to the return air, less supply air needed
    plenum = air_handler_hours(replace(vav_unit, return_plenum_fraction=0.5), t, w, P, loads)
    plain = air_handler_hours(vav_unit, t, w, P, loads)
    cp_r = 1.006 + 1.86 * plenum["return_humidity_ratio_kgkg"]
    np.testing.assert_allclose(
        plenum["return_drybulb_C"] - plenum["zone_drybulb_C"],
        10.0 / (plenum["supply_mass_flow_kgs"] * cp_r),
        rtol=1e-4,  # the model's solution tolerance
    )
    assert np.all(plenum["supply_mass_flow_kgs"] < plain["supply_mass_flow_kgs"])
    # reheat: at minimum airflow the supply stays at 13 °C and reheat makes up the rest
    small = HourlyZoneLoads(sensible=[3.0], latent=1.0)
    held = air_handler_hours(
        replace(vav_unit, low_load_response="reheat"), [26.0], [0.01], P, small
    )
    raised = air_handler_hours(vav_unit, [26.0], [0.01], P, small)
    m, cp = held["supply_mass_flow_kgs"][0], 1.006 + 1.86 * held["supply_humidity_ratio_kgkg"][0]
    assert held["supply_drybulb_C"][0] == pytest.approx(13.0, abs=1e-5)
    assert held["reheat_kW"][0] == pytest.approx(m * cp * (24.0 - 13.0) - 3.0, rel=1e-6)
    assert raised["reheat_kW"][0] == 0.0 and raised["supply_drybulb_C"][0] > 20.0
    assert held["coil_total_kW"][0] > raised["coil_total_kW"][0]


def test_fan_off_hours(years):
    frame = years["fixed_outdoor_airflow_fixed_adp_reset_occupied"]
    off = ~frame["operating"]
    assert off.sum() > 4000 and (frame.loc[off, "economizer_mode"] == "off").all()
    assert (frame.loc[off, ["coil_total_kW", "heating_coil_kW", "fan_power_kW"]] == 0).all().all()
    assert frame.loc[off, "mixed_drybulb_C"].isna().all()
    assert (frame.loc[off, "zone_sensible_unmet_kW"] != 0).any()


def test_bad_hourly_inputs(vav_unit):
    loads = HourlyZoneLoads(sensible=[10.0, 10.0], latent=1.0)
    # the weather importer's range (-70 to 60 °C) is the model's range too
    air_handler_hours(vav_unit, [-70.0, 60.0], [0.0, 0.02], P, loads)
    with pytest.raises(InputRangeError, match="outdoor_drybulb"):
        air_handler_hours(vav_unit, [-71.0, 10.0], [0.0, 0.002], P, loads)
    with pytest.raises(InputRangeError, match="outdoor_humidity_ratio"):
        air_handler_hours(vav_unit, [10.0, 10.0], [0.002, 0.05], P, loads)
    with pytest.raises(InputRangeError, match="zone_loads"):
        air_handler_hours(vav_unit, [10.0, 10.0, 11.0], [0.002] * 3, P, loads)
    with pytest.raises(InputRangeError, match="minimum_outdoor_air_fraction"):
        air_handler_hours(
            vav_unit, [10.0, 10.0], [0.002] * 2, P, loads, minimum_outdoor_air_fraction=1.5
        )


# --- cautions and the sweep ----------------------------------------------------------------------
def test_humid_zone_caution(office_zone, vav_unit):
    weather = synthetic_weather(mean=22.0, swing=6.0, dew_depression=2.0, hours=24 * 30, seed=3)
    humid = replace(office_zone, cooling_design_latent=40.0)
    frame = hourly_year(replace(vav_unit, bypass_factor=0.3, supply_drybulb=15.0), weather, humid)
    assert any("mould" in c for c in frame.attrs["cautions"])
    muggy = (28.0, float(ma.humidity_ratio_from_dew_point(25.0, P)), P)
    point = design_point(replace(vav_unit, bypass_factor=0.3, supply_drybulb=15.0), humid, muggy)
    assert any("mould" in c for c in point.cautions)


def test_sweep_agrees_with_single_runs(weather, office_zone, vav_unit):
    sweep = outdoor_air_sweep(vav_unit, weather, office_zone, fractions=[0.0, 0.3, 1.0])
    assert list(sweep.columns) == list(SWEEP_COLUMNS)
    single = hourly_year(replace(vav_unit, minimum_outdoor_air_fraction=0.3), weather, office_zone)
    row = sweep.iloc[1]
    # to the solution tolerance (a block of fractions may take one pass more or fewer)
    assert row["coil_total_kWh"] == pytest.approx(single["coil_total_kW"].sum(), rel=1e-5)
    assert row["heating_coil_kWh"] == pytest.approx(single["heating_coil_kW"].sum(), rel=1e-5)
    assert row["coil_total_peak_kW"] == pytest.approx(single["coil_total_kW"].max(), rel=1e-5)
    modes = single["economizer_mode"].isin(["free_cooling", "integrated"]).sum()
    assert row["economizer_hours"] == modes
    # more outdoor air: more heating energy in this cold-winter climate
    assert sweep["heating_coil_kWh"].is_monotonic_increasing


# --- property test over random settings ----------------------------------------------------------
SHORT = synthetic_weather(hours=24 * 10, seed=11, mean=18.0, swing=14.0)


@hypothesis_settings(max_examples=40)
@given(
    fan_control=st.sampled_from(["variable_volume", "constant_volume"]),
    economizer=st.sampled_from(
        ["none", "fixed_drybulb", "differential_drybulb", "fixed_enthalpy", "differential_enthalpy"]
    ),
    integrated=st.booleans(),
    minimum_oa=st.floats(0.05, 1.0),
    all_oa=st.booleans(),
    fan_power=st.floats(0.0, 10.0),
    blow=st.booleans(),
    plenum=st.floats(0.0, 0.6),
    recovery=st.tuples(st.floats(0.0, 0.9), st.floats(0.0, 0.8)),
    coil=st.sampled_from(["bypass_factor", "apparatus_dew_point", "leaving_dew_point"]),
    bf=st.floats(0.0, 0.3),
    supply=st.floats(11.0, 16.0),
    reheat=st.booleans(),
    basis=st.sampled_from(["standard", "actual"]),
    latent=st.floats(0.0, 30.0),
)
def test_random_settings_give_finite_balanced_years(
    fan_control,
    economizer,
    integrated,
    minimum_oa,
    all_oa,
    fan_power,
    blow,
    plenum,
    recovery,
    coil,
    bf,
    supply,
    reheat,
    basis,
    latent,
    office_zone,
):
    settings = AirHandlerSettings(
        supply_airflow=5.0,
        airflow_basis=basis,
        fan_control=fan_control,
        minimum_outdoor_air_fraction=minimum_oa,
        all_outdoor_air=all_oa,
        supply_drybulb=supply,
        supply_fan_power=fan_power,
        fan_position="blow_through" if blow else "draw_through",
        return_plenum_fraction=plenum,
        economizer=economizer,
        economizer_integrated=integrated,
        recovery_sensible_effectiveness=recovery[0],
        recovery_latent_effectiveness=recovery[1],
        coil_model=coil,
        bypass_factor=bf,
        apparatus_dew_point=supply - 4.0,
        leaving_dew_point=supply - 2.0,
        apparatus_dew_point_min=-5.0,
        low_load_response="reheat" if reheat else "raise_supply_temperature",
    )
    frame = hourly_year(settings, SHORT, replace(office_zone, cooling_design_latent=latent))
    values = frame[[c for c in frame.columns if c.endswith(("_kW", "_kgs", "_m3s"))]]
    assert np.isfinite(values.to_numpy()).all()
    residual, gross = balance_residual(frame)
    assert (np.abs(residual) <= 1e-3 * gross + 1e-6).all()
    assert (
        (frame[["coil_total_kW", "heating_coil_kW", "preheat_kW", "reheat_kW"]] >= -1e-3)
        .all()
        .all()
    )
    assert (frame["zone_relative_humidity"] <= 1.0).all()
    assert frame["economizer_mode"].notna().all()
    assert isinstance(frame, pd.DataFrame)
