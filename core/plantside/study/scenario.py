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
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import types
import typing
from contextlib import contextmanager
from dataclasses import dataclass, field, fields, replace
from pathlib import Path

import tomli_w

from plantside.air_handler.year import AirHandlerSettings
from plantside.air_handler.zone_load_csv import read_zone_loads_csv
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel
from plantside.climate.bundled import BUNDLED_CLIMATES, load_bundled_climate
from plantside.climate.climate_zone import economizer_drybulb_limit, parse_climate_zone
from plantside.climate.design_conditions import COOLING_PERCENTS, HEATING_PERCENTS
from plantside.climate.weather import Weather
from plantside.climate.weather_csv import read_weather_csv
from plantside.errors import InputFileError, InputRangeError, ScenarioError, excerpt
from plantside.plant.staging import DEFAULT_MINIMUM_TURNDOWN
from plantside.study.solar_gains import zone_with_solar_gain
from plantside.study.toml_input import (
    MAX_SCENARIO_BYTES,
    parse_toml_text,
    read_toml_text,
    saved_number,
)
from plantside.study.water_side import (
    WaterSideSpec,
    water_side_from_plant_table,
    water_side_to_tables,
)
from plantside.units import (
    MESSAGE_QUANTITIES,
    UnitSystem,
    display_text,
    from_display,
    to_display,
    unit_label,
)

