"""Tests of plantside.plant.sizing: design capacity, load percentiles and what a margin buys."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from plantside.errors import InputRangeError
from plantside.plant.sizing import (
    design_capacity_from_design_load,
    energy_above,
    hours_above,
    load_exceeded,
    margin_table,
    sizing_cautions,
    sizing_summary,
)


def test_design_capacity_adds_the_margin():
    # 1000 kW + 15 % = 1150 kW (arithmetic); vectorised over margins
    assert design_capacity_from_design_load(1000.0, 15.0) == pytest.approx(1150.0)
    np.testing.assert_allclose(
        design_capacity_from_design_load(800.0, [0.0, 10.0, 25.0]), [800.0, 880.0, 1000.0]
    )


def test_negative_margin_raises_naming_field_and_range():
    with pytest.raises(InputRangeError) as info:
        design_capacity_from_design_load(1000.0, -5.0)
    assert info.value.field == "margin_percent"
    assert info.value.allowed == "0 to 100 %"
    with pytest.raises(InputRangeError) as info:
        design_capacity_from_design_load(-1.0, 5.0)
    assert info.value.field == "design_load"


def test_percentiles_on_one_to_thousand():
    # Constructed series 1, 2, ..., 1000 kW (shuffled). 1 % of 1000 h = 10 h may lie above the
    # answer: the 11th highest, 990 kW, which exactly 10 hours (991..1000) exceed. 0.4 % = 4 h:
    # the 5th highest, 996 kW, exceeded by 997..1000 (definition in plantside.plant.sizing notes).
    loads = np.random.default_rng(7).permutation(np.arange(1.0, 1001.0))
    assert load_exceeded(loads, 1.0) == 990.0
    assert load_exceeded(loads, 0.4) == 996.0
    np.testing.assert_array_equal(load_exceeded(loads, [1.0, 0.4]), [990.0, 996.0])
    assert hours_above(loads, 990.0) == 10  # exactly 1 % of the hours
    assert hours_above(loads, 996.0) == 4  # exactly 0.4 % of the hours
    assert load_exceeded(loads, 0.0) == 1000.0  # p = 0: nothing may exceed it, the peak


@pytest.mark.parametrize(
    ("hours_at_peak", "percent", "expected"),
    [
        # 8760 h: 0.4 % = 35.04 h and 1 % = 87.6 h may exceed the answer (k = 35 and 87).
        (35, 0.4, 100.0),  # 35 peak hours <= 35.04: the peak is not "exceeded 0.4 %"
        (36, 0.4, 500.0),  # 36 peak hours > 35.04: the 0.4 % load is the peak itself
        (87, 1.0, 100.0),  # 87 <= 87.6
        (88, 1.0, 500.0),  # 88 > 87.6
    ],
)
def test_percentiles_on_a_year_with_a_plateau(hours_at_peak, percent, expected):
    # Constructed year: `hours_at_peak` hours at 500 kW, the rest at 100 kW (exact by construction).
    loads = np.full(8760, 100.0)
    loads[:hours_at_peak] = 500.0
    assert load_exceeded(loads, percent) == expected


def test_percentiles_per_unit_for_a_two_dimensional_array():
    # Column 0 = 1..1000, column 1 = 2 x that: the answers scale (constructed as above).
    base = np.arange(1.0, 1001.0)
    result = load_exceeded(np.column_stack([base, 2 * base]), [1.0, 0.4])
    np.testing.assert_array_equal(result, [[990.0, 1980.0], [996.0, 1992.0]])


@settings(max_examples=100, deadline=None)
@given(
    arrays(float, st.integers(1, 400), elements=st.floats(0, 1e4, allow_nan=False)),
    st.floats(0.0, 99.0),
)
def test_percentile_definition_holds(loads, percent):
    # The definition itself: at most floor(pN/100) hours above, and at least that + 1 at or above.
    value = load_exceeded(loads, percent)
    allowed = np.floor(percent * loads.size / 100.0 + 1e-9)
    assert (loads > value).sum() <= allowed
    assert (loads >= value).sum() >= allowed + 1


def test_hours_and_energy_above_on_a_small_series():
    # By hand: loads 0, 100, 200, 300 kW against 150 kW: 2 hours above, 50 + 150 = 200 kWh unmet.
    loads = np.array([0.0, 100.0, 200.0, 300.0])
    assert hours_above(loads, 150.0) == 2
    assert energy_above(loads, 150.0) == pytest.approx(200.0)
    np.testing.assert_array_equal(hours_above(loads, [0.0, 300.0, 400.0]), [3, 0, 0])
    np.testing.assert_allclose(energy_above(loads, [0.0, 300.0, 400.0]), [600.0, 0.0, 0.0])


@settings(max_examples=100, deadline=None)
@given(
    arrays(float, st.integers(1, 300), elements=st.floats(0, 1e4, allow_nan=False)),
    st.floats(0, 1.2e4),
)
def test_energy_above_matches_the_direct_sum(loads, capacity):
    # sum of max(q - C, 0), the definition, computed directly
    direct = np.maximum(loads - capacity, 0.0).sum()
    assert energy_above(loads, capacity) == pytest.approx(direct, rel=1e-9, abs=1e-6)
    assert hours_above(loads, capacity) == (loads > capacity).sum()


def test_margin_table_on_a_constructed_year():
    # Year: 10 h at 1200 kW, 20 h at 1100 kW, the rest at 500 kW. Design load 1000 kW.
    # By hand: margin 0 -> 1000 kW, 30 h short, 10 x 200 + 20 x 100 = 4000 kWh;
    # 10 % -> 1100 kW, 10 h short (1100 is met), 10 x 100 = 1000 kWh; 20 % -> 1200 kW, 0 h.
    loads = np.full(8760, 500.0)
    loads[:10] = 1200.0
    loads[10:30] = 1100.0
    table = margin_table(loads, 1000.0, margins_percent=[0, 10, 20])
    np.testing.assert_allclose(table["capacity_kW"], [1000.0, 1100.0, 1200.0])
    np.testing.assert_array_equal(table["hours_short"], [30, 10, 0])
    np.testing.assert_allclose(table["unmet_energy_kWh"], [4000.0, 1000.0, 0.0])
    np.testing.assert_allclose(table["largest_shortfall_kW"], [200.0, 100.0, 0.0])
    np.testing.assert_allclose(table["capacity_over_peak"], [1000 / 1200, 1100 / 1200, 1.0])


def test_sizing_summary_rows_and_values():
    # Same constructed year: peak 1200; 0.4 % (35.04 h) -> 36th highest = 500 kW;
    # 1 % (87.6 h) -> 88th highest = 500 kW; design 1000 kW + 10 % = 1100 kW.
    loads = np.full(8760, 500.0)
    loads[:10] = 1200.0
    loads[10:30] = 1100.0
    table = sizing_summary(loads, 1000.0, 10.0).set_index("quantity")
    assert list(table.index) == [
        "design_load",
        "design_capacity",
        "annual_peak",
        "exceeded_1_percent",
        "exceeded_0.4_percent",
    ]
    np.testing.assert_allclose(table["load_kW"], [1000.0, 1100.0, 1200.0, 500.0, 500.0])
    assert table.loc["design_capacity", "hours_above"] == 10
    assert table.loc["annual_peak", "percent_of_design_capacity"] == pytest.approx(
        100 * 1200 / 1100
    )


def test_cautions_for_undersized_and_oversized_plants():
    loads = np.array([0.0, 400.0, 1000.0])
    undersized = sizing_cautions(loads, 900.0)
    assert "below the year's peak" in undersized[0] and "1 hour(s)" in undersized[0]
    assert "licensed engineer" in undersized[-1]
    # 1.25 x peak is the documented threshold (common practice, no source)
    assert "short cycling" in " ".join(sizing_cautions(loads, 1300.0))
    assert sizing_cautions(loads, 1100.0) == []


def test_bad_inputs_raise():
    with pytest.raises(InputRangeError) as info:
        load_exceeded([1.0, 2.0], 100.0)
    assert info.value.field == "exceedance_percent"
    with pytest.raises(InputRangeError) as info:
        hours_above([1.0, 2.0], -1.0)
    assert info.value.field == "capacity"
    with pytest.raises(InputRangeError) as info:
        margin_table([1.0, 2.0], 1.0, margins_percent=[5, -5])
    assert info.value.field == "margins_percent"
    with pytest.raises(InputRangeError) as info:
        sizing_cautions([1.0, 2.0], 0.0)
    assert info.value.field == "capacity"
    with pytest.raises(InputRangeError):
        load_exceeded([], 1.0)
