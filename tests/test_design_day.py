"""24-hour design days from a design condition and a daily range."""

import numpy as np
import psychrolib
import pytest
from plantside.air import moist_air
from plantside.climate.bundled import load_bundled_climate
from plantside.climate.design_conditions import DesignCondition, design_conditions_from_weather
from plantside.climate.design_day import (
    DAILY_RANGE_FRACTION,
    cooling_design_day,
    design_day_from_condition,
    heating_design_day,
)
from plantside.errors import InputRangeError


def condition(drybulb=34.0, wet_bulb=24.0, pressure=101325.0):
    w = float(moist_air.humidity_ratio_from_wet_bulb(drybulb, wet_bulb, pressure))
    return DesignCondition(
        kind="cooling",
        percent=0.4,
        drybulb=drybulb,
        humidity_ratio=w,
        pressure=pressure,
        dew_point=float(moist_air.dew_point_from_humidity_ratio(w, pressure)),
        wet_bulb=wet_bulb,
        enthalpy=float(moist_air.enthalpy_from_humidity_ratio(drybulb, w)),
        label="test condition",
    )


# The profile's values are in the register of unsourced values (DEVELOPERS.md): recalled
# from ASHRAE Handbook Fundamentals 2017 (SI) Ch. 14 Table 6 and not confirmed. These
# tests do not compare them with a second copy of the same recollection; they check
# what the published profile must be, which a shifted, reversed or mistyped copy fails.


def test_profile_is_a_fraction_with_its_extremes_at_the_documented_hours():
    # Ch. 14 Table 6 (the hours are stated in the table's text and in the module notes):
    # 1 at the daily low, 05:00; 0 at the daily high, 14:00 and 15:00; nothing outside.
    f = DAILY_RANGE_FRACTION
    assert f.shape == (24,)
    assert np.all((f >= 0.0) & (f <= 1.0))
    assert np.flatnonzero(f == 1.0).tolist() == [5]
    assert np.flatnonzero(f == 0.0).tolist() == [14, 15]


def test_profile_is_monotone_between_its_extremes():
    # A daily temperature wave has one low and one high (Ch. 14 Table 6, common
    # practice): the fraction falls from 05:00 to 14:00 and rises from 15:00 through
    # midnight back to 05:00, never turning on the way.
    f = DAILY_RANGE_FRACTION
    warming = f[5:15]
    cooling = np.concatenate([f[15:], f[:6]])
    assert np.all(np.diff(warming) < 0)
    assert np.all(np.diff(cooling) > 0)


def test_profile_applied_as_t_design_minus_f_range():
    # t(h) = t_design - f(h) * range (ASHRAE Fundamentals 2017 Ch. 14, from memory), clock
    # time h:00 at index h: the high is the design dry bulb at 14:00 and 15:00, the low is
    # the design dry bulb less the range at 05:00.
    day = design_day_from_condition(condition(30.0), 10.0)
    np.testing.assert_allclose(day.drybulb, 30.0 - DAILY_RANGE_FRACTION * 10.0, atol=1e-12)
    assert day.hours == 24
    np.testing.assert_array_equal(day.hour_of_year, np.arange(24))
    assert day.drybulb.max() == 30.0
    assert np.flatnonzero(day.drybulb == 30.0).tolist() == [14, 15]
    assert day.drybulb.min() == pytest.approx(20.0)
    assert int(np.argmin(day.drybulb)) == 5


def test_constant_humidity_ratio_capped_at_saturation():
    # Design state 30 °C DB / 26 °C WB: dew point about 24.9 °C (psychrolib); with a 12 K
    # range the night falls to 18 °C, below the dew point, so those hours are saturated.
    c = condition(30.0, 26.0)
    day = design_day_from_condition(c, 12.0)
    saturation = np.array([psychrolib.GetSatHumRatio(t, c.pressure) for t in day.drybulb])
    expected = np.minimum(c.humidity_ratio, saturation)
    np.testing.assert_allclose(day.humidity_ratio, expected, rtol=2e-4)  # psychrolib accuracy
    capped = c.humidity_ratio > saturation
    assert capped.any() and not capped.all()
    assert any("capped at saturation" in note for note in day.notes)
    # Uncapped hours keep the design humidity ratio exactly (the stated rule).
    assert np.all(day.humidity_ratio[~capped] == c.humidity_ratio)


def test_wet_bulb_range_method():
    # ASHRAE Fundamentals 2017 Ch. 14 (from memory): t_wb(h) = t_wb,design - f(h) * wb range.
    c = condition(34.0, 24.0)
    day = design_day_from_condition(c, 11.0, humidity="wet_bulb_range", wet_bulb_range=4.0)
    wet_bulb = moist_air.wet_bulb_from_humidity_ratio(day.drybulb, day.humidity_ratio, c.pressure)
    expected = np.minimum(24.0 - DAILY_RANGE_FRACTION * 4.0, day.drybulb)
    np.testing.assert_allclose(wet_bulb, expected, atol=1e-5)
    # psychrolib check of the 05:00 state (Table 6 fraction 1.00): 23 °C DB, 20 °C WB.
    assert day.humidity_ratio[5] == pytest.approx(
        psychrolib.GetHumRatioFromTWetBulb(23.0, 20.0, c.pressure), rel=2e-4
    )


def test_arguments_checked():
    c = condition()
    with pytest.raises(InputRangeError, match="daily_range"):
        design_day_from_condition(c, -1.0)
    with pytest.raises(InputRangeError, match="daily_range"):
        design_day_from_condition(c, 45.0)
    with pytest.raises(InputRangeError, match="month"):
        design_day_from_condition(c, 10.0, month=13)
    with pytest.raises(InputRangeError, match="wet_bulb_range"):
        design_day_from_condition(c, 10.0, humidity="wet_bulb_range")
    with pytest.raises(InputRangeError, match="humidity"):
        design_day_from_condition(c, 10.0, humidity="relative")


def test_cooling_and_heating_design_days_of_a_bundled_site():
    weather = load_bundled_climate("Mesa Ardiente")
    conditions = design_conditions_from_weather(weather)
    day = cooling_design_day(conditions, "cooling", 0.4)
    design = conditions.cooling("cooling", 0.4)
    assert day.drybulb.max() == pytest.approx(design.drybulb)
    assert day.drybulb.max() - day.drybulb.min() == pytest.approx(conditions.mean_daily_range)
    assert np.all(day.month == conditions.warmest_month)
    assert np.all(day.pressure == design.pressure)
    assert day.altitude == pytest.approx(1600, abs=60)  # standard atmosphere at the site
    heating = heating_design_day(conditions, 99.6)
    assert np.all(heating.drybulb == conditions.heating(99.6).drybulb)
    assert np.all(heating.month == 1)
