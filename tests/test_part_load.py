"""Tests of plantside.plant.part_load: load-duration curve and part-load bins."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from plantside.errors import InputRangeError
from plantside.plant.part_load import (
    NO_LOAD_FRACTION_OF_PEAK,
    load_duration_curve,
    no_load_threshold_from_loads,
    part_load_bins,
)


def _synthetic_year(seed=3):
    """A fictional year of hourly cooling loads [kW]: daily and seasonal swings, idle nights."""
    hours = np.arange(8760)
    season = 0.5 - 0.5 * np.cos(2 * np.pi * (hours / 8760.0))
    day = np.clip(np.sin(np.pi * ((hours % 24) - 6) / 14.0), 0.0, None)
    noise = np.random.default_rng(seed).normal(0.0, 30.0, hours.size)
    return np.clip(900.0 * season * day + noise, 0.0, None)


def test_bins_sum_to_the_years_hours_and_cooling_energy():
    # The bins partition the hours, so hours and energy add up to the year's (definition).
    loads = _synthetic_year()
    table = part_load_bins(loads, design_capacity=800.0)
    assert table["hours"].sum() == 8760
    assert table["energy_kWh"].sum() == pytest.approx(loads.sum(), rel=1e-12)
    assert table["percent_of_hours"].sum() == pytest.approx(100.0)
    assert table["percent_of_energy"].sum() == pytest.approx(100.0)
    assert list(table["band"])[:2] == ["no load", "0-10 %"]
    assert list(table["band"])[-1] == "above 100 %"
    assert len(table) == 12  # no load + 10 bands + above 100 %


@settings(max_examples=100, deadline=None)
@given(
    arrays(float, st.integers(1, 500), elements=st.floats(0, 2000, allow_nan=False)),
    st.floats(1.0, 3000.0),
    st.sampled_from([5.0, 10.0, 20.0, 25.0]),
)
def test_bins_always_partition_hours_and_energy(loads, capacity, width):
    table = part_load_bins(loads, capacity, band_width_percent=width)
    assert table["hours"].sum() == loads.size
    assert table["energy_kWh"].sum() == pytest.approx(loads.sum(), rel=1e-9, abs=1e-9)
    assert len(table) == round(100 / width) + 2


def test_band_edges_include_the_upper_edge():
    # Constructed hours against 1000 kW (documented band rule: upper edge included).
    # Peak 1200 kW -> no-load threshold 0.1 % x 1200 = 1.2 kW (project convention).
    loads = np.array([0.0, 0.5, 50.0, 100.0, 100.0001, 300.0, 1000.0, 1200.0])
    table = part_load_bins(loads, design_capacity=1000.0).set_index("band")
    assert table.loc["no load", "hours"] == 2  # 0 and 0.5 kW <= 1.2 kW
    assert table.loc["0-10 %", "hours"] == 2  # 50 kW (5 %) and 100 kW (exactly 10 %)
    assert table.loc["10-20 %", "hours"] == 1  # 100.0001 kW
    assert table.loc["20-30 %", "hours"] == 1  # 300 kW, exactly 30 %
    assert table.loc["90-100 %", "hours"] == 1  # 1000 kW, exactly 100 %
    assert table.loc["above 100 %", "hours"] == 1  # 1200 kW
    assert table.loc["0-10 %", "energy_kWh"] == pytest.approx(150.0)  # 50 + 100 kWh
    assert table.loc["above 100 %", "energy_kWh"] == pytest.approx(1200.0)  # whole hour's load
    assert table.loc["no load", "upper_percent"] == pytest.approx(0.12)  # 1.2 kW of 1000 kW


def test_no_load_threshold_default_and_override():
    loads = np.array([0.0, 0.3, 2.0, 500.0])
    # default: 0.1 % of the 500 kW peak = 0.5 kW (project convention, NO_LOAD_FRACTION_OF_PEAK)
    assert NO_LOAD_FRACTION_OF_PEAK == 0.001
    assert no_load_threshold_from_loads(loads) == pytest.approx(0.5)
    assert part_load_bins(loads, 500.0).set_index("band").loc["no load", "hours"] == 2
    # explicit 5 kW threshold: 2 kW is an hour without load too
    table = part_load_bins(loads, 500.0, no_load_threshold=5.0).set_index("band")
    assert table.loc["no load", "hours"] == 3
    # a year without load: every hour is a no-load hour, energy 0
    zero = part_load_bins(np.zeros(24), 100.0).set_index("band")
    assert zero.loc["no load", "hours"] == 24
    assert zero["percent_of_energy"].sum() == 0.0


def test_load_duration_curve_is_exact_at_the_ends_and_decimated():
    loads = _synthetic_year()
    curve = load_duration_curve(loads)
    assert len(curve) <= 200
    first, last = curve.iloc[0], curve.iloc[-1]
    assert (first["hours_at_or_above"], first["load_kW"]) == (1, loads.max())
    assert (last["hours_at_or_above"], last["load_kW"]) == (8760, loads.min())
    assert np.all(np.diff(curve["load_kW"]) <= 0)  # non-increasing
    assert np.all(np.diff(curve["hours_at_or_above"]) > 0)
    # every kept point lies on the full curve: the k-th highest load (definition)
    descending = np.sort(loads)[::-1]
    np.testing.assert_array_equal(curve["load_kW"], descending[curve["hours_at_or_above"] - 1])
    # the peak hours that govern sizing are all kept (log spacing starts 1, 2, 3, ...)
    assert list(curve["hours_at_or_above"][:3]) == [1, 2, 3]


def test_load_duration_curve_hours_mean_at_or_above():
    # Constructed: 10 h at 300 kW, 20 h at 200 kW, 70 h at 0 (100 h, kept whole since <= 200):
    # the load was >= 300 for 10 h and >= 200 for 30 h.
    loads = np.concatenate([np.zeros(70), np.full(20, 200.0), np.full(10, 300.0)])
    curve = load_duration_curve(loads).set_index("hours_at_or_above")
    assert len(curve) == 100
    assert curve.loc[10, "load_kW"] == 300.0
    assert curve.loc[11, "load_kW"] == 200.0 and curve.loc[30, "load_kW"] == 200.0
    assert curve.loc[31, "load_kW"] == 0.0
    assert curve.loc[30, "percent_of_hours"] == pytest.approx(30.0)


def test_bad_inputs_raise():
    with pytest.raises(InputRangeError) as info:
        part_load_bins([1.0, 2.0], design_capacity=0.0)
    assert info.value.field == "design_capacity"
    with pytest.raises(InputRangeError) as info:
        part_load_bins([1.0, 2.0], 10.0, band_width_percent=7.0)
    assert info.value.field == "band_width_percent"
    with pytest.raises(InputRangeError) as info:
        part_load_bins([1.0, -2.0], 10.0)
    assert info.value.field == "loads"
    with pytest.raises(InputRangeError) as info:
        load_duration_curve([1.0, 2.0], points=1)
    assert info.value.field == "points"
    with pytest.raises(InputRangeError) as info:
        part_load_bins([1.0], 10.0, no_load_threshold=-1.0)
    assert info.value.field == "no_load_threshold"
