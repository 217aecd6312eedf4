"""The water side of a study: scenario tables, each option's year, the command line."""

import dataclasses
import json
import math
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from plantside.cli.main import main
from plantside.errors import ScenarioError
from plantside.plant.chillers import IPLV_TOLERANCE, default_chiller_curves
from plantside.study.run import run_study, study_summary
from plantside.study.scenario import dumps_scenario, load_scenario, loads_scenario
from plantside.study.water_side_run import run_water_side
from plantside.units import delta_celsius_from_fahrenheit, gpm_from_m3s, meters_from_feet

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
CLINIC = SCENARIOS / "quillon_clinic.toml"
SCHOOL = SCENARIOS / "korva_school_zone_file.toml"


@pytest.fixture(scope="module")
def clinic():
    result = run_study(load_scenario(CLINIC))
    return result, run_water_side(result)


def test_clinic_tables_read_in_ip():
    # 44 °F = 6.667 °C, 12 °F = 6.667 K, 70 ft = 21.34 m (°F/°C and NIST SP 811 foot).
    spec = load_scenario(CLINIC).water_side
    assert spec.chilled_water.supply_temperature == pytest.approx(6.6667, abs=1e-4)
    assert spec.chilled_water.design_delta_t == pytest.approx(delta_celsius_from_fahrenheit(12.0))
    assert spec.chilled_water_pump.head == pytest.approx(meters_from_feet(70.0))
    assert spec.condenser.waterside_economizer
    assert spec.hot_water.boiler_type == "condensing"


def test_scenario_round_trip_keeps_the_water_side():
    scenario = load_scenario(CLINIC)
    back = loads_scenario(dumps_scenario(scenario))
    a, b = back.water_side, scenario.water_side
    assert a.chilled_water == b.chilled_water and a.hot_water == b.hot_water
    assert a.condenser.fan_power_per_heat == pytest.approx(b.condenser.fan_power_per_heat)
    assert a.chiller_staging_fraction == b.chiller_staging_fraction


def test_files_without_tables_keep_working():
    text = CLINIC.read_text(encoding="utf-8")
    start, end = text.index("[plant.chilled_water]"), text.index("[[air_handler]]")
    scenario = loads_scenario(text[:start] + text[end:], base_dir=SCENARIOS)
    assert scenario.water_side is None
    result = run_study(scenario)
    assert run_water_side(result) is None
    assert study_summary(result)["water_side"] is None


@pytest.mark.parametrize(
    ("field", "value", "message"),
    [
        # 1-20 °C is 33.8-68 °F; 0-200 m of head is 0-656.2 ft: the range in the file's units
        ("supply_temperature", "90.0", "90 °F is outside the allowed range 33.8 to 68 °F"),
        ("pump_head", "900.0", "900 ft is outside the allowed range 0 to 656.168 ft"),
        ("staging_fraction", "0.1", "0.1 is outside the allowed range 0.3 to 1"),
    ],
)
def test_bad_value_names_field_and_range_in_file_units(field, value, message):
    text = CLINIC.read_text(encoding="utf-8")
    start = text.index("[plant.chilled_water]")
    line_start = text.index(f"\n{field} = ", start) + 1
    line_end = text.index("\n", line_start)
    bad = text[:line_start] + f"{field} = {value}" + text[line_end:]
    with pytest.raises(ScenarioError, match=f"plant.chilled_water.{field}") as caught:
        loads_scenario(bad, base_dir=SCENARIOS)
    assert message in str(caught.value)


def test_design_flow_matches_24_tons_over_delta_t(clinic):
    # Common practice (no source): gpm = 24 x tons / ΔT °F, at the design coil load.
    result, water = clinic
    design_coil_kw = result.cooling.design_load / (
        1 + result.scenario.distribution_gain_percent / 100
    )
    row = water.options.iloc[0]
    tons = design_coil_kw / 3.51685
    assert gpm_from_m3s(row["design_flow_m3s"]) == pytest.approx(24 * tons / 12.0, rel=5e-3)


def test_tower_at_the_evaporation_wet_bulb(clinic):
    # Tower leaving water = evaporation design WB (0.4 %) + approach (7 °F); ~3 gpm per tower
    # ton at a 10 °F range (common practice, no source).
    result, water = clinic
    wet_bulb = result.conditions.evaporation(0.4).wet_bulb
    for _, design in water.heat_rejection:
        assert design.entering_air == wet_bulb
        assert design.leaving_water == pytest.approx(wet_bulb + delta_celsius_from_fahrenheit(7.0))
        assert gpm_from_m3s(design.flow) / design.nominal_tons == pytest.approx(3.0, rel=0.01)


def test_each_option_balances_every_hour_and_keeps_its_rating(clinic):
    # First law each hour (condenser heat = cooling served + input) and the curves' IPLV
    # against the option's rating (AHRI 550/590 weights) within the stated tolerance.
    _, water = clinic
    for _, year in water.chiller_options:
        h = year.hourly
        served = h["chiller_load_kW"] - h["unmet_kW"]
        np.testing.assert_allclose(h["condenser_heat_kW"], served + h["chiller_input_kW"])
    cooling = water.options[water.options["plant"] == "cooling"]
    assert (cooling["curves_iplv_cop"] / cooling["rated_iplv_cop"] - 1).abs().max() < IPLV_TOLERANCE
    assert (cooling["hours_extra_for_flow"] > 0).all()  # the clinic's ΔT falls at part load


