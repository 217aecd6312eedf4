"""The air-handler model computes only the hours its fan runs and fills the others.

Fan-off hours do not depend on the outdoor air (every state NaN, every flow and load
zero, the zone loads unmet, plantside.air_handler.results), so filling them must give
what modelling every hour gives: every column, dtype and shape, to the model's pass
tolerance (humidity ~5e-7 kg/kg, so loads ~0.01 kW, as tests/test_air_handler_benchmark.py),
for a year, for a sweep of outdoor-air fractions and for a record with no fan hours.
"""

from __future__ import annotations

import numpy as np
import pytest
from air_handler_cases import synthetic_weather
from plantside.air_handler.model import air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.zone_loads import HourlyZoneLoads, zone_loads_for_weather


def _both(settings, weather, loads, **kwargs):
    args = (settings, weather.drybulb, weather.humidity_ratio, weather.pressure, loads)
    return (
        air_handler_hours(*args, **kwargs),
        air_handler_hours(*args, operating_hours_only=False, **kwargs),
    )


def _assert_same(filled, modelled):
    assert set(filled) == set(modelled)
    for key, expected in modelled.items():
        value = np.asarray(filled[key])
        expected = np.asarray(expected)
        assert value.dtype == expected.dtype, key
        assert value.shape == expected.shape, key
        if expected.dtype.kind == "f":
            np.testing.assert_allclose(value, expected, rtol=1e-5, atol=0.01, equal_nan=True)
        else:
            assert np.array_equal(value, expected), key


@pytest.mark.parametrize("economizer", ["fixed_drybulb", "differential_enthalpy"])
def test_fan_off_hours_filled_as_modelled(office_zone, economizer):
    weather = synthetic_weather()
    loads = zone_loads_for_weather(office_zone, weather)
    assert 0.2 < loads.occupied.mean() < 0.5  # a schedule with both kinds of hour
    settings = AirHandlerSettings(
        supply_airflow=5.0,
        supply_fan_power=5.0,
        fan_schedule="occupied",
        economizer=economizer,
        recovery_sensible_effectiveness=0.7,
    )
    _assert_same(*_both(settings, weather, loads))
    fractions = np.array([[0.0], [0.3], [1.0]])
    filled, modelled = _both(settings, weather, loads, minimum_outdoor_air_fraction=fractions)
    assert filled["coil_total_kW"].shape == (3, weather.hours)
    _assert_same(filled, modelled)


def test_no_fan_hours(office_zone):
    weather = synthetic_weather(hours=48)
    loads = zone_loads_for_weather(office_zone, weather)
    night = HourlyZoneLoads(
        sensible=loads.sensible, latent=loads.latent, occupied=np.zeros(48, dtype=bool)
    )
    settings = AirHandlerSettings(supply_airflow=5.0, supply_fan_power=5.0, fan_schedule="occupied")
    filled = air_handler_hours(
        settings, weather.drybulb, weather.humidity_ratio, weather.pressure, night
    )
    assert np.all(filled["coil_total_kW"] == 0.0)
    assert np.all(np.isnan(filled["supply_drybulb_C"]))
    np.testing.assert_array_equal(filled["zone_sensible_unmet_kW"], night.sensible)
    assert filled["economizer_mode"].dtype == np.int8
    swept = air_handler_hours(
        settings,
        weather.drybulb,
        weather.humidity_ratio,
        weather.pressure,
        night,
        minimum_outdoor_air_fraction=np.array([[0.1], [0.2]]),
    )
    assert swept["coil_total_kW"].shape == (2, 48)
