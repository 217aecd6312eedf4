"""The water-side chart and the coil-schedule and water-side tables of a study.

Every number drawn or tabled is the study's own (``run_water_side``, ``coil_schedule``,
``study_summary``), converted with unit factors from NIST SP 811 (2008), so the chart
layer adds no calculation of its own.
"""

from __future__ import annotations

import html
import json
import re
from pathlib import Path

import altair as alt
import numpy as np
import pytest
from plantside.air_handler.coil_schedule import coil_schedule
from plantside.charts.export import chart_bytes
from plantside.charts.tables import (
    STARTS_ROW,
    coil_schedule_html,
    coil_schedule_table,
    html_table,
    staging_note,
    water_side_html,
    water_side_tables,
)
from plantside.charts.water_side import (
    EFFICIENCY_COLOURS,
    ENERGY_COLOURS,
    efficiency_display,
    water_side_chart,
    water_side_efficiency_frame,
    water_side_energy_frame,
    water_side_of_units,
)
from plantside.study.run import run_study, study_summary
from plantside.study.scenario import load_scenario
from plantside.study.water_side_run import run_water_side, water_side_summary
from test_chart_export import png_header
from test_charts import _CVD, MIN_DELTA_E, _lab, _linear_rgb

CLINIC = Path(__file__).parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"

# NIST SP 811 (2008), Appendix B: 1 US gallon = 3.785411784e-3 m³, 1 ft³ = 2.831684659e-2 m³,
# 1 Btu_IT/h = 0.2930710702 W, 1 lb = 0.45359237 kg; 1 ton of refrigeration = 12,000 Btu/h.
M3S_PER_GPM = 3.785411784e-3 / 60.0
M3S_PER_CFM = 2.831684659e-2 / 60.0
KW_PER_TON = 12_000 * 0.2930710702e-3


@pytest.fixture(scope="module")
def clinic():
    result = run_study(load_scenario(CLINIC))
    return result, run_water_side(result)


@pytest.mark.parametrize("system", ["SI", "IP"])
def test_energy_frame_is_the_study_kwh_stacked(clinic, system):
    result, water = clinic
    frame = water_side_energy_frame(water, system)
    summary = study_summary(result)["water_side"]
    cooling = [row for row in summary["options"] if row["plant"] == "cooling"]
    assert frame.attrs["system"] == system
    assert list(dict.fromkeys(frame["option"])) == [row["option"] for row in cooling]
    for row in cooling:  # the --json figures, bit for bit (electricity is kWh in both)
        part = frame[frame["option"] == row["option"]].set_index("part")["energy"]
        assert part["Chillers"] == row["chiller_kWh"]
        assert part["Pumps"] == row["pump_kWh"]
        assert part["Tower fans"] == row["tower_fan_kWh"]
        # the stack closes on the plant's total (chillers + pumps + tower fans)
        stack = frame[frame["option"] == row["option"]]
        assert stack["end"].iloc[-1] == pytest.approx(row["plant_kWh"], rel=1e-12)
        assert stack["percent"].sum() == pytest.approx(100.0, rel=1e-12)


def test_efficiency_frame_is_cop_in_si_and_kw_per_ton_in_ip(clinic):
    _, water = clinic
    si = water_side_efficiency_frame(water, "SI")
    ip = water_side_efficiency_frame(water, "IP")
    assert (si.attrs["unit"], ip.attrs["unit"]) == ("COP", "kW/ton")
    first = water.options.iloc[0]
    rows = si[si["option"] == first["option"]].set_index("measure")["value"]
    assert rows["Seasonal, chillers"] == first["seasonal_cop"]
    assert rows["IPLV as rated (AHRI 550/590)"] == first["rated_iplv_cop"]
    # kW/ton = 3.517 / COP (12,000 Btu/h per ton; NIST SP 811 Btu_IT)
    assert ip["value"].to_numpy() == pytest.approx(KW_PER_TON / si["value"].to_numpy(), rel=1e-6)
    assert float(efficiency_display(KW_PER_TON, "IP")[0]) == pytest.approx(1.0, rel=1e-6)