def test_clinic_and_school_show_the_figures(capsys):
    # The examples print flows, pump power, tower size and annual kWh in the file's units.
    assert main(["design", str(CLINIC)]) == 0
    text = capsys.readouterr().out
    assert "Water side" in text and " gpm" in text and "nominal tons" in text and "kWh" in text
    assert main(["design", str(SCHOOL)]) == 0
    text = capsys.readouterr().out
    assert "Water side" in text and " L/s" in text and "air-cooled" in text
    assert "non-condensing boiler would condense" in text


def test_design_json_carries_the_water_side(capsys):
    assert main(["design", str(CLINIC), "--json"]) == 0
    water = json.loads(capsys.readouterr().out)["water_side"]
    names = [o["option"] for o in water["options"]]
    assert names == ["2 x 50 %", "3 x 34 %", "35 % lead + 65 %", "2 x 67 %", "3 x 40 %"]
    cooling = water["options"][0]
    assert cooling["plant_kWh"] == pytest.approx(
        cooling["chiller_kWh"] + cooling["pump_kWh"] + cooling["tower_fan_kWh"]
    )
    assert all(math.isfinite(d["nominal_tower_tons"]) for d in water["heat_rejection"])


def _with_curves(text, option_name, lines):
    """The clinic's text with curve lines added to one cooling option."""
    anchor = text.index(f'name = "{option_name}"')
    end = text.index("\n\n", anchor)
    return text[:end] + "\n" + "\n".join(lines) + text[end:]


def _option_year(result, options):
    scenario = dataclasses.replace(result.scenario, cooling_options=options)
    water = run_water_side(dataclasses.replace(result, scenario=scenario))
    return dict(water.chiller_options)


def test_option_curves_replace_the_default_set(clinic):
    # The curve form (input = capacity / COP x CAPFT x EIRFT x EIRFPLR): with the default
    # set's own coefficients the year is the default year exactly; with CAPFT = EIRFT = 1
    # and EIRFPLR = PLR the input is the served load over the rated COP every hour.
    result, _ = clinic
    plain = dataclasses.replace(result.scenario.cooling_options[0], efficiency=None)
    default = default_chiller_curves(result.scenario.water_side.condenser.condenser)
    same = dataclasses.replace(
        plain,
        name="own",
        capacity_curve=default.capft,
        efficiency_curve=default.eirft,
        part_load_curve=default.eirfplr,
    )
    flat = dataclasses.replace(
        same,
        name="flat",
        capacity_curve=(1.0, 0, 0, 0, 0, 0),
        efficiency_curve=(1.0, 0, 0, 0, 0, 0),
        part_load_curve=(0.0, 1.0, 0.0),
    )
    years = _option_year(result, (plain, same, flat))
    base, own, linear = years[plain.name], years["own"], years["flat"]
    pd.testing.assert_frame_equal(base.hourly, own.hourly)
    h = linear.hourly
    served = h["chiller_load_kW"] - h["unmet_kW"]
    np.testing.assert_allclose(h["chiller_input_kW"], served / default.reference_cop, atol=1e-9)
    assert linear.summary()["chiller_kWh"] != pytest.approx(base.summary()["chiller_kWh"])


def test_option_curves_are_read_checked_and_round_trip():
    text = CLINIC.read_text(encoding="utf-8")
    lines = [
        "capacity_curve = [1.0, 0.0, 0.0, 0.0, 0.0, 0.0]",
        "efficiency_curve = [1.2, 0.0, 0.0, -0.00679, 0.0, 0.0]",  # 1.0001 at 29.44 °C
        "part_load_curve = [0.1, 0.3, 0.6]",
    ]
    scenario = loads_scenario(_with_curves(text, "2 x 50 %", lines), base_dir=SCENARIOS)
    option = scenario.cooling_options[0]
    assert option.efficiency_curve == (1.2, 0.0, 0.0, -0.00679, 0.0, 0.0)
    back = loads_scenario(dumps_scenario(scenario), base_dir=SCENARIOS)
    assert back.cooling_options == scenario.cooling_options
    # 85 °F entering condenser = 29.44 °C (AHRI 550/590 water-cooled full load, from
    # memory): 1.2 - 0.01 x 29.44 = 0.906, outside 1 +- 2 %.
    far = [*lines[:1], "efficiency_curve = [1.2, 0.0, 0.0, -0.01, 0.0, 0.0]", lines[2]]
    with pytest.raises(ScenarioError, match="efficiency_curve") as caught:
        loads_scenario(_with_curves(text, "2 x 50 %", far), base_dir=SCENARIOS)
    assert "0.9056" in str(caught.value) and "SI (°C)" in str(caught.value)
    with pytest.raises(ScenarioError, match=r"part_load_curve.*missing"):
        loads_scenario(_with_curves(text, "2 x 50 %", lines[:2]), base_dir=SCENARIOS)
    short = [*lines[:2], "part_load_curve = [0.1, 0.9]"]
    with pytest.raises(ScenarioError, match=r"part_load_curve.*expected 3 numbers"):
        loads_scenario(_with_curves(text, "2 x 50 %", short), base_dir=SCENARIOS)
