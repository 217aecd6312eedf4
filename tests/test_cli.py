"""The command line: every example scenario runs; corrupted copies exit 2 with a message."""

import json
import re
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest
from plantside.cli.main import main

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
EXAMPLES = sorted(SCENARIOS.glob("*.toml"))
CLINIC = SCENARIOS / "quillon_clinic.toml"


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_design_table_for_every_example(path, capsys):
    assert main(["design", str(path)]) == 0
    out = capsys.readouterr().out
    assert "plant: design load" in out
    assert "licensed engineer" in out  # the caution is always printed


def test_design_json_is_si_with_unit_suffixes(capsys):
    assert main(["design", str(CLINIC), "--json"]) == 0
    summary = json.loads(capsys.readouterr().out)
    unit = summary["air_handlers"][0]
    for key in (
        "design_coil_total_kW",
        "design_zone_sensible_kW",
        "supply_drybulb_C",
        "annual_coil_total_kWh",
    ):
        assert key in unit
    assert (
        summary["cooling_plant"]["design_capacity_kW"] > summary["cooling_plant"]["design_load_kW"]
    )
    # 55 °F in the file is reported in SI in the JSON.
    assert unit["supply_drybulb_C"] == pytest.approx(12.7778, abs=1e-3)


def test_year_writes_hourly_csv_and_summary(tmp_path, capsys):
    assert main(["year", str(CLINIC), "--out", str(tmp_path)]) == 0
    files = sorted(p.name for p in tmp_path.iterdir())
    assert "summary.json" in files
    hourly = [p for p in tmp_path.glob("hourly_*.csv")]
    assert len(hourly) == 3
    frame = pd.read_csv(hourly[0])
    assert len(frame) == 8760
    assert "coil_total_kW" in frame.columns
    summary = json.loads((tmp_path / "summary.json").read_text())
    bins = pd.DataFrame(summary["cooling_plant"]["part_load_bins"])
    # Part-load bins add up to the year's cooling energy (issue check).
    assert bins["energy_kWh"].sum() == pytest.approx(
        summary["cooling_plant"]["annual_energy_kWh"], rel=1e-9
    )


def test_year_parquet(tmp_path):
    assert main(["year", str(CLINIC), "--out", str(tmp_path), "--format", "parquet"]) == 0
    frames = list(tmp_path.glob("hourly_*.parquet"))
    assert len(frames) == 3 and len(pd.read_parquet(frames[0])) == 8760


@pytest.mark.parametrize(
    ("old", "new", "field"),
    [
        ("supply_airflow = 4500.0", 'supply_airflow = "lots"', "air_handler[1].supply_airflow"),
        ('unit_system = "IP"', "", "unit_system"),
        (
            "minimum_airflow_fraction = 0.3",
            "minimum_airflow_fractoin = 0.3",
            "air_handler[2].minimum_airflow_fractoin",
        ),
        ('climate = "Salvia Flats"', 'weather_file = "gone/away.csv"', "site.weather_file"),
    ],
)
def test_corrupted_scenario_exits_2_naming_the_field(tmp_path, capsys, old, new, field):
    text = CLINIC.read_text(encoding="utf-8")
    path = tmp_path / "corrupt.toml"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    assert main(["design", str(path)]) == 2
    err = capsys.readouterr().err
    assert field in err
    assert "Traceback" not in err


def test_installed_entry_point_runs_and_fails_cleanly(tmp_path):
    ok = subprocess.run(
        [sys.executable, "-m", "plantside.cli.main", "climates"],
        capture_output=True,
        text=True,
        check=False,
    )
    assert ok.returncode == 0 and "fictional" in ok.stdout
    bad = tmp_path / "bad.toml"
    bad.write_text('unit_system = "SI"\n[[air_handler]]\nname = 3\n', encoding="utf-8")
    run = subprocess.run(
        [sys.executable, "-m", "plantside.cli.main", "design", str(bad)],
        capture_output=True,
        text=True,
        check=False,
    )
    assert run.returncode == 2
    assert "Traceback" not in run.stderr and "plantside: error" in run.stderr


