"""The outdoor-air sweep's short cuts against the plain model (issue 15).

The sweep models the (fraction, hour) pairs of a few fractions as one array of hours,
asks the model for only the columns it sums, and lets lower fractions reuse the hours
whose damper stood above the minimum in every pass. Each short cut is checked against
the model run as a user runs it: one year per fraction, every column. The reference is
the model's own full run (its physics are checked against ASHRAE Handbook Fundamentals
2017 Ch. 1 and 90.1 elsewhere); the tolerance is the model's solution tolerance
(tests/test_air_handler.py: a block may stop one pass earlier or later, 1e-5 of an
annual sum).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from air_handler_cases import synthetic_weather
from plantside.air.economizer import MODE_FREE_COOLING, MODE_INTEGRATED
from plantside.air_handler.model import HOURLY_COLUMNS, MINIMUM_IN_A_PASS, air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.year import SWEEP_COLUMNS, outdoor_air_sweep
from plantside.air_handler.zone_loads import ZoneLoadModel, zone_loads_for_weather
from plantside.errors import InputRangeError

ZONE = ZoneLoadModel(  # fictional zone
    cooling_design_sensible=60.0,
    cooling_design_latent=10.0,
    cooling_design_drybulb=33.0,
    heating_design_load=40.0,
    heating_design_drybulb=-8.0,
    internal_fraction=0.5,
)
WEATHER = synthetic_weather(hours=24 * 60, seed=5, mean=14.0, swing=10.0)
LOADS = zone_loads_for_weather(ZONE, WEATHER)
UNITS = {
    "enthalpy + recovery": AirHandlerSettings(
        name="AHU-R",
        supply_airflow=5.0,
        supply_fan_power=5.0,
        economizer="differential_enthalpy",
        recovery_sensible_effectiveness=0.7,
    ),
    "dry bulb, integrated, occupied hours": AirHandlerSettings(
        name="AHU-D", supply_airflow=5.0, supply_fan_power=5.0, fan_schedule="occupied"
    ),
    "no economizer, humidity control": AirHandlerSettings(
        name="AHU-H",
        supply_airflow=5.0,
        supply_fan_power=5.0,
        economizer="none",
        zone_relative_humidity_max=0.55,
    ),
}


def _year(settings, fraction, **options):
    return air_handler_hours(
        settings,
        WEATHER.drybulb,
        WEATHER.humidity_ratio,
        WEATHER.pressure,
        LOADS,
        minimum_outdoor_air_fraction=fraction,
        **options,
    )


@pytest.mark.parametrize("name", list(UNITS))
def test_only_the_asked_columns_are_the_same_as_in_the_whole_table(name):
    settings = UNITS[name]
    whole = _year(settings, 0.3)
    asked = ("coil_total_kW", "zone_relative_humidity", "operating", "economizer_mode")
    some = _year(settings, 0.3, columns=asked)
    assert set(some) == {*asked, "humidity_iteration_change"}
    for key in asked:
        assert some[key].dtype == whole[key].dtype
        np.testing.assert_array_equal(some[key], whole[key])
    # every column alone is the column of the whole table
    for key in HOURLY_COLUMNS:
        np.testing.assert_array_equal(_year(settings, 0.3, columns=[key])[key], whole[key])


def test_unknown_columns_are_refused_by_name():
    with pytest.raises(InputRangeError, match="coil_total_kWh") as info:
        _year(UNITS["enthalpy + recovery"], 0.3, columns=["coil_total_kWh"])
    assert info.value.field == "columns"


@pytest.mark.parametrize("name", list(UNITS))
def test_sweep_rows_are_the_separate_years(name):
    settings = UNITS[name]
    fractions = np.array([0.0, 0.05, 0.1, 0.2, 0.35, 0.5, 0.7, 0.85, 1.0])
    sweep = outdoor_air_sweep(settings, WEATHER, LOADS, fractions)
    assert list(sweep.columns) == list(SWEEP_COLUMNS)
    for i, x in enumerate(fractions):
        year = _year(settings, x)
        row = sweep.iloc[i]
        assert row["minimum_outdoor_air_fraction"] == x
        for column, key in (
            ("coil_total_kWh", "coil_total_kW"),
            ("coil_sensible_kWh", "coil_sensible_kW"),
            ("coil_latent_kWh", "coil_latent_kW"),
            ("heating_coil_kWh", "heating_coil_kW"),
            ("preheat_kWh", "preheat_kW"),
            ("reheat_kWh", "reheat_kW"),
        ):
            assert row[column] == pytest.approx(year[key].sum(), rel=1e-5, abs=1e-3), column
        assert row["coil_total_peak_kW"] == pytest.approx(year["coil_total_kW"].max(), rel=1e-5)
        mode = year["economizer_mode"]
        economizer = np.count_nonzero((mode == MODE_FREE_COOLING) | (mode == MODE_INTEGRATED))
        assert row["economizer_hours"] == economizer


def test_reused_hours_are_hours_the_minimum_never_bound():
    # An hour is reused at a lower fraction only where the damper stood above the
    # minimum in every pass; there the lower fraction's own run gives the same hour.
    settings = UNITS["dry bulb, integrated, occupied hours"]
    high = _year(
        settings, 0.6, columns=["coil_total_kW", "outdoor_air_fraction", MINIMUM_IN_A_PASS]
    )
    free = ~high[MINIMUM_IN_A_PASS]
    assert 0 < np.count_nonzero(free) < free.size  # the case exercises both kinds of hour
    assert np.all(high["outdoor_air_fraction"][free] > 0.6)
    low = _year(settings, 0.2)
    np.testing.assert_allclose(
        low["coil_total_kW"][free], high["coil_total_kW"][free], rtol=1e-6, atol=1e-6
    )
    np.testing.assert_array_equal(low["outdoor_air_fraction"][free] > 0.6, True)


def test_sweep_does_not_depend_on_the_order_or_the_blocks():
    settings = UNITS["enthalpy + recovery"]
    fractions = np.array([0.4, 0.0, 1.0, 0.15, 0.4, 0.7])
    by_four = outdoor_air_sweep(settings, WEATHER, LOADS, fractions)
    one_by_one = outdoor_air_sweep(settings, WEATHER, LOADS, fractions, chunk=1)
    all_at_once = outdoor_air_sweep(settings, WEATHER, LOADS, fractions, chunk=6)
    np.testing.assert_array_equal(by_four["minimum_outdoor_air_fraction"], fractions)
    for other in (one_by_one, all_at_once):
        np.testing.assert_allclose(other.to_numpy(float), by_four.to_numpy(float), rtol=1e-5)
    # a fraction given twice gives the same row twice
    np.testing.assert_allclose(by_four.iloc[0].to_numpy(float), by_four.iloc[4].to_numpy(float))


def test_all_outdoor_air_unit_sweeps_without_reuse():
    settings = replace(UNITS["enthalpy + recovery"], all_outdoor_air=True)
    sweep = outdoor_air_sweep(settings, WEATHER, LOADS, [0.0, 0.5, 1.0])
    # the fraction does not matter to an all-outdoor-air unit
    for column in ("coil_total_kWh", "heating_coil_kWh"):
        assert np.ptp(sweep[column]) <= 1e-5 * abs(sweep[column].iloc[0]) + 1e-3
