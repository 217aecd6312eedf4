"""The dashboard and the command line give the same plant figures for every example scenario.

The command line's figures are those of ``plantside design FILE --json`` (the study
layer's ``run_study`` and ``study_summary``); the dashboard's are those of its state
object with the scenario's inputs untouched (per-unit caching, its own orchestration).
Both must come from one calculation, so the figures must be equal to the last bit
(JSON keeps a float exactly). Besides, the plant figures are checked against the
rule they follow, from the per-unit numbers the command line prints.
"""

from __future__ import annotations

import contextlib
import io
import json
from pathlib import Path

import pytest
from plantside.cli.main import main
from plantside.dashboard.state import DashboardState
from plantside.dashboard.water_side_panel import WaterSidePanel
from plantside.study.scenario import load_scenario
from plantside.study.water_side_run import water_side_summary
from plantside.units import to_display

SCENARIOS = sorted(
    (Path(__file__).resolve().parents[1] / "example_data" / "scenarios").glob("*.toml")
)


#: Headline figure (the dashboard's) -> key of ``plantside design --json`` (the command
#: line's), for the plant and for one air handler.
PLANT_KEYS = {
    "design_coil_load": "design_load_kW",
    "governing_condition": "governing_condition",
    "recommended_capacity": "design_capacity_kW",
    "peak_coil_load": "annual_peak_kW",
    "cooling_energy": "annual_energy_kWh",
    "design_zone_load": "design_zone_kW",
    "hours_above_threshold": "hours_above_75_percent_of_capacity",
}
UNIT_KEYS = {
    "design_coil_load": "design_coil_total_kW",
    "governing_condition": "governing_condition",
    "recommended_capacity": "design_capacity_kW",
    "peak_coil_load": "annual_peak_coil_total_kW",
    "cooling_energy": "annual_coil_total_kWh",
    "design_zone_load": "design_zone_kW",
    "hours_above_threshold": "hours_above_75_percent_of_capacity",
}


def _assert_same_figures(figures, record: dict, keys: dict) -> None:
    """Every figure equal to the last bit (JSON keeps a float exactly); all differences listed."""
    different = {
        name: (getattr(figures, name), record[key])
        for name, key in keys.items()
        if getattr(figures, name) != record[key]
    }
    assert not different, different


@pytest.fixture(scope="module", params=SCENARIOS, ids=lambda path: path.stem)
def both(request):
    """(command line JSON summary, scenario) of one example scenario."""
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        status = main(["design", str(request.param), "--json"])
    assert status == 0
    return json.loads(out.getvalue()), load_scenario(request.param)


def test_there_is_an_example_of_each_kind():
    # a bundled climate, a weather CSV beside the scenario and a zone-load CSV
    names = {path.stem for path in SCENARIOS}
    assert {"mesa_lab_weather_file", "korva_school_zone_file", "quillon_clinic"} <= names


def test_plant_view_equals_the_command_line(both):
    summary, scenario = both
    figures = DashboardState(scenario, view="plant").result.figures
    plant = summary["cooling_plant"]
    _assert_same_figures(figures, plant, PLANT_KEYS)
    assert figures.design_loads == plant["design_loads_kW"]
    assert figures.option_name == plant["first_option"]
    assert list(figures.machine_capacities) == plant["first_option_machines_kW"]


def test_plant_figures_follow_the_coincident_rule(both):
    # coincident design: every unit at the same outdoor state, the largest sum plus the
    # distribution gain governs, times (1 + the morning pick-up allowance, its own term);
    # capacity = design load x (1 + margin) (common practice)
    summary, scenario = both
    plant = summary["cooling_plant"]
    gain = 1.0 + scenario.distribution_gain_percent / 100.0
    pickup = plant["pickup_allowance_percent"] / 100.0
    sums = {
        row["kind"]: sum(row[f"{u['name']}_coil_total_kW"] for u in summary["air_handlers"])
        for row in plant["design_conditions"]
    }
    governing = max(sums, key=sums.get)
    assert plant["design_load_kW"] == pytest.approx(
        sums[governing] * gain * (1.0 + pickup), rel=1e-12
    )
    assert plant["design_capacity_kW"] == pytest.approx(
        plant["design_load_kW"] * (1.0 + plant["margin_percent"] / 100.0), rel=1e-12
    )
    assert plant["design_loads_kW"]["distribution_gain_kW"] == pytest.approx(
        sums[governing] * (gain - 1.0), rel=1e-9, abs=1e-9
    )
    assert plant["design_loads_kW"]["pickup_kW"] == pytest.approx(
        sums[governing] * gain * pickup, rel=1e-9, abs=1e-9
    )
    # the year's peak cannot be below the largest unit's own peak (loads are >= 0)
    assert plant["annual_peak_kW"] >= max(
        u["annual_peak_coil_total_kW"] for u in summary["air_handlers"]
    )


