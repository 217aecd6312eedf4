"""The plant page's sweep panel runs the same calculation as ``plantside sweep``.

The reference is the command's own path: a sweep file with the same base scenario,
climates and outdoor-air fractions, read by :func:`plantside.study.sweep.load_sweep` and
run by :func:`plantside.study.sweep_run.run_sweep` (itself checked case by case against
:func:`plantside.study.run.run_study` in ``tests/test_sweep.py``); the charts are those
``plantside sweep --charts`` saves (:func:`plantside.charts.sweep.sweep_charts`).
"""

from __future__ import annotations

import html
import time
from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from plantside.charts.sweep import sweep_charts
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.dashboard.controls import GuardedInput
from plantside.dashboard.state import DashboardState
from plantside.dashboard.sweep_panel import MAX_PANEL_CASES, SweepPanel
from plantside.study.scenario import load_scenario
from plantside.study.sweep import load_sweep
from plantside.study.sweep_run import run_sweep

ROOT = Path(__file__).parents[1]
CLINIC = ROOT / "example_data" / "scenarios" / "quillon_clinic.toml"
OFFICE = ROOT / "example_data" / "scenarios" / "linden_office_si.toml"


@pytest.fixture(scope="module")
def state():
    return DashboardState(load_scenario(CLINIC), view="plant")


def _tick(panel, names):
    for name, box in panel.climates.items():
        box.value = name in names


def test_tiny_sweep_equals_the_command_and_draws_its_charts(state, tmp_path):
    panel = SweepPanel(state)
    unit = panel.unit.value
    climates = ["Salvia Flats", "Korva Plains"]
    _tick(panel, climates)
    panel.fraction.value = (20.0, 40.0)
    panel.steps.value = 2
    assert panel.start()
    assert panel.join(timeout=300)
    assert panel.progress.value == panel.progress.max == 4
    assert panel.progress_text.value == "4 of 4 cases"
    assert not panel.run_button.disabled and panel.stop_button.disabled
    # the command, from a sweep file with the same choices
    path = tmp_path / "sweep.toml"
    path.write_text(
        f'[sweep]\nbase = "{CLINIC.as_posix()}"\nclimates = ["Salvia Flats", "Korva Plains"]\n'
        f'[sweep.axes]\n"air_handler[{unit}].minimum_outdoor_air_fraction" = '
        "{ start = 0.2, stop = 0.4, num = 2 }\n",
        encoding="utf-8",
    )
    sweep = load_sweep(path)
    command = run_sweep(sweep, tmp_path / "out", workers=1).table
    assert list(panel.table["case_id"]) == list(command["case_id"])
    assert (panel.table["status"] == "ok").all()
    pd.testing.assert_frame_equal(panel.table, command, check_exact=False, rtol=1e-12)
    system = state.inputs.unit_system  # the page's units (the clinic is written in I-P)
    # the charts are the command's, with the fraction drawn in percent as the page shows it
    column = sweep.axes[0].column
    in_percent = command.rename(columns={column: "Minimum outdoor-air fraction[%]"})
    in_percent["Minimum outdoor-air fraction[%]"] = 100.0 * command[column]
    expected = sweep_charts(in_percent, ["Minimum outdoor-air fraction[%]"], system=system)
    assert set(panel.charts) == set(expected)
    drawn = panel.charts["sweep_plant_capacity"].to_dict()
    assert "Minimum outdoor-air fraction, %" in str(drawn)  # the x axis title
    xs = {row["x"] for rows in drawn["datasets"].values() for row in rows if "x" in row}
    assert sorted(xs) == pytest.approx([20.0, 40.0])  # percent, not 0.2 and 0.4
    for name, chart in expected.items():
        assert panel.charts[name].to_dict() == chart.to_dict()
    assert panel.chart_choice.value == "sweep_plant_capacity"
    assert len(panel.chart_box.children) == 1
    assert "4 of 4 cases finished" in panel.message.value


def test_more_than_the_limit_is_refused_with_the_limit_named(state):
    panel = SweepPanel(state)
    _tick(panel, ["Salvia Flats", "Korva Plains", "Port Calder"])
    panel.steps.value = 21  # 63 cases
    assert panel.case_count() == 63 > MAX_PANEL_CASES
    assert not panel.start()
    assert not panel.running
    assert f"the {MAX_PANEL_CASES} a sweep from the page may run" in panel.message.value
    assert "63 cases" in panel.message.value
    assert f"more than the {MAX_PANEL_CASES}" in panel.count.value
    # nothing the user chose is lost
    assert panel.steps.value == 21 and len(panel.chosen_climates()) == 3


def test_no_climate_is_refused_by_name(state):
    panel = SweepPanel(state)
    _tick(panel, [])
    assert not panel.start()
    assert (
        "Climates: none ticked" in panel.message.value
        and "at least one climate" in panel.message.value
    )