@pytest.mark.parametrize("system", ["SI", "IP"])
def test_chart_spec_validates_round_trips_and_renders(clinic, system):
    _, water = clinic
    energy = water_side_energy_frame(water, system)
    efficiency = water_side_efficiency_frame(water, system)
    chart = water_side_chart(energy, efficiency, width=520)
    spec = chart.to_dict(validate=True)
    again = alt.Chart.from_dict(json.loads(json.dumps(spec))).to_dict(validate=True)
    assert again == spec
    # the data are the frames' rows, no hourly payload
    assert len(spec["datasets"]) == 2
    assert sum(len(rows) for rows in spec["datasets"].values()) == len(energy) + len(efficiency)
    text = json.dumps(spec)
    assert "Electricity a year [kWh]" in text
    assert ("kW/ton" in text) == (system == "IP") and ("COP" in text) == (system == "SI")
    width, height = png_header(chart_bytes(chart, "png", scale=1))
    assert width > 520 and height > 200


def test_chart_colours_stay_apart_for_colour_blind_readers():
    # Machado et al. (2009) simulations as in test_charts.py; colours of one panel
    for colours in (ENERGY_COLOURS, EFFICIENCY_COLOURS):
        for vision, matrix in _CVD.items():
            lab = {n: _lab(matrix @ _linear_rgb(c)) for n, c in colours.items()}
            names = list(lab)
            for i, a in enumerate(names):
                for b in names[i + 1 :]:
                    assert np.linalg.norm(lab[a] - lab[b]) >= MIN_DELTA_E, (vision, a, b)


@pytest.mark.parametrize("system", ["SI", "IP"])
def test_coil_schedule_table_is_the_study_schedule_in_user_units(clinic, system):
    result, _ = clinic
    schedule = coil_schedule(result.air_handlers)
    table = coil_schedule_table(schedule, system)
    assert len(table) == len(schedule)
    json_rows = study_summary(result)["coil_schedule"]
    assert [r["total_kW"] for r in json_rows] == list(schedule["total_kW"])
    cooling = (schedule["coil"] == "cooling").to_numpy()
    if system == "SI":
        assert table["Airflow [L/s]"].to_numpy() == pytest.approx(
            1000.0 * schedule["airflow_m3s"].to_numpy(), rel=1e-12
        )
        assert table["Entering DB [°C]"].to_numpy() == pytest.approx(
            schedule["entering_drybulb_C"].to_numpy(), rel=1e-12
        )
        assert table["Total"].to_numpy() == pytest.approx(schedule["total_kW"].to_numpy())
    else:
        assert table["Airflow [cfm]"].to_numpy() == pytest.approx(
            schedule["airflow_m3s"].to_numpy() / M3S_PER_CFM, rel=1e-9
        )
        # °F = 1.8 °C + 32 (NIST SP 811 B.9)
        assert table["Leaving WB [°F]"].to_numpy() == pytest.approx(
            1.8 * schedule["leaving_wet_bulb_C"].to_numpy() + 32.0, rel=1e-12
        )
        # cooling rows in tons, heating rows in MBH (thousands of Btu/h)
        total = schedule["total_kW"].to_numpy()
        assert table["Total"].to_numpy()[cooling] == pytest.approx(
            total[cooling] / KW_PER_TON, rel=1e-6
        )
        assert table["Total"].to_numpy()[~cooling] == pytest.approx(
            total[~cooling] / 0.2930710702, rel=1e-6
        )
        assert set(table["Load unit"]) == {"tons", "MBH"}
        assert table["Condensate [lb/h]"].to_numpy() == pytest.approx(
            schedule["condensate_kgs"].to_numpy() * 3600 / 0.45359237, rel=1e-12
        )
    assert table["SHR [-]"].to_numpy()[cooling] == pytest.approx(
        schedule["sensible_kW"].to_numpy()[cooling] / schedule["total_kW"].to_numpy()[cooling]
    )
    page = coil_schedule_html(schedule, system)
    assert page.count("<tr>") == len(schedule) + 1
    first = table.iloc[0]
    airflow = first.filter(like="Airflow [").iloc[0]
    assert f"<td>{airflow:,.0f}</td>" in page


