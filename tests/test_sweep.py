"""Sweeps: parsing, validation messages, resume, interruption, and the table against run_study.

The reference for every number in a sweep's table is :func:`plantside.study.run.run_study` of
that case alone, built here through the public scenario API (``Scenario.with_air_handler``,
``dataclasses.replace``) rather than through the sweep's own code, and read through
``study_summary`` (the command line's ``--json``). Unit conversions are checked against
their exact definitions (NIST SP 811-2008, Appendix B).
"""

import dataclasses
import functools
import io
import json
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import altair as alt
import numpy as np
import pandas as pd
import pytest
import sweep_faults
import sweep_gate
from plantside.charts.sweep import (
    column_quantity,
    sweep_charts,
    sweep_heatmap_chart,
    sweep_heatmap_frame,
    sweep_line_chart,
    sweep_line_frame,
)
from plantside.cli.main import main
from plantside.cli.sweep import ProgressBar
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.errors import InputFileError, InputRangeError, ScenarioError
from plantside.study.run import run_study, study_summary
from plantside.study.scenario import load_scenario
from plantside.study.sweep import load_sweep, loads_sweep
from plantside.study.sweep_run import (
    PARTS_FOLDER,
    STATUS_COLUMNS,
    SweepInterruptedError,
    plan_batches,
    results_table,
    run_sweep,
)

ROOT = Path(__file__).parents[1]
SCENARIOS = ROOT / "example_data" / "scenarios"
CLINIC = SCENARIOS / "quillon_clinic.toml"
OFFICE = SCENARIOS / "linden_office_si.toml"  # one air handler, SI: a fast case (~0.05 s)
EXAMPLE_SWEEP = ROOT / "example_data" / "sweeps" / "clinic_oa_by_climate.toml"
CLIMATE_CSVS = ROOT / "example_data" / "climates"

OA = "air_handler[1].minimum_outdoor_air_fraction"


def write_sweep(folder: Path, body: str, base: Path = OFFICE, name="sweep.toml") -> Path:
    path = folder / name
    path.write_text(f'[sweep]\nbase = "{base.as_posix()}"\n{body}', encoding="utf-8")
    return path


@pytest.fixture
def office_sweep(tmp_path):
    """2 climates x 3 outdoor-air fractions of the one-unit SI office: 6 fast cases."""
    return load_sweep(
        write_sweep(
            tmp_path,
            f'climates = ["Linden Vale", "Port Calder"]\n[sweep.axes]\n"{OA}" = [0.1, 0.2, 0.3]\n',
        )
    )


# ---------------------------------------------------------------------------------------
# parsing
# ---------------------------------------------------------------------------------------
def test_example_sweep_is_the_full_cartesian_product():
    sweep = load_sweep(EXAMPLE_SWEEP)
    assert [c.label for c in sweep.climates] == list(BUNDLED_CLIMATES)
    [axis] = sweep.axes
    # {start = 0.10, stop = 0.40, num = 7}: evenly spaced, both ends included
    # (the definition of numpy.linspace)
    assert axis.values == pytest.approx((0.10, 0.15, 0.20, 0.25, 0.30, 0.35, 0.40), abs=1e-12)
    assert sweep.size == len(sweep.cases) == 5 * 7
    assert len({c.case_id for c in sweep.cases}) == 35
    # climates outermost, then the axis values in order
    assert [c.climate.label for c in sweep.cases[:8]] == [BUNDLED_CLIMATES[0]] * 7 + [
        BUNDLED_CLIMATES[1]
    ]


def test_case_ids_are_stable_and_independent_of_axis_order(tmp_path):
    one = write_sweep(
        tmp_path,
        f'[sweep.axes]\n"{OA}" = [0.1, 0.2]\n"plant.cooling_margin_percent" = [5, 15]\n',
        name="a.toml",
    )
    two = write_sweep(
        tmp_path,
        f'[sweep.axes]\n"plant.cooling_margin_percent" = [5, 15]\n"{OA}" = [0.1, 0.2]\n',
        name="b.toml",
    )
    ids_one = {c.case_id for c in load_sweep(one).cases}
    assert ids_one == {c.case_id for c in load_sweep(one).cases}
    assert ids_one == {c.case_id for c in load_sweep(two).cases}


def test_ip_values_are_converted_to_si_at_the_edge(tmp_path):
    path = write_sweep(
        tmp_path,
        '[sweep.axes]\n"air_handler[2].supply_drybulb" = [53, 55]\n'
        '"air_handler[3].supply_airflow" = [9000]\n'
        '"air_handler[1].zone.cooling_design_sensible" = [5]\n',
        base=CLINIC,
    )
    sweep = load_sweep(path)
    temperature, airflow, zone = sweep.axes
    # °C = (°F - 32) / 1.8 (exact; NIST SP 811-2008 B.9)
    assert temperature.values == pytest.approx(((53 - 32) / 1.8, (55 - 32) / 1.8), rel=1e-12)
    assert temperature.column == "air_handler[2].supply_drybulb_C"
    # 1 cfm = 0.3048**3 / 60 m³/s (exact; NIST SP 811-2008 B.9)
    assert airflow.values[0] == pytest.approx(9000 * 0.3048**3 / 60, rel=1e-12)
    # 1 ton of refrigeration = 12,000 Btu/h = 3.516853 kW (NIST SP 811-2008 B.9)
    assert zone.values[0] == pytest.approx(5 * 3.516853, rel=1e-6)
    scenario = sweep.scenario_for(sweep.cases[1])
    assert scenario.air_handlers[1].settings.supply_drybulb == pytest.approx((55 - 32) / 1.8)
    assert scenario.air_handlers[2].settings.supply_airflow == pytest.approx(airflow.values[0])
    assert scenario.air_handlers[0].zone.cooling_design_sensible == pytest.approx(zone.values[0])
    # nothing else changed
    base = load_scenario(CLINIC)
    assert scenario.air_handlers[1].settings == dataclasses.replace(
        base.air_handlers[1].settings, supply_drybulb=temperature.values[1]
    )


