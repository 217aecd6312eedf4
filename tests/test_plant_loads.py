"""Tests of plantside.plant.loads: coincident plant load and diversity."""

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from plantside.errors import InputRangeError
from plantside.plant.loads import (
    coincident_load,
    diversity_table,
    load_matrix,
    peak_table,
    plant_load_from_coil_loads,
)

# Two coils that peak in different hours; expected values worked by hand:
# coil A peaks at 100 kW (hour 0), coil B at 80 kW (hour 1); hourly sums 100, 80, 100 kW,
# so the coincident peak is 100 kW at hour 0 (first of the tie) and the sum of peaks 180 kW.
COIL_A = np.array([100.0, 0.0, 50.0])
COIL_B = np.array([0.0, 80.0, 50.0])

load_matrices = arrays(
    float,
    st.tuples(st.integers(1, 48), st.integers(1, 6)),
    elements=st.floats(0.0, 5000.0, allow_nan=False, allow_infinity=False),
)


@settings(max_examples=150, deadline=None)
@given(load_matrices)
def test_coincident_peak_never_above_sum_of_peaks(matrix):
    # max_h sum_u q <= sum_u max_h q for q >= 0 (each term of the sum is at most its unit's peak:
    # a property of max and sum, no source needed).
    table = diversity_table(matrix)
    coils = table.set_index("level").loc["coils"]
    assert coils["coincident_peak_kW"] <= coils["sum_of_peaks_kW"] * (1 + 1e-12) + 1e-9
    if coils["coincident_peak_kW"] > 0:
        assert coils["diversity_factor"] >= 1 - 1e-12
        assert coils["coincidence_factor"] <= 1 + 1e-12


@settings(max_examples=50, deadline=None)
@given(
    arrays(float, st.integers(1, 48), elements=st.floats(0.0, 5000.0, allow_nan=False)),
    st.integers(1, 8),
)
def test_identical_units_give_n_times_one(loads, units):
    # N identical air handlers peak together: plant load = N x one unit, no diversity
    # (definition of the coincident sum).
    matrix = np.tile(loads[:, None], (1, units))
    np.testing.assert_allclose(plant_load_from_coil_loads(matrix), units * loads, rtol=1e-12)
    coils = diversity_table(matrix).set_index("level").loc["coils"]
    np.testing.assert_allclose(coils["coincident_peak_kW"], units * loads.max(), rtol=1e-12)
    if loads.max() > 0:
        np.testing.assert_allclose(coils["diversity_factor"], 1.0, rtol=1e-12)


def test_worked_example_two_coils_peaking_apart():
    table = diversity_table([COIL_A, COIL_B]).set_index("level")
    # hand computation above: sum of peaks 180 kW, coincident 100 kW at hour 0, factor 1.8
    assert table.loc["coils", "sum_of_peaks_kW"] == pytest.approx(180.0)
    assert table.loc["coils", "coincident_peak_kW"] == pytest.approx(100.0)
    assert table.loc["coils", "coincident_peak_hour"] == 0
    assert table.loc["coils", "diversity_factor"] == pytest.approx(1.8)
    assert table.loc["coils", "coincidence_factor"] == pytest.approx(100.0 / 180.0)


def test_distribution_gain_scales_plant_load_and_plant_row():
    # 5 % gain: (1 + 5/100) x hourly sum, hand computation: 105, 84, 105 kW
    plant = plant_load_from_coil_loads([COIL_A, COIL_B], distribution_gain_percent=5.0)
    np.testing.assert_allclose(plant, [105.0, 84.0, 105.0])
    table = diversity_table([COIL_A, COIL_B], distribution_gain_percent=5.0).set_index("level")
    assert table.loc["plant", "coincident_peak_kW"] == pytest.approx(105.0)
    assert table.loc["plant", "sum_of_peaks_kW"] == pytest.approx(189.0)  # 180 x 1.05
    assert table.loc["plant", "diversity_factor"] == pytest.approx(1.8)


