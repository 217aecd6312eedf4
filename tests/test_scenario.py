"""Scenario files: validation messages, unit conversion at the edge, round trips."""

import dataclasses
import math
import tomllib
from pathlib import Path

import pytest
from plantside.errors import ScenarioError
from plantside.study.scenario import (
    dumps_scenario,
    load_scenario,
    loads_scenario,
    save_scenario,
)
from plantside.units import m3s_from_cfm

EXAMPLES = sorted((Path(__file__).parents[1] / "example_data" / "scenarios").glob("*.toml"))
CLINIC = Path(__file__).parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"


def _close(a, b):
    """Dataclasses equal field by field, floats to 1e-9 relative (unit round trips)."""
    if dataclasses.is_dataclass(a):
        return type(a) is type(b) and all(
            _close(getattr(a, f.name), getattr(b, f.name))
            for f in dataclasses.fields(a)
            if f.compare
        )
    if isinstance(a, tuple):
        return len(a) == len(b) and all(_close(x, y) for x, y in zip(a, b, strict=True))
    if isinstance(a, float) and isinstance(b, float):
        return math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-12)
    return a == b


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_every_example_loads_and_round_trips(path, tmp_path):
    scenario = load_scenario(path)
    text = dumps_scenario(scenario)
    again = loads_scenario(text, "again.toml", path.parent)
    # Saved and loaded back: the same study (floats through IP<->SI to 1e-9) and the
    # same text when saved a second time.
    assert _close(scenario, again)
    assert dumps_scenario(again) == text
    saved = save_scenario(again, tmp_path / "saved.toml")
    assert saved.read_text(encoding="utf-8") == text


def test_ip_numbers_are_converted_at_the_edge():
    scenario = load_scenario(CLINIC)
    unit = scenario.air_handlers[1].settings
    # 14,000 cfm in the file; the model works in m³/s (NIST SP 811: 1 cfm = 0.000471947 m³/s).
    assert unit.supply_airflow == pytest.approx(m3s_from_cfm(14000.0), rel=1e-12)
    # 55 °F supply air is 12.78 °C (exact conversion).
    assert unit.supply_drybulb == pytest.approx((55.0 - 32.0) / 1.8, rel=1e-12)
    # 17 tons of zone sensible load: 1 ton = 12,000 Btu/h = 3.51685 kW (AHRI 550/590).
    assert scenario.air_handlers[1].zone.cooling_design_sensible == pytest.approx(
        17.0 * 3.516853, rel=1e-6
    )
    # 1200 ft² of east glazing: 1 ft² = 0.09290304 m² (NIST SP 811, exact).
    assert scenario.air_handlers[1].zone.glazing_area_east == pytest.approx(
        1200.0 * 0.09290304, rel=1e-12
    )


def _corrupt(tmp_path, old, new, name="bad.toml"):
    text = CLINIC.read_text(encoding="utf-8")
    assert old in text, old
    path = tmp_path / name
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    return path


@pytest.mark.parametrize(
    ("old", "new", "field", "words"),
    [
        # wrong type
        (
            "supply_airflow = 4500.0",
            'supply_airflow = "lots"',
            "air_handler[1].supply_airflow",
            "expected a number",
        ),
        # unknown key, with a did-you-mean suggestion
        (
            "supply_airflow = 14000.0",
            "supply_airflo = 14000.0",
            "air_handler[2].supply_airflo",
            "did you mean 'supply_airflow'",
        ),
        # missing required field
        ('unit_system = "IP"', "", "unit_system", "missing"),
        # out of range (caught by the model's own validation, reported with the file path)
        ("bypass_factor = 0.10", "bypass_factor = 1.5", "air_handler[2].bypass_factor", "allowed"),
        # a climate that is not bundled
        (
            'climate = "Salvia Flats"',
            'climate = "Salvia Flat"',
            "site.climate",
            "did you mean 'Salvia Flats'",
        ),
        # an unreadable weather path
        (
            'climate = "Salvia Flats"',
            'weather_file = "no_such_year.csv"',
            "site.weather_file",
            "not found",
        ),
        # a design percentage the handbook does not tabulate
        (
            "cooling_design_percent = 0.4",
            "cooling_design_percent = 5",
            "site.cooling_design_percent",
            "allowed: 0.4, 1, 2",
        ),
        # a plant option with an impossible machine size
        (
            "capacity_fractions = [0.5, 0.5]",
            "capacity_fractions = [0.5, -0.5]",
            "plant.cooling_option[1].capacity_fractions[2]",
            "allowed range",
        ),
        # TOML syntax error
        ("[site]", "[site", "(syntax)", "not valid TOML"),
    ],
)
def test_bad_scenarios_name_file_field_and_allowed(tmp_path, old, new, field, words):
    path = _corrupt(tmp_path, old, new)
    with pytest.raises(ScenarioError) as caught:
        load_scenario(path)
    message = str(caught.value)
    assert str(path) in message
    assert field in message
    assert words in message


