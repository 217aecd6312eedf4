"""The study charts' inputs (``plantside.charts.study_frames``): study results in, frames out.

The dashboard and ``plantside charts`` both frame their charts here; these tests check
that the dashboard's frames and stamp are exactly those the module gives for the
scenario's own inputs, and that the frames carry the study's figures.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from plantside.charts.export import safe_filename
from plantside.charts.study_frames import (
    CHARTS,
    chart_frames,
    study_chart,
    study_chart_views,
    view_stamp,
    year_table,
)
from plantside.dashboard.app import Dashboard
from plantside.study.figures import (
    climate_label,
    first_recirculating_unit,
    outdoor_air_fraction_of,
)
from plantside.study.run import run_study
from plantside.study.scenario import load_scenario

EXAMPLES = Path(__file__).resolve().parents[1] / "example_data" / "scenarios"
#: 1 ton of refrigeration = 3.516853 kW (AHRI 550/590, NIST SP 811).
KW_PER_TON = 3.516853


@pytest.fixture(scope="module")
def study():
    scenario = load_scenario(EXAMPLES / "quillon_clinic.toml")  # written in IP
    result = run_study(scenario)
    views = study_chart_views(result, climate_label(scenario), first_recirculating_unit(scenario))
    return scenario, result, views


def test_views_are_the_plant_then_each_air_handler(study):
    scenario, result, views = study
    assert [index for index, _ in views] == [None, *range(len(scenario.air_handlers))]
    assert views[0][1].plant and not any(view.plant for _, view in views[1:])
    for index, view in views[1:]:
        assert view.unit is result.air_handlers[index]


def test_plant_frames_carry_the_study_figures(study):
    _, result, views = study
    view = views[0][1]
    figures = view.figures
    # the plant's figures are the cooling plant's (one calculation)
    assert figures.design_coil_load == result.cooling.design_load
    assert figures.recommended_capacity == result.cooling.design_capacity
    design = chart_frames("design", view, "IP")["frame"]
    # the plant's waterfall ends on the plant load (coils plus distribution gain), so named
    assert "Coil load" not in set(design["component"])
    plant = design.loc[design["component"] == "Plant load", "load"].iloc[-1]
    # tolerance: the 7 significant figures of the ton quoted above
    assert plant == pytest.approx(figures.design_coil_load / KW_PER_TON, rel=1e-6)
    lines = chart_frames("distribution", view, "SI")["lines"]
    capacity = lines.loc[lines["kind"] == "capacity", "load"].iloc[0]
    assert capacity == pytest.approx(sum(figures.machine_capacities), rel=1e-12)
    # the machines share the recommended capacity as the first option's fractions say
    fractions = result.scenario.cooling_options[0].capacity_fractions
    assert sum(figures.machine_capacities) == pytest.approx(
        figures.recommended_capacity * sum(fractions), rel=1e-12
    )
    table = year_table(view)
    np.testing.assert_array_equal(table["coil_total_kW"].to_numpy(), result.cooling.hourly_load)
    # the plant's year: its hours are not coloured by one air handler's economizer mode,
    # and what is left out is said to be the hours with no plant load, counted as the
    # load-distribution chart beside it counts them (the page read 761 h on one, 772 h on
    # the other: load > 0 against load above 0.1 % of the peak)
    year = chart_frames("year", view, "SI")["frame"]
    assert set(year["mode"]) == {"Hours with plant load"}
    assert year.attrs["off_label"] == "hours with no plant load"
    bins = chart_frames("distribution", view, "SI")["bins"]
    no_load = int(bins.loc[bins["band"] == "no load", "hours"].iloc[0])
    assert year.attrs["hours_off"] == no_load == int((~table["operating"]).sum())
    assert no_load > int((result.cooling.hourly_load <= 0).sum())  # the threshold counts
    spec = study_chart("year", chart_frames("year", view, "SI"), "SI", view).to_dict()
    # (unpinned, the plant's axis read "Coil total load": only the A/B panels were told)
    assert "plant = zone" in str(spec) and "coil = zone" not in str(spec)
    assert "Plant load [kW]" in str(spec) and "Coil total load" not in str(spec)
    # the stage lines and the weights name the plant option they stage
    option = result.scenario.cooling_options[0].name
    stages = lines.loc[lines["kind"] == "stage", "line"]
    assert len(stages) and all(line.endswith(f"({option})") for line in stages)
    weights = chart_frames("distribution", view, "SI")["weights"]
    assert weights.attrs["option"] == option


def test_one_air_handler_has_a_coil_capacity_not_a_plant_capacity(study):
    view = study[2][1][1]
    lines = chart_frames("distribution", view, "SI")["lines"]
    names = set(lines.loc[lines["kind"] == "capacity", "line"])
    assert names == {"Recommended coil capacity"}
    design = chart_frames("design", view, "SI")["frame"]
    assert "Coil load" in set(design["component"])


def test_unknown_chart_is_refused(study):
    with pytest.raises(KeyError, match="unknown chart"):
        chart_frames("pie", study[2][0][1], "SI")


@pytest.mark.parametrize("view_name", ["plant", "air_handler"])
def test_dashboard_frames_and_stamp_are_the_modules(study, view_name):
    scenario, _, views = study
    index = first_recirculating_unit(scenario)
    dashboard = Dashboard(scenario, view=view_name, air_handler=index)
    view = views[0][1] if view_name == "plant" else views[index + 1][1]
    system = dashboard.state.inputs.unit_system
    for name in CHARTS:
        ours = chart_frames(name, view, system)
        shown = dashboard._frames(name, dashboard.state.result, system)
        assert ours.keys() == shown.keys()
        for key in ours:
            pd.testing.assert_frame_equal(ours[key], shown[key])
        chart = study_chart(name, ours, system, view)
        assert chart.to_dict()["title"] == dashboard.chart_specs[name].to_dict()["title"]
    stamp = dashboard.stamp()
    when = re.search(r"\d{4}-\d\d-\d\d \d\d:\d\d", stamp)[0]
    assert view_stamp(scenario, view, when) == stamp


def test_safe_filename_keeps_no_folder():
    # the rule of the module: letters, digits, dot, dash, underscore and space only
    assert safe_filename("../../etc/passwd") == "_.._etc_passwd"
    assert safe_filename("AHU 1/east") == "AHU 1_east"
    assert safe_filename("") == "plantside-export"


def test_a_unit_without_return_air_is_drawn_at_its_own_fraction_and_says_why(study):
    # the example's OA-1 takes 100 % outdoor air (scenario file): its sweep is one point
    _, result, views = study
    index = next(
        i
        for i, unit in enumerate(result.scenario.air_handlers)
        if outdoor_air_fraction_of(unit.settings) == 1.0
    )
    view = views[index + 1][1]
    frames = chart_frames("sweep", view, "SI")
    assert set(frames["sweep"]["outdoor_air_percent"]) == {100.0}  # not at 0 %, as drawn before
    chart = study_chart("sweep", frames, "SI", view).to_dict()
    assert "no return air" in " ".join(chart["title"]["subtitle"])
    # its value labels sit left of the markers, clear of the legend on the right
    assert {row["label_side"] for row in chart["datasets"]["marker"]} == {"left"}