def test_charts_writes_every_dashboard_chart_as_png_and_svg(tmp_path):
    import xml.etree.ElementTree as ET

    office = SCENARIOS / "linden_office_si.toml"
    assert main(["charts", str(office), "--out", str(tmp_path)]) == 0
    pngs = sorted(tmp_path.glob("*.png"))
    svgs = sorted(tmp_path.glob("*.svg"))
    # The plant view and the one air handler's view, five charts each (the dashboard's five).
    assert len(pngs) == len(svgs) == 10
    for png in pngs:
        data = png.read_bytes()
        assert data[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948)
        width = int.from_bytes(data[16:20], "big")  # IHDR width
        assert width >= 1200  # report resolution (scale 2)
    for svg in svgs:
        root = ET.fromstring(svg.read_text(encoding="utf-8"))
        assert root.tag.endswith("svg")
        assert "Tinderloft Works" in svg.read_text(encoding="utf-8")  # the scenario stamp


def test_climates_and_design_show_the_suggested_climate_zone(capsys):
    # plantside.climate.climate_zone: the hot-humid fictional site suggests 2A; the clinic
    # confirms 2A in site.climate_zone (example_data/scenarios/quillon_clinic.toml).
    assert main(["climates", "--json"]) == 0
    listed = {c["name"]: c for c in json.loads(capsys.readouterr().out)}
    assert listed["Salvia Flats"]["suggested_climate_zone"] == "2A"
    assert main(["design", str(CLINIC)]) == 0
    text = capsys.readouterr().out
    assert "climate zone 2A (site.climate_zone)" in text
    assert "economizer_drybulb_limit 70 °F is above" in text


def test_cautions_of_an_ip_study_are_in_its_units_and_the_disclaimer_once(capsys):
    assert main(["design", str(CLINIC)]) == 0
    cautions = [line for line in capsys.readouterr().out.splitlines() if line.startswith("!")]
    text = "\n".join(cautions)
    # the clinic is an I-P study: powers in tons (AHRI 550/590), temperatures in °F
    assert re.search(r"\d tons", text), text
    assert not re.search(r"\d(?:\.\d+)? ?(?:kW|kWh|°C)\b", text), text
    # one disclaimer line, not one from the study and another from the plant sizing
    assert sum("licensed engineer" in line for line in cautions) == 1


def test_cautions_in_the_json_stay_si(capsys):
    assert main(["design", str(CLINIC), "--json"]) == 0
    cautions = json.loads(capsys.readouterr().out)["cautions"]
    assert any(re.search(r"\d kW", c) for c in cautions)
    assert not any(re.search(r"\d tons", c) for c in cautions)


def test_every_mistake_of_an_ip_file_is_reported_in_its_units(tmp_path, capsys):
    text = CLINIC.read_text(encoding="utf-8")
    text = text.replace("supply_airflow = 14000", "supply_airflow = -200", 1)
    text = text.replace("bypass_factor = 0.10", "bypass_factor = 1.5", 1)
    path = tmp_path / "two.toml"
    path.write_text(text, encoding="utf-8")
    assert main(["design", str(path)]) == 2
    err = capsys.readouterr().err
    assert "and 1 more mistake" in err
    # -200 cfm as written (the README promises the file's units), not m³/s
    assert "air_handler[2].supply_airflow: supply_airflow = -200.0 cfm" in err
    assert "air_handler[2].bypass_factor" in err
    assert "m³/s" not in err and "Traceback" not in err


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_sizing_cautions_quote_the_figures_the_plant_lines_show(path, capsys):
    # A caution rounded in kW and then converted (339 kW -> 96.4 tons) disagreed with the
    # plant line's 96.5 tons; a figure the table shows must read the same in a caution.
    assert main(["design", str(path)]) == 0
    text = capsys.readouterr().out
    figure = r"([\d,]+\.\d) (tons|MBH|kW)"
    shown = {
        (value, unit)
        for line in text.splitlines()
        if line.startswith(("Cooling plant:", "Heating plant:"))
        for value, unit in re.findall(figure, line)
    }
    for line in (line for line in text.splitlines() if line.startswith("!")):
        for phrase in ("year's peak (", "design load ("):
            if phrase in line:
                quoted = re.search(re.escape(phrase) + figure, line)
                assert quoted and (quoted[1], quoted[2]) in shown, (line, shown)


def test_plant_cautions_say_which_plant(capsys):
    # the SI office's cooling and heating plants both fall short of their year's peak:
    # two cautions that read alike must say which plant each is about
    assert main(["design", str(SCENARIOS / "linden_office_si.toml")]) == 0
    cautions = [line for line in capsys.readouterr().out.splitlines() if "below the year" in line]
    assert [line.split(":")[0] for line in cautions] == ["! Cooling plant", "! Heating plant"]