def test_unit_system_typo_is_refused(tmp_path):
    path = _corrupt(tmp_path, 'unit_system = "IP"', 'unit_system = "imperial"')
    with pytest.raises(ScenarioError, match=r"unit_system.*'SI' or 'IP'"):
        load_scenario(path)


def test_missing_file_and_bad_encoding(tmp_path):
    with pytest.raises(ScenarioError, match="not found"):
        load_scenario(tmp_path / "absent.toml")
    path = tmp_path / "latin1.toml"
    path.write_bytes('title = "Caf\xe9"\n'.encode("latin-1"))
    with pytest.raises(ScenarioError, match="not UTF-8"):
        load_scenario(path)


def test_with_air_handler_changes_one_setting_only():
    scenario = load_scenario(CLINIC)
    changed = scenario.with_air_handler(1, supply_drybulb=14.0)
    assert changed.air_handlers[1].settings.supply_drybulb == 14.0
    assert changed.air_handlers[0] == scenario.air_handlers[0]
    assert changed.air_handlers[2] == scenario.air_handlers[2]


def test_packaged_example_scenario_is_the_repository_example():
    # The dashboard opens the copy shipped as package data; it must be the documented example.
    packaged = Path(__file__).parents[1] / "core" / "plantside" / "data" / "example_scenario.toml"
    assert packaged.read_bytes() == CLINIC.read_bytes()


def test_uploaded_scenarios_cannot_reach_files_outside_their_folder(tmp_path):
    # An upload names files only inside its own folder (files="inside"); the command line
    # reads the user's own files wherever they are (files="any", the default).
    text = CLINIC.read_text(encoding="utf-8").replace(
        'climate = "Salvia Flats"', 'weather_file = "../climates/mesa_ardiente.csv"'
    )
    folder = CLINIC.parent
    assert loads_scenario(text, "mine.toml", folder).weather_file.startswith("../")
    with pytest.raises(ScenarioError, match="inside the scenario's folder"):
        loads_scenario(text, "upload.toml", folder, files="inside")
    absolute = text.replace("../climates/mesa_ardiente.csv", "/etc/hostname")
    with pytest.raises(ScenarioError, match=r"site\.weather_file"):
        loads_scenario(absolute, "upload.toml", tmp_path, files="inside")


def test_saved_title_with_control_characters_opens_again():
    scenario = load_scenario(CLINIC)
    odd = dataclasses.replace(scenario, title="Ward A\nfoo = 1\r\x0c\x7f end")
    again = loads_scenario(dumps_scenario(odd), "again.toml", CLINIC.parent)
    assert again.title == odd.title


# ---------------------------------------------------------------------------------------
# every mistake, in the file's units
# ---------------------------------------------------------------------------------------
def _clinic_with(*changes):
    """The clinic's text with each (old, new) replaced once, in order."""
    text = CLINIC.read_text(encoding="utf-8")
    for old, new in changes:
        assert old in text, old
        text = text.replace(old, new, 1)
    return text


