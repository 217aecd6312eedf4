"""The dashboard's words: the plant's load is called the plant load, and every export's
file name says what it shows (the plant or which air handler).

The distribution gain (pumps and pipes) is added to the air handlers' coil loads to give
the load the plant meets (common practice; the contributor guide's register, "Distribution
gain as a fraction of the load"); a figure that includes it is the plant load.
"""

from __future__ import annotations

import pytest
from plantside.dashboard.app import Dashboard


@pytest.fixture(scope="module")
def plant():
    return Dashboard(view="plant")


@pytest.fixture(scope="module")
def unit():
    return Dashboard(view="air_handler")


def test_the_plant_page_calls_its_design_load_the_plant_load(plant, unit):
    assert plant.state.scenario.distribution_gain_percent > 0  # the gain is in the figure
    assert "Design plant load" in plant.figures.value
    assert "Design coil load" not in plant.figures.value
    assert "Design plant load" in plant.mini_figures.value
    assert "Design coil load" in unit.figures.value
    assert "Design plant load" not in unit.figures.value


def test_every_plant_card_that_includes_the_distribution_gain_says_plant(plant, unit):
    # the peak and the energy are the plant's load too (coil loads + distribution gain);
    # the cards read "Peak coil load, year" and "coil, whole year" while their
    # derivations said "Peak plant load, year"
    cards = plant.figures.value
    assert "Peak plant load, year" in cards and "Peak coil load" not in cards
    assert "plant, whole year" in cards and "coil, whole year" not in cards
    assert "Peak coil load, year" in unit.figures.value
    assert "coil, whole year" in unit.figures.value


def test_a_change_that_rounds_away_reads_plus_zero_not_minus_zero():
    # pinned A, then a move that changes the design zone load by less than 0.05 %
    dashboard = Dashboard(view="plant")
    dashboard.controls.widgets["pin"].click()
    dashboard.controls.widgets["outdoor_air_fraction"].value += 5
    assert "-0.0 %" not in dashboard.figures.value
    assert "</span> +0.0 % against A" in dashboard.figures.value  # the zone load did not move


def test_exports_of_the_plant_and_of_an_air_handler_have_their_own_names(plant, unit):
    names = {}
    for page, dashboard in (("plant", plant), ("unit", unit)):
        for chart in ("design", "psychrometric"):
            names[page, chart] = dashboard.export_chart(chart, "svg")
        names[page, "csv"] = dashboard.export_hourly_csv()
    shown = unit.state.result.unit.name.lower().replace(" ", "-")
    assert len(set(names.values())) == len(names), names
    assert "-plant-" in names["plant", "design"]
    assert names["unit", "design"].startswith(names["unit", "csv"].removesuffix("hourly.csv"))
    assert shown in names["unit", "design"]
    # the plant page's psychrometric chart is one air handler's: the name says which
    plant_unit = plant.state.result.unit.name.lower().replace(" ", "-")
    assert f"plant-{plant_unit}" in names["plant", "psychrometric"]
    assert f"plant-{plant_unit}" not in names["plant", "design"]
