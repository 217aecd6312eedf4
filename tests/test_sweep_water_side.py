"""A sweep's water-side columns (``[sweep] water_side = true``): each plant option's year
per case, the same calculation as ``plantside design --json`` prints.

The chiller, pump, tower and boiler models are checked against their sources elsewhere
(tests/test_chillers.py, tests/test_water_side.py: AHRI 550/590 IPLV, ASHRAE 90.1); here
the sweep must hand on exactly what the study of each case alone gives.
"""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from plantside.charts.export import chart_bytes
from plantside.charts.sweep import (
    column_label,
    column_quantity,
    sweep_charts,
    sweep_line_frame,
)
from plantside.cli.main import main
from plantside.errors import ScenarioError
from plantside.study.run import run_study, study_summary
from plantside.study.scenario import load_scenario
from plantside.study.sweep import load_sweep
from plantside.study.sweep_run import run_sweep
from plantside.study.sweep_worker import (
    WATER_SIDE_COOLING_COLUMNS,
    WATER_SIDE_HEATING_COLUMNS,
    headline_columns,
)

ROOT = Path(__file__).parents[1]
CLINIC = ROOT / "example_data" / "scenarios" / "quillon_clinic.toml"  # fictional clinic
OFFICE = ROOT / "example_data" / "scenarios" / "linden_office_si.toml"  # no water side
OA = "air_handler[2].minimum_outdoor_air_fraction"