def test_sweep_inside_a_scenario_file(tmp_path):
    text = OFFICE.read_text(encoding="utf-8")
    text += (
        '\n[sweep]\ntitle = "inside"\n[sweep.axes]\n"site.cooling_design_percent" = [0.4, 1, 2]\n'
    )
    sweep = loads_sweep(text, "inside.toml", tmp_path)
    assert sweep.title == "inside" and sweep.size == 3
    assert [sweep.scenario_for(c).cooling_design_percent for c in sweep.cases] == [0.4, 1.0, 2.0]
    assert sweep.climates[0].label == "Linden Vale" and sweep.climates[0].is_base


def test_every_air_handler_and_optional_none(tmp_path):
    path = write_sweep(
        tmp_path,
        '[sweep.axes]\n"air_handler[*].bypass_factor" = [0.05, 0.15]\n'
        '"air_handler[2].preheat_drybulb" = ["none", 40]\n',
        base=CLINIC,
    )
    sweep = load_sweep(path)
    scenario = sweep.scenario_for(sweep.cases[0])  # bypass 0.05, preheat none
    assert [s.settings.bypass_factor for s in scenario.air_handlers] == [0.05] * 3
    assert scenario.air_handlers[1].settings.preheat_drybulb is None
    assert scenario.air_handlers[0].settings.preheat_drybulb is not None  # untouched
    scenario = sweep.scenario_for(sweep.cases[1])  # bypass 0.05, preheat 40 °F
    # °C = (°F - 32) / 1.8 (exact; NIST SP 811-2008 B.9)
    assert scenario.air_handlers[1].settings.preheat_drybulb == pytest.approx((40 - 32) / 1.8)


def test_climate_folder_gives_one_climate_per_csv(tmp_path):
    folder = tmp_path / "weather"
    folder.mkdir()
    for name in ("korva_plains.csv", "mesa_ardiente.csv"):
        shutil.copy(CLIMATE_CSVS / name, folder / name)
    (folder / "readme.txt").write_text("not weather")
    sweep = load_sweep(
        write_sweep(tmp_path, f'climate_folder = "weather"\n[sweep.axes]\n"{OA}" = [0.2]\n')
    )
    assert [c.label for c in sweep.climates] == ["korva_plains", "mesa_ardiente"]
    scenario = sweep.scenario_for(sweep.cases[0])
    assert scenario.climate is None and Path(scenario.weather_file).name == "korva_plains.csv"


# ---------------------------------------------------------------------------------------
# validation: file, field, value and what is allowed; did-you-mean for names
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("body", "field", "words"),
    [
        (
            '[sweep.axes]\n"air_handler[1].minimum_outdoor_air_fractoin" = [0.1]\n',
            'sweep.axes."air_handler[1].minimum_outdoor_air_fractoin"',
            ["did you mean 'air_handler[1].minimum_outdoor_air_fraction'"],
        ),
        (
            f'[sweep.axes]\n"{OA}" = [0.2, 1.5]\n',
            f'sweep.axes."{OA}"',
            ["1.5", "minimum_outdoor_air_fraction", "allowed range"],
        ),
        (
            '[sweep.axes]\n"air_handler[4].bypass_factor" = [0.1]\n',
            'sweep.axes."air_handler[4].bypass_factor"',
            ["has 1 air handler", "1 to 1"],
        ),
        (
            '[sweep.axes]\n"air_handler[1].economizer" = [1]\n',
            'sweep.axes."air_handler[1].economizer"',
            ["not a number"],
        ),
        (
            'climates = ["Salvia Flat"]\n',
            "sweep.climates[1]",
            ["did you mean 'Salvia Flats'", "Bundled:"],
        ),
        (f'[sweep.axes]\n"{OA}" = {{ start = 0.1, stop = 0.3 }}\n', f'sweep.axes."{OA}"', ["num"]),
        (
            f'[sweep.axes]\n"{OA}" = {{ start = 0.1, stop = 0.3, num = 0 }}\n',
            f'sweep.axes."{OA}".num',
            ["1 to 10000"],
        ),
        (f'[sweep.axes]\n"{OA}" = [0.1, 0.1]\n', f'sweep.axes."{OA}"', ["repeated"]),
        (f'[sweep.axes]\n"{OA}" = "lots"\n', f'sweep.axes."{OA}"', ["expected a list"]),
        ("axis = {}\n", "sweep.axis", ["did you mean 'axes'"]),
        (
            '[sweep.axes]\n"site.cooling_design_percent" = [0.5]\n',
            'sweep.axes."site.cooling_design_percent"',
            ["0.4, 1, 2"],
        ),
        (
            '[sweep.axes]\n"plant.cooling_margin_percent" = [150]\n',
            'sweep.axes."plant.cooling_margin_percent"',
            ["0 to 100"],
        ),
        (
            '[sweep.axes]\n"site.climate" = [1]\n',
            'sweep.axes."site.climate"',
            ["sweep.climates"],
        ),
        ('climate_folder = "nowhere"\n', "sweep.climate_folder", ["not found"]),
    ],
)
def test_bad_sweeps_name_file_field_and_allowed(tmp_path, body, field, words):
    path = write_sweep(tmp_path, body)
    with pytest.raises(ScenarioError) as caught:
        load_sweep(path)
    assert caught.value.source == str(path)
    assert caught.value.field == field
    for word in words:
        assert word in str(caught.value)


