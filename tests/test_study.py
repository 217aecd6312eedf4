"""A whole study: coincident plant loads from several air handlers, design, sizing."""

import dataclasses
from pathlib import Path

import numpy as np
import pytest
from plantside.study.run import heating_load_columns, run_study, study_summary
from plantside.study.scenario import load_scenario

CLINIC = Path(__file__).parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"


@pytest.fixture(scope="module")
def clinic():
    return run_study(load_scenario(CLINIC))


def test_plant_load_is_the_coincident_sum_with_distribution_gain(clinic):
    gain = clinic.scenario.distribution_gain_percent
    coil_sum = sum(u.hourly["coil_total_kW"].to_numpy() for u in clinic.air_handlers)
    # Definition of the coincident plant load (issue 5): the hour-by-hour sum of coil loads
    # plus the distribution gain as a percentage.
    np.testing.assert_allclose(clinic.cooling.hourly_load, coil_sum * (1 + gain / 100), rtol=1e-12)
    heat_sum = sum(
        sum(u.hourly[c].to_numpy() for c in heating_load_columns) for u in clinic.air_handlers
    )
    np.testing.assert_allclose(clinic.heating.hourly_load, heat_sum * (1 + gain / 100), rtol=1e-12)


def test_coincident_peak_is_at_most_the_sum_of_peaks(clinic):
    sum_of_peaks = sum(u.hourly["coil_total_kW"].max() for u in clinic.air_handlers)
    gain = 1 + clinic.scenario.distribution_gain_percent / 100
    # A sum's maximum never exceeds the sum of maxima (triangle inequality).
    assert clinic.cooling.annual_peak <= sum_of_peaks * gain + 1e-9


def test_governing_design_condition_is_the_largest_coincident_sum(clinic):
    table = clinic.cooling.design_table
    assert clinic.cooling.design_load == pytest.approx(table["plant_kW"].max())
    for kind, row in table.iterrows():
        units = sum(
            u.cooling_design.points[kind].loads["coil_total_kW"] for u in clinic.air_handlers
        )
        assert row["coil_total_kW"] == pytest.approx(units)
    assert clinic.cooling.design_capacity == pytest.approx(
        clinic.cooling.design_load * (1 + clinic.scenario.cooling_margin_percent / 100)
    )


def test_identical_air_handlers_give_n_times_one():
    scenario = load_scenario(CLINIC)
    one = dataclasses.replace(scenario, air_handlers=scenario.air_handlers[1:2])
    spec = scenario.air_handlers[1]
    twins = tuple(
        dataclasses.replace(spec, settings=dataclasses.replace(spec.settings, name=f"AHU-{i}"))
        for i in range(3)
    )
    three = dataclasses.replace(scenario, air_handlers=twins)
    single, triple = run_study(one), run_study(three)
    # Issue 5: with identical units the coincident sum equals N times one.
    np.testing.assert_allclose(triple.cooling.hourly_load, 3 * single.cooling.hourly_load)
    assert triple.cooling.design_load == pytest.approx(3 * single.cooling.design_load)
    assert triple.heating.design_load == pytest.approx(3 * single.heating.design_load)


def test_staging_and_bins_add_up(clinic):
    bins = clinic.cooling.bins
    # Part-load bins add up to the year's energy and hours (issue 5).
    assert bins["energy_kWh"].sum() == pytest.approx(clinic.cooling.annual_energy, rel=1e-9)
    assert bins["hours"].sum() == clinic.weather.hours
    options = clinic.cooling.options
    assert list(options["option"]) == [o.name for o in clinic.scenario.cooling_options]
    stage = clinic.cooling.stage_hours
    for option, rows in stage.groupby("option"):
        with_load = options.set_index("option").loc[option, "hours_with_load"]
        assert rows.loc[rows["machines_running"] > 0, "hours"].sum() == with_load


def test_summary_is_finite_and_carries_the_cautions(clinic):
    summary = study_summary(clinic)
    assert any("licensed engineer" in c for c in summary["cautions"])
    assert summary["cooling_plant"]["design_capacity_kW"] > 0
    assert summary["heating_plant"]["design_capacity_kW"] > 0
    assert len(summary["air_handlers"]) == 3