def test_zone_block_load_beside_coil_peaks():
    # Zones: block load = peak of the zone sum. Zone 1 = [60, 10, 40], zone 2 = [20, 50, 30]:
    # sums 80, 60, 70 -> block load 80 kW at hour 0; sum of zone peaks 60 + 50 = 110 kW (by hand).
    zones = {"zone 1": [60.0, 10.0, 40.0], "zone 2": [20.0, 50.0, 30.0]}
    table = diversity_table([COIL_A, COIL_B], zone_loads=zones)
    assert list(table["level"]) == ["zones", "coils", "plant"]
    row = table.set_index("level").loc["zones"]
    assert row["coincident_peak_kW"] == pytest.approx(80.0)
    assert row["sum_of_peaks_kW"] == pytest.approx(110.0)
    assert row["units"] == 2


def test_peak_table_shows_load_of_each_unit_at_coincident_peak():
    table = peak_table({"outdoor-air unit": COIL_A, "recirculating unit": COIL_B})
    # coincident peak hour is 0 (hand computation above): A carries 100 kW, B 0 kW then
    assert list(table["unit"]) == ["outdoor-air unit", "recirculating unit"]
    np.testing.assert_allclose(table["peak_kW"], [100.0, 80.0])
    np.testing.assert_array_equal(table["peak_hour"], [0, 1])
    np.testing.assert_allclose(table["load_at_coincident_peak_kW"], [100.0, 0.0])
    np.testing.assert_allclose(table["share_of_coincident_peak"], [1.0, 0.0])


def test_heating_plant_from_preheat_and_reheat_coils():
    # A heating plant adds preheat and reheat coil loads the same way; by hand with a 2 % pipe
    # loss: (200 + 30) x 1.02 = 234.6, (150 + 40) x 1.02 = 193.8, (0 + 60) x 1.02 = 61.2 kW.
    preheat = np.array([200.0, 150.0, 0.0])
    reheat = np.array([30.0, 40.0, 60.0])
    plant = plant_load_from_coil_loads([preheat, reheat], distribution_gain_percent=2.0)
    np.testing.assert_allclose(plant, [234.6, 193.8, 61.2])


def test_all_input_forms_agree():
    expected = COIL_A + COIL_B  # hourly sum by definition
    forms = [
        [COIL_A, COIL_B],
        np.column_stack([COIL_A, COIL_B]),
        {"a": COIL_A, "b": COIL_B},
        pd.DataFrame({"a": COIL_A, "b": COIL_B}),
    ]
    for form in forms:
        np.testing.assert_allclose(coincident_load(form), expected)
    _, names = load_matrix(pd.DataFrame({"a": COIL_A, "b": COIL_B}))
    assert names == ["a", "b"]
    # a single 1-D series is one unit
    np.testing.assert_allclose(coincident_load(COIL_A), COIL_A)


def test_all_zero_loads_give_nan_factors():
    # 0/0: the diversity of a plant without load is undefined (documented as NaN)
    table = diversity_table(np.zeros((5, 2)))
    assert table["diversity_factor"].isna().all()


def test_mismatched_hours_raise_naming_the_unit():
    with pytest.raises(InputRangeError) as info:
        plant_load_from_coil_loads([np.zeros(8760), np.zeros(8759)])
    assert info.value.field == "coil_loads[1]"
    assert "8759" in str(info.value) and "8760" in str(info.value)


def test_zone_and_coil_hours_must_match():
    with pytest.raises(InputRangeError) as info:
        diversity_table([COIL_A], zone_loads=[np.zeros(4)])
    assert info.value.field == "zone_loads"


def test_negative_or_nan_load_raises():
    with pytest.raises(InputRangeError) as info:
        plant_load_from_coil_loads([COIL_A, np.array([1.0, -2.0, 3.0])])
    assert info.value.field == "coil_loads[1]"
    assert "0 to +inf kW" in info.value.allowed
    with pytest.raises(InputRangeError):
        coincident_load([np.array([1.0, np.nan, 3.0])])


def test_bad_distribution_gain_raises_with_range():
    with pytest.raises(InputRangeError) as info:
        plant_load_from_coil_loads([COIL_A], distribution_gain_percent=-1.0)
    assert info.value.field == "distribution_gain_percent"
    assert info.value.allowed == "0 to 100 %"


def test_wrong_number_of_names_raises():
    with pytest.raises(InputRangeError) as info:
        peak_table([COIL_A, COIL_B], names=["only one"])
    assert info.value.field == "names"


def test_non_numeric_input_raises_input_range_error():
    with pytest.raises(InputRangeError):
        coincident_load([["a", "b"]])
    with pytest.raises(InputRangeError):
        coincident_load(42)