def test_combinations_in_one_air_handler_are_checked_before_running(tmp_path):
    # each value is allowed alone; together the supply (70.5 °F = 21.4 °C) is not at least
    # 0.5 K below the zone (71 °F = 21.7 °C), which the air-handler settings refuse
    path = write_sweep(
        tmp_path,
        '[sweep.axes]\n"air_handler[2].supply_drybulb" = [55, 70.5]\n'
        '"air_handler[2].zone_cooling_drybulb" = [75, 71]\n',
        base=CLINIC,
    )
    with pytest.raises(ScenarioError) as caught:
        load_sweep(path)
    assert caught.value.field == "sweep.axes"
    message = str(caught.value)
    assert "air_handler[2].supply_drybulb = 70.5 °F" in message
    assert "air_handler[2].zone_cooling_drybulb = 71 °F" in message


def test_missing_base_and_stray_tables(tmp_path):
    path = tmp_path / "s.toml"
    path.write_text('[sweep]\nbase = "gone.toml"\n')
    with pytest.raises(ScenarioError, match=r"sweep\.base: file 'gone\.toml' not found"):
        load_sweep(path)
    path.write_text(f'title = "x"\n[sweep]\nbase = "{OFFICE.as_posix()}"\n')
    with pytest.raises(ScenarioError, match="holds only the \\[sweep\\] table"):
        load_sweep(path)
    path.write_text('title = "no sweep here"\n')
    with pytest.raises(ScenarioError, match="sweep: missing"):
        load_sweep(path)


@pytest.mark.parametrize("load", [load_scenario, load_sweep])
def test_scenario_and_sweep_files_get_the_same_file_checks(tmp_path, load):
    # nested deeper than the 32 levels allowed (the limit the README states), in arrays,
    # inline tables or dotted keys: refused before the TOML parser recurses into it
    for name, text in {
        "arrays.toml": "x = " + "[" * 100_000 + "]" * 100_000 + "\n",
        "tables.toml": "[site]\nclimate = " + "{a = " * 40 + "1" + "}" * 40 + "\n",
        "dotted.toml": "site." + ".".join(["a"] * 100_000) + " = 1\n",
    }.items():
        path = tmp_path / name
        path.write_text(text)
        with pytest.raises(ScenarioError, match=r"\(file\): nested more than 32 levels deep"):
            load(path)
    # a huge file name is quoted as a short excerpt, not whole
    with pytest.raises(ScenarioError) as caught:
        load(tmp_path / ("n" * 1_000_000))
    assert "file name longer than the 4096 characters" in str(caught.value)
    assert len(str(caught.value)) < 300 and "..." in str(caught.value)
    # one guard for both kinds of file: missing, too large (the 1,000 kB limit the README's
    # "Ranges the model accepts" table states), not UTF-8
    with pytest.raises(ScenarioError, match=r"absent\.toml: \(file\): file not found"):
        load(tmp_path / "absent.toml")
    big = tmp_path / "big.toml"
    big.write_text("# " + "x" * 1_000_001 + "\n")
    with pytest.raises(ScenarioError, match="larger than the 1000 kB allowed"):
        load(big)
    latin = tmp_path / "latin1.toml"
    latin.write_bytes('title = "Caf\xe9"\n'.encode("latin-1"))
    with pytest.raises(ScenarioError, match="not UTF-8 text"):
        load(latin)


def test_toml_depth_counts_brackets_and_dotted_keys_outside_strings():
    from plantside.study.toml_input import toml_depth

    # by the TOML 1.0 grammar (toml.io): brackets in strings and comments are text
    assert toml_depth("x = [[1, 2]]") == 2
    assert toml_depth("[[air_handler]]\n[air_handler.zone]\n") == 3
    assert toml_depth('a."b.c".d = 1  # [[[[') == 3
    assert toml_depth('t = "[[[["\nu = \'{{{{\'\nv = """\n[[[[\n"""\n') == 0
    # every example file is far below the limit
    for path in [*SCENARIOS.glob("*.toml"), EXAMPLE_SWEEP]:
        assert toml_depth(path.read_text(encoding="utf-8")) <= 6, path


