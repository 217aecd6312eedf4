"""The cooling plant's morning pick-up allowance (plant.cooling_pickup_percent).

A unit whose fan is off when unoccupied lets its zone float up overnight; pulling it
down in the morning adds to the cooling plant's design. It is an allowance on the
coincident design load with its distribution gain, its own term (common practice, no
source: recovering in about an hour or two).
"""

from dataclasses import replace
from pathlib import Path

import pytest
from plantside.charts.design_breakdown_frames import design_breakdown_frame
from plantside.errors import ScenarioError
from plantside.study.figures import coincident_cooling_design, headline_figures
from plantside.study.run import run_study, study_summary
from plantside.study.scenario import (
    DEFAULT_PICKUP_PERCENT,
    dumps_scenario,
    load_scenario,
    loads_scenario,
)
from plantside.units import UnitSystem

SCENARIOS = Path(__file__).parent.parent / "example_data" / "scenarios"
KORVA = SCENARIOS / "korva_school_zone_file.toml"  # fan_schedule = "occupied"
CLINIC = SCENARIOS / "quillon_clinic.toml"  # fans run around the clock


@pytest.fixture(scope="module")
def korva():
    scenario = load_scenario(KORVA)
    return scenario, run_study(scenario)


def test_default_follows_the_fan_schedule():
    korva = load_scenario(KORVA)
    assert korva.cooling_pickup_percent is None  # the file does not state it
    assert any(s.settings.fan_schedule == "occupied" for s in korva.air_handlers)
    # the zone floats up while the fan is off: the common practice default applies
    assert korva.cooling_pickup_allowance_percent == DEFAULT_PICKUP_PERCENT == 10.0
    clinic = load_scenario(CLINIC)
    assert all(s.settings.fan_schedule != "occupied" for s in clinic.air_handlers)
    assert clinic.cooling_pickup_allowance_percent == 0.0  # nothing floats up
    # a stated value wins either way, 0 included
    assert replace(clinic, cooling_pickup_percent=7.5).cooling_pickup_allowance_percent == 7.5
    assert replace(korva, cooling_pickup_percent=0.0).cooling_pickup_allowance_percent == 0.0


def test_pickup_is_its_own_term_of_the_plant(korva):
    scenario, result = korva
    table = result.cooling.design_table
    factor = 1.0 + scenario.distribution_gain_percent / 100.0
    kind = str(table["plant_kW"].idxmax())
    row = table.loc[kind]
    # plant = coil x (1 + gain) x (1 + pickup): the allowance on the coil load with its
    # distribution gain, before the margin (common practice)
    assert row["pickup_percent"] == 10.0
    assert row["pickup_kW"] == pytest.approx(row["coil_total_kW"] * factor * 0.10, rel=1e-12)
    assert row["plant_kW"] == pytest.approx(row["coil_total_kW"] * factor * 1.10, rel=1e-12)
    assert result.cooling.design_load == pytest.approx(row["plant_kW"], rel=1e-12)
    # without the allowance the same units give the coil load with its gain only
    bare = coincident_cooling_design(result.air_handlers, scenario.distribution_gain_percent)
    assert bare.table.loc[kind, "pickup_kW"] == 0.0
    assert bare.table.loc[kind, "plant_kW"] == pytest.approx(row["coil_total_kW"] * factor)
    assert row["plant_kW"] - bare.table.loc[kind, "plant_kW"] == pytest.approx(row["pickup_kW"])


def test_summary_and_headline_carry_the_allowance(korva):
    scenario, result = korva
    summary = study_summary(result)
    plant = summary["cooling_plant"]
    assert plant["pickup_allowance_percent"] == 10.0
    loads = plant["design_loads_kW"]
    assert plant["design_load_kW"] == pytest.approx(loads["coil_total_kW"], rel=1e-12)
    assert loads["pickup_kW"] == pytest.approx(
        (loads["coil_total_kW"] - loads["pickup_kW"]) * 0.10, rel=1e-12
    )
    # capacity = design load x (1 + margin) (common practice), the pick-up inside it
    figures = headline_figures(scenario, result.air_handlers, result.conditions)
    assert figures.recommended_capacity == pytest.approx(
        plant["design_load_kW"] * (1.0 + scenario.cooling_margin_percent / 100.0)
    )
    # a clinic-like zero allowance leaves no pick-up term in the breakdown's sum
    none = headline_figures(
        replace(scenario, cooling_pickup_percent=0.0), result.air_handlers, result.conditions
    )
    assert none.design_loads["pickup_kW"] == 0.0
    assert figures.design_coil_load == pytest.approx(none.design_coil_load * 1.10, rel=1e-12)


@pytest.mark.parametrize("system", ["SI", "IP"])
def test_breakdown_has_a_morning_pickup_step_and_no_other(korva, system):
    scenario, result = korva
    figures = headline_figures(scenario, result.air_handlers, result.conditions)
    frame = design_breakdown_frame(figures.design_loads, system).set_index("component")
    assert "Other" not in frame.index  # the named steps add up to the plant load
    assert "Morning pick-up" in frame.index
    assert "Distribution gain" in frame.index or scenario.distribution_gain_percent == 0
    # the last step ends on the plant's design load
    assert frame.loc["Morning pick-up", "end"] == pytest.approx(frame.loc["Coil load", "load"])
    share = frame.loc["Morning pick-up", "load"] / frame.loc["Coil load", "load"]
    assert share == pytest.approx(0.10 / 1.10, rel=1e-9)  # pickup / (1 + pickup)


@pytest.mark.parametrize("system", [UnitSystem.SI, UnitSystem.IP])
def test_round_trip_in_both_unit_systems(system):
    scenario = replace(load_scenario(KORVA), unit_system=system, cooling_pickup_percent=12.5)
    text = dumps_scenario(scenario)
    assert "cooling_pickup_percent = 12.5" in text  # a percentage: the same in IP and SI
    again = loads_scenario(text, "again.toml", KORVA.parent)
    assert again.cooling_pickup_percent == 12.5
    assert dumps_scenario(again) == text
    # not stated: not written, so the default rule applies again on reading
    unstated = dumps_scenario(replace(scenario, cooling_pickup_percent=None))
    assert "cooling_pickup_percent" not in unstated


@pytest.mark.parametrize("value", [-1, 101])
def test_out_of_range_names_the_field(value):
    text = KORVA.read_text(encoding="utf-8").replace(
        "[plant]", f"[plant]\ncooling_pickup_percent = {value}", 1
    )
    with pytest.raises(ScenarioError, match=r"plant\.cooling_pickup_percent") as caught:
        loads_scenario(text, "bad.toml", KORVA.parent)
    assert "100" in str(caught.value)  # the allowed range, 0 to 100 %
