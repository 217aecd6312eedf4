"""Tests of plantside.plant.staging: sequencing N machines and comparing plant options.

Expected values are worked by hand from the staging rule stated in the module notes of
plantside.plant.staging (a planning rule of our own; common practice, no source).
"""

import time

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from plantside.errors import InputRangeError
from plantside.plant.part_load import no_load_threshold_from_loads, part_load_bins
from plantside.plant.staging import (
    PlantOption,
    compare_plant_options,
    compare_stage_hours,
    stage_machines,
)

# Loads [kW] against 2 x 500 kW machines with 20 % turndown (no-load threshold 0.1 % of the
# 1200 kW peak = 1.2 kW). By hand, with the rule:
#   load   machines  PLR     note
#      0   0         0       no load
#     50   1         0.10    below turndown (0.10 < 0.20) and below the 100 kW lowest steady load
#    100   1         0.20    exactly at turndown: not below
#    400   1         0.80
#    500   1         1.00    the lead alone can meet 500 kW: no stage-up
#    501   2         0.501
#    900   2         0.90
#   1000   2         1.00
#   1200   2         1.00    200 kW unmet
LOADS = np.array([0.0, 50.0, 100.0, 400.0, 500.0, 501.0, 900.0, 1000.0, 1200.0])
EXPECTED_RUNNING = [0, 1, 1, 1, 1, 2, 2, 2, 2]
EXPECTED_PLR = [0.0, 0.1, 0.2, 0.8, 1.0, 0.501, 0.9, 1.0, 1.0]


def test_worked_example_two_equal_machines():
    result = stage_machines(LOADS, [500.0, 500.0], 0.2)
    np.testing.assert_array_equal(result.machines_running, EXPECTED_RUNNING)
    np.testing.assert_allclose(result.part_load_ratio, EXPECTED_PLR, rtol=1e-12)
    np.testing.assert_allclose(result.unmet_load, [0, 0, 0, 0, 0, 0, 0, 0, 200.0])
    np.testing.assert_array_equal(result.below_turndown, [0, 1, 0, 0, 0, 0, 0, 0, 0])
    np.testing.assert_array_equal(result.below_lowest_stable_load, [0, 1, 0, 0, 0, 0, 0, 0, 0])
    # machine 2 carries 0.501 x 500 = 250.5 kW at 501 kW (equal shares)
    np.testing.assert_allclose(result.machine_load[5], [250.5, 250.5])
    hours = result.hours_by_machines_running().set_index("machines_running")["hours"]
    assert list(hours) == [1, 4, 4]
    summary = result.summary()
    assert summary["hours_with_load"] == 8
    assert summary["unmet_hours"] == 1 and summary["unmet_energy_kWh"] == pytest.approx(200.0)
    assert summary["lowest_stable_load_kW"] == pytest.approx(100.0)  # 0.2 x 500
    assert summary["hours_below_turndown"] == 1
    # starts: 0 -> 1 at hour 1, 1 -> 2 at hour 5 (hourly changes): 2
    assert summary["machine_starts"] == 2
    assert summary["machine_hours"] == 12  # 4 x 1 + 4 x 2
    assert summary["peak_met_with_largest_out"] is False  # 500 kW < 1200 kW peak


def test_unequal_machines_share_in_proportion_to_capacity():
    # 400 kW lead + 600 kW lag, 450 kW load: the lead alone (400) cannot meet it, so both run at
    # 450 / 1000 = 0.45: 180 kW and 270 kW (by hand).
    result = stage_machines([450.0, 300.0], [400.0, 600.0], 0.15)
    np.testing.assert_array_equal(result.machines_running, [2, 1])
    np.testing.assert_allclose(result.machine_load[0], [180.0, 270.0])
    np.testing.assert_allclose(result.machine_load[1], [300.0, 0.0])  # lead alone at 0.75


