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
    ZoneSolarGain,
    design_zone_loads,
    occupied_from_hour_of_year,
    solar_gain_from_irradiance,
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


# --- shape in time: schedules and solar gain through glazing --------------------------


def test_weekend_hours_and_internal_gain_profile():
    # By the definitions in ZoneLoadModel: Saturday 8-12 occupied; internal gains in an
    # occupied hour are the profile's share of internal_fraction x Q_c (here 40 kW).
    profile = [0.0] * 7 + [0.5] + [1.0] * 9 + [0.25] + [0.0] * 6
    model = ZoneLoadModel(
        cooling_design_sensible=100.0,
        internal_fraction=0.4,
        unoccupied_internal_fraction=0.0,
        weekend_occupied_start_hour=8,
        weekend_occupied_end_hour=12,
        internal_gain_profile=profile,
    )
    saturday = 24 * 5
    hours = np.array([7, 12, 17, saturday + 7, saturday + 8, saturday + 11, saturday + 12])
    loads = zone_loads_from_model(model, np.full(hours.size, 35.0), hours)
    assert loads.occupied.tolist() == [True, True, True, False, True, True, False]
    np.testing.assert_allclose(loads.internal_sensible, [20.0, 40.0, 10.0, 0.0, 40.0, 40.0, 0.0])
    # design hour: the profile's largest share
    np.testing.assert_allclose(design_zone_loads(model, 35.0).internal_sensible, [40.0])


def test_glazing_needs_the_sites_solar_gain():
    model = ZoneLoadModel(cooling_design_sensible=10.0, glazing_area_east=20.0)
    assert model.has_glazing
    with pytest.raises(InputRangeError) as info:
        zone_loads_from_model(model, [30.0, 31.0])
    assert info.value.field == "solar_gain"
    gain = ZoneSolarGain(hourly=[0.0, 2.5], design=3.0)
    with_sun = model.with_solar_gain(gain)
    loads = zone_loads_from_model(with_sun, [30.0, 30.0], occupied=[True, True])
    # the solar gain adds to the straight line: the two hours differ by exactly 2.5 kW
    assert loads.sensible[1] - loads.sensible[0] == pytest.approx(2.5)
    design = design_zone_loads(with_sun, 30.0)
    assert float(design.sensible[0]) == pytest.approx(float(loads.sensible[0]) + 3.0)
    with pytest.raises(InputRangeError, match="hours"):
        zone_loads_from_model(with_sun, [30.0, 30.0, 30.0])


def test_solar_gain_from_irradiance():
    # Q = SHGC x IAC x sum(A_i E_i) (ASHRAE Fundamentals 2017 Ch. 15, fenestration solar
    # heat gain with one SHGC for beam and diffuse): 0.4 x 0.5 x (10 x 500 + 20 x 100) W.
    model = ZoneLoadModel(
        cooling_design_sensible=10.0,
        glazing_area_east=10.0,
        glazing_area_west=20.0,
        solar_heat_gain_coefficient=0.4,
        interior_attenuation_coefficient=0.5,
    )
    irradiance = np.array([[50.0], [500.0], [300.0], [100.0]])  # N, E, S, W [W/m²]
    gain = solar_gain_from_irradiance(model, irradiance)
    np.testing.assert_allclose(gain, [0.4 * 0.5 * (10 * 500 + 20 * 100) / 1000.0])
    with pytest.raises(InputRangeError, match="shape"):
        solar_gain_from_irradiance(model, np.ones((3, 2)))


@pytest.mark.parametrize(
    ("field", "changes"),
    [
        ("internal_gain_profile", {"internal_gain_profile": [1.0] * 23}),
        ("internal_gain_profile", {"internal_gain_profile": [1.5] * 24}),
        ("glazing_area_south", {"glazing_area_south": -1.0}),
        ("solar_heat_gain_coefficient", {"solar_heat_gain_coefficient": 1.2}),
        ("weekend_occupied_end_hour", {"weekend_occupied_start_hour": 9}),
    ],
)
def test_bad_shape_inputs_name_field(field, changes):
    with pytest.raises(InputRangeError) as info:
        ZoneLoadModel(cooling_design_sensible=10.0, **changes)
    assert info.value.field == field