def test_every_mistake_of_a_file_is_reported_in_its_units():
    text = _clinic_with(
        ("cooling_margin_percent = 10.0", "cooling_margin_percent = -5"),
        ("supply_airflow = 14000", "supply_airflow = -200"),
        # the same air handler's supply air above its zone set point
        ("supply_drybulb = 55.0", "supply_drybulb = 95.0"),
        ("bypass_factor = 0.10", "bypass_factor = 1.5"),
    )
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text, "several.toml", CLINIC.parent)
    error = caught.value
    message = str(error)
    # it reads as the first mistake, then the others, one line each
    assert message.startswith(f"several.toml: {error.field}: ")
    assert "and 3 more mistakes:" in message
    fields = [field for field, _ in error.problems]
    assert "plant.cooling_margin_percent" in fields
    assert "air_handler[2].supply_airflow" in fields
    assert "air_handler[1].supply_drybulb" in fields
    assert "air_handler[2].bypass_factor" in fields
    problems = dict(error.problems)
    # the file is I-P: the airflow in cfm (-200 cfm as written, NIST SP 811 factor both
    # ways), the temperature in °F (supply 4 °C = 39.2 °F, exact), never m³/s or °C
    assert "-200.0 cfm" in problems["air_handler[2].supply_airflow"]
    assert "m³/s" not in message and "°C" not in message
    assert "95.0 °F" in problems["air_handler[1].supply_drybulb"]
    assert "39.2 to" in problems["air_handler[1].supply_drybulb"]
    assert "1.5" in problems["air_handler[2].bypass_factor"]


def test_two_mistakes_in_one_air_handler_are_both_reported():
    text = _clinic_with(
        ("supply_airflow = 14000", "supply_airflow = -200"),
        ("bypass_factor = 0.10", "bypass_factor = 1.5"),
    )
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text, "two.toml", CLINIC.parent)
    assert [field for field, _ in caught.value.problems] == [
        "air_handler[2].supply_airflow",
        "air_handler[2].bypass_factor",
    ]


def test_one_mistake_reads_as_before():
    text = _clinic_with(("bypass_factor = 0.10", "bypass_factor = 1.5"))
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text, "one.toml", CLINIC.parent)
    assert str(caught.value).startswith("one.toml: air_handler[2].bypass_factor: ")
    assert caught.value.field == "air_handler[2].bypass_factor"


def test_si_file_airflow_mistake_is_reported_in_litres_per_second():
    path = EXAMPLES[[p.name for p in EXAMPLES].index("linden_office_si.toml")]
    text = path.read_text(encoding="utf-8")
    written = next(line for line in text.splitlines() if line.startswith("supply_airflow = "))
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text.replace(written, "supply_airflow = -5", 1), "si.toml", path.parent)
    # -5 L/s as written (1 L/s = 0.001 m³/s, SI)
    assert "supply_airflow = -5 L/s" in str(caught.value)
    assert "m³/s" not in str(caught.value)


# ---------------------------------------------------------------------------------------
# saving: the scenario's own units, sensible digits
# ---------------------------------------------------------------------------------------
def test_saved_numbers_are_in_the_files_units_with_sensible_digits():
    scenario = load_scenario(CLINIC)
    # 57 °F set in SI (13.888... °C) and an airflow come back through the exact factors
    # (°F = 1.8 °C + 32; NIST SP 811 cfm) as the numbers a design team types
    changed = scenario.with_air_handler(
        1, supply_drybulb=(57.0 - 32.0) / 1.8, supply_airflow=m3s_from_cfm(14250.0)
    )
    unit_text = dumps_scenario(changed).split("[[air_handler]]")[2]
    assert "supply_drybulb = 57.0\n" in unit_text
    assert "supply_airflow = 14250.0\n" in unit_text
    # in an SI study, the same 57 °F (set from the I-P view) and 4,500 cfm are written to
    # six significant digits: 13.8889 °C and 2,123.76 L/s (exact °F; NIST SP 811 cfm)
    office = load_scenario(EXAMPLES[[p.name for p in EXAMPLES].index("linden_office_si.toml")])
    moved = office.with_air_handler(
        0, supply_drybulb=(57.0 - 32.0) / 1.8, supply_airflow=m3s_from_cfm(4500.0)
    )
    text = dumps_scenario(moved)
    assert "supply_drybulb = 13.8889\n" in text
    assert "supply_airflow = 2123.76\n" in text
    # no number of the air handlers carries more than six significant digits
    for table in tomllib.loads(text)["air_handler"]:
        for value in (*table.values(), *table.get("zone", {}).values()):
            if isinstance(value, float):
                assert float(f"{value:.6g}") == value, value