def test_turndown_under_the_sequence_versus_lowest_steady_load():
    # 100 kW lead (20 % turndown) + 900 kW lag (30 %), load 150 kW: both run at 0.15, below the
    # lag's 0.30 -> below turndown under this order; but the lead alone could carry 20..100 kW,
    # so 150 kW is not below the plant's lowest steady load min(0.2 x 100, 0.3 x 900) = 20 kW.
    result = stage_machines([150.0, 10.0], [100.0, 900.0], [0.2, 0.3])
    np.testing.assert_array_equal(result.below_turndown, [True, True])
    np.testing.assert_array_equal(result.below_lowest_stable_load, [False, True])
    machines = result.machine_table()
    # lead: below at 0.15 and at 0.10 (10 kW alone); lag: below only at 0.15 (by hand)
    np.testing.assert_array_equal(machines["hours_below_turndown"], [2, 1])
    cautions = " ".join(result.cautions())
    assert "further hour(s)" in cautions and "licensed engineer" in cautions


@settings(max_examples=120, deadline=None)
@given(
    arrays(float, st.integers(1, 300), elements=st.floats(0, 3000, allow_nan=False)),
    st.lists(st.floats(10.0, 1500.0), min_size=1, max_size=5),
    st.floats(0.0, 1.0),
)
def test_staging_hours_sum_to_hours_with_load_and_energy_balances(loads, capacities, turndown):
    result = stage_machines(loads, capacities, turndown)
    threshold = no_load_threshold_from_loads(loads)
    hours = result.hours_by_machines_running()
    # hours with 1..N machines = hours with load (issue 5 test); all rows = all hours
    assert hours["hours"][1:].sum() == (loads > threshold).sum()
    assert hours["hours"].sum() == loads.size
    # energy balance: served + unmet + below-threshold = load energy (definition)
    s = result.summary()
    total = s["served_energy_kWh"] + s["unmet_energy_kWh"] + s["no_load_energy_kWh"]
    assert total == pytest.approx(loads.sum(), rel=1e-9, abs=1e-6)
    # a machine never runs above 100 %, and only the first n run
    assert np.all(result.part_load_ratio <= 1.0)
    # machine bins partition each machine's running hours and energy
    bins = result.machine_part_load_bins()
    by_machine = bins.groupby("machine")[["hours", "energy_kWh"]].sum()
    table = result.machine_table()
    np.testing.assert_array_equal(by_machine["hours"], table["running_hours"])
    np.testing.assert_allclose(by_machine["energy_kWh"], table["energy_kWh"], rtol=1e-9, atol=1e-6)


def test_plant_option_from_fractions_and_description():
    # 2 x 50 % of 1000 kW is two 500 kW machines; 40 % + 60 % is 400 + 600 kW (arithmetic)
    option = PlantOption.from_fractions("2 x 50 %", 1000.0, [0.5, 0.5], 0.15)
    assert option.capacities == (500.0, 500.0)
    assert option.minimum_turndown == (0.15, 0.15)
    assert option.description == "2 x 500 kW"
    assert option.total_capacity == 1000.0
    mixed = PlantOption("40/60", (400.0, 600.0), (0.1, 0.2))
    assert mixed.description == "400 kW + 600 kW"


def _year(seed=11):
    """A fictional year of plant loads [kW] (synthetic, for shapes and totals only)."""
    hours = np.arange(8760)
    season = 0.55 - 0.45 * np.cos(2 * np.pi * hours / 8760.0)
    day = 0.35 + 0.65 * np.clip(np.sin(np.pi * ((hours % 24) - 6) / 14.0), 0.0, None)
    noise = np.random.default_rng(seed).normal(0.0, 40.0, hours.size)
    loads = np.clip(950.0 * season * day + noise, 0.0, None)
    loads[(hours % 24) < 5] = 0.0  # plant off at night
    return loads


OPTIONS = [
    PlantOption.from_fractions("2 x 50 %", 1000.0, [0.5, 0.5], 0.15),
    PlantOption.from_fractions("3 x 33 %", 1000.0, [1 / 3] * 3, 0.15),
    PlantOption("40 % lead + 60 %", (400.0, 600.0), (0.10, 0.20)),
    PlantOption("60 % lead + 40 %", (600.0, 400.0), (0.20, 0.10)),
]


