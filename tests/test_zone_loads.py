"""Zone loads by the modified bin method.

Source: Knebel, D.E. (1983), Simplified Energy Analysis Using the Modified Bin Method,
ASHRAE: zone loads are straight lines in the outdoor dry bulb, with separate occupied
and unoccupied lines. Expected values below are computed by hand from that definition
and the design numbers given (the lines through the cooling and heating design points).
"""

from __future__ import annotations

import numpy as np
import pytest
from air_handler_cases import synthetic_weather
from hypothesis import assume, given
from hypothesis import strategies as st
from plantside.air_handler.zone_loads import (
    HourlyZoneLoads,
    ZoneLoadModel,
    design_zone_loads,
    occupied_from_hour_of_year,
    zone_loads_for_weather,
    zone_loads_from_model,
)
from plantside.errors import InputRangeError

MODEL = ZoneLoadModel(
    cooling_design_sensible=100.0,
    cooling_design_latent=20.0,
    cooling_design_drybulb=35.0,
    heating_design_load=50.0,
    heating_design_drybulb=-10.0,
    internal_fraction=0.4,
    unoccupied_internal_fraction=0.0,
    unoccupied_latent_fraction=0.25,
)


def test_hand_computed_points_on_the_lines():
    # Envelope line through (35 °C, 60 kW) and (-10 °C, -50 kW): slope 110/45 kW/K.
    assert MODEL.envelope_slope == pytest.approx(110.0 / 45.0)
    occupied = design_zone_loads(MODEL, [35.0, 20.0, -10.0], occupied=True)
    # 60 + 40 = 100 kW at design; 60 - 15 x 110/45 + 40 = 63.33 kW at 20 °C; -50 + 40 at -10 °C
    np.testing.assert_allclose(occupied.sensible, [100.0, 63.3333333, -10.0], rtol=1e-7)
    np.testing.assert_allclose(occupied.latent, 20.0)
    np.testing.assert_allclose(occupied.internal_sensible, 40.0)
    unoccupied = design_zone_loads(MODEL, [35.0, -10.0], occupied=False)
    # no internal gains unoccupied: the heating design load itself at -10 °C
    np.testing.assert_allclose(unoccupied.sensible, [60.0, -50.0])
    np.testing.assert_allclose(unoccupied.latent, 5.0)
    # balance point of the occupied line: 35 - 100 / (110/45) = -5.9 °C
    assert MODEL.balance_drybulb == pytest.approx(35.0 - 100.0 * 45.0 / 110.0)
    at_balance = design_zone_loads(MODEL, MODEL.balance_drybulb)
    assert float(at_balance.sensible[0]) == pytest.approx(0.0, abs=1e-9)


@given(t=st.lists(st.floats(-30.0, 45.0), min_size=3, max_size=3, unique=True))
def test_lines_are_straight_and_parallel(t):
    # Modified bin method: linear in outdoor dry bulb; occupied and unoccupied lines
    # differ by the internal gains that leave with the occupants (here all of them).
    t = np.sort(np.array(t))
    assume(np.min(np.diff(t)) > 0.01)  # slopes of nearly coincident points are round-off
    occ = design_zone_loads(MODEL, t, occupied=True).sensible
    unocc = design_zone_loads(MODEL, t, occupied=False).sensible
    slopes = np.diff(occ) / np.diff(t)
    np.testing.assert_allclose(slopes, MODEL.envelope_slope, rtol=1e-7)
    np.testing.assert_allclose(occ - unocc, 40.0, rtol=1e-9)


def test_schedule():
    # 1 January is a Monday (first_weekday 0); occupied 7:00 to 18:00 on weekdays.
    hours = np.array([6, 7, 17, 18, 24 * 5 + 10, 24 * 6 + 10, 24 * 7 + 10])
    expected = [False, True, True, False, False, False, True]  # Sat, Sun, Mon
    assert occupied_from_hour_of_year(hours, 7, 18, "weekdays", 0).tolist() == expected
    # starting on a Saturday shifts the weekend to the first two days
    assert occupied_from_hour_of_year([10, 34, 58], 7, 18, "weekdays", 5).tolist() == [
        False,
        False,
        True,
    ]
    assert occupied_from_hour_of_year([24 * 5 + 10], 7, 18, "all", 0).tolist() == [True]


def test_year_from_weather():
    weather = synthetic_weather(hours=24 * 14)
    loads = zone_loads_for_weather(MODEL, weather)
    assert loads.hours == weather.hours
    assert loads.occupied.sum() == 10 * 11  # ten weekdays of 11 hours
    direct = zone_loads_from_model(MODEL, weather.drybulb, weather.hour_of_year)
    np.testing.assert_array_equal(direct.sensible, loads.sensible)
    occupied = loads.occupied
    np.testing.assert_allclose(loads.latent[occupied], 20.0)
    np.testing.assert_allclose(loads.latent[~occupied], 5.0)


@pytest.mark.parametrize(
    ("field", "changes"),
    [
        ("cooling_design_sensible", {"cooling_design_sensible": -5.0}),
        ("cooling_design_latent", {"cooling_design_latent": -1.0}),
        ("heating_design_drybulb", {"heating_design_drybulb": 33.0}),
        ("internal_fraction", {"internal_fraction": 1.5}),
        ("occupied_end_hour", {"occupied_start_hour": 9, "occupied_end_hour": 8}),
        ("occupied_days", {"occupied_days": "sometimes"}),
        ("first_weekday", {"first_weekday": 7}),
    ],
)
def test_bad_model_inputs_name_field_and_range(field, changes):
    arguments = {"cooling_design_sensible": 10.0, **changes}
    with pytest.raises(InputRangeError) as info:
        ZoneLoadModel(**arguments)
    assert info.value.field == field
    assert info.value.allowed


def test_hourly_loads_validation():
    loads = HourlyZoneLoads(sensible=[5.0, -3.0], latent=1.0)
    np.testing.assert_array_equal(loads.latent, [1.0, 1.0])
    np.testing.assert_array_equal(loads.internal_sensible, [5.0, 0.0])
    assert loads.occupied.all()
    with pytest.raises(InputRangeError, match="zone sensible load"):
        HourlyZoneLoads(sensible=[np.nan], latent=[0.0])
    with pytest.raises(InputRangeError, match="internal sensible"):
        HourlyZoneLoads(sensible=[1.0], latent=[0.0], internal_sensible=[-1.0])
