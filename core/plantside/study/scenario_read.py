"""Reading a scenario file: TOML text or a parsed dict -> a validated :class:`Scenario`.

:func:`load_scenario` reads a file, :func:`loads_scenario` text (an upload),
:func:`scenario_from_dict` a parsed document: the site, the plant and its options, and
each ``[[air_handler]]`` with its zone loads. Every mistake is collected, so one
:class:`plantside.errors.ScenarioError` lists them all, each in the file's units.
"""

from __future__ import annotations

from dataclasses import fields, replace
from pathlib import Path

from plantside.air_handler.year import AirHandlerSettings
from plantside.air_handler.zone_loads import ZoneLoadModel
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.climate.climate_zone import economizer_drybulb_limit, parse_climate_zone
from plantside.climate.design_conditions import COOLING_PERCENTS, HEATING_PERCENTS
from plantside.errors import InputRangeError, ScenarioError
from plantside.plant.chillers import (
    RATING_CHILLED_WATER_C,
    RATING_CONDENSER_C,
    biquadratic,
    quadratic,
)
from plantside.plant.staging import DEFAULT_MINIMUM_TURNDOWN
from plantside.study.scenario_fields import (
    FILE_POLICIES,
    _bad_choice,
    _check_keys,
    _choice,
    _dataclass_from_table,
    _flag,
    _Mistakes,
    _number,
    _percent,
    _resolve,
    _text,
)
from plantside.study.scenario_spec import (
    CURVE_FIELDS,
    AirHandlerSpec,
    PlantOptionSpec,
    Scenario,
)
from plantside.study.toml_input import parse_toml_text, read_toml_text
from plantside.study.water_side import water_side_from_plant_table
from plantside.units import UnitSystem, from_display

__all__ = [
    "CURVE_RATING_TOLERANCE",
    "MAX_AIR_HANDLERS",
    "load_scenario",
    "loads_scenario",
    "scenario_from_dict",
]


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
    "cooling_pickup_percent",
    "cooling_option",
    "heating_option",
    "chilled_water",
    "condenser",
    "hot_water",
)
_OPTION_KEYS = (
    "name",
    "capacity_fractions",
    "minimum_turndown",
    "efficiency_metric",
    "efficiency",
    *CURVE_FIELDS,
)
#: How far from 1 a given chiller curve may be at the AHRI 550/590 full-load rating
#: condition [-] (project tolerance: published curves are normalised there, to a few
#: parts in a thousand after rounding; 2 % leaves room for that, common practice).
CURVE_RATING_TOLERANCE = 0.02
_CURVES_SI = "coefficients are in SI (°C) whatever the file's unit_system"
_EFFICIENCY_METRICS = ("cop", "eer", "kw_per_ton")


#: Most air handlers in one scenario; each costs a year of hourly physics in every run,
#: sweep case and dashboard change (400 took 22 s of CPU and 1.5 GB in the dashboard),
#: and a plant serves a few to a few dozen (common practice).
MAX_AIR_HANDLERS = 50


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
    curves = _option_curves(source, where, table, design_kind)
    return PlantOptionSpec(name, fractions, turndown, metric, efficiency, **curves)


def _option_curves(source, where, table, design_kind) -> dict:
    """The option's chiller curves as given (all three or none), lengths and numbers checked."""
    given = [key for key in CURVE_FIELDS if key in table]
    if not given:
        return {}
    if design_kind != "cooling":
        raise ScenarioError(
            source, f"{where}.{given[0]}", "chiller curves belong to [[plant.cooling_option]]"
        )
    missing = [key for key in CURVE_FIELDS if key not in table]
    if missing:
        raise ScenarioError(
            source,
            f"{where}.{missing[0]}",
            f"missing; give {', '.join(CURVE_FIELDS)} together or none of them",
        )
    curves = {}
    for key, size in CURVE_FIELDS.items():
        raw = table[key]
        if not isinstance(raw, list) or len(raw) != size:
            raise ScenarioError(
                source,
                f"{where}.{key}",
                f"expected {size} numbers ({_CURVES_SI}), got {raw!r}",
            )
        curves[key] = tuple(
            _number(source, f"{where}.{key}[{i + 1}]", v) for i, v in enumerate(raw)
        )
    return curves


def check_option_curves(source, where, option: PlantOptionSpec, condenser: str) -> None:
    """Each given curve is about 1 at the AHRI 550/590 full-load rating condition.

    Leaving chilled water 44 °F (6.67 °C) and entering condenser 85 °F (29.44 °C) water-
    cooled or 95 °F (35 °C) air-cooled, part-load ratio 1 (AHRI 550/590, from memory);
    within :data:`CURVE_RATING_TOLERANCE`.

    Raises
    ------
    ScenarioError
        Naming the curve, its value at the rating condition and the allowed range.
    """
    if option.capacity_curve is None:
        return
    chw, cond = RATING_CHILLED_WATER_C, RATING_CONDENSER_C[condenser][0]
    values = {
        "capacity_curve": float(biquadratic(option.capacity_curve, chw, cond)),
        "efficiency_curve": float(biquadratic(option.efficiency_curve, chw, cond)),
        "part_load_curve": float(quadratic(option.part_load_curve, 1.0)),
    }
    low, high = 1.0 - CURVE_RATING_TOLERANCE, 1.0 + CURVE_RATING_TOLERANCE
    for key, value in values.items():
        if not low <= value <= high:
            at = (
                "part-load ratio 1"
                if key == "part_load_curve"
                else (
                    f"{chw:.2f} °C chilled water and {cond:.2f} °C entering condenser "
                    f"({condenser}-cooled)"
                )
            )
            raise ScenarioError(
                source,
                f"{where}.{key}",
                f"evaluates to {value:.4g} at the AHRI 550/590 rating condition ({at}); "
                f"allowed {low:g} to {high:g} ({_CURVES_SI})",
            )


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
        ("cooling_pickup_percent", None),
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
    condenser = water_side.condenser.condenser if water_side is not None else "water"
    for i, option in enumerate(options["cooling"]):
        with mistakes.check():
            check_option_curves(source, f"plant.cooling_option[{i + 1}]", option, condenser)

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
        cooling_pickup_percent=percents["cooling_pickup_percent"],
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