def test_compare_plant_options_table():
    loads = _year()
    table = compare_plant_options(loads, OPTIONS)
    assert list(table["option"]) == [o.name for o in OPTIONS]
    # one no-load threshold for every option, so hours with load agree across the table
    assert table["hours_with_load"].nunique() == 1
    assert (table["hours_with_load"] == (loads > 0.001 * loads.max()).sum()).all()
    # same total capacity, so the same unmet energy for every option (rule 3)
    np.testing.assert_allclose(table["unmet_energy_kWh"], table["unmet_energy_kWh"][0])
    # lowest steady load: 0.15 x 500 = 75, 0.15 x 333.3 = 50, min(40, 120) = 40 kW (by hand)
    np.testing.assert_allclose(table["lowest_stable_load_kW"], [75.0, 50.0, 40.0, 40.0])
    long = compare_stage_hours(loads, OPTIONS)
    assert set(long["option"]) == {o.name for o in OPTIONS}
    sums = long[long["machines_running"] > 0].groupby("option", sort=False)["hours"].sum()
    np.testing.assert_array_equal(sums.to_numpy(), table["hours_with_load"].to_numpy())


def test_bad_inputs_raise_naming_field_and_range():
    with pytest.raises(InputRangeError) as info:
        stage_machines([1.0], [500.0, -1.0], 0.2)
    assert info.value.field == "capacities"
    with pytest.raises(InputRangeError) as info:
        stage_machines([1.0], [500.0], 1.5)
    assert info.value.field == "minimum_turndown"
    assert info.value.allowed.startswith("0 to 1")
    with pytest.raises(InputRangeError) as info:
        stage_machines([1.0], [500.0, 500.0], [0.1, 0.2, 0.3])
    assert info.value.field == "minimum_turndown"
    with pytest.raises(InputRangeError) as info:
        PlantOption("bad", (0.0,), 0.1)
    assert info.value.field == "capacities"
    with pytest.raises(InputRangeError) as info:
        compare_plant_options([1.0], [])
    assert info.value.field == "options"
    with pytest.raises(InputRangeError) as info:
        compare_plant_options([1.0], [OPTIONS[0], "2 x 50 %"])
    assert info.value.field == "options[1]"
    with pytest.raises(InputRangeError) as info:
        stage_machines([1.0, -3.0], [500.0], 0.1)
    assert info.value.field == "loads"


# --- benchmark: vectorised rule against a per-hour Python loop of the same rule -------------


def _loop_staging(loads, capacities, turndown, threshold, bands=10):
    """The staging rule of plantside.plant.staging written hour by hour (the baseline)."""
    machines = len(capacities)
    stage_hours = [0] * (machines + 1)
    bin_hours = [[0] * bands for _ in range(machines)]
    bin_energy = [[0.0] * bands for _ in range(machines)]
    lowest = min(t * c for t, c in zip(turndown, capacities, strict=True))
    unmet_hours, unmet_energy, below, below_lowest, starts, previous = 0, 0.0, 0, 0, 0, 0
    for q in loads.tolist():
        running = 0
        if q > threshold:
            total = 0.0
            for c in capacities:
                total += c
                running += 1
                if total >= q:
                    break
            ratio = min(q / total, 1.0)
            if q > total:
                unmet_hours += 1
                unmet_energy += q - total
            if ratio < max(turndown[:running]):
                below += 1
            if q < lowest:
                below_lowest += 1
            band = 0
            while band < bands - 1 and ratio > (band + 1) / bands:
                band += 1
            for j in range(running):
                bin_hours[j][band] += 1
                bin_energy[j][band] += ratio * capacities[j]
        stage_hours[running] += 1
        if running > previous:
            starts += running - previous
        previous = running
    return {
        "stage_hours": stage_hours,
        "bin_hours": bin_hours,
        "bin_energy": bin_energy,
        "unmet_hours": unmet_hours,
        "unmet_energy": unmet_energy,
        "below": below,
        "below_lowest": below_lowest,
        "starts": starts,
    }