@pytest.mark.parametrize("system", ["SI", "IP"])
def test_water_side_tables_are_the_study_figures(clinic, system):
    result, water = clinic
    spec = result.scenario.water_side
    tables = water_side_tables(water, spec, system)
    assert set(tables) == {"cooling", "heating", "heat_recovery"}
    summary = study_summary(result)["water_side"]
    rows = {(r["plant"], r["option"]): r for r in summary["options"]}
    cooling = tables["cooling"]
    for _, line in cooling.iterrows():
        row = rows[("cooling", line["Option"])]
        flow = line.filter(like="Chilled water [").iloc[0]
        if system == "SI":
            assert flow == pytest.approx(1000 * row["design_flow_m3s"], rel=1e-12)
            assert line["ΔT [K]"] == spec.chilled_water.design_delta_t
            assert line["Seasonal [COP]"] == row["seasonal_cop"]
        else:
            assert flow == pytest.approx(row["design_flow_m3s"] / M3S_PER_GPM, rel=1e-9)
            # the clinic's file says a 12 °F chilled-water ΔT
            assert line["ΔT [°F]"] == pytest.approx(12.0, rel=1e-9)
            assert line["IPLV rated [kW/ton]"] == pytest.approx(
                KW_PER_TON / row["rated_iplv_cop"], rel=1e-6
            )
        assert line["Chillers [kWh]"] == row["chiller_kWh"]
        assert line["Pumps [kWh]"] == row["pump_kWh"]
        assert line["Tower fans [kWh]"] == row["tower_fan_kWh"]
        assert line["Pump [kW]"] == row["design_pump_kW"]
        assert line["Tower [nominal tons]"] == row["tower_tons"]
        assert line["Free-cooling hours [h]"] == row["free_cooling_hours"]
        assert line[STARTS_ROW] == row["machine_starts"]
    heating = tables["heating"]
    for _, line in heating.iterrows():
        row = rows[("heating", line["Option"])]
        assert line["Fuel [kWh]"] == row["fuel_kWh"]
        assert line["Seasonal boiler efficiency [%]"] == pytest.approx(
            100 * row["seasonal_efficiency"], rel=1e-12
        )
        assert line[STARTS_ROW] == row["machine_starts"]
    recovery = tables["heat_recovery"].iloc[0]
    assert recovery["Heat-recovery hours [h]"] == summary["heat_recovery"]["heat_recovery_hours"]
    page = water_side_html(water, spec, system)
    assert page.count("<table") == 3 and page.count("<caption>") == 3
    # the staging the starts follow, from the scenario's own fractions
    assert html.escape(staging_note(spec)) in page
    chiller = f"{100 * spec.chiller_staging_fraction:.0f} % of the running capacity"
    assert chiller in staging_note(spec)
    # the option tables on their side (a column per option): fifteen columns of the
    # chilled-water table ran off a 1280 px page
    chilled = re.search(r"<table class='ps-table ps-options'>(.*?)</table>", page, re.S).group(1)
    heads = re.findall(r"<th scope='col'>(.*?)</th>", chilled)
    assert heads == ["Figure", *(html.escape(name) for name in cooling["Option"])]
    figures = re.findall(r"<th scope='row'>(.*?)</th>", chilled)
    assert figures == [html.escape(c) for c in cooling.columns if c != "Option"]
    chillers = re.search(r"<th scope='row'>Chillers \[kWh\]</th>(.*?)</tr>", chilled).group(1)
    assert re.findall(r"<td>(.*?)</td>", chillers) == [
        f"{v:,.0f}" for v in cooling["Chillers [kWh]"]
    ]


def test_tables_escape_text():
    import pandas as pd

    frame = pd.DataFrame({"Air <handler>": ["<script>x</script> & co"], "Load [kW]": [1.25]})
    page = html_table(frame, caption="A & B")
    assert "<script>" not in page and "&lt;script&gt;" in page
    assert "<th>Air &lt;handler&gt;</th>" in page and "<caption>A &amp; B</caption>" in page
    assert re.search(r"<td>1\.2</td>|<td>1\.3</td>", page)


def test_no_water_side_gives_no_tables():
    assert water_side_tables(None, None, "SI") == {}
    assert water_side_html(None, None, "IP") == ""


def test_water_side_of_units_is_the_command_lines(clinic):
    # one calculation: the plants assembled from the same units give the same summary
    result, water = clinic
    again = water_side_of_units(
        result.scenario, result.weather, result.conditions, result.air_handlers
    )
    assert water_side_summary(again) == water_side_summary(water)