def test_deep_or_huge_named_file_on_the_command_line_exits_2(tmp_path, capsys):
    deep = tmp_path / "deep.toml"
    deep.write_text("title = " + "[" * 50_000 + "]" * 50_000 + "\n")
    for argv in (["design", str(deep)], ["sweep", str(deep), "--plan"]):
        assert main(argv) == 2
        err = capsys.readouterr().err
        assert "nested more than 32 levels deep" in err and "Traceback" not in err
    assert main(["design", "x" * 1_000_000]) == 2
    err = capsys.readouterr().err
    assert len(err) < 400 and "Traceback" not in err


def test_bad_sweep_on_the_command_line_exits_2_naming_the_field(tmp_path, capsys):
    path = write_sweep(tmp_path, '[sweep.axes]\n"air_handler[1].bypas_factor" = [0.1]\n')
    assert main(["sweep", str(path), "--out", str(tmp_path / "out")]) == 2
    err = capsys.readouterr().err
    assert "air_handler[1].bypas_factor" in err and "did you mean" in err
    assert "Traceback" not in err


# ---------------------------------------------------------------------------------------
# running: the table equals run_study case by case
# ---------------------------------------------------------------------------------------
def test_table_equals_run_study_case_by_case(tmp_path):
    path = write_sweep(
        tmp_path,
        'climates = ["Salvia Flats", "Korva Plains"]\n'
        '[sweep.axes]\n"air_handler[2].minimum_outdoor_air_fraction" = [0.15, 0.35]\n',
        base=CLINIC,
    )
    run = run_sweep(load_sweep(path), tmp_path / "out", workers=1)
    table = run.table
    assert len(table) == 4 and run.computed == 4 and run.skipped == 0
    base = load_scenario(CLINIC)
    expected_cases = [(c, f) for c in ("Salvia Flats", "Korva Plains") for f in (0.15, 0.35)]
    for climate, fraction in expected_cases:
        case = dataclasses.replace(
            base.with_air_handler(1, minimum_outdoor_air_fraction=fraction), climate=climate
        )
        result = run_study(case)  # the reference: the study of this case alone
        summary = study_summary(result)
        [line] = [
            row
            for _, row in table.iterrows()
            if row["climate"] == climate
            and row["air_handler[2].minimum_outdoor_air_fraction"] == fraction
        ]
        for unit in summary["air_handlers"]:
            name = unit["name"]
            assert line[f"design_coil_total_kW[{name}]"] == unit["design_coil_total_kW"]
            assert line[f"design_coil_latent_kW[{name}]"] == unit["design_coil_latent_kW"]
            assert line[f"heating_design_kW[{name}]"] == unit["heating_design_kW"]
            assert line[f"annual_peak_coil_total_kW[{name}]"] == unit["annual_peak_coil_total_kW"]
            assert line[f"annual_coil_total_kWh[{name}]"] == unit["annual_coil_total_kWh"]
        plant = summary["cooling_plant"]
        assert line["cooling_governing_condition"] == plant["governing_condition"]
        assert line["cooling_design_load_kW"] == plant["design_load_kW"]
        assert line["cooling_design_capacity_kW"] == plant["design_capacity_kW"]
        assert line["cooling_annual_peak_kW"] == plant["annual_peak_kW"]
        assert line["cooling_energy_kWh"] == plant["annual_energy_kWh"]
        load = result.cooling.hourly_load
        assert line["cooling_hours_above_75_percent_capacity"] == int(
            (load > 0.75 * plant["design_capacity_kW"]).sum()
        )
        assert line["heating_design_capacity_kW"] == summary["heating_plant"]["design_capacity_kW"]
    # the same table on disk, as Parquet and CSV
    parquet, csv = run.files
    pd.testing.assert_frame_equal(pd.read_parquet(parquet), table)
    from_csv = pd.read_csv(csv)
    assert list(from_csv.columns) == list(table.columns)
    np.testing.assert_allclose(
        from_csv["cooling_design_capacity_kW"], table["cooling_design_capacity_kW"], rtol=1e-9
    )


def test_two_local_workers_give_the_single_process_table(office_sweep, tmp_path):
    one = run_sweep(office_sweep, tmp_path / "one", workers=1)
    two = run_sweep(office_sweep, tmp_path / "two", workers=2, batch_size=1)
    assert two.batches == 6
    pd.testing.assert_frame_equal(one.table, two.table, check_exact=False, rtol=1e-12)


def test_rerun_skips_done_cases_and_a_new_value_runs_alone(office_sweep, tmp_path):
    out = tmp_path / "out"
    first = run_sweep(office_sweep, out, workers=1)
    again = run_sweep(office_sweep, out, workers=1)
    assert (again.computed, again.skipped) == (0, 6)
    pd.testing.assert_frame_equal(first.table, again.table)
    # one more value on the axis: only its two cases (one per climate) are run
    path = Path(office_sweep.source)
    path.write_text(path.read_text().replace("[0.1, 0.2, 0.3]", "[0.1, 0.2, 0.3, 0.4]"))
    wider = run_sweep(load_sweep(path), out, workers=1)
    assert (wider.computed, wider.skipped) == (2, 6)
    assert len(wider.table) == 8
    pd.testing.assert_frame_equal(
        wider.table[wider.table[OA] != 0.4].drop(columns="case_index").reset_index(drop=True),
        first.table.drop(columns="case_index"),
    )