def _sweep_file(folder: Path, body: str, base: Path = CLINIC) -> Path:
    path = folder / "sweep.toml"
    path.write_text(f'[sweep]\nbase = "{base.as_posix()}"\n{body}', encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def clinic_run(tmp_path_factory):
    folder = tmp_path_factory.mktemp("water_sweep")
    path = _sweep_file(
        folder,
        'climates = ["Salvia Flats", "Korva Plains"]\nwater_side = true\n'
        f'[sweep.axes]\n"{OA}" = [0.15, 0.35]\n',
    )
    sweep = load_sweep(path)
    return sweep, run_sweep(sweep, folder / "out", workers=1)


def test_each_option_is_the_design_summary_of_the_case_alone(clinic_run):
    _sweep, run = clinic_run
    table = run.table
    assert run.failed == 0 and len(table) == 4
    base = load_scenario(CLINIC)
    for _, line in table.iterrows():
        case = dataclasses.replace(
            base.with_air_handler(1, minimum_outdoor_air_fraction=line[OA]),
            climate=line["climate"],
        )
        # the reference: what `plantside design --json` prints for this case alone
        options = study_summary(run_study(case))["water_side"]["options"]
        assert {o["plant"] for o in options} == {"cooling", "heating"}
        for option in options:
            names = (
                WATER_SIDE_COOLING_COLUMNS
                if option["plant"] == "cooling"
                else WATER_SIDE_HEATING_COLUMNS
            )
            for column, key in names.items():
                value = line[f"{column}[{option['option']}]"]
                assert value == pytest.approx(option[key], rel=1e-12), (column, option["option"])


def test_the_climates_change_the_options_years(clinic_run):
    # a hot and a cold fictional climate: the same plant uses more chiller electricity in
    # the hot one and more boiler fuel in the cold one (a check that the columns move)
    _, run = clinic_run
    table = run.table[run.table[OA] == 0.15].set_index("climate")
    option = "2 x 50 %"
    electricity = f"chilled_water_plant_electricity_kWh[{option}]"
    assert table.loc["Salvia Flats", electricity] > 2 * table.loc["Korva Plains", electricity]
    fuel = next(c for c in table.columns if c.startswith("heating_fuel_kWh["))
    assert table.loc["Korva Plains", fuel] > table.loc["Salvia Flats", fuel]
    for column in table.columns:
        if column.startswith(("chilled_water_plant_seasonal_cop[", "boiler_seasonal_eff")):
            assert np.all((table[column] > 0.5) & (table[column] < 15.0)), column


def test_columns_only_when_asked_and_named_for_the_options(clinic_run, tmp_path):
    sweep, run = clinic_run
    plain = load_sweep(_sweep_file(tmp_path, f'[sweep.axes]\n"{OA}" = [0.15]\n'))
    assert plain.water_side is False
    without, with_water = headline_columns(plain.base), headline_columns(sweep.base, True)
    water = [c for c in with_water if c not in without]
    assert with_water[: len(without)] == without  # the water side comes after the rest
    # three figures for each of the clinic's three cooling options, four for each of its
    # two heating options
    assert len(water) == 3 * 3 + 2 * 4
    assert "chiller_starts[3 x 34 %]" in water and "boiler_starts[2 x 67 %]" in water
    assert all(c in run.table.columns for c in water)
    # a table without the water side is not reused for one with it
    assert plain.fingerprint != sweep.fingerprint


def test_electricity_and_fuel_stay_in_kwh_in_both_unit_systems(clinic_run):
    _, run = clinic_run
    column = "chilled_water_plant_electricity_kWh[2 x 50 %]"
    assert column_label(column) == "Chilled-water plant electricity, 2 x 50 %"
    assert column_quantity(column) is None
    for system in ("SI", "IP"):
        frame = sweep_line_frame(run.table, OA, column, system=system)
        assert frame.attrs["y_title"].endswith("[kWh]"), frame.attrs
        np.testing.assert_allclose(
            np.sort(frame["y"].to_numpy()),
            np.sort(run.table[column].to_numpy(float)),
            rtol=1e-12,
        )
    assert column_quantity("heating_fuel_kWh[2 x 67 %]") is None


@pytest.mark.parametrize(
    ("body", "base", "words"),
    [
        ('water_side = "yes"\n', CLINIC, ["expected true or false", "'yes'"]),
        ("water_side = true\n", OFFICE, ["no water side", "[plant.chilled_water]"]),
    ],
)
def test_bad_water_side_is_named(tmp_path, body, base, words):
    axis = '[sweep.axes]\n"air_handler[1].minimum_outdoor_air_fraction" = [0.2]\n'
    path = _sweep_file(tmp_path, body + axis, base)
    with pytest.raises(ScenarioError) as caught:
        load_sweep(path)
    assert caught.value.field == "sweep.water_side"
    for word in words:
        assert word in str(caught.value)


def test_command_line_table_has_the_water_side(tmp_path, capsys):
    path = _sweep_file(
        tmp_path, f'climates = ["Port Calder"]\nwater_side = true\n[sweep.axes]\n"{OA}" = [0.2]\n'
    )
    assert main(["sweep", str(path), "--out", str(tmp_path / "out"), "--quiet"]) == 0
    capsys.readouterr()
    header = (tmp_path / "out" / "sweep_results.csv").read_text(encoding="utf-8").splitlines()[0]
    assert "chilled_water_plant_electricity_kWh[2 x 50 %]" in header
    json.dumps(header)  # plain text


def test_options_heat_map_by_climate_renders(clinic_run, tmp_path):
    _, run = clinic_run
    charts = sweep_charts(run.table, [OA], system="IP")
    chart = charts["sweep_chiller_options_map"]
    cells = chart.data if isinstance(chart.data, pd.DataFrame) else chart.layer[0].data
    # 2 climates x 3 cooling options at the first fraction (0.15), in kWh in I-P too
    assert len(cells) == 6
    assert set(cells["y"]) == {"2 x 50 %", "3 x 34 %", "35 % lead + 65 %"}
    # each cell: the option's electricity above the lowest option of its climate [%]
    first = run.table[run.table[OA] == 0.15].set_index("climate")
    for _, cell in cells.iterrows():
        row = first.loc[cell["x"]]
        values = [row[f"chilled_water_plant_electricity_kWh[{o}]"] for o in set(cells["y"])]
        own = row[f"chilled_water_plant_electricity_kWh[{cell['y']}]"]
        assert cell["value"] == pytest.approx(100.0 * (own / min(values) - 1.0), rel=1e-9)
    assert (cells.groupby("x")["value"].min() == 0.0).all()
    subtitle = " ".join(chart.to_dict()["title"]["subtitle"])
    assert "held at" in subtitle and "= 0.15" in subtitle, subtitle
    png = chart_bytes(chart, "png", scale=1.0)
    assert png[:8] == b"\x89PNG\r\n\x1a\n" and len(png) > 5_000
    (tmp_path / "options.png").write_bytes(png)
