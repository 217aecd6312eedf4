"""Writing a scenario back: :class:`Scenario` -> TOML in the scenario's own unit system.

:func:`scenario_to_dict` gives the TOML-ready tables (defaults left out, numbers to
:data:`plantside.study.toml_input.SAVE_SIGNIFICANT_DIGITS` significant digits),
:func:`dumps_scenario` the text and :func:`save_scenario` the file, so a scenario saved
from the dashboard loads back identically.
"""

from __future__ import annotations

import dataclasses
from dataclasses import fields
from pathlib import Path

import tomli_w

from plantside.air_handler.year import AirHandlerSettings
from plantside.air_handler.zone_loads import ZoneLoadModel
from plantside.study.scenario_fields import FIELD_QUANTITIES
from plantside.study.scenario_spec import CURVE_FIELDS, PlantOptionSpec, Scenario
from plantside.study.toml_input import saved_number
from plantside.study.water_side import water_side_to_tables
from plantside.units import to_display

__all__ = ["dumps_scenario", "save_scenario", "scenario_to_dict"]


def _display(key, value, system):
    if value is None:
        return "none"
    if isinstance(value, bool | str | int):
        return value
    if isinstance(value, tuple):
        return [saved_number(v) for v in value]
    if key in FIELD_QUANTITIES:
        value = float(to_display(FIELD_QUANTITIES[key], value, system)[0])
    return saved_number(value)


def _table_from_dataclass(obj, system, defaults) -> dict:
    table = {}
    for f in fields(obj):
        value = getattr(obj, f.name)
        default = getattr(defaults, f.name, dataclasses.MISSING)
        if f.name != "name" and default is not dataclasses.MISSING and value == default:
            continue
        table[f.name] = _display(f.name, value, system)
    return table


def _option_table(option: PlantOptionSpec) -> dict:
    table = {
        "name": option.name,
        "capacity_fractions": [saved_number(v) for v in option.capacity_fractions],
        "minimum_turndown": option.minimum_turndown,
        "efficiency_metric": option.efficiency_metric,
    }
    if option.efficiency is not None:
        table["efficiency"] = list(option.efficiency)
    for key in CURVE_FIELDS:
        # SI coefficients whatever the unit system, written unrounded
        if getattr(option, key) is not None:
            table[key] = [float(v) for v in getattr(option, key)]
    return table


def scenario_to_dict(scenario: Scenario) -> dict:
    """The scenario as a TOML-ready dict, numbers in the scenario's unit system.

    Numbers are rounded to :data:`plantside.study.toml_input.SAVE_SIGNIFICANT_DIGITS`
    significant digits.
    """
    system = scenario.unit_system
    site = {}
    if scenario.climate is not None:
        site["climate"] = scenario.climate
    else:
        site["weather_file"] = scenario.weather_file
        if scenario.weather_units is not None:
            site["weather_units"] = scenario.weather_units
    if scenario.altitude is not None:
        site["altitude"] = _display(
            "altitude", float(to_display("length", scenario.altitude, system)[0]), system
        )
    if scenario.fill_gaps:
        site["fill_gaps"] = True
    site["cooling_design_percent"] = scenario.cooling_design_percent
    site["heating_design_percent"] = scenario.heating_design_percent
    for key in ("climate_zone", "latitude", "longitude", "time_zone"):
        if getattr(scenario, key) is not None:
            site[key] = getattr(scenario, key)
    plant = {
        "distribution_gain_percent": scenario.distribution_gain_percent,
        "cooling_margin_percent": scenario.cooling_margin_percent,
        "heating_margin_percent": scenario.heating_margin_percent,
    }
    for key in ("heating_pickup_percent", "cooling_pickup_percent"):
        if getattr(scenario, key) is not None:
            plant[key] = getattr(scenario, key)
    if scenario.cooling_options:
        plant["cooling_option"] = [_option_table(o) for o in scenario.cooling_options]
    if scenario.heating_options:
        plant["heating_option"] = [_option_table(o) for o in scenario.heating_options]
    plant.update(water_side_to_tables(scenario.water_side, system))
    units = []
    default_settings = AirHandlerSettings()
    for spec in scenario.air_handlers:
        table = _table_from_dataclass(spec.settings, system, default_settings)
        if spec.zone is not None:
            zone_defaults = {f.name: f.default for f in fields(ZoneLoadModel)}
            table["zone"] = {
                f.name: _display(f.name, getattr(spec.zone, f.name), system)
                for f in fields(spec.zone)
                if f.init
                and (
                    zone_defaults[f.name] is dataclasses.MISSING
                    or getattr(spec.zone, f.name) != zone_defaults[f.name]
                )
            }
        else:
            table["zone_load_file"] = spec.zone_load_file
        units.append(table)
    return {
        "title": scenario.title,
        "unit_system": str(system),
        "site": site,
        "plant": plant,
        "air_handler": units,
    }


def dumps_scenario(scenario: Scenario) -> str:
    """The scenario as TOML text in its unit system (what 'save' writes)."""
    title = " ".join("".join(c if c.isprintable() else " " for c in scenario.title).split())
    header = (
        f"# plantside scenario: {title}\n"
        f"# Numbers are in {scenario.unit_system} units (see README, 'Scenario files').\n\n"
    )
    return header + tomli_w.dumps(scenario_to_dict(scenario))


def save_scenario(scenario: Scenario, path) -> Path:
    """Write the scenario to ``path`` as TOML; returns the path."""
    path = Path(path)
    path.write_text(dumps_scenario(scenario), encoding="utf-8")
    return path