# As in tests/test_sweep.py: supply air at 11 °C with a bypass factor of 0.3 needs, by the
# bypass-factor line t_adp = (t_supply - BF t_mix) / (1 - BF) (common practice), an
# apparatus dew point below the coil's 3 °C floor when 60 % outdoor air meets Salvia
# Flats' cooling design condition, but not with 15 % nor in Linden Vale: one case of four
# is refused by run_study itself, the three others compute.
def test_a_refused_case_is_a_failed_row_not_a_traceback():
    scenario = load_scenario(OFFICE)
    spec = scenario.air_handlers[0]
    spec = replace(spec, settings=replace(spec.settings, supply_drybulb=11.0, bypass_factor=0.3))
    panel = SweepPanel(DashboardState(replace(scenario, air_handlers=(spec,)), view="plant"))
    _tick(panel, ["Linden Vale", "Salvia Flats"])
    panel.fraction.value = (15.0, 60.0)
    panel.steps.value = 2
    assert panel.start() and panel.join(timeout=300)
    table = panel.table.set_index(["climate", "air_handler[1].minimum_outdoor_air_fraction"])
    assert list(table["status"]) == ["ok", "failed", "ok", "ok"]
    refused = table.loc[("Salvia Flats", 0.6)]
    assert refused["error_field"] == "apparatus_dew_point"
    shown = html.unescape(panel.failed.value)
    assert "Salvia Flats" in shown and refused["error_message"] in shown
    # the refused case's fraction in percent, as the slider shows it (was "0.6")
    assert "Outdoor-air fraction [%]" in shown and "<td>60</td>" in shown
    assert "1 failed (listed below)" in panel.message.value
    assert "Traceback" not in panel.message.value + panel.failed.value
    # the chart is drawn from the three cases that ran
    assert panel.charts and panel.chart_box.children
    assert np.isfinite(table[table["status"] == "ok"]["cooling_design_capacity_kW"]).all()


def test_stop_keeps_the_finished_cases(state):
    panel = SweepPanel(state)
    _tick(panel, ["Salvia Flats", "Korva Plains"])
    panel.steps.value = 10  # 20 cases
    assert panel.start()
    deadline = time.monotonic() + 120
    while panel.progress.value < 1 and time.monotonic() < deadline:
        time.sleep(0.02)
    panel.stop()
    assert panel.join(timeout=120)
    assert 1 <= len(panel.table) < 20
    assert (panel.table["status"] == "ok").all()
    assert "Stopped" in panel.message.value
    assert not panel.run_button.disabled


def test_the_pages_own_weather_file_is_a_climate_and_runs_as_the_command(tmp_path):
    # a scenario naming a weather CSV on disk: the panel offers that file (ticked) beside
    # the bundled climates; swept alone it is the base scenario's own climate, as a sweep
    # file with no climates runs it
    lab = ROOT / "example_data" / "scenarios" / "mesa_lab_weather_file.toml"
    state = DashboardState(load_scenario(lab), view="plant")
    panel = SweepPanel(state)
    own = [name for name in panel.climates if name not in BUNDLED_CLIMATES]
    assert len(own) == 1 and panel.chosen_climates() == own
    panel.fraction.value = (20.0, 30.0)
    panel.steps.value = 2
    assert panel.start() and panel.join(timeout=300)
    path = tmp_path / "sweep.toml"
    path.write_text(
        f'[sweep]\nbase = "{lab.as_posix()}"\n[sweep.axes]\n'
        f'"air_handler[{panel.unit.value}].minimum_outdoor_air_fraction" = [0.2, 0.3]\n',
        encoding="utf-8",
    )
    command = run_sweep(load_sweep(path), tmp_path / "out", workers=1).table
    pd.testing.assert_frame_equal(panel.table, command, check_exact=False, rtol=1e-12)


def test_a_scenario_loaded_on_the_page_gives_its_air_handlers(state):
    panel = SweepPanel(state)
    before = panel.unit.options
    office = load_scenario(OFFICE)
    state.load_scenario(office)
    try:
        assert panel.unit.options != before
        assert [label for label, _ in panel.unit.options] == [
            spec.settings.name for spec in office.air_handlers
        ]
        assert panel.build_sweep().base.title == office.title
    finally:
        state.load_scenario(load_scenario(CLINIC))


def _send(widget, state):
    widget._handle_msg({"content": {"data": {"method": "update", "state": state}}, "buffers": []})


HOSTILE = [
    float("nan"),
    float("inf"),
    "x" * 1_000_000,
    None,
    True,
    [90, 10],
    [10],
    {},
    -1,
    99,
    [0, 101],
]


def test_hostile_page_messages_are_refused_and_change_nothing(state, caplog):
    panel = SweepPanel(state)
    assert all(isinstance(w, GuardedInput) for w in panel.controls.values())
    box = panel.climates["Port Calder"]
    controls = {
        "unit": (panel.unit, "index"),
        "fraction": (panel.fraction, "value"),
        "steps": (panel.steps, "value"),
        "climate": (box, "value"),
        "chart": (panel.chart_choice, "index"),
    }
    for name, (widget, key) in controls.items():
        kept = getattr(widget, key)
        for raw in HOSTILE:
            if name == "climate" and isinstance(raw, bool):
                continue  # a tick is a valid move
            panel.message.value = ""
            _send(widget, {key: raw})
            assert getattr(widget, key) == kept, (name, raw)
            assert "⚠" in panel.message.value, (name, raw)
            assert len(panel.message.value) < 400  # a short message, never the value echoed
        _send(widget, {"disabled": True})  # another trait: refused
        assert not widget.disabled
    _send(panel.stop_button, {"disabled": False})  # the page cannot enable Stop
    assert panel.stop_button.disabled and not panel.running
    assert not [r for r in caplog.records if r.levelname in ("ERROR", "CRITICAL")]
    # valid moves are taken
    _send(panel.steps, {"value": 3})
    _send(panel.fraction, {"value": [20.0, 60.0]})
    assert panel.steps.value == 3 and panel.fraction.value == (20.0, 60.0)
    assert "3 fractions" in panel.count.value


