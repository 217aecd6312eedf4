"""Staging on efficiency: today's rule at f = 1, a staging fraction, the power rule, flow."""

import numpy as np
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from plantside.plant.efficient_staging import stage_on_efficiency
from plantside.plant.staging import stage_machines


@given(
    arrays(float, 48, elements=st.floats(0.0, 1500.0)),
    st.lists(st.floats(50.0, 800.0), min_size=1, max_size=4),
)
def test_fraction_one_without_power_rule_is_todays_rule(loads, capacities):
    # Project rule (DEVELOPERS.md, staging): f = 1 must reproduce stage_machines exactly.
    today = stage_machines(loads, capacities, 0.15)
    new = stage_on_efficiency(loads, capacities, 0.15, staging_fraction=1.0).staging
    assert np.array_equal(today.machines_running, new.machines_running)
    assert np.array_equal(today.part_load_ratio, new.part_load_ratio)
    assert np.array_equal(today.unmet_load, new.unmet_load)


def test_staging_fraction_starts_the_next_machine_early():
    # Two 500 kW machines, f = 0.8: the second starts above 400 kW (0.8 x 500); at 790 and
    # 900 kW the load alone needs two, so only 401 kW is an extra start for the fraction.
    loads = np.array([100.0, 400.0, 401.0, 790.0, 900.0])
    result = stage_on_efficiency(loads, [500.0, 500.0], 0.15, staging_fraction=0.8)
    assert result.staging.machines_running.tolist() == [1, 1, 2, 2, 2]
    assert result.extra_for_fraction.tolist() == [False, False, True, False, False]
    table = result.staging.hours_by_machines_running()
    assert table["hours"].tolist() == [0, 2, 3]


def test_two_running_use_less_power_than_one():
    # A machine whose input is 0.1 + 0.9 PLR² of its capacity (an illustrative curve):
    # at 500 kW one 500 kW machine takes 500 kW, two take 1000 x (0.1 + 0.9/4) = 325 kW,
    # so two run; at 100 kW one takes 68 kW, two take 109 kW, so one runs.
    def input_power(load, capacity):
        plr = np.minimum(load / capacity, 1.0)
        return capacity * (0.1 + 0.9 * plr**2)

    loads = np.array([100.0, 500.0, 100.0, 500.0])
    result = stage_on_efficiency(loads, [500.0, 500.0], 0.15, input_power=input_power)
    assert result.staging.machines_running.tolist() == [1, 2, 1, 2]
    assert result.extra_for_efficiency.tolist() == [False, True, False, True]
    # starts counted from the hourly stage changes: 1 (first hour) + 1 + 1
    assert result.summary()["machine_starts"] == 3


def test_machines_needed_for_flow():
    result = stage_on_efficiency([100.0, 300.0], [500.0, 500.0], 0.15, minimum_machines=[2, 3])
    assert result.staging.machines_running.tolist() == [2, 2]
    assert result.summary()["hours_extra_for_flow"] == 2