def _loop_plant_bins(loads, capacity, threshold, bands=10):
    hours = [0] * (bands + 2)
    energy = [0.0] * (bands + 2)
    for q in loads.tolist():
        if q <= threshold:
            index = 0
        else:
            ratio = q / capacity
            index = bands + 1
            for k in range(1, bands + 1):
                if ratio <= k / bands:
                    index = k
                    break
        hours[index] += 1
        energy[index] += q
    return hours, energy


def _run_vectorised(loads, threshold):
    results = []
    for option in OPTIONS:
        staged = stage_machines(loads, option.capacities, option.minimum_turndown, threshold)
        results.append(
            (
                staged.hours_by_machines_running(),
                staged.machine_part_load_bins(),
                staged.summary(),
            )
        )
    table = compare_plant_options(loads, OPTIONS, threshold)
    bins = part_load_bins(loads, 1000.0, no_load_threshold=threshold)
    return results, table, bins


def _run_loop(loads, threshold):
    staged = [_loop_staging(loads, o.capacities, o.minimum_turndown, threshold) for o in OPTIONS]
    return staged, _loop_plant_bins(loads, 1000.0, threshold)


def _best_time(function, *args, repeats=3):
    """Best wall time [s] of `repeats` calls after one warm-up call, and the last result."""
    result = function(*args)
    best = float("inf")
    for _ in range(repeats):
        start = time.perf_counter()
        result = function(*args)
        best = min(best, time.perf_counter() - start)
    return best, result


@pytest.mark.benchmark
def test_benchmark_staging_and_bins_against_per_hour_loop():
    loads = _year()
    threshold = no_load_threshold_from_loads(loads)
    vectorised_seconds, vectorised = _best_time(_run_vectorised, loads, threshold)
    loop_seconds, looped = _best_time(_run_loop, loads, threshold)
    print(
        f"\nstaging + bins, 8760 h x {len(OPTIONS)} options (+ comparison table), best of 3: "
        f"vectorised {vectorised_seconds * 1e3:.1f} ms, per-hour loop {loop_seconds * 1e3:.1f} ms, "
        f"loop / vectorised = {loop_seconds / vectorised_seconds:.1f}"
    )
    results, table, bins = vectorised
    loop_staged, (loop_hours, loop_energy) = looped
    for (hours, machine_bins, summary), loop, row in zip(
        results, loop_staged, table.to_dict("records"), strict=True
    ):
        np.testing.assert_array_equal(hours["hours"], loop["stage_hours"])
        np.testing.assert_array_equal(machine_bins["hours"], np.ravel(loop["bin_hours"]))
        np.testing.assert_allclose(
            machine_bins["energy_kWh"], np.ravel(loop["bin_energy"]), rtol=1e-9, atol=1e-6
        )
        for key, loop_key in [
            ("unmet_hours", "unmet_hours"),
            ("hours_below_turndown", "below"),
            ("hours_below_lowest_stable_load", "below_lowest"),
            ("machine_starts", "starts"),
        ]:
            assert summary[key] == loop[loop_key] == row[key]
        assert summary["unmet_energy_kWh"] == pytest.approx(loop["unmet_energy"], abs=1e-6)
    np.testing.assert_array_equal(bins["hours"], loop_hours)
    np.testing.assert_allclose(bins["energy_kWh"], loop_energy, rtol=1e-9)


def test_a_running_machine_with_a_vanishing_load_is_binned_in_the_lowest_band():
    # Found by hypothesis: a load of 5e-324 kW with no threshold runs one machine whose
    # part-load ratio underflows to 0; it still counts one hour in the lowest band.
    result = stage_machines(np.array([5e-324]), [10.0], 0.0, no_load_threshold=0.0)
    bins = result.machine_part_load_bins()
    assert bins["hours"].sum() == 1
    assert bins.loc[bins["hours"] == 1, "lower_percent"].iloc[0] == 0.0
