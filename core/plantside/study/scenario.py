"""Scenario files: a whole study in one human-readable TOML file.

A scenario holds the site and its climate, the unit system the file's numbers are
written in, the air handlers (each with its zone loads and settings) and the plant
options to compare. :func:`load_scenario` reads and validates a file into SI
objects; :func:`dumps_scenario` writes one back in the scenario's unit system, so
a scenario saved from the dashboard loads back identically.

Every problem raises :class:`plantside.errors.ScenarioError` naming the file, the
field (as a dotted path, e.g. ``air_handler[2].supply_drybulb``), the bad value and
what is allowed; an unknown key gets a did-you-mean suggestion.

The layout (field by field in the README)::

    title = "..."
    unit_system = "IP"            # or "SI": the units of every number below

    [site]
    climate = "Salvia Flats"      # a bundled fictional climate, or
    weather_file = "year.csv"     # an hourly CSV, relative to the scenario file
    cooling_design_percent = 0.4  # 0.4 | 1 | 2
    heating_design_percent = 99.6 # 99.6 | 99
    climate_zone = "2A"           # ASHRAE 90.1 climate zone (economizer high limits)
    latitude = 29.1               # degrees north; with longitude and time_zone, the sun's
    longitude = -94.7             # position for zones with glazing (bundled sites know theirs)
    time_zone = -6                # hours from UTC, standard time

    [plant]
    distribution_gain_percent = 3
    cooling_margin_percent = 10
    heating_margin_percent = 15
    heating_pickup_percent = 10   # morning pick-up after night set-back (default: 10 % where a
                                  # unit sets back, else 0; common practice)
    cooling_pickup_percent = 10   # morning pull-down after the zone floats up overnight
                                  # (default: 10 % where a unit's fan is off when
                                  # unoccupied, else 0; common practice)
    [[plant.cooling_option]]      # one table per option compared
    name = "2 x 50 %"
    capacity_fractions = [0.5, 0.5]
    minimum_turndown = 0.15
    efficiency_metric = "kw_per_ton"
    efficiency = [0.60, 0.52, 0.45, 0.50]   # at 100/75/50/25 % load
    [plant.chilled_water]         # optional water side: [plant.chilled_water], [plant.condenser],
    supply_temperature = 44       # [plant.hot_water] (plantside.study.water_side)

    [[air_handler]]               # one table per air handler
    name = "AHU-1"
    supply_airflow = 10000        # cfm (IP) or L/s (SI)
    design_airflow = "scheduled"  # cooling design at supply_airflow, or "load"
    unoccupied_heating = "terminal"   # fan off: perimeter/terminal heat, or "night_cycle"
    night_setback_drybulb = 60    # °F (IP) or °C (SI): unoccupied heating set point
    low_load_response = "reheat"  # VAV terminal reheat, or "raise_supply_temperature"
    zone_relative_humidity_max = 0.6  # optional zone humidity control (a fraction)
    ...
    [air_handler.zone]            # zone loads by the modified bin method, or
    cooling_design_sensible = 25  # tons (IP) or kW (SI)
    # zone_load_file = "ahu1_loads.csv"   (in [[air_handler]]) hourly zone loads

The parts live in their own modules and are re-exported here, where readers look first:
:mod:`~plantside.study.scenario_spec` (the dataclasses, in SI),
:mod:`~plantside.study.scenario_fields` (field kinds and units, checks, collected
mistakes, the files a scenario names), :mod:`~plantside.study.scenario_read` (TOML ->
:class:`Scenario`) and :mod:`~plantside.study.scenario_write` (:class:`Scenario` -> TOML).
"""

from plantside.study.scenario_fields import FIELD_QUANTITIES, FILE_POLICIES, field_unit
from plantside.study.scenario_read import (
    MAX_AIR_HANDLERS,
    load_scenario,
    loads_scenario,
    scenario_from_dict,
)
from plantside.study.scenario_spec import (
    DEFAULT_PICKUP_PERCENT,
    AirHandlerSpec,
    PlantOptionSpec,
    Scenario,
)
from plantside.study.scenario_write import dumps_scenario, save_scenario, scenario_to_dict
from plantside.study.toml_input import MAX_SCENARIO_BYTES, read_toml_text

__all__ = [
    "DEFAULT_PICKUP_PERCENT",
    "FIELD_QUANTITIES",
    "FILE_POLICIES",
    "MAX_AIR_HANDLERS",
    "MAX_SCENARIO_BYTES",
    "AirHandlerSpec",
    "PlantOptionSpec",
    "Scenario",
    "dumps_scenario",
    "field_unit",
    "load_scenario",
    "loads_scenario",
    "read_toml_text",
    "save_scenario",
    "scenario_from_dict",
    "scenario_to_dict",
]
