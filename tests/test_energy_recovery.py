"""Energy recovery: effectiveness definitions and the air handler's recovery control.

Sources:
- ASHRAE Handbook HVAC Systems and Equipment 2020, Ch. 26, Eq. 1 (effectiveness
  eps = m_s (x1 - x2) / (m_min (x1 - x3)), balanced flow; from memory) and AHRI 1060
  rating at balanced flow.
- psychrolib 2.5 for enthalpies and mixing (independent of plantside).
- Control rule (common practice, no source): recovery bypassed during economizer
  operation and whenever it would add load; modulated in cold weather so the mixed air
  does not overshoot the mixed-air set point.
"""

from __future__ import annotations

from dataclasses import replace

import psychrolib
import pytest
from air_handler_cases import synthetic_weather
from hypothesis import given
from hypothesis import strategies as st
from plantside.air import moist_air as ma
from plantside.air.energy_recovery import (
    recovery_fraction_for_mixed_drybulb,
    recovery_leaving_state,
    total_effectiveness,
)
from plantside.air.mixing import mixed_state
from plantside.air_handler.year import AirHandlerSettings, hourly_year
from plantside.air_handler.zone_loads import ZoneLoadModel
from plantside.errors import InputRangeError

P = 101325.0  # Pa, ASHRAE 2017 Ch. 1 Table 1


def test_effectiveness_definition():
    # ASHRAE HVAC S&E 2020 Ch. 26 Eq. 1 at balanced flow: eps = (x1 - x2)/(x1 - x3).
    t2, w2 = recovery_leaving_state(-10.0, 0.0015, 22.0, 0.008, 0.75, 0.6)
    assert (-10.0 - float(t2)) / (-10.0 - 22.0) == pytest.approx(0.75)
    assert (0.0015 - float(w2)) / (0.0015 - 0.008) == pytest.approx(0.6)
    t2, w2 = recovery_leaving_state(-10.0, 0.0015, 22.0, 0.008, 0.75, 0.6, fraction=0.0)
    assert float(t2) == -10.0 and float(w2) == 0.0015
    with pytest.raises(InputRangeError, match="sensible_effectiveness"):
        recovery_leaving_state(30.0, 0.015, 24.0, 0.009, 1.2)


def test_total_effectiveness_against_psychrolib():
    t1, w1, t3, w3, es, el = 33.0, 0.018, 24.0, 0.0093, 0.75, 0.65
    t2, w2 = recovery_leaving_state(t1, w1, t3, w3, es, el)
    h1, h2, h3 = (
        psychrolib.GetMoistAirEnthalpy(t, w)
        for t, w in ((t1, w1), (float(t2), float(w2)), (t3, w3))
    )
    assert float(total_effectiveness(t1, w1, t3, w3, es, el)) == pytest.approx(
        (h1 - h2) / (h1 - h3), rel=1e-6
    )
    # with latent effectiveness 0 the total lies well below the sensible in humid weather
    assert float(total_effectiveness(t1, w1, t3, w3, es, 0.0)) < 0.5 * es


@given(
    x=st.floats(0.2, 1.0),
    t_o=st.floats(-30.0, 5.0),
    rh=st.floats(0.2, 1.0),
    es=st.floats(0.3, 0.9),
    el=st.floats(0.0, 0.8),
    f_true=st.floats(0.0, 1.0),
)
def test_recovery_fraction_round_trip(x, t_o, rh, es, el, f_true):
    # Mix (psychrolib balances) the outdoor air recovered at f_true with return air; the
    # closed-form quadratic root must recover f_true from the mixed dry bulb.
    w_o = float(ma.humidity_ratio_from_relative_humidity(t_o, rh, P))
    t_r, w_r = 24.0, 0.008
    t2, w2 = recovery_leaving_state(t_o, w_o, t_r, w_r, es, el, fraction=f_true)
    h = x * psychrolib.GetMoistAirEnthalpy(float(t2), float(w2)) + (1 - x) * (
        psychrolib.GetMoistAirEnthalpy(t_r, w_r)
    )
    w = x * float(w2) + (1 - x) * w_r
    target = psychrolib.GetTDryBulbFromEnthalpyAndHumRatio(h, w)
    f = float(recovery_fraction_for_mixed_drybulb(target, x, t_o, w_o, t_r, w_r, t_r, w_r, es, el))
    assert f == pytest.approx(f_true, abs=1e-7)
    f = min(max(f, 0.0), 1.0)  # round-off around the ends of the range
    t_mix, _, _ = mixed_state(x, *recovery_leaving_state(t_o, w_o, t_r, w_r, es, el, f), t_r, w_r)
    assert float(t_mix) == pytest.approx(target, abs=1e-6)