def test_interrupted_run_keeps_finished_parts_and_resumes(office_sweep, tmp_path):
    out = tmp_path / "out"
    calls = []

    def stop_after_two_batches(done, total):
        calls.append(done)
        if len(calls) == 3:  # the start, then two finished batches
            raise KeyboardInterrupt

    with pytest.raises(SweepInterruptedError) as caught:
        run_sweep(office_sweep, out, workers=1, batch_size=1, progress=stop_after_two_batches)
    assert (caught.value.done, caught.value.total) == (2, 6)
    assert len(list((out / PARTS_FOLDER).glob("part-*.parquet"))) == 2
    manifest = json.loads((out / "manifest.json").read_text())
    assert manifest["state"] == "interrupted" and manifest["cases_done"] == 2
    partial = results_table(out, office_sweep)
    assert list(partial["case_index"]) == [0, 1]
    resumed = run_sweep(office_sweep, out, workers=1)
    assert (resumed.computed, resumed.skipped) == (4, 2)
    fresh = run_sweep(office_sweep, tmp_path / "fresh", workers=1)
    pd.testing.assert_frame_equal(resumed.table, fresh.table)


def test_interrupting_the_process_pool_keeps_finished_parts(office_sweep, tmp_path):
    out = tmp_path / "out"

    def stop_after_first_batch(done, total):
        if done > 0:
            raise KeyboardInterrupt

    with pytest.raises(SweepInterruptedError) as caught:
        run_sweep(office_sweep, out, workers=2, batch_size=1, progress=stop_after_first_batch)
    kept = caught.value.done
    assert 1 <= kept < 6
    assert len(results_table(out, office_sweep)) == kept
    resumed = run_sweep(office_sweep, out, workers=2)
    assert resumed.skipped == kept and resumed.computed == 6 - kept
    assert list(resumed.table["case_index"]) == list(range(6))


def test_folder_of_another_sweep_is_refused_unless_restarted(office_sweep, tmp_path):
    out = tmp_path / "out"
    run_sweep(office_sweep, out, workers=1)
    changed = dataclasses.replace(
        office_sweep, base=dataclasses.replace(office_sweep.base, cooling_margin_percent=25.0)
    )
    with pytest.raises(InputFileError, match="results of another sweep"):
        run_sweep(changed, out, workers=1)
    again = run_sweep(changed, out, workers=1, restart=True)
    assert again.computed == 6
    assert (again.table["cooling_design_capacity_kW"] > 0).all()


def test_csv_climates_are_read_once_per_process(tmp_path, monkeypatch):
    import plantside.climate.weather_csv as weather_import
    import plantside.study.sweep_run as sweep_run

    folder = tmp_path / "weather"
    folder.mkdir()
    for name in ("korva_plains.csv", "port_calder.csv"):
        shutil.copy(CLIMATE_CSVS / name, folder / name)
    calls = []
    real = weather_import.read_weather_csv

    def counting(*args, **kwargs):
        calls.append(args[0])
        return real(*args, **kwargs)

    monkeypatch.setattr(weather_import, "read_weather_csv", counting)
    sweep_run._weather.cache_clear()
    sweep = load_sweep(
        write_sweep(
            tmp_path, f'climate_folder = "weather"\n[sweep.axes]\n"{OA}" = [0.1, 0.2, 0.3]\n'
        )
    )
    run = run_sweep(sweep, tmp_path / "out", workers=1, batch_size=1)
    assert run.computed == 6 and run.batches == 6
    assert len(calls) == 2  # 6 cases, 2 climates: each file read once
    # and the result equals the study with the same CSV named in the scenario
    case = sweep.cases[4]
    reference = run_study(sweep.scenario_for(case), None)
    row = run.table.set_index("case_id").loc[case.case_id]
    assert row["cooling_design_capacity_kW"] == reference.cooling.design_capacity


def test_a_climate_file_that_cannot_be_read_fails_its_case_only(tmp_path):
    folder = tmp_path / "weather"
    folder.mkdir()
    shutil.copy(CLIMATE_CSVS / "korva_plains.csv", folder / "a_good.csv")
    (folder / "b_broken.csv").write_text("drybulb_C,relative_humidity_percent\n20,50\n")
    sweep = load_sweep(write_sweep(tmp_path, 'climate_folder = "weather"\n'))
    run = run_sweep(sweep, tmp_path / "out", workers=1)
    good, broken = run.table.itertuples()
    assert (good.status, broken.status, run.failed) == ("ok", "failed", 1)
    assert broken.error_field.endswith("b_broken.csv") and broken.error_message
    assert np.isnan(broken.cooling_design_capacity_kW) and good.cooling_design_capacity_kW > 0