__all__ = [
    "DEFAULT_PICKUP_PERCENT",
    "FIELD_QUANTITIES",
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

#: Morning pick-up allowance on the heating plant's design load where an air handler sets
#: its zone back at night [%] (common practice, no source: recovering the set-back in
#: about an hour or two; a licensed engineer sets it from the building's mass and the
#: pick-up period).
DEFAULT_PICKUP_PERCENT = 10.0

#: Physical quantity of each numeric field written in the file's unit system. Fields not
#: listed are dimensionless (fractions, effectivenesses) or carry their unit in their name
#: (``*_percent``); fan power is in kW in both systems.
FIELD_QUANTITIES = {
    # air handler
    "supply_airflow": "airflow",
    "minimum_outdoor_airflow": "airflow",
    "ventilation_airflow_required": "airflow",
    "zone_cooling_drybulb": "temperature",
    "zone_heating_drybulb": "temperature",
    "supply_drybulb": "temperature",
    "supply_reset_drybulb": "temperature",
    "supply_reset_outdoor_low": "temperature",
    "supply_reset_outdoor_high": "temperature",
    "heating_supply_drybulb_max": "temperature",
    "economizer_drybulb_limit": "temperature",
    "economizer_enthalpy_limit": "enthalpy",
    "preheat_drybulb": "temperature",
    "apparatus_dew_point": "temperature",
    "leaving_dew_point": "temperature",
    "night_setback_drybulb": "temperature",
    "apparatus_dew_point_min": "temperature",
    # zone load model
    "cooling_design_sensible": "power",
    "cooling_design_latent": "power",
    "cooling_design_drybulb": "temperature",
    "heating_design_load": "heating_power",
    "heating_design_drybulb": "temperature",
    "glazing_area_north": "area",
    "glazing_area_east": "area",
    "glazing_area_south": "area",
    "glazing_area_west": "area",
}

_TOP_KEYS = ("title", "unit_system", "site", "plant", "air_handler")
_SITE_KEYS = (
    "climate",
    "weather_file",
    "weather_units",
    "altitude",
    "fill_gaps",
    "cooling_design_percent",
    "heating_design_percent",
    "climate_zone",
    "latitude",
    "longitude",
    "time_zone",
)
_PLANT_KEYS = (
    "distribution_gain_percent",
    "cooling_margin_percent",
    "heating_margin_percent",
    "heating_pickup_percent",
    "cooling_option",
    "heating_option",
    "chilled_water",
    "condenser",
    "hot_water",
)
_OPTION_KEYS = ("name", "capacity_fractions", "minimum_turndown", "efficiency_metric", "efficiency")
_EFFICIENCY_METRICS = ("cop", "eer", "kw_per_ton")


@dataclass(frozen=True)
class PlantOptionSpec:
    """One plant arrangement to compare: machine sizes as fractions of design capacity.

    Parameters
    ----------
    name : str
        Label shown in tables and charts.
    capacity_fractions : tuple of float
        Each machine's capacity as a fraction of the plant design capacity, in start order.
    minimum_turndown : float
        Lowest stable part-load ratio of each machine [0..1].
    efficiency_metric : str
        ``"cop"``, ``"eer"`` or ``"kw_per_ton"`` for ``efficiency``.
    efficiency : tuple of float or None
        Machine efficiency at 100/75/50/25 % load (the AHRI 550/590 rating points).
    """

    name: str
    capacity_fractions: tuple[float, ...]
    minimum_turndown: float = DEFAULT_MINIMUM_TURNDOWN
    efficiency_metric: str = "cop"
    efficiency: tuple[float, ...] | None = None


@dataclass(frozen=True)
class AirHandlerSpec:
    """An air handler of the study with its zone loads (a model or an hourly file)."""

    settings: AirHandlerSettings
    zone: ZoneLoadModel | None = None
    zone_load_file: str | None = None


@dataclass(frozen=True)
class Scenario:
    """A whole study, in SI, as read from (or written to) a scenario file.

    ``source`` and ``base_dir`` are where it came from: messages name ``source`` and
    relative file paths resolve against ``base_dir``.
    """

    title: str
    unit_system: UnitSystem
    air_handlers: tuple[AirHandlerSpec, ...]
    climate: str | None = None
    weather_file: str | None = None
    weather_units: str | None = None
    altitude: float | None = None
    fill_gaps: bool = False
    cooling_design_percent: float = 0.4
    heating_design_percent: float = 99.6
    distribution_gain_percent: float = 0.0
    cooling_margin_percent: float = 10.0
    heating_margin_percent: float = 10.0
    cooling_options: tuple[PlantOptionSpec, ...] = ()
    heating_options: tuple[PlantOptionSpec, ...] = ()
    heating_pickup_percent: float | None = None
    climate_zone: str | None = None
    latitude: float | None = None
    longitude: float | None = None
    time_zone: float | None = None
    water_side: WaterSideSpec | None = None
    source: str = field(default="<scenario>", compare=False)
    files: str = field(default="any", compare=False)
    base_dir: Path = field(default_factory=Path.cwd, compare=False)

    @property
    def pickup_allowance_percent(self) -> float:
        """Morning pick-up allowance on the heating plant's design load [%].

        ``heating_pickup_percent`` when given; otherwise
        :data:`DEFAULT_PICKUP_PERCENT` when an air handler sets its zone back at
        night (``night_setback_drybulb`` below ``zone_heating_drybulb`` with the fan off
        when unoccupied), else 0.
        """
        if self.heating_pickup_percent is not None:
            return float(self.heating_pickup_percent)
        sets_back = any(
            s.fan_schedule == "occupied"
            and s.night_setback_drybulb is not None
            and s.night_setback_drybulb < s.zone_heating_drybulb
            for s in (spec.settings for spec in self.air_handlers)
        )
        return DEFAULT_PICKUP_PERCENT if sets_back else 0.0

    def load_weather(self) -> Weather:
        """The hourly weather of the site (bundled climate or CSV)."""
        if self.climate is not None:
            return self.located_weather(load_bundled_climate(self.climate))
        path = _resolve(
            self.base_dir, self.weather_file, self.source, "site.weather_file", self.files
        )
        altitude = self.altitude
        if altitude is not None and self.unit_system is UnitSystem.IP:
            altitude = float(to_display("length", altitude, "IP")[0])
        try:
            weather = read_weather_csv(
                path, units=self.weather_units, altitude=altitude, fill_gaps=self.fill_gaps
            )
        except (InputFileError, InputRangeError) as error:
            raise ScenarioError(self.source, "site.weather_file", str(error)) from error
        return self.located_weather(weather)

    def located_weather(self, weather: Weather) -> Weather:
        """The weather with the site's latitude, longitude and time zone, where given.

        A weather CSV does not say where it was recorded; the scenario's site does
        (the sun on glazed zones needs it). The dashboard places an uploaded year
        with it too, so both give the same figures.
        """
        place = {
            name: getattr(self, name)
            for name in ("latitude", "longitude", "time_zone")
            if getattr(self, name) is not None
        }
        return replace(weather, **place) if place else weather

    def zone_loads(self, index: int, weather: Weather | None = None):
        """Zone loads of air handler ``index``: the model, or the hourly file read."""
        spec = self.air_handlers[index]
        if spec.zone is not None:
            if not spec.zone.has_glazing:
                return spec.zone
            weather = self.load_weather() if weather is None else weather
            try:
                return zone_with_solar_gain(spec.zone, weather)
            except InputRangeError as error:
                raise ScenarioError(self.source, f"site.{error.field}", str(error)) from error
        where = f"air_handler[{index + 1}].zone_load_file"
        path = _resolve(self.base_dir, spec.zone_load_file, self.source, where, self.files)
        hours = None if weather is None else weather.hours
        try:
            loads: HourlyZoneLoads = read_zone_loads_csv(path, expected_hours=hours)
        except (InputFileError, InputRangeError) as error:
            raise ScenarioError(self.source, where, str(error)) from error
        return loads

    def with_air_handler(self, index: int, **changes) -> Scenario:
        """A copy with some settings of air handler ``index`` changed (SI values)."""
        specs = list(self.air_handlers)
        specs[index] = replace(specs[index], settings=replace(specs[index].settings, **changes))
        return replace(self, air_handlers=tuple(specs))


# ---------------------------------------------------------------------------------------
# reading
# ---------------------------------------------------------------------------------------
#: File policies: "any" follows any name (the user's own files, command line);
#: "inside" (for uploads) accepts only names inside the scenario's folder.
FILE_POLICIES = ("any", "inside")


def _resolve(base_dir: Path, name: str | None, source: str, where: str, files: str = "any") -> Path:
    """A file named in a scenario, relative to the scenario's folder; must exist.

    With ``files="inside"`` an absolute name, or one that leads out of the scenario's
    folder, is refused: an uploaded scenario cannot make the server read other files.
    """
    if not name:
        raise ScenarioError(source, where, "no file given")
    path = Path(name)
    if not path.is_absolute():
        path = Path(base_dir) / path
    try:
        if files == "inside" and (
            Path(name).is_absolute() or not path.resolve().is_relative_to(Path(base_dir).resolve())
        ):
            raise ScenarioError(
                source, where, f"{excerpt(name)!r} must name a file inside the scenario's folder"
            )
        found = path.is_file()
    except (OSError, ValueError) as error:  # a name the file system refuses (too long, NUL)
        raise ScenarioError(
            source, where, f"file {excerpt(name)!r} cannot be opened: {excerpt(error)}"
        ) from error
    if not found:
        raise ScenarioError(
            source, where, f"file {excerpt(name)!r} not found (looked in {excerpt(path.parent)})"
        )
    return path


def _unknown_key(source: str, where: str, key: str, allowed) -> ScenarioError:
    guess = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
    hint = f"; did you mean {guess[0]!r}?" if guess else ""
    prefix = f"{where}." if where else ""
    return ScenarioError(
        source,
        f"{prefix}{key}",
        f"unknown key {key!r}{hint} Allowed here: {', '.join(sorted(allowed))}",
    )


def _bad_choice(source: str, where: str, value, allowed) -> ScenarioError:
    guess = difflib.get_close_matches(str(value), list(allowed), n=1, cutoff=0.6)
    hint = f"; did you mean {guess[0]!r}?" if guess else ""
    return ScenarioError(source, where, f"{value!r} is not one of: {', '.join(allowed)}{hint}")


def _check_keys(source: str, where: str, table: dict, allowed) -> None:
    if not isinstance(table, dict):
        raise ScenarioError(source, where or "(top level)", f"expected a table, got {table!r}")
    for key in table:
        if key not in allowed:
            raise _unknown_key(source, where, key, allowed)


def _number(source, where, value, *, integer=False):
    if isinstance(value, bool) or not isinstance(value, int | float):
        kind = "a whole number" if integer else "a number"
        raise ScenarioError(source, where, f"expected {kind}, got {value!r}")
    if not math.isfinite(value):
        raise ScenarioError(source, where, f"expected a finite number, got {value!r}")
    return int(value) if integer else float(value)


def _text(source, where, value):
    if not isinstance(value, str):
        raise ScenarioError(source, where, f"expected text in quotes, got {value!r}")
    return value


def _flag(source, where, value):
    if not isinstance(value, bool):
        raise ScenarioError(source, where, f"expected true or false, got {value!r}")
    return value


def _field_kind(cls, name):
    """'float', 'int', 'str', 'bool' and whether None is allowed, from the type hint."""
    hint = typing.get_type_hints(cls)[name]
    optional = False
    args = typing.get_args(hint)
    if typing.get_origin(hint) in (typing.Union, types.UnionType):
        optional = type(None) in args
        hint = next(a for a in args if a is not type(None))
    return hint, optional


class _Mistakes:
    """Every mistake found in a scenario file, so one message lists them all.

    ``with mistakes.check(): ...`` runs a part of the reading and keeps its
    :class:`ScenarioError` instead of stopping; :meth:`raise_any` raises one error
    listing every mistake (:meth:`ScenarioError.several`).
    """

    def __init__(self, source: str):
        self.source = source
        self.found: list[ScenarioError] = []

    @contextmanager
    def check(self):
        try:
            yield
        except ScenarioError as error:
            self.found.append(error)

    def raise_any(self) -> None:
        if self.found:
            raise ScenarioError.several(self.source, self.found)


def _dataclass_from_table(cls, table, source, where, system):
    """Build a settings dataclass from a TOML table in ``system`` units, with checks.

    Every field that cannot be read is reported, and so is every value out of its
    range: after a value the model refuses, that field is taken at its default and the
    table checked again, until the rest is accepted (or the refused field has no
    default, or is one the file did not give: a range that depends on the refused
    value is not checked further).
    """
    names = [f.name for f in fields(cls) if f.init]
    _check_keys(source, where, table, names)
    mistakes = _Mistakes(source)
    values = {}
    for key, raw in table.items():
        with mistakes.check():
            values[key] = _table_value(cls, key, raw, source, f"{where}.{key}", system)
    defaults = {
        f.name
        for f in fields(cls)
        if f.default is not dataclasses.MISSING or f.default_factory is not dataclasses.MISSING
    }
    tried = dict(values)
    built = None
    for _ in range(len(tried) + 1):
        try:
            built = cls(**tried)
            break
        except InputRangeError as error:
            mistakes.found.append(
                ScenarioError(source, f"{where}.{error.field}", _in_file_units(error, system))
            )
            if error.field not in tried or error.field not in defaults:
                break
            del tried[error.field]  # its default, to look for further mistakes
        except TypeError as error:
            mistakes.found.append(ScenarioError(source, where, str(error)))
            break
    mistakes.raise_any()
    return built


def _table_value(cls, key, raw, source, path, system):
    """One field of a settings table, read as its type (SI for a quantity)."""
    hint, optional = _field_kind(cls, key)
    if raw == "none" and optional:
        return None
    if hint is float:
        value = _number(source, path, raw)
        if key in FIELD_QUANTITIES:
            value = float(from_display(FIELD_QUANTITIES[key], value, system))
        return value
    if hint is int:
        return _number(source, path, raw, integer=True)
    if hint is bool:
        return _flag(source, path, raw)
    if typing.get_origin(hint) is tuple:
        if not isinstance(raw, list):
            raise ScenarioError(source, path, f"expected a list of numbers, got {raw!r}")
        return tuple(_number(source, f"{path}[{i + 1}]", v) for i, v in enumerate(raw))
    return _text(source, path, raw)


#: Core unit the model writes for each quantity of :data:`FIELD_QUANTITIES`.
_CORE_UNITS = {
    "temperature": "°C",
    "power": "kW",
    "heating_power": "kW",
    "airflow": "m³/s",
    "area": "m²",
    "enthalpy": "kJ/kg",
}


def _in_file_units(error: InputRangeError, system: UnitSystem) -> str:
    """The model's message (written in core SI units) with its figures in the file's units.

    The field's own quantity decides what its unit means (kW of a heating load is MBH in
    an I-P file, not tons); temperatures and the rest read as
    :func:`plantside.units.display_text` reads them.
    """
    quantities = dict(MESSAGE_QUANTITIES)
    quantity = FIELD_QUANTITIES.get(error.field)
    if quantity in _CORE_UNITS:
        quantities[_CORE_UNITS[quantity]] = quantity
    return display_text(str(error), system, quantities)


def _option(source, where, table, design_kind) -> PlantOptionSpec:
    _check_keys(source, where, table, _OPTION_KEYS)
    if "capacity_fractions" not in table:
        raise ScenarioError(source, f"{where}.capacity_fractions", "missing; e.g. [0.5, 0.5]")
    fractions = table["capacity_fractions"]
    if not isinstance(fractions, list) or not fractions:
        raise ScenarioError(
            source, f"{where}.capacity_fractions", f"expected a list of numbers, got {fractions!r}"
        )
    fractions = tuple(
        _number(source, f"{where}.capacity_fractions[{i + 1}]", v) for i, v in enumerate(fractions)
    )
    for i, value in enumerate(fractions):
        if not 0.0 < value <= 2.0:
            raise ScenarioError(
                source,
                f"{where}.capacity_fractions[{i + 1}]",
                f"{value:g} is outside the allowed range above 0 to 2 "
                "(fraction of design capacity)",
            )
    name = _text(source, f"{where}.name", table.get("name", f"{design_kind} option"))
    turndown = _number(
        source, f"{where}.minimum_turndown", table.get("minimum_turndown", DEFAULT_MINIMUM_TURNDOWN)
    )
    if not 0.0 <= turndown < 1.0:
        raise ScenarioError(
            source,
            f"{where}.minimum_turndown",
            f"{turndown:g} is outside the allowed range 0 to <1",
        )
    metric = _text(source, f"{where}.efficiency_metric", table.get("efficiency_metric", "cop"))
    if metric not in _EFFICIENCY_METRICS:
        raise _bad_choice(source, f"{where}.efficiency_metric", metric, _EFFICIENCY_METRICS)
    efficiency = table.get("efficiency")
    if efficiency is not None:
        if not isinstance(efficiency, list) or len(efficiency) != 4:
            raise ScenarioError(
                source,
                f"{where}.efficiency",
                f"expected 4 numbers (at 100/75/50/25 % load), got {efficiency!r}",
            )
        efficiency = tuple(
            _number(source, f"{where}.efficiency[{i + 1}]", v) for i, v in enumerate(efficiency)
        )
        if any(v <= 0 for v in efficiency):
            raise ScenarioError(source, f"{where}.efficiency", "every value must be above 0")
    return PlantOptionSpec(name, fractions, turndown, metric, efficiency)


def _choice(source, where, value, allowed):
    value = _number(source, where, value)
    if not any(math.isclose(value, a) for a in allowed):
        allowed_text = ", ".join(f"{a:g}" for a in allowed)
        raise ScenarioError(source, where, f"{value:g} is not allowed; allowed: {allowed_text}")
    return value


def _percent(source, where, value, high=100.0):
    value = _number(source, where, value)
    if not 0.0 <= value <= high:
        raise ScenarioError(
            source, where, f"{value:g} is outside the allowed range 0 to {high:g} %"
        )
    return value


#: Most air handlers in one scenario; each costs a year of hourly physics in every run,
#: sweep case and dashboard change (400 took 22 s of CPU and 1.5 GB in the dashboard),
#: and a plant serves a few to a few dozen (common practice).
MAX_AIR_HANDLERS = 50


def _site_weather(site, source, base_dir, files):
    """``(climate, weather_file)`` of the site table: exactly one of them is given."""
    climate = site.get("climate")
    weather_file = site.get("weather_file")
    if (climate is None) == (weather_file is None):
        raise ScenarioError(
            source, "site.climate", "give exactly one of site.climate or site.weather_file"
        )
    if climate is not None:
        climate = _text(source, "site.climate", climate)
        names = {name.lower(): name for name in BUNDLED_CLIMATES}
        if climate.lower() not in names:
            raise _bad_choice(source, "site.climate", climate, BUNDLED_CLIMATES)
        return names[climate.lower()], None
    weather_file = _text(source, "site.weather_file", weather_file)
    _resolve(base_dir, weather_file, source, "site.weather_file", files)
    return None, weather_file


def _air_handler_spec(table, where, source, system, base_dir, files, climate_zone):
    """One ``[[air_handler]]`` table: its settings and its zone loads, every mistake listed."""
    setting_names = [f.name for f in fields(AirHandlerSettings)]
    _check_keys(source, where, table, [*setting_names, "zone", "zone_load_file"])
    mistakes = _Mistakes(source)
    settings = zone = zone_file = None
    settings_table = {k: v for k, v in table.items() if k not in ("zone", "zone_load_file")}
    with mistakes.check():
        settings = _dataclass_from_table(AirHandlerSettings, settings_table, source, where, system)
        if climate_zone is not None and "economizer_drybulb_limit" not in settings_table:
            # the 90.1 table's fixed dry-bulb limit of the site's zone is the default
            settings = replace(
                settings, economizer_drybulb_limit=economizer_drybulb_limit(climate_zone)
            )
    zone, zone_file = table.get("zone"), table.get("zone_load_file")
    with mistakes.check():
        if (zone is None) == (zone_file is None):
            zone = zone_file = None
            raise ScenarioError(
                source,
                f"{where}.zone",
                "give exactly one of a [air_handler.zone] table or zone_load_file",
            )
        if zone is not None:
            zone = _dataclass_from_table(ZoneLoadModel, zone, source, f"{where}.zone", system)
        else:
            zone_file = _text(source, f"{where}.zone_load_file", zone_file)
            _resolve(base_dir, zone_file, source, f"{where}.zone_load_file", files)
    mistakes.raise_any()
    return AirHandlerSpec(settings, zone, zone_file)


def scenario_from_dict(
    data: dict, source: str = "<scenario>", base_dir=None, *, files: str = "any"
) -> Scenario:
    """Validate a parsed scenario (a dict as read from TOML) into a :class:`Scenario`.

    Parameters
    ----------
    data : dict
        The parsed TOML document.
    source : str
        Name used in messages (the file name).
    base_dir : path-like, optional
        Folder that relative file names resolve against.
    files : {"any", "inside"}
        ``"inside"`` refuses file names outside ``base_dir`` (use it for uploads).
    """
    if files not in FILE_POLICIES:
        raise InputRangeError("files", f"files = {files!r}; allowed {FILE_POLICIES}")
    base_dir = Path.cwd() if base_dir is None else Path(base_dir)
    _check_keys(source, "", data, _TOP_KEYS)
    for key in ("unit_system", "air_handler"):
        if key not in data:
            raise ScenarioError(source, key, "missing (required)")
    # before any work: each air handler is a year of hourly physics wherever it is used
    if isinstance(data["air_handler"], list) and len(data["air_handler"]) > MAX_AIR_HANDLERS:
        raise ScenarioError(
            source,
            "air_handler",
            f"{len(data['air_handler']):,} [[air_handler]] tables is more than the "
            f"{MAX_AIR_HANDLERS} allowed in one scenario; split the plant into several scenarios",
        )
    try:
        system = UnitSystem.parse(data["unit_system"])
    except InputRangeError as error:
        raise ScenarioError(source, "unit_system", str(error)) from error
    # from here on every mistake is collected, so one message lists them all
    mistakes = _Mistakes(source)
    title = "Untitled study"
    with mistakes.check():
        title = _text(source, "title", data.get("title", "Untitled study"))

    site = data.get("site", {})
    climate = weather_file = weather_units = altitude = climate_zone = None
    fill_gaps, cooling_percent, heating_percent = False, 0.4, 99.6
    place = {}
    with mistakes.check():
        _check_keys(source, "site", site, _SITE_KEYS)
    if isinstance(site, dict):  # else its mistake is the one above
        with mistakes.check():
            climate, weather_file = _site_weather(site, source, base_dir, files)
        with mistakes.check():
            weather_units = site.get("weather_units")
            if weather_units is not None:
                try:
                    weather_units = str(
                        UnitSystem.parse(_text(source, "site.weather_units", weather_units))
                    )
                except InputRangeError as error:
                    raise ScenarioError(
                        source, "site.weather_units", f"{weather_units!r}; allowed 'SI' or 'IP'"
                    ) from error
        with mistakes.check():
            altitude = site.get("altitude")
            if altitude is not None:
                altitude = float(
                    from_display("length", _number(source, "site.altitude", altitude), system)
                )
        with mistakes.check():
            fill_gaps = _flag(source, "site.fill_gaps", site.get("fill_gaps", False))
        with mistakes.check():
            cooling_percent = _choice(
                source,
                "site.cooling_design_percent",
                site.get("cooling_design_percent", 0.4),
                COOLING_PERCENTS,
            )
        with mistakes.check():
            heating_percent = _choice(
                source,
                "site.heating_design_percent",
                site.get("heating_design_percent", 99.6),
                HEATING_PERCENTS,
            )
        with mistakes.check():
            given = site.get("climate_zone")
            if given is not None:
                try:
                    climate_zone = parse_climate_zone(
                        _text(source, "site.climate_zone", given), "site.climate_zone"
                    )
                except InputRangeError as error:
                    # the zone stays unset, so the air handlers' defaults do not use it
                    raise ScenarioError(source, "site.climate_zone", str(error)) from error
        places = (("latitude", -90, 90), ("longitude", -180, 180), ("time_zone", -12, 14))
        for key, low, high in places:
            if key in site:
                with mistakes.check():
                    value = _number(source, f"site.{key}", site[key])
                    if not low <= value <= high:
                        unit = "h from UTC" if key == "time_zone" else "°"
                        raise ScenarioError(
                            source,
                            f"site.{key}",
                            f"{value:g} is outside the allowed range {low} to {high} {unit}",
                        )
                    place[key] = value

    plant = data.get("plant", {})
    with mistakes.check():
        _check_keys(source, "plant", plant, _PLANT_KEYS)
    if not isinstance(plant, dict):
        plant = {}
    percents = {}
    for key, default in (
        ("distribution_gain_percent", 0.0),
        ("cooling_margin_percent", 10.0),
        ("heating_margin_percent", 10.0),
        ("heating_pickup_percent", None),
    ):
        percents[key] = default
        if plant.get(key, default) is not None:
            with mistakes.check():
                percents[key] = _percent(source, f"plant.{key}", plant.get(key, default))
    options = {"cooling": (), "heating": ()}
    for key, kind in (("cooling_option", "cooling"), ("heating_option", "heating")):
        tables = plant.get(key, [])
        if not isinstance(tables, list):
            mistakes.found.append(
                ScenarioError(source, f"plant.{key}", f"expected [[plant.{key}]] tables")
            )
            continue
        found = []
        for i, table in enumerate(tables):
            with mistakes.check():
                found.append(_option(source, f"plant.{key}[{i + 1}]", table, kind))
        options[kind] = tuple(found)

    water_side = None
    with mistakes.check():
        water_side = water_side_from_plant_table(plant, source, system)

    units = data["air_handler"]
    if not isinstance(units, list) or not units:
        mistakes.found.append(
            ScenarioError(source, "air_handler", "expected one or more [[air_handler]] tables")
        )
        units = []
    specs = []
    for i, table in enumerate(units):
        with mistakes.check():
            specs.append(
                _air_handler_spec(
                    table, f"air_handler[{i + 1}]", source, system, base_dir, files, climate_zone
                )
            )
    names = [spec.settings.name for spec in specs]
    duplicates = sorted({n for n in names if names.count(n) > 1})
    if duplicates:
        mistakes.found.append(
            ScenarioError(source, "air_handler.name", f"names must differ; repeated: {duplicates}")
        )
    mistakes.raise_any()
    gain = percents["distribution_gain_percent"]
    cooling_margin = percents["cooling_margin_percent"]
    heating_margin = percents["heating_margin_percent"]
    heating_pickup = percents["heating_pickup_percent"]

    return Scenario(
        title=title,
        unit_system=system,
        air_handlers=tuple(specs),
        climate=climate,
        weather_file=weather_file,
        weather_units=weather_units,
        altitude=altitude,
        fill_gaps=fill_gaps,
        cooling_design_percent=cooling_percent,
        heating_design_percent=heating_percent,
        distribution_gain_percent=gain,
        cooling_margin_percent=cooling_margin,
        heating_margin_percent=heating_margin,
        heating_pickup_percent=heating_pickup,
        cooling_options=options["cooling"],
        heating_options=options["heating"],
        water_side=water_side,
        climate_zone=climate_zone,
        **place,
        source=source,
        base_dir=base_dir,
        files=files,
    )


def loads_scenario(
    text: str, source: str = "<scenario>", base_dir=None, *, files: str = "any"
) -> Scenario:
    """Parse scenario TOML text (e.g. an upload) into a :class:`Scenario`.

    Pass ``files="inside"`` for text that came from someone else (an upload), so the
    file names in it can only reach files inside ``base_dir``.
    """
    data = parse_toml_text(text, source)
    return scenario_from_dict(data, source, base_dir, files=files)


def load_scenario(path) -> Scenario:
    """Read and validate a scenario file.

    Parameters
    ----------
    path : path-like
        The ``.toml`` file. Relative file names inside it resolve against its folder.
    """
    path = Path(path)
    return loads_scenario(read_toml_text(path), str(path), path.parent)


# ---------------------------------------------------------------------------------------
# writing
# ---------------------------------------------------------------------------------------
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
    if scenario.heating_pickup_percent is not None:
        plant["heating_pickup_percent"] = scenario.heating_pickup_percent
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


def field_unit(key: str, system) -> str:
    """The unit a scenario field is written in, in ``system`` ("" if dimensionless)."""
    quantity = FIELD_QUANTITIES.get(key)
    return unit_label(quantity, system) if quantity else ""


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