def test_the_range_is_in_percent_as_the_pages_slider_and_the_sweep_gets_fractions(state):
    """The page's own outdoor-air slider speaks percent (controls.SLIDERS); so does the
    sweep's range. The sweep file field ``minimum_outdoor_air_fraction`` stays a fraction
    (0 to 1), as ``plantside sweep`` reads it."""
    from plantside.dashboard.controls import SLIDERS

    panel = SweepPanel(state)
    page_unit = SLIDERS["outdoor_air_fraction"].unit("SI")
    assert page_unit == "%"
    assert f"[{page_unit}]" in panel.fraction.description
    assert (panel.fraction.min, panel.fraction.max) == (0.0, 100.0)
    assert panel.fraction.readout_format == ".0f"
    assert panel.fraction.value == (10.0, 50.0)

    def texts(widget):
        if isinstance(getattr(widget, "value", None), str):
            yield widget.value
        for child in getattr(widget, "children", ()):
            yield from texts(child)

    assert any("in percent of the supply air" in text for text in texts(panel.box))
    _tick(panel, ["Salvia Flats"])
    panel.fraction.value = (15.0, 60.0)
    panel.steps.value = 4
    sweep = panel.build_sweep()
    assert sweep.axes[0].field.endswith(".minimum_outdoor_air_fraction")
    assert np.allclose(sweep.axes[0].values, [0.15, 0.30, 0.45, 0.60], rtol=0, atol=1e-12)


def test_a_refused_range_is_named_in_percent(state):
    panel = SweepPanel(state)
    _tick(panel, ["Salvia Flats"])
    panel.fraction.value = (30.0, 30.0)
    with pytest.raises(Exception) as refused:
        panel.build_sweep()
    assert "30 % to 30 %" in str(refused.value) and "0 % to 100 %" in str(refused.value)
    assert not panel.start()
    assert "0 % to 100 %" in html.unescape(panel.message.value)
    panel.message.value = ""
    _send(panel.fraction, {"value": [0.2, 120.0]})  # above 100 %: refused, kept
    assert panel.fraction.value == (30.0, 30.0)
    assert "0 % to 100 %" in html.unescape(panel.message.value)


def test_the_case_count_reads_in_plain_words(state):
    # it read "5 fractions × 1 climate(s) = 5 cases"
    panel = SweepPanel(state)
    for name, box in panel.climates.items():
        box.value = name == next(iter(panel.climates))
    panel.steps.value = 5
    assert "5 fractions × 1 climate = 5 cases" in panel.count.value
    for box in panel.climates.values():
        box.value = True
    assert f"× {len(panel.climates)} climates = {5 * len(panel.climates)} cases" in (
        panel.count.value
    )


def test_the_water_side_box_adds_each_options_year_as_the_command(state, tmp_path):
    panel = SweepPanel(state)
    assert panel.water_side.layout.display is None  # the clinic has water-side tables
    assert panel.controls["sweep_water_side"] is panel.water_side
    unit = panel.unit.value
    _tick(panel, ["Salvia Flats", "Korva Plains"])
    panel.fraction.value = (20.0, 40.0)
    panel.steps.value = 2
    panel.water_side.value = True
    assert panel.start()
    assert panel.join(timeout=300)
    path = tmp_path / "sweep.toml"
    path.write_text(
        f'[sweep]\nbase = "{CLINIC.as_posix()}"\nclimates = ["Salvia Flats", "Korva Plains"]\n'
        "water_side = true\n"
        f'[sweep.axes]\n"air_handler[{unit}].minimum_outdoor_air_fraction" = '
        "{ start = 0.2, stop = 0.4, num = 2 }\n",
        encoding="utf-8",
    )
    command = run_sweep(load_sweep(path), tmp_path / "out", workers=1).table
    assert "chiller_starts[2 x 50 %]" in command.columns
    pd.testing.assert_frame_equal(panel.table, command, check_exact=False, rtol=1e-12)
    assert "sweep_chiller_options_map" in panel.charts
    names = dict(panel.chart_choice.options)
    assert names["Chilled-water plant options by climate"] == "sweep_chiller_options_map"


def test_no_water_side_box_without_water_side_tables():
    panel = SweepPanel(DashboardState(load_scenario(OFFICE), view="plant"))
    assert panel.water_side.layout.display == "none"
    panel.water_side.value = True  # hidden: it cannot change what runs
    assert panel.build_sweep().water_side is False