# A supply air at 11 °C with a bypass factor of 0.3 needs, by the bypass-factor line
# t_adp = (t_supply - BF t_mix) / (1 - BF) (common practice), an apparatus dew point below
# the coil's 3 °C floor when 60 % outdoor air meets Salvia Flats' cooling design
# condition, but not with 15 % outdoor air nor in Linden Vale: one case of four is refused
# by run_study itself (the reference below), the three others compute.
REFUSED_IN_ONE_CLIMATE = (
    'climates = ["Linden Vale", "Salvia Flats"]\n[sweep.axes]\n'
    '"air_handler[1].supply_drybulb" = [11]\n"air_handler[1].bypass_factor" = [0.3]\n'
    f'"{OA}" = [0.15, 0.6]\n'
)


def test_a_case_the_model_refuses_is_a_failed_row_and_the_others_go_on(tmp_path):
    sweep = load_sweep(write_sweep(tmp_path, REFUSED_IN_ONE_CLIMATE))
    out = tmp_path / "out"
    run = run_sweep(sweep, out, workers=1, batch_size=4)
    table = run.table.set_index("case_id")
    assert (run.computed, run.failed, len(table)) == (4, 1, 4)
    assert list(run.table.columns[-3:]) == list(STATUS_COLUMNS)
    for case in sweep.cases:
        row = table.loc[case.case_id]
        try:  # the reference: the study of this case alone
            reference = run_study(sweep.scenario_for(case))
        except InputRangeError as error:
            assert (case.climate.label, case.values[-1]) == ("Salvia Flats", 0.6)
            assert row["status"] == "failed"
            assert row["error_field"] == error.field == "apparatus_dew_point"
            assert row["error_message"] == str(error)[:200] or "..." in row["error_message"]
            assert len(row["error_message"]) <= 200
            assert np.isnan(row["cooling_design_capacity_kW"])
            continue
        assert (row["status"], row["error_field"], row["error_message"]) == ("ok", "", "")
        assert row["cooling_design_capacity_kW"] == reference.cooling.design_capacity
    manifest = json.loads((out / "manifest.json").read_text())
    assert (manifest["state"], manifest["cases_done"], manifest["cases_failed"]) == (
        "complete",
        4,
        1,
    )
    # a rerun leaves the failed case alone unless asked; asked, it runs it (and only it)
    again = run_sweep(sweep, out, workers=1)
    assert (again.computed, again.skipped, again.failed) == (0, 4, 1)
    retried = run_sweep(sweep, out, workers=1, retry_failed=True)
    assert (retried.computed, retried.skipped, retried.failed) == (1, 3, 1)
    pd.testing.assert_frame_equal(retried.table, run.table)


def test_failed_cases_give_exit_status_3_and_say_where(tmp_path, capsys):
    path = write_sweep(tmp_path, REFUSED_IN_ONE_CLIMATE)
    out = tmp_path / "out"
    assert main(["sweep", str(path), "--out", str(out), "--workers", "1", "--json"]) == 3
    captured = capsys.readouterr()
    assert json.loads(captured.out)["failed"] == 1
    assert "1 of 4 case(s) failed" in captured.err and "sweep_results.csv" in captured.err
    assert "--retry-failed" in captured.err and "Traceback" not in captured.err
    # the charts leave the failed case out; a rerun still reports it
    assert main(["sweep", str(path), "--out", str(out), "--charts", "--quiet"]) == 3
    assert "0 case(s) computed, 4 already done, 1 failed" in capsys.readouterr().out
    argv = ["sweep", str(path), "--out", str(out), "--workers", "1", "--retry-failed"]
    assert main([*argv, "--quiet"]) == 3
    assert "1 case(s) computed, 3 already done, 1 failed" in capsys.readouterr().out


# ---------------------------------------------------------------------------------------
# a worker that dies (killed, out of memory)
# ---------------------------------------------------------------------------------------
def _dying(monkeypatch, doomed, claims=None):
    """Workers of this test kill themselves on a batch holding a ``doomed`` case."""
    import plantside.study.sweep_run as sweep_run

    dying = functools.partial(sweep_faults.dying_run_batch, frozenset(doomed), claims, os.getpid())
    monkeypatch.setattr(sweep_run, "run_batch", dying)


def test_a_worker_killed_once_loses_nothing(office_sweep, tmp_path, monkeypatch):
    # the doomed batch kills its worker the first time only: retried, every case runs
    claims = tmp_path / "claims"
    claims.mkdir()
    _dying(monkeypatch, {office_sweep.cases[4].case_id}, claims)
    run = run_sweep(office_sweep, tmp_path / "out", workers=2, batch_size=1)
    assert len(list(claims.iterdir())) == 1  # it did die once
    assert (run.computed, run.failed) == (6, 0)
    monkeypatch.undo()
    reference = run_sweep(office_sweep, tmp_path / "reference", workers=1)
    pd.testing.assert_frame_equal(run.table, reference.table, check_exact=False, rtol=1e-12)