ZONE = ZoneLoadModel(
    cooling_design_sensible=40.0,
    cooling_design_latent=8.0,
    cooling_design_drybulb=33.0,
    heating_design_load=30.0,
    heating_design_drybulb=-12.0,
)


@pytest.fixture(scope="module")
def humid_year():
    return synthetic_weather(mean=16.0, swing=13.0, dew_depression=4.0, seed=7)


def test_outdoor_air_unit_recovery(humid_year):
    base = AirHandlerSettings(
        supply_airflow=3.0,
        all_outdoor_air=True,
        fan_control="constant_volume",
        supply_fan_power=3.0,
        preheat_drybulb=None,
    )
    plain = hourly_year(base, humid_year, ZONE)
    wheel = hourly_year(
        replace(base, recovery_sensible_effectiveness=0.75, recovery_latent_effectiveness=0.65),
        humid_year,
        ZONE,
    )
    on = wheel["recovery_fraction"] > 0
    assert on.sum() > 1000
    # Never over the mixed-air set point in cold hours (the modulation stops it):
    cold = wheel["outdoor_drybulb_C"] < wheel["coil_leaving_drybulb_C"] - 1.0
    assert (wheel.loc[cold, "coil_total_kW"] < 1e-3).all()

    # Where the outdoor air is warmer than the return (recovery lowers both its dry bulb
    # and enthalpy) the hour's net coil energy is never higher with recovery (tolerance:
    # the model's solution tolerance); over the year it is clearly lower.
    def net(frame):
        return frame["coil_total_kW"] + frame["heating_coil_kW"] + frame["preheat_kW"]

    warm = on & (wheel["outdoor_drybulb_C"] > wheel["return_drybulb_C"])
    assert warm.sum() > 500
    assert (net(wheel)[warm] <= net(plain)[warm] + 1e-3).all()
    assert net(wheel).sum() < 0.8 * net(plain).sum()
    # Mild humid hours (cooler but more enthalpic than the return): the wheel dries the
    # outdoor air, so the zone ends up no more humid (the coil may then work a little more).
    humid = on & ~warm & (wheel["outdoor_enthalpy_kJkg"] > wheel["return_enthalpy_kJkg"])
    assert (
        wheel.loc[humid, "zone_humidity_ratio_kgkg"]
        <= plain.loc[humid, "zone_humidity_ratio_kgkg"] + 1e-7
    ).all()
    # In hot humid hours the wheel cools and dries the outdoor air.
    hot = on & (wheel["outdoor_drybulb_C"] > 28.0)
    assert hot.sum() > 10
    assert (
        wheel.loc[hot, "recovered_enthalpy_kJkg"] < wheel.loc[hot, "outdoor_enthalpy_kJkg"]
    ).all()
    assert (wheel.loc[hot, "recovery_effect_kW"] > 0).all()


def test_recovery_bypassed_during_economizer_operation(humid_year):
    settings = AirHandlerSettings(
        supply_airflow=5.0,
        minimum_outdoor_air_fraction=0.3,
        economizer="differential_enthalpy",
        recovery_sensible_effectiveness=0.7,
        recovery_latent_effectiveness=0.0,
    )
    year = hourly_year(settings, humid_year, ZONE)
    economizing = year["economizer_mode"].isin(["free_cooling", "integrated"])
    assert economizing.sum() > 500
    assert (year.loc[economizing, "recovery_fraction"] == 0).all()
    assert (year.loc[economizing, "recovery_effect_kW"] == 0).all()
    # and runs in the cold hours at minimum outdoor air that need heat
    heating = year["economizer_mode"] == "heating"
    assert (year.loc[heating, "recovery_fraction"] > 0).mean() > 0.9
