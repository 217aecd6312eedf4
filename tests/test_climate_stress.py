"""The climate stress test: the shifted year and the plant held at its designed capacity.

The shift is the morphing method's "shift" (Belcher, Hacker and Powell 2005, Building
Services Engineering Research and Technology 26(1) 49-61, Eq. 1: x = x0 + dx) applied to
the dry bulb and the dew point; the dew point is checked against psychrolib's
GetTDewPointFromHumRatio (ASHRAE Handbook Fundamentals 2017 Ch. 1), to its stated
tolerance.
"""

from __future__ import annotations

import contextlib
import io
import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import psychrolib
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from plantside.cli.main import main
from plantside.climate.weather import Weather
from plantside.climate.weather_shift import shifted_weather
from plantside.errors import InputRangeError
from plantside.study.climate_stress import climate_stress, stress_summary
from plantside.study.run import run_study
from plantside.study.scenario import load_scenario

SCENARIOS = Path(__file__).resolve().parents[1] / "example_data" / "scenarios"
CLINIC = SCENARIOS / "quillon_clinic.toml"
OFFICE = SCENARIOS / "linden_office_si.toml"


@settings(max_examples=60, deadline=None)
@given(
    drybulb=st.lists(st.floats(-30.0, 45.0), min_size=1, max_size=24),
    depression=st.floats(0.0, 25.0),
    dt=st.floats(0.0, 4.0),
    dd=st.floats(0.0, 3.0),
)
def test_shift_moves_the_dry_bulb_and_dew_point_and_never_supersaturates(
    drybulb, depression, dt, dd
):
    psychrolib.SetUnitSystem(psychrolib.SI)
    t = np.array(drybulb)
    pressure = 101325.0
    dew = t - depression
    w = np.array([psychrolib.GetHumRatioFromTDewPoint(d, pressure) for d in dew])
    year = Weather("Fictional Stressville", t, w, pressure)
    shifted = shifted_weather(year, dt, dd)
    # Belcher et al. (2005) Eq. 1: every hour's dry bulb moves by the step
    np.testing.assert_allclose(shifted.weather.drybulb, t + dt, rtol=0, atol=1e-12)
    new_dew = np.array(
        [psychrolib.GetTDewPointFromHumRatio(tt, ww, pressure)
         for tt, ww in zip(shifted.weather.drybulb, shifted.weather.humidity_ratio, strict=True)]
    )  # fmt: skip
    # the dew point moves by its step, held at the dry bulb where it would pass it
    # (psychrolib's tolerance, 0.001 K, PSYCHROLIB_TOLERANCE)
    expected = np.minimum(dew + dd, t + dt)
    np.testing.assert_allclose(new_dew, expected, rtol=0, atol=2e-3)
    # hours held: those whose shifted dew point passes the dry bulb (to round-off, as the
    # dew point of a saturated hour is read back from its humidity ratio)
    margin = dew + dd - (t + dt)
    assert int(np.sum(margin > 1e-6)) <= shifted.saturated_hours <= int(np.sum(margin > -1e-6))
    # at or below saturation (Fundamentals Ch. 1: RH <= 100 %)
    saturation = np.array(
        [psychrolib.GetSatHumRatio(tt, pressure) for tt in shifted.weather.drybulb]
    )
    assert np.all(shifted.weather.humidity_ratio <= saturation * (1 + 1e-9))


def test_no_shift_is_the_year_itself():
    year = Weather("Fictional Stressville", [20.0, 30.0], [0.008, 0.012], 101325.0)
    shifted = shifted_weather(year, 0.0, 0.0)
    assert shifted.weather is year and shifted.saturated_hours == 0


@pytest.mark.parametrize(
    ("drybulb", "dew_point", "field"),
    [(4.5, 0.0, "drybulb_shift"), (-1.0, 0.0, "drybulb_shift"), (1.0, 3.5, "dew_point_shift"),
     (float("nan"), 0.0, "drybulb_shift")],
)  # fmt: skip
def test_a_shift_out_of_range_is_refused_by_name(drybulb, dew_point, field):
    year = Weather("Fictional Stressville", [20.0], [0.008], 101325.0)
    with pytest.raises(InputRangeError) as caught:
        shifted_weather(year, drybulb, dew_point)
    assert field in str(caught.value) and " K" in str(caught.value)


@pytest.fixture(scope="module")
def clinic():
    return load_scenario(CLINIC)


def test_no_shift_gives_the_study_figures_exactly(clinic):
    study = run_study(clinic)
    stress = climate_stress(clinic, 0.0, 0.0)
    for year in (stress.designed, stress.shifted):
        assert year.capacity == study.cooling.design_capacity
        assert year.design_load == study.cooling.design_load
        assert year.peak == study.cooling.annual_peak
        assert year.energy == study.cooling.annual_energy
    assert stress.holds and replace(stress.shifted, label="as designed") == stress.designed


def test_a_warmer_year_asks_more_of_the_same_plant(clinic):
    stress = climate_stress(clinic, 4.0, 3.0)
    designed, shifted = stress.designed, stress.shifted
    assert shifted.capacity == designed.capacity  # the plant as sized on the record
    assert shifted.energy > designed.energy and shifted.peak > designed.peak
    assert shifted.design_load > designed.design_load
    # the shifted year's own design condition is warmer (its dry bulb moved by 4 K)
    assert shifted.governing.drybulb > designed.governing.drybulb
    # the verdict names the shifted design load above capacity, in the page's units
    assert "design load (129.0 tons) is above it" in stress.verdict.ip
    assert "+7.2 °F" in stress.verdict.ip and "+4 K" in str(stress.verdict)


def test_the_office_plant_falls_short_in_more_hours_when_shifted():
    stress = climate_stress(load_scenario(OFFICE), 4.0, 3.0)
    assert stress.shifted.hours_above_capacity > stress.designed.hours_above_capacity > 0
    assert stress.shifted.unmet_energy > stress.designed.unmet_energy
    assert not stress.holds and "falls short in" in str(stress.verdict)


def test_the_command_line_prints_the_same_test(clinic):
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        status = main(["stress", str(CLINIC), "--drybulb-shift", "2", "--dew-point-shift", "1",
                       "--json"])  # fmt: skip
    assert status == 0
    expected = stress_summary(climate_stress(clinic, 2.0, 1.0))
    assert json.loads(out.getvalue()) == json.loads(json.dumps(expected))


def test_the_command_line_table_is_in_the_file_units_and_refuses_a_bad_shift(capsys):
    assert main(["stress", str(CLINIC), "--drybulb-shift", "4", "--dew-point-shift", "3"]) == 0
    text = capsys.readouterr().out
    assert "124.3 tons" in text and "kW" not in text  # the I-P file's units
    assert "enthalpy 0.4 %: 44.9 Btu/lb / 90.8 °F MCDB" in text  # as `plantside design`
    assert "licensed engineer" in text
    assert main(["stress", str(CLINIC), "--drybulb-shift", "9"]) == 2
    assert "drybulb_shift = 9 K is outside the allowed range 0 to 4 K" in capsys.readouterr().err