def test_a_batch_that_kills_its_worker_twice_is_recorded_failed(
    office_sweep, tmp_path, monkeypatch
):
    doomed = office_sweep.cases[1]
    _dying(monkeypatch, {doomed.case_id})
    out = tmp_path / "out"
    run = run_sweep(office_sweep, out, workers=2, batch_size=1)
    table = run.table.set_index("case_id")
    assert (run.computed, run.failed) == (6, 1)
    assert table.loc[doomed.case_id, "status"] == "failed"
    assert table.loc[doomed.case_id, "error_field"] == "worker"
    assert "worker died" in table.loc[doomed.case_id, "error_message"]
    assert (table.drop(doomed.case_id)["status"] == "ok").all()
    # the manifest agrees with the parts, each part whole
    manifest = json.loads((out / "manifest.json").read_text())
    assert (manifest["cases_done"], manifest["cases_failed"]) == (6, 1)
    parts = sorted(p.name for p in (out / PARTS_FOLDER).iterdir())
    assert parts == sorted(manifest["parts"]) and len(parts) == 6
    # the cause gone, a rerun asked to retry finishes the rest
    monkeypatch.undo()
    again = run_sweep(office_sweep, out, workers=2, retry_failed=True)
    assert (again.computed, again.skipped, again.failed) == (1, 5, 0)
    reference = run_sweep(office_sweep, tmp_path / "reference", workers=1)
    pd.testing.assert_frame_equal(again.table, reference.table, check_exact=False, rtol=1e-12)


def test_batches_hold_one_climate_and_share_the_work(office_sweep):
    cases = office_sweep.cases
    batches = plan_batches(cases, workers=2)
    assert sum(len(b) for b in batches) == len(cases)
    assert all(len({c.climate.key for c in b}) == 1 for b in batches)
    assert len(plan_batches(cases, workers=1, batch_size=4)) == 2  # 3 + 3, never mixed


def test_bad_run_arguments_are_named():
    sweep = load_sweep(EXAMPLE_SWEEP)
    with pytest.raises(InputRangeError, match="batch_size"):
        run_sweep(sweep, "unused", batch_size=0)
    with pytest.raises(InputRangeError, match="workers"):
        run_sweep(sweep, "unused", workers=0)


