"""Economizer high-limit shutoff and damper control on hand-built cases.

Sources:
- ANSI/ASHRAE/IES Standard 90.1-2019, section 6.5.1.1.3 and Table 6.5.1.1.3 (high-limit
  shutoff control types and settings: fixed dry bulb 75 °F, fixed enthalpy 28 Btu/lb with
  75 °F, differential dry bulb, differential enthalpy with 75 °F), from memory.
- The economizer is disabled when the outdoor value *exceeds* the limit (the standard's
  "shutoff when T_OA > ..." wording), so each case sits just above and just below it.
- psychrolib 2.5 in IP and SI for the enthalpy-limit conversion.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import psychrolib
import pytest
from air_handler_cases import synthetic_weather
from plantside.air import moist_air as ma
from plantside.air.economizer import (
    DEFAULT_DRYBULB_LIMIT,
    DEFAULT_ENTHALPY_LIMIT,
    DRYBULB_LIMIT_BY_CLIMATE_ZONE,
    ECONOMIZER_MODES,
    EconomizerControl,
    economizer_enabled,
    economizer_outdoor_air_fraction,
    enthalpy_si_from_ip_table,
)
from plantside.air_handler.year import AirHandlerSettings, air_handler_hours, hourly_year
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel
from plantside.errors import InputRangeError

P = 101325.0  # Pa, ASHRAE 2017 Ch. 1 Table 1


def _w_for_enthalpy(t, h):
    return ma.humidity_ratio_from_enthalpy(t, h)


def test_limits_are_the_standard_values():
    # 90.1-2019 Table 6.5.1.1.3 (from memory): 75 °F; 70 °F in 5A/6A; 65 °F in 1A-4A.
    assert DEFAULT_DRYBULB_LIMIT == pytest.approx((75 - 32) / 1.8, abs=0.05)
    assert DRYBULB_LIMIT_BY_CLIMATE_ZONE["5A"] == pytest.approx((70 - 32) / 1.8, abs=0.05)
    assert DRYBULB_LIMIT_BY_CLIMATE_ZONE["2A"] == pytest.approx((65 - 32) / 1.8, abs=0.05)
    assert DRYBULB_LIMIT_BY_CLIMATE_ZONE["7"] == DEFAULT_DRYBULB_LIMIT


def test_enthalpy_limit_conversion_with_psychrolib():
    # psychrolib in IP (0 °F dry-air reference) and SI (0 °C reference) for the same state:
    # the SI value of an IP enthalpy follows from enthalpy_si_from_ip_table.
    w = 0.0095
    psychrolib.SetUnitSystem(psychrolib.IP)
    h_ip = psychrolib.GetMoistAirEnthalpy(75.0, w)  # Btu/lb
    psychrolib.SetUnitSystem(psychrolib.SI)
    h_si = psychrolib.GetMoistAirEnthalpy((75.0 - 32.0) / 1.8, w) / 1000.0
    # The IP and SI forms of Eq. 30 use 0.240 Btu/(lb °F) and 1.006 kJ/(kg K) for dry air,
    # 0.12 % apart: about 0.03 kJ/kg at 24 °C.
    assert float(enthalpy_si_from_ip_table(h_ip)) == pytest.approx(h_si, abs=0.05)
    # 28 Btu/lb (Table 6.5.1.1.3, from memory) -> 47.3 kJ/kg.
    assert DEFAULT_ENTHALPY_LIMIT == pytest.approx(float(enthalpy_si_from_ip_table(28.0)), abs=0.05)
    assert DEFAULT_ENTHALPY_LIMIT == pytest.approx(47.3, abs=0.05)


@pytest.mark.parametrize(
    ("control", "t_o", "h_o", "t_r", "h_r", "enabled"),
    [
        ("none", 10.0, 20.0, 24.0, 45.0, False),
        ("fixed_drybulb", 23.85, 45.0, 24.0, 45.0, True),
        ("fixed_drybulb", 23.95, 45.0, 24.0, 45.0, False),
        ("fixed_drybulb", 23.9, 45.0, 24.0, 45.0, True),  # at the limit: still enabled
        ("differential_drybulb", 23.99, 60.0, 24.0, 45.0, True),
        ("differential_drybulb", 24.01, 30.0, 24.0, 45.0, False),
        ("fixed_enthalpy", 20.0, 47.2, 24.0, 45.0, True),
        ("fixed_enthalpy", 20.0, 47.4, 24.0, 45.0, False),
        ("fixed_enthalpy", 23.95, 40.0, 24.0, 45.0, False),  # its dry-bulb limit
        ("differential_enthalpy", 20.0, 44.9, 24.0, 45.0, True),
        ("differential_enthalpy", 20.0, 45.1, 24.0, 45.0, False),
        ("differential_enthalpy", 23.95, 40.0, 26.0, 50.0, False),  # its dry-bulb limit
    ],
)
def test_high_limit_just_above_and_below(control, t_o, h_o, t_r, h_r, enabled):
    # ASHRAE 90.1-2019 Table 6.5.1.1.3 shutoff conditions (from memory).
    result = economizer_enabled(control, t_o, h_o, t_r, h_r, 23.9, 47.3)
    assert bool(result) is enabled


def test_damper_modes_on_hand_built_hours():
    # Mixed-air set point 13 °C, minimum 20 %, return 24 °C / 9 g/kg, fixed dry bulb 23.9 °C.
    t_o = np.array([-25.0, 0.0, 10.0, 18.0, 23.85, 23.95, 10.0])
    w_o = np.array([0.0004, 0.003, 0.006, 0.009, 0.010, 0.010, 0.006])
    heating = np.array([False] * 6 + [True])
    for integrated, warm_mode in ((True, "integrated"), (False, "locked_out")):
        x, mode = economizer_outdoor_air_fraction(
            "fixed_drybulb", integrated, 0.2, 13.0, t_o, w_o, 24.0, 0.009, 23.9, 47.3, heating
        )
        names = [ECONOMIZER_MODES[m] for m in mode]
        # -25 °C at a 20 % minimum: the mix at minimum is about 14 °C, still above 13 °C,
        # so the dampers modulate (mass-basis fraction for exactly 13 °C).
        assert names == [
            "free_cooling",
            "free_cooling",
            "free_cooling",
            warm_mode,
            warm_mode,
            "locked_out",
            "heating",
        ]
        assert 0.2 < x[0] < x[1] < x[2]
        assert x[3] == (1.0 if integrated else 0.2)
        assert x[5] == 0.2 and x[6] == 0.2
    # With a 45 % minimum the mix at -25 °C is below the set point: minimum outdoor air.
    x, mode = economizer_outdoor_air_fraction(
        "fixed_drybulb", True, 0.45, 13.0, -25.0, 0.0004, 24.0, 0.009
    )
    assert ECONOMIZER_MODES[int(mode)] == "minimum_outdoor_air"
    assert float(x) == 0.45


def test_control_type_parse_error_names_field():
    with pytest.raises(InputRangeError, match="economizer") as info:
        EconomizerControl.parse("enthalpy-ish")
    assert "differential_enthalpy" in str(info.value)


# --- through the air handler, one hour per case -------------------------------------------
def _run(settings, t_o, w_o, q_sensible=40.0, q_latent=5.0):
    t_o = np.atleast_1d(np.asarray(t_o, float))
    loads = HourlyZoneLoads(
        sensible=np.full(t_o.size, q_sensible), latent=np.full(t_o.size, q_latent)
    )
    return air_handler_hours(settings, t_o, np.broadcast_to(w_o, t_o.shape), P, loads)


BASE = AirHandlerSettings(
    supply_airflow=6.0, minimum_outdoor_air_fraction=0.2, supply_fan_power=0.0, bypass_factor=0.1
)


@pytest.mark.parametrize(
    ("control", "below", "above"),
    [
        # (t_o, w_o) just below and just above each high limit; return 24 °C (no plenum)
        ("fixed_drybulb", (23.85, 0.008), (23.95, 0.008)),
        ("differential_drybulb", (23.95, 0.008), (24.05, 0.008)),
        (
            "fixed_enthalpy",
            (20.0, float(_w_for_enthalpy(20.0, 47.2))),
            (20.0, float(_w_for_enthalpy(20.0, 47.4))),
        ),
        ("fixed_enthalpy", (23.85, 0.006), (23.95, 0.006)),
    ],
)
def test_air_handler_modes_at_each_high_limit(control, below, above):
    for integrated, mode_below in ((True, "integrated"), (False, "locked_out")):
        settings = replace(BASE, economizer=control, economizer_integrated=integrated)
        r_below = _run(settings, below[0], below[1])
        r_above = _run(settings, above[0], above[1])
        assert ECONOMIZER_MODES[r_below["economizer_mode"][0]] == mode_below
        assert ECONOMIZER_MODES[r_above["economizer_mode"][0]] == "locked_out"
        assert r_above["outdoor_air_fraction"][0] == pytest.approx(0.2)
        expected = 1.0 if integrated else 0.2
        assert r_below["outdoor_air_fraction"][0] == pytest.approx(expected)


def test_air_handler_differential_enthalpy_against_return():
    settings = replace(BASE, economizer="differential_enthalpy")
    # Return enthalpy with the dampers at the minimum, from a locked-out hour.
    probe = _run(settings, 22.0, 0.016)
    assert ECONOMIZER_MODES[probe["economizer_mode"][0]] == "locked_out"
    h_r = probe["return_enthalpy_kJkg"][0]
    t_o = 21.0
    # 2 kJ/kg below and above the return enthalpy (the return floats a little with x).
    low = _run(settings, t_o, float(_w_for_enthalpy(t_o, h_r - 2.0)))
    high = _run(settings, t_o, float(_w_for_enthalpy(t_o, h_r + 2.0)))
    assert ECONOMIZER_MODES[low["economizer_mode"][0]] == "integrated"
    assert low["outdoor_enthalpy_kJkg"][0] <= low["return_enthalpy_kJkg"][0]
    assert ECONOMIZER_MODES[high["economizer_mode"][0]] == "locked_out"
    assert high["outdoor_enthalpy_kJkg"][0] > high["return_enthalpy_kJkg"][0]


def test_free_cooling_holds_the_mixed_air_setpoint_exactly():
    # Dampers modulate to the set point (13 °C supply, no fan): coil idle, mix = 13 °C.
    settings = replace(BASE, economizer="differential_drybulb", preheat_drybulb=None)
    t_o = np.array([-15.0, 0.0, 8.0, 12.5])
    r = _run(settings, t_o, 0.8 * ma.saturation_humidity_ratio(t_o, P))
    assert all(ECONOMIZER_MODES[m] == "free_cooling" for m in r["economizer_mode"])
    # to the model's solution tolerance (1e-3 K, 1e-3 kW)
    np.testing.assert_allclose(r["mixed_drybulb_C"], 13.0, atol=1e-3)
    np.testing.assert_allclose(r["coil_total_kW"], 0.0, atol=1e-3)
    np.testing.assert_allclose(r["heating_coil_kW"], 0.0, atol=1e-3)
    assert np.all(r["outdoor_air_fraction"] > 0.2)


def test_cold_mix_at_minimum_needs_heat_and_never_closes_below_minimum():
    # 60 % minimum outdoor air at -20 °C: the mix at minimum is far below 13 °C.
    settings = replace(BASE, minimum_outdoor_air_fraction=0.6, preheat_drybulb=5.0)
    r = _run(settings, -20.0, 0.0005)
    assert ECONOMIZER_MODES[r["economizer_mode"][0]] == "minimum_outdoor_air"
    assert r["outdoor_air_fraction"][0] == pytest.approx(0.6)
    assert r["preheat_kW"][0] > 0 and r["heating_coil_kW"][0] > 0
    assert r["coil_leaving_drybulb_C"][0] == pytest.approx(13.0)


def test_integrated_and_non_integrated_differ_exactly_where_they_should():
    weather = synthetic_weather(mean=14.0, swing=11.0, dew_depression=7.0)
    zone = ZoneLoadModel(
        cooling_design_sensible=55.0,
        cooling_design_latent=8.0,
        cooling_design_drybulb=32.0,
        heating_design_load=35.0,
        heating_design_drybulb=-10.0,
    )
    settings = replace(BASE, economizer="fixed_drybulb", supply_fan_power=4.0)
    integrated = hourly_year(settings, weather, zone)
    plain = hourly_year(replace(settings, economizer_integrated=False), weather, zone)
    mode_i = integrated["economizer_mode"].astype(str)
    mode_p = plain["economizer_mode"].astype(str)
    # Where they should differ: outdoor air passes the high limit (23.9 °C), is warmer than
    # the mixed-air set point (= coil leaving target, draw-through fan, no preheat active)
    # and the zone needs cooling. Within 0.01 K of the set point the decision depends on
    # the solution history (like a controller's deadband), so those hours are left out.
    t_o = integrated["outdoor_drybulb_C"]
    t_ma = plain["coil_leaving_drybulb_C"]
    should = (t_o <= 23.9) & (t_o > t_ma) & (mode_p != "heating")
    clear = (t_o - t_ma).abs() > 0.01
    differ = mode_i != mode_p
    assert (differ[clear] == should[clear]).all()
    assert should.sum() > 100
    assert (mode_p[clear & should] == "locked_out").all()
    assert (mode_i[clear & should] == "integrated").all()
    assert np.allclose(plain.loc[clear & should, "outdoor_air_fraction"], 0.2)
    assert np.allclose(integrated.loc[clear & should, "outdoor_air_fraction"], 1.0)
    # Everywhere else the two are the same unit in the same state.
    same = ~should
    tolerances = {  # the model's solution tolerance
        "coil_total_kW": 1e-3,
        "heating_coil_kW": 1e-3,
        "outdoor_air_fraction": 1e-6,
        "zone_humidity_ratio_kgkg": 1e-6,
    }
    for column, atol in tolerances.items():
        np.testing.assert_allclose(
            integrated.loc[same, column], plain.loc[same, column], rtol=1e-5, atol=atol
        )
    # Integrated: the outdoor air, cooler than the return, takes sensible load off the coil.
    hours = clear & should
    assert (
        integrated.loc[hours, "coil_sensible_kW"].sum() < plain.loc[hours, "coil_sensible_kW"].sum()
    )
