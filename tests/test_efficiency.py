"""Tests of plantside.plant.efficiency: AHRI IPLV and the project-weighted efficiency.

IPLV: AHRI Standard 550/590 (I-P)-2020, section 5.4 (and 551/591 (SI)): weights 1 %, 42 %,
45 %, 12 % at 100, 75, 50, 25 % load; IPLV = 0.01A + 0.42B + 0.45C + 0.12D for COP or EER,
IPLV = 1 / (0.01/A + 0.42/B + 0.45/C + 0.12/D) for kW/ton.
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from plantside.constants import KW_PER_TON, W_PER_BTUH
from plantside.errors import InputRangeError
from plantside.plant.efficiency import (
    IPLV_LOAD_POINTS,
    IPLV_WEIGHTS,
    cop_from_efficiency,
    efficiency_from_cop,
    input_power_ratio_from_part_load_ratio,
    integrated_part_load_value,
    iplv_band_weights,
    project_weighted_efficiency,
)
from plantside.plant.staging import stage_machines

# A fictional water-cooled chiller whose efficiencies are given (not a catalogue machine):
# kW/ton at 100 / 75 / 50 / 25 % load.
KW_PER_TON_POINTS = [0.70, 0.58, 0.50, 0.54]


def test_published_weights_and_points():
    # AHRI 550/590 (I-P)-2020 section 5.4: A..D at 100/75/50/25 % with 0.01/0.42/0.45/0.12
    assert IPLV_LOAD_POINTS == (1.00, 0.75, 0.50, 0.25)
    assert IPLV_WEIGHTS == (0.01, 0.42, 0.45, 0.12)
    assert sum(IPLV_WEIGHTS) == pytest.approx(1.0)


def test_iplv_cop_form_worked_by_hand():
    # COP A..D = 5.0, 6.0, 7.0, 6.5 (given). By hand, AHRI 550/590 section 5.4:
    # 0.01 x 5.0 + 0.42 x 6.0 + 0.45 x 7.0 + 0.12 x 6.5 = 0.05 + 2.52 + 3.15 + 0.78 = 6.50
    assert integrated_part_load_value([5.0, 6.0, 7.0, 6.5], "cop") == pytest.approx(6.50, abs=1e-12)
    # EER is weighted the same way (higher is better): 10, 12, 14, 13 Btu/(W h) -> 13.0
    assert integrated_part_load_value([10.0, 12.0, 14.0, 13.0], "eer") == pytest.approx(13.0)


def test_iplv_kw_per_ton_form_worked_by_hand():
    # kW/ton A..D = 0.70, 0.58, 0.50, 0.54 (given). By hand, AHRI 550/590 section 5.4 kW/ton form:
    #   0.01/0.70 = 0.0142857   0.42/0.58 = 0.7241379   0.45/0.50 = 0.9000000
    #   0.12/0.54 = 0.2222222   sum = 1.8606458         IPLV = 1/1.8606458 = 0.53745 kW/ton
    assert integrated_part_load_value(KW_PER_TON_POINTS, "kw_per_ton") == pytest.approx(
        0.53745, abs=5e-6
    )
    # The arithmetic weighting of kW/ton (the wrong form) would give, by hand,
    # 0.007 + 0.2436 + 0.225 + 0.0648 = 0.5404 kW/ton: the function must not return that.
    wrong = float(np.dot(IPLV_WEIGHTS, KW_PER_TON_POINTS))
    assert abs(wrong - integrated_part_load_value(KW_PER_TON_POINTS, "kw_per_ton")) > 1e-3


@settings(max_examples=100, deadline=None)
@given(st.lists(st.floats(1.0, 12.0), min_size=4, max_size=4))
def test_kw_per_ton_iplv_is_the_reciprocal_form_of_the_cop_iplv(cops):
    # The two forms of AHRI 550/590 5.4 describe one machine: kW/ton = 3.517 / COP
    # (1 ton = 12,000 Btu/h, AHRI 550/590), so IPLV_kW/ton = 3.517 / IPLV_COP exactly.
    kw_per_ton = KW_PER_TON / np.asarray(cops)
    from_cop = KW_PER_TON / integrated_part_load_value(cops, "cop")
    assert integrated_part_load_value(kw_per_ton, "kw_per_ton") == pytest.approx(from_cop)
    eer = np.asarray(cops) / W_PER_BTUH
    assert integrated_part_load_value(eer, "eer") * W_PER_BTUH == pytest.approx(
        integrated_part_load_value(cops, "cop")
    )


def test_iplv_vectorised_over_machines():
    table = np.array([[5.0, 6.0, 7.0, 6.5], [4.0, 4.0, 4.0, 4.0]])
    # equal efficiencies at every point give that efficiency (weights sum to 1)
    np.testing.assert_allclose(integrated_part_load_value(table, "cop"), [6.5, 4.0])


def test_unit_conversions():
    # 1 ton = 12,000 Btu/h = 3.516853 kW (AHRI 550/590); 0.6 kW/ton -> COP 5.8614;
    # EER 10 Btu/(W h) -> COP 10 / 3.412142 = 2.9307 (NIST SP 811 Btu)
    assert cop_from_efficiency(0.6, "kw_per_ton") == pytest.approx(3.516853 / 0.6, rel=1e-6)
    assert cop_from_efficiency(10.0, "eer") == pytest.approx(10.0 / 3.412142, rel=1e-6)
    assert efficiency_from_cop(cop_from_efficiency(0.6, "kw_per_ton"), "kw_per_ton") == (
        pytest.approx(0.6)
    )


def test_input_power_at_rated_points_and_between():
    cops = [5.0, 6.0, 7.0, 6.5]
    # at a rated point x, P/capacity = x / COP(x): 1/5, 0.75/6, 0.5/7, 0.25/6.5 (definition)
    np.testing.assert_allclose(
        input_power_ratio_from_part_load_ratio([1.0, 0.75, 0.5, 0.25], cops),
        [0.2, 0.125, 0.5 / 7.0, 0.25 / 6.5],
        rtol=1e-12,
    )
    # linear in x between points (module notes): at 0.625, halfway between 0.5/7 and 0.125
    assert input_power_ratio_from_part_load_ratio(0.625, cops) == pytest.approx(
        0.5 * (0.5 / 7.0 + 0.125)
    )


def test_interpolation_does_not_depend_on_the_metric_entered():
    # Interpolating power makes COP and kW/ton entries of one machine give the same power
    x = np.linspace(0.0, 1.0, 41)
    cop_entry = KW_PER_TON / np.asarray(KW_PER_TON_POINTS)
    np.testing.assert_allclose(
        input_power_ratio_from_part_load_ratio(x, KW_PER_TON_POINTS, "kw_per_ton"),
        input_power_ratio_from_part_load_ratio(x, cop_entry, "cop"),
        rtol=1e-12,
    )


def test_below_lowest_point_cycling_and_constant():
    cops = [5.0, 6.0, 7.0, 6.5]
    # cycling: C_D = 1.13 - 0.13 LF, LF = x/0.25 (AHRI 550/590 5.4, from memory). At x = 0.125:
    # LF = 0.5, C_D = 1.065, P = 0.125 x 1.065 / 6.5 (by hand)
    cycling = input_power_ratio_from_part_load_ratio(0.125, cops, below_lowest="cycling")
    assert cycling == pytest.approx(0.125 * 1.065 / 6.5)
    constant = input_power_ratio_from_part_load_ratio(0.125, cops, below_lowest="constant")
    assert constant == pytest.approx(0.125 / 6.5)
    # continuous at 25 % (C_D = 1 at LF = 1) and zero at no load
    just_below = input_power_ratio_from_part_load_ratio(0.25 - 1e-12, cops)
    assert just_below == pytest.approx(0.25 / 6.5, rel=1e-9)
    assert input_power_ratio_from_part_load_ratio(0.0, cops) == 0.0
    # above 100 %: full-load efficiency held, P = x / COP_100
    assert input_power_ratio_from_part_load_ratio(1.2, cops) == pytest.approx(1.2 / 5.0)


def test_project_weighted_efficiency_worked_by_hand():
    # One 100 kW machine, COP 4, 5, 6, 5 at 100/75/50/25 %; 10 h at 100 kW and 30 h at 25 kW.
    # By hand: input = 10 x 100/4 + 30 x 25/5 = 250 + 150 = 400 kWh; cooling = 1000 + 750 =
    # 1750 kWh; average COP = 1750 / 400 = 4.375. Energy weights: 100 % band 1000/1750,
    # 25 % band 750/1750; hours weights 10/40 and 30/40.
    loads = np.concatenate([np.full(10, 100.0), np.full(30, 25.0)])
    result = project_weighted_efficiency(loads, 100.0, [4.0, 5.0, 6.0, 5.0], "cop")
    assert result.cooling_energy == pytest.approx(1750.0)
    assert result.input_energy == pytest.approx(400.0)
    assert result.average_cop == pytest.approx(4.375)
    weights = result.weights.set_index("rating_point_percent")
    np.testing.assert_allclose(
        weights["building_energy_weight"], [1000 / 1750, 0.0, 0.0, 750 / 1750]
    )
    np.testing.assert_allclose(weights["building_hours_weight"], [0.25, 0.0, 0.0, 0.75])
    np.testing.assert_allclose(weights["standard_weight"], IPLV_WEIGHTS)
    # rated IPLV with the AHRI weights: 0.04 + 2.1 + 2.7 + 0.6 = 5.44 (by hand)
    assert result.rated_iplv == pytest.approx(5.44)
    # project IPLV with the building's energy weights: 4 x 4/7 + 5 x 3/7 = 31/7 (by hand)
    assert result.project_iplv == pytest.approx(31.0 / 7.0)


def test_constant_half_load_gives_the_half_load_efficiency():
    # A machine at exactly 50 % every hour uses its 50 % efficiency C (definition): all weight in
    # the 50 % band, average = C = 0.50 kW/ton, project IPLV = C.
    result = project_weighted_efficiency(
        np.full(100, 250.0), 500.0, KW_PER_TON_POINTS, "kw_per_ton"
    )
    assert result.average_efficiency == pytest.approx(0.50)
    assert result.project_iplv == pytest.approx(0.50)
    assert result.rated_iplv == pytest.approx(0.53745, abs=5e-6)  # hand computation above
    assert result.to_dict()["cooling_energy_kWh"] == pytest.approx(25000.0)


def test_band_mapping_edges():
    # Nearest rating point, upper edge included (module notes): 0.375 -> 25 % point,
    # 0.3751 -> 50 %, 0.625 -> 50 %, 0.875 -> 75 %, 0.9 -> 100 %; 0 kW is not a running hour.
    loads = np.array([0.0, 37.5, 37.51, 62.5, 87.5, 90.0])
    table = iplv_band_weights(loads, 100.0).set_index("rating_point_percent")
    np.testing.assert_array_equal(table["hours"].loc[[100.0, 75.0, 50.0, 25.0]], [1, 1, 2, 1])


def test_staged_plant_machines_feed_the_project_weighting():
    # Two 500 kW machines staged over a load series; the project weighting pools both machines'
    # hours. Cooling energy equals the served staging energy (energy balance, definition).
    loads = np.array([100.0, 300.0, 600.0, 900.0, 1000.0])
    staged = stage_machines(loads, [500.0, 500.0], 0.1)
    result = project_weighted_efficiency(staged.machine_load, staged.capacities, [5, 6, 7, 6.5])
    assert result.cooling_energy == pytest.approx(staged.summary()["served_energy_kWh"])
    assert result.input_power.shape == (5, 2)
    assert result.weights["hours"].sum() == staged.summary()["machine_hours"]


def test_bad_inputs_raise():
    with pytest.raises(InputRangeError) as info:
        integrated_part_load_value([5.0, 6.0, 7.0], "cop")
    assert info.value.field == "efficiencies"
    with pytest.raises(InputRangeError) as info:
        integrated_part_load_value([5.0, 0.0, 7.0, 6.0], "cop")
    assert info.value.field == "efficiencies"
    with pytest.raises(InputRangeError) as info:
        integrated_part_load_value([5.0, 6.0, 7.0, 6.0], "ikw")
    assert info.value.field == "metric"
    with pytest.raises(InputRangeError) as info:
        integrated_part_load_value([5.0, 6.0, 7.0, 6.0], "cop", weights=[0.5, 0.5, 0.5, 0.0])
    assert info.value.field == "weights"
    with pytest.raises(InputRangeError) as info:
        input_power_ratio_from_part_load_ratio(0.5, [5, 6, 7, 6], below_lowest="off")
    assert info.value.field == "below_lowest"
    with pytest.raises(InputRangeError) as info:
        project_weighted_efficiency(np.ones((4, 2)), [100.0], [5, 6, 7, 6])
    assert info.value.field == "capacities"
    with pytest.raises(InputRangeError) as info:
        project_weighted_efficiency(np.ones(4), [-100.0], [5, 6, 7, 6])
    assert info.value.field == "capacities"
    with pytest.raises(InputRangeError) as info:
        project_weighted_efficiency(np.ones(4), 100.0, [5, 6, 7, 6], weights_basis="tons")
    assert info.value.field == "weights_basis"