# ---------------------------------------------------------------------------------------
# the command line
# ---------------------------------------------------------------------------------------
def test_command_line_sweep_runs_and_resumes(tmp_path, capsys):
    path = write_sweep(tmp_path, f'[sweep.axes]\n"{OA}" = [0.1, 0.3]\n')
    out = tmp_path / "out"
    assert main(["sweep", str(path), "--out", str(out), "--workers", "1", "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    assert report["computed"] == 2 and report["skipped_already_done"] == 0
    assert main(["sweep", str(path), "--out", str(out), "--workers", "1"]) == 0
    captured = capsys.readouterr()
    assert "0 case(s) computed, 2 already done" in captured.out
    assert "2/2 cases 100 %" in captured.err  # the progress bar, on stderr
    assert main(["sweep", str(path), "--plan"]) == 0
    assert "2 cases" in capsys.readouterr().out
    # the charts of a finished sweep, as PNG and SVG
    assert main(["sweep", str(path), "--out", str(out), "--charts", "--quiet"]) == 0
    charts = sorted(p.name for p in (out / "charts").iterdir())
    assert charts == [
        "sweep_coil_load_1.png",
        "sweep_coil_load_1.svg",
        "sweep_plant_capacity.png",
        "sweep_plant_capacity.svg",
    ]


@pytest.mark.skipif(sys.platform == "win32", reason="sends SIGINT to a child process")
def test_ctrl_c_on_the_command_line_keeps_finished_cases(tmp_path):
    # The child is the real command line with its workers gated (tests/sweep_gate.py): one
    # batch finishes and the rest wait, so the interrupt always lands mid-sweep and exactly
    # one case is kept, on a fast machine or a loaded one.
    values = ", ".join(f"{v:.2f}" for v in np.linspace(0.05, 0.6, 4))
    path = write_sweep(
        tmp_path, f'climates = ["Linden Vale", "Port Calder"]\n[sweep.axes]\n"{OA}" = [{values}]\n'
    )
    out = tmp_path / "out"
    gate = tmp_path / "gate"
    gate.mkdir()
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(Path(__file__).parent), env.get("PYTHONPATH")) if part
    )
    env[sweep_gate.GATE_VARIABLE] = str(gate)
    gated = [sys.executable, "-c", "import sweep_gate; sweep_gate.main()"]
    child = subprocess.Popen(
        [*gated, "sweep", str(path), "--out", str(out), "--workers", "2", "--batch-size", "1"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
    )
    deadline = time.monotonic() + 120
    while time.monotonic() < deadline and child.poll() is None:
        if any((out / PARTS_FOLDER).glob("part-*.parquet")):
            break
        time.sleep(0.05)
    assert child.poll() is None, f"the sweep ended before the interrupt: {child.communicate()}"
    child.send_signal(signal.SIGINT)
    _, err = child.communicate(timeout=120)
    assert child.returncode == 130, err
    assert "sweep interrupted" in err and "run the same command again" in err
    assert "Traceback" not in err
    assert len(results_table(out, load_sweep(path))) == 1
    assert json.loads((out / "manifest.json").read_text())["state"] == "interrupted"
    resumed = run_sweep(load_sweep(path), out, workers=1)
    assert (resumed.skipped, resumed.computed) == (1, 7)


def test_progress_bar_text():
    stream = io.StringIO()
    bar = ProgressBar(stream, width=10)
    for done in range(0, 21):
        bar(done, 20)
    lines = stream.getvalue().splitlines()
    assert lines[0].startswith("[..........] 0/20 cases")
    assert lines[-1].startswith("[##########] 20/20 cases 100 %")
    assert len(lines) == 11  # not a terminal: one line per 10 % step


# ---------------------------------------------------------------------------------------
# charts
# ---------------------------------------------------------------------------------------
@pytest.fixture(scope="module")
def clinic_table():
    """A small synthetic sweep table in the layout of results_table (SI)."""
    rows = []
    for climate, slope in (("Salvia Flats", 120.0), ("Port Calder", 40.0)):
        for fraction in (0.1, 0.2, 0.3):
            rows.append(
                {
                    "case_index": len(rows),
                    "case_id": f"id{len(rows)}",
                    "climate": climate,
                    "air_handler[2].minimum_outdoor_air_fraction": fraction,
                    "design_coil_total_kW[AHU-2 offices]": 70.0 + slope * fraction,
                    "cooling_design_capacity_kW": 200.0 + 2 * slope * fraction,
                }
            )
    return pd.DataFrame(rows)


def test_line_chart_per_climate_in_display_units(clinic_table):
    x, y = "air_handler[2].minimum_outdoor_air_fraction", "design_coil_total_kW[AHU-2 offices]"
    frame = sweep_line_frame(clinic_table, x, y, system="IP")
    # kW -> tons: 1 ton = 3.516853 kW (NIST SP 811-2008 B.9)
    np.testing.assert_allclose(frame["y"], clinic_table[y] / 3.516853, rtol=1e-6)
    assert frame.attrs["y_title"] == "Design coil load, AHU-2 offices [tons]"
    assert list(dict.fromkeys(frame["series"])) == ["Salvia Flats", "Port Calder"]
    chart = sweep_line_chart(frame)
    spec = chart.to_dict()  # validates against the Vega-Lite schema
    assert alt.LayerChart.from_dict(json.loads(json.dumps(spec))).to_dict() == spec
    assert spec["layer"][0]["mark"]["type"] == "line"


def test_heat_map_of_two_axes(clinic_table):
    frame = sweep_heatmap_frame(
        clinic_table,
        "air_handler[2].minimum_outdoor_air_fraction",
        "climate",
        "cooling_design_capacity_kW",
    )
    assert len(frame) == 6
    assert frame.attrs["x_sort"] == ["0.1", "0.2", "0.3"]
    assert frame.attrs["y_sort"] == ["Salvia Flats", "Port Calder"]
    spec = sweep_heatmap_chart(frame).to_dict()
    assert alt.LayerChart.from_dict(json.loads(json.dumps(spec))).to_dict() == spec
    assert [layer["mark"]["type"] for layer in spec["layer"]] == ["rect", "text"]


def test_charts_refuse_several_cases_per_point(clinic_table):
    doubled = pd.concat(
        [clinic_table.assign(**{"plant.cooling_margin_percent": m}) for m in (5.0, 15.0)]
    )
    x, y = "air_handler[2].minimum_outdoor_air_fraction", "design_coil_total_kW[AHU-2 offices]"
    with pytest.raises(InputRangeError, match=r"plant\.cooling_margin_percent"):
        sweep_line_frame(doubled, x, y)
    frame = sweep_line_frame(doubled, x, y, where={"plant.cooling_margin_percent": 5.0})
    assert len(frame) == 6
    with pytest.raises(InputRangeError, match="no column 'nope'"):
        sweep_line_frame(clinic_table, x, "nope")


def test_standard_sweep_charts(clinic_table):
    oa = "air_handler[2].minimum_outdoor_air_fraction"
    charts = sweep_charts(clinic_table, [oa], system="IP")
    assert sorted(charts) == [
        "sweep_coil_load_1",
        "sweep_plant_capacity",
        "sweep_plant_capacity_map",
    ]
    for chart in charts.values():
        spec = chart.to_dict()  # validates against the Vega-Lite schema
        assert json.loads(json.dumps(spec)) == spec
    # a second axis is held at its first value, and the subtitle says so
    doubled = pd.concat(
        [clinic_table.assign(**{"plant.cooling_margin_percent": m}) for m in (5.0, 15.0)]
    )
    charts = sweep_charts(doubled, [oa, "plant.cooling_margin_percent"])
    subtitle = charts["sweep_plant_capacity"].to_dict()["title"]["subtitle"]
    assert "Other axes held at: Cooling margin percent (plant) = 5" in subtitle[1]
    cells = charts["sweep_plant_capacity_map"].data  # 3 fractions x 2 margins, first climate
    assert len(cells) == 6 and set(cells["y"]) == {"5", "15"}
    assert (
        "Climate = Salvia Flats"
        in charts["sweep_plant_capacity_map"].to_dict()["title"]["subtitle"][1]
    )


def test_column_quantities_follow_the_unit_suffix():
    assert column_quantity("design_coil_total_kW[AHU-1]") == "power"
    assert column_quantity("heating_design_load_kW") == "heating_power"
    assert column_quantity("cooling_energy_kWh") == "energy"
    assert column_quantity("air_handler[2].supply_drybulb_C") == "temperature"
    assert column_quantity("air_handler[2].minimum_outdoor_air_fraction") is None