def test_each_air_handler_view_equals_the_command_line(both):
    summary, scenario = both
    state = DashboardState(scenario, view="air_handler", air_handler=0)
    for index, unit in enumerate(summary["air_handlers"]):
        assert state.set("air_handler", index)
        figures = state.result.figures
        assert state.result.unit.name == unit["name"]
        _assert_same_figures(figures, unit, UNIT_KEYS)
        # zone load = sensible + latent (ASHRAE Handbook Fundamentals Ch. 18: total load)
        assert figures.design_zone_load == pytest.approx(
            unit["design_zone_sensible_kW"] + unit["design_zone_latent_kW"], rel=1e-12
        )


def test_plant_page_water_side_equals_the_command_line(both):
    # the plant page's water-side chart and tables draw these figures (one calculation)
    summary, scenario = both
    panel = WaterSidePanel(DashboardState(scenario, view="plant"), plant=True)
    assert water_side_summary(panel.water_side()) == summary["water_side"]
    panel.update()
    if summary["water_side"] is None:
        assert panel.tables.value == "" and panel.chart is None
        return
    first = summary["water_side"]["options"][0]  # the first option's chillers, as printed
    assert f"<td>{first['chiller_kWh']:,.0f}</td>" in panel.tables.value
    energy = panel.chart_spec.to_dict()["datasets"]["energy"]
    assert energy[0]["energy"] == pytest.approx(first["chiller_kWh"], rel=1e-9)
    # the other unit system: redrawn in place, the spec as Altair writes it, flows in gpm/L/s
    other = "SI" if panel.state.inputs.unit_system == "IP" else "IP"
    assert panel.state.set("unit_system", other)
    assert panel.update()
    assert panel.chart.spec == panel.chart_spec.to_dict()
    assert ("[gpm]" if other == "IP" else "[L/s]") in panel.tables.value


def test_single_unit_page_coil_schedule_equals_the_command_line(both):
    summary, scenario = both
    state = DashboardState(scenario, view="air_handler", air_handler=0)
    panel = WaterSidePanel(state, plant=False)
    panel.update()
    name = summary["air_handlers"][0]["name"]
    rows = [r for r in summary["coil_schedule"] if r["air_handler"] == name]
    assert panel.tables.value.count("<tr>") == len(rows) + 1
    system = state.inputs.unit_system
    airflow = float(to_display("airflow", rows[0]["airflow_m3s"], system)[0])
    assert f"<td>{airflow:,.0f}</td>" in panel.tables.value


@pytest.mark.parametrize("path", SCENARIOS, ids=lambda p: p.stem)
def test_outdoor_air_chart_reads_the_design_coil_load_at_the_units_fraction(path):
    # the chart swept the unit as it runs (load airflow) while the design coil load card
    # and the coil schedule select at the scheduled airflow: the clinic's AHU-2 read 43 tons
    # on the chart at its own 20 % against 50.2 tons on the card
    from dataclasses import replace

    from plantside.air_handler.design import cooling_design_points
    from plantside.climate.design_conditions import design_conditions_from_weather
    from plantside.study.design_sweep import (
        SWEEP_FRACTIONS,
        design_kind_label,
        design_outdoor_air_sweep,
    )
    from plantside.study.run import design_zone

    scenario = load_scenario(path)
    weather = scenario.load_weather()
    conditions = design_conditions_from_weather(weather)
    percent = scenario.cooling_design_percent
    compared = 0
    for index, spec in enumerate(scenario.air_handlers):
        if spec.settings.all_outdoor_air:  # its own fraction is 100 %: the sweep's last point
            column, settings = -1, spec.settings  # (the sweep has that one point)
        else:
            column = 30
            settings = replace(
                spec.settings,
                minimum_outdoor_air_fraction=SWEEP_FRACTIONS[column],
                minimum_outdoor_airflow=None,
            )
        zone = scenario.zone_loads(index, weather)
        sweep = design_outdoor_air_sweep(settings, zone, conditions, percent)
        design = cooling_design_points(settings, design_zone(zone, "cooling"), conditions, percent)
        for kind, point in design.points.items():
            on_chart = sweep[design_kind_label(kind, percent)][column]
            assert on_chart == pytest.approx(point.loads["coil_total_kW"], rel=1e-12), (index, kind)
            compared += 1
    assert compared >= 3
