"""Columns of an hourly weather CSV: which header is which quantity, in which unit.

The weather reader's vocabulary on top of :mod:`plantside.hourly_csv`: the names
each role is recognised by, the units of each quantity with their unit system and
conversion to SI, how a column's unit is decided (``units=`` mapping, header,
unit system), and the physical range of each quantity with hints when values
look like another unit or like a missing-value marker.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from plantside import units as _units
from plantside.constants import ZERO_CELSIUS
from plantside.errors import InputRangeError
from plantside.hourly_csv.headers import canonical_unit, role_of, split_header
from plantside.hourly_csv.layout import HourlyTable
from plantside.hourly_csv.values import ParsedColumn, numbers

__all__ = ["Column", "choose_columns", "is_weather_header", "parse_units_argument"]

# Physical range of each quantity in SI [unit] (project rule from world records,
# rounded out): dry bulb records are about -89 and +57 °C; dew points above 35 °C
# are unknown.
RANGES = {
    "drybulb": (-70.0, 60.0, "°C"),
    "dew_point": (-80.0, 40.0, "°C"),
    "wet_bulb": (-70.0, 40.0, "°C"),
    "relative_humidity": (0.0, 100.0, "%"),
    "humidity_ratio": (0.0, 0.045, "kg/kg"),
    "pressure": (50_000.0, 110_000.0, "Pa"),
}

ROLE_TEXT = {
    "timestamp": "timestamp",
    "date": "date",
    "time": "time of day",
    "hour": "hour index",
    "drybulb": "dry bulb",
    "dew_point": "dew point",
    "wet_bulb": "wet bulb",
    "relative_humidity": "relative humidity",
    "humidity_ratio": "humidity ratio",
    "pressure": "pressure",
}

#: Normalised header names of each role (see plantside.hourly_csv.headers).
ROLE_NAMES = {
    "timestamp": ("timestamp", "datetime", "dateandtime", "localtime", "datetimelocal"),
    "date": ("date",),
    "time": ("time", "timeofday", "clocktime"),
    "hour": ("hour", "hourofyear", "hoy", "hr", "hourindex", "hours"),
    "drybulb": (
        "drybulb", "drybulbtemperature", "drybulbtemp", "db", "dbt", "tdb", "temperature",
        "temp", "airtemperature", "airtemp", "tair", "t", "outdoortemperature",
        "outdoorairtemperature", "oat", "outsideairtemperature",
    ),
    "dew_point": ("dewpoint", "dewpointtemperature", "dewpointtemp", "dp", "td", "tdp", "dew"),
    "wet_bulb": ("wetbulb", "wetbulbtemperature", "wetbulbtemp", "wb", "twb"),
    "humidity_ratio": ("humidityratio", "w", "mixingratio", "moisturecontent"),
    "relative_humidity": ("relativehumidity", "rh", "humidity", "relhum", "relhumidity"),
    "pressure": (
        "pressure", "stationpressure", "atmosphericpressure", "barometricpressure", "p",
        "patm", "pbaro", "baro", "airpressure", "pstation",
    ),
}  # fmt: skip

HUMIDITY_ROLES = ("dew_point", "humidity_ratio", "wet_bulb", "relative_humidity")
TEMPERATURE_ROLES = ("drybulb", "dew_point", "wet_bulb")

# canonical unit -> (quantity, systems it belongs to)
UNITS = {
    "C": ("temperature", {"SI"}),
    "F": ("temperature", {"IP"}),
    "K": ("temperature", {"SI"}),
    "%": ("relative_humidity", {"SI", "IP"}),
    "fraction": ("relative_humidity", {"SI", "IP"}),
    "kg/kg": ("humidity_ratio", {"SI"}),
    "g/kg": ("humidity_ratio", {"SI"}),
    "lb/lb": ("humidity_ratio", {"IP"}),
    "gr/lb": ("humidity_ratio", {"IP"}),
    "Pa": ("pressure", {"SI"}),
    "kPa": ("pressure", {"SI"}),
    "hPa": ("pressure", {"SI"}),
    "inHg": ("pressure", {"IP"}),
    "psi": ("pressure", {"IP"}),
}

UNIT_ALIASES = {
    "c": "C", "degc": "C", "celsius": "C", "degcelsius": "C",
    "f": "F", "degf": "F", "fahrenheit": "F", "degfahrenheit": "F",
    "k": "K", "kelvin": "K",
    "%": "%", "percent": "%", "pct": "%", "%rh": "%",
    "fraction": "fraction", "frac": "fraction", "0-1": "fraction", "-": "fraction",
    "kg/kg": "kg/kg", "kgkg": "kg/kg", "kg/kgdryair": "kg/kg", "kg/kgda": "kg/kg",
    "g/kg": "g/kg", "gkg": "g/kg", "g/kgdryair": "g/kg", "g/kgda": "g/kg",
    "lb/lb": "lb/lb", "lblb": "lb/lb", "lb/lbdryair": "lb/lb", "lbm/lbm": "lb/lb",
    "gr/lb": "gr/lb", "grlb": "gr/lb", "grains/lb": "gr/lb", "grain/lb": "gr/lb",
    "gr/lbdryair": "gr/lb",
    "pa": "Pa", "kpa": "kPa", "hpa": "hPa", "mbar": "hPa", "mb": "hPa", "millibar": "hPa",
    "inhg": "inHg", "inchhg": "inHg", "inchesofmercury": "inHg", "inofhg": "inHg",
    "psi": "psi", "psia": "psi",
}  # fmt: skip

SYSTEM_DEFAULTS = {
    "SI": {"temperature": "C", "relative_humidity": "%", "humidity_ratio": "kg/kg",
           "pressure": "Pa", "altitude": "m"},
    "IP": {"temperature": "F", "relative_humidity": "%", "humidity_ratio": "lb/lb",
           "pressure": "inHg", "altitude": "ft"},
}  # fmt: skip

# Conversion of each file unit to SI (plantside.units, factors from plantside.constants).
TO_SI = {
    "C": np.asarray,
    "K": lambda x: np.asarray(x, float) - ZERO_CELSIUS,
    "F": _units.celsius_from_fahrenheit,
    "%": np.asarray,
    "fraction": lambda x: np.asarray(x, float) * 100.0,
    "kg/kg": np.asarray,
    "lb/lb": np.asarray,  # the same ratio in any mass unit
    "g/kg": lambda x: np.asarray(x, float) / 1000.0,
    "gr/lb": lambda x: _units.g_per_kg_from_grains_per_lb(x) / 1000.0,
    "Pa": np.asarray,
    "kPa": lambda x: np.asarray(x, float) * 1000.0,
    "hPa": lambda x: np.asarray(x, float) * 100.0,
    "inHg": _units.pa_from_inhg,
    "psi": _units.pa_from_psia,
}

DISPLAY_UNIT = {"C": "°C", "F": "°F", "fraction": "(fraction)"}


def quantity_of(role: str) -> str:
    """The quantity a role is measured as (the three temperatures share one)."""
    return "temperature" if role in TEMPERATURE_ROLES else role


def to_si(unit: str, values: np.ndarray) -> np.ndarray:
    """Values in a file unit converted to SI; a value too large for the conversion is inf.

    A number near the largest float (``1e308`` as a fraction) overflows when
    converted; it becomes ±inf, never a warning, and the range check refuses it.
    """
    with np.errstate(over="ignore", invalid="ignore"):
        return np.asarray(TO_SI[unit](values), dtype=float)


@dataclass
class Column:
    """A column of the file given a role: header as written, role, unit."""

    header: str
    role: str
    unit: str | None
    unit_text: str | None


# ---------------------------------------------------------------------------------------
# arguments and header recognition
# ---------------------------------------------------------------------------------------
def parse_units_argument(units) -> tuple[str | None, dict[str, str]]:
    """(unit system or None, header-or-role -> canonical unit) from ``units=``."""
    if units is None:
        return None, {}
    if isinstance(units, str):
        system = units.strip().upper()
        if system not in SYSTEM_DEFAULTS:
            raise InputRangeError("units", f"units = {units!r}: use 'SI', 'IP' or a mapping")
        return system, {}
    if isinstance(units, Mapping):
        unit_map = {}
        system = None
        for key, value in units.items():
            if key == "system":
                system, _ = parse_units_argument(value)
                continue
            if key == "altitude":
                if str(value).strip().lower() not in ("m", "ft"):
                    raise InputRangeError("units", f"altitude unit {value!r}: use 'm' or 'ft'")
                unit_map[key] = str(value).strip().lower()
                continue
            canonical = canonical_unit(str(value), UNIT_ALIASES)
            if canonical is None:
                raise InputRangeError(
                    "units",
                    f"unit {value!r} for {key!r} is not recognised; use one of "
                    f"{', '.join(UNITS)} (or mbar, psia)",
                )
            unit_map[str(key)] = canonical
        return system, unit_map
    raise InputRangeError("units", f"units must be 'SI', 'IP' or a mapping, not {units!r}")


def check_columns_argument(columns: Mapping[str, str]) -> dict[str, str]:
    """``columns=`` (role -> header) checked for known roles."""
    for role in columns:
        if role not in ROLE_TEXT:
            raise InputRangeError(
                "columns", f"columns: unknown role {role!r}; use one of {sorted(ROLE_TEXT)}"
            )
    return dict(columns)


def is_weather_header(cells: list[str], columns: Mapping[str, str]) -> bool:
    """Whether a line's cells name a dry-bulb and a humidity column (or the given ones)."""
    forced = {header.strip(): role for role, header in columns.items()}
    roles = {
        forced.get(cell) or role_of(split_header(cell, UNIT_ALIASES).name, ROLE_NAMES)
        for cell in cells
    }
    return "drybulb" in roles and bool(roles & set(HUMIDITY_ROLES))


# ---------------------------------------------------------------------------------------
# choosing the columns
# ---------------------------------------------------------------------------------------
def choose_columns(
    table: HourlyTable, columns: Mapping[str, str], system: str | None, unit_map: dict
) -> dict[str, Column]:
    """Role -> column, with each column's unit decided; problems go to ``table``."""
    headers, row = table.headers, table.header_row
    first_position = {}
    for position, header in enumerate(table.raw_headers):
        key = header.strip()
        if key in first_position:
            table.problems.append(
                f"row {row}: column name {key!r} appears more than once "
                f"(columns {first_position[key] + 1} and {position + 1})"
            )
        first_position.setdefault(key, position)
    candidates: dict[str, list[Column]] = {}
    ignored = []
    forced = {}
    for role, header in columns.items():
        if header not in headers:
            table.problems.append(
                f"row {row}: column {header!r} given for {ROLE_TEXT[role]} "
                f"is not in the header; columns found: {table.header_list}"
            )
            continue
        forced[header] = role
    for header in headers:
        cell = split_header(header, UNIT_ALIASES)
        natural = role_of(cell.name, ROLE_NAMES)
        role = forced.get(header) or natural
        unit = cell.unit
        if header in forced and natural is None:
            # A forced column may carry a unit the splitter did not see.
            unit = unit or canonical_unit(header, UNIT_ALIASES)
        if role is None or (header not in forced and role in forced.values()):
            ignored.append(header)
            continue
        candidates.setdefault(role, []).append(Column(header, role, unit, cell.unit_text))
    chosen: dict[str, Column] = {}
    for role, found in candidates.items():
        if len(found) > 1:
            names = " and ".join(repr(c.header) for c in found)
            table.problems.append(
                f"row {row}: columns {names} both look like the "
                f"{ROLE_TEXT[role]}; choose one with columns={{'{role}': ...}}"
            )
            continue
        chosen[role] = found[0]
    if "drybulb" not in candidates:
        table.problems.append(
            f"row {row}: no dry-bulb column; columns found: {table.header_list}; expected a "
            f"header such as 'drybulb_C', 'Dry bulb (°F)' or 'temperature', or name it with "
            f"columns={{'drybulb': ...}}; " + table.looked_for("dry bulb", ROLE_NAMES["drybulb"])
        )
    humidity = [role for role in HUMIDITY_ROLES if role in candidates]
    if not humidity:
        table.problems.append(
            f"row {row}: no humidity column; columns found: {table.header_list}; expected "
            f"one of dew point, wet bulb, relative humidity or humidity ratio (e.g. "
            f"'dew_point_C', 'RH %', 'humidity_ratio_g_per_kg'); "
            + table.looked_for(
                "humidity", [name for role in HUMIDITY_ROLES for name in ROLE_NAMES[role]]
            )
        )
    elif len(humidity) > 1:
        unused = [chosen[r].header for r in humidity[1:] if r in chosen]
        for role in humidity[1:]:
            chosen.pop(role, None)
        if unused and humidity[0] in chosen:
            table.notes.append(
                f"humidity taken from {chosen[humidity[0]].header!r} "
                f"({ROLE_TEXT[humidity[0]]}); not used: " + ", ".join(repr(u) for u in unused)
            )
    # A lone date or time column is read as the timestamp column.
    lone = [role for role in ("date", "time") if role in chosen]
    if len(lone) == 1 and "timestamp" not in chosen:
        column = chosen.pop(lone[0])
        chosen["timestamp"] = Column(column.header, "timestamp", None, None)
    if "timestamp" in chosen and "hour" in chosen:
        table.notes.append(
            f"time taken from {chosen['timestamp'].header!r}; hour column "
            f"{chosen['hour'].header!r} not used"
        )
        chosen.pop("hour")
    if ignored:
        table.notes.append("ignored columns: " + ", ".join(repr(h) for h in ignored))
    for column in chosen.values():
        _resolve_unit(table, column, system, unit_map)
    return chosen


def _resolve_unit(table: HourlyTable, column: Column, system, unit_map) -> None:
    """Decide a column's unit: ``units=`` mapping, then header, then the unit system."""
    if column.role in ("timestamp", "date", "time", "hour"):
        return
    quantity = quantity_of(column.role)
    row, header, role_text = table.header_row, column.header, ROLE_TEXT[column.role]
    given = unit_map.get(header) or unit_map.get(column.role)
    header_unit = column.unit
    if header_unit is None and column.unit_text:
        table.problems.append(
            f"row {row}, column {header!r}: unit {column.unit_text!r} is not recognised for "
            f"the {role_text}"
        )
        return
    if header_unit is not None and UNITS[header_unit][0] != quantity:
        table.problems.append(
            f"row {row}, column {header!r}: unit {header_unit!r} is not a unit of {role_text}"
        )
        return
    if given is not None:
        if UNITS[given][0] != quantity:
            table.problems.append(
                f"column {header!r}: the unit {given!r} given in units= is not a unit of "
                f"{role_text} (row {row})"
            )
            return
        if header_unit is not None and header_unit != given:
            table.notes.append(
                f"column {header!r}: the header says {header_unit!r}; read in {given!r} as "
                f"units= gives"
            )
        column.unit = given
        return
    if header_unit is not None:
        if system is not None and system not in UNITS[header_unit][1]:
            table.problems.append(
                f"row {row}, column {header!r}: the header says {header_unit!r}, an "
                f"{'/'.join(sorted(UNITS[header_unit][1]))} unit, but units={system!r} was "
                f"given; give units={{{header!r}: {header_unit!r}}} or correct the header"
            )
            return
        column.unit = header_unit
        return
    if system is not None:
        column.unit = SYSTEM_DEFAULTS[system][quantity]
        return
    if quantity == "relative_humidity":
        column.unit = "%"
        table.notes.append(f"column {header!r}: no unit given, read as percent")
        return
    table.problems.append(
        f"row {row}, column {header!r}: no unit in the header and none given; pass "
        f"units='SI' or units='IP', or units={{{header!r}: 'C'}} (or 'F', ...)"
    )


# ---------------------------------------------------------------------------------------
# values
# ---------------------------------------------------------------------------------------
def column_numbers(table: HourlyTable, column: Column) -> ParsedColumn:
    """Numbers of a column [file unit]; text cells are reported (infinities too)."""
    parsed = numbers(table.frame[column.header], decimal_comma=table.decimal_comma)
    bad = parsed.text | parsed.infinite
    if bad.any():
        first = int(np.flatnonzero(bad)[0])
        table.problems.append(
            f"column {column.header!r}: text where a number is expected at "
            f"{table.rows_text(np.flatnonzero(bad))}; first "
            f"{table.frame[column.header].iloc[first]!r} at row {table.row_numbers([first])[0]}"
        )
    values = parsed.values.copy()
    values[bad] = np.nan
    return ParsedColumn(values=values, missing=parsed.missing, text=bad)


def check_physical(table: HourlyTable, column: Column, values_si, raw) -> None:
    """Values outside the role's physical range (with a unit or marker hint)."""
    low, high, unit = RANGES[column.role]
    bad = np.isfinite(raw) & ~((values_si >= low) & (values_si <= high))
    if not bad.any():
        return
    index = np.flatnonzero(bad)
    shown_unit = DISPLAY_UNIT.get(column.unit, column.unit)
    plural = "s" if index.size > 1 else ""
    if column.role == "relative_humidity" and (values_si[bad] > high).all():
        what = f"value{plural} of relative humidity above 100 %"
    else:
        what = f"value{plural} outside {low:g} to {high:g} {unit}"
    message = (
        f"column {column.header!r} ({ROLE_TEXT[column.role]}, read in {shown_unit}): "
        f"{index.size} {what} at {table.rows_text(index)}; first {raw[index[0]]:g} {shown_unit}"
    )
    hint = _unit_hint(column, raw)
    if np.any(np.abs(raw[bad]) >= 999):
        hint = (hint + "; " if hint else "") + (
            "values such as -9999 or 9999 look like missing-value markers: leave the "
            "cell empty and use fill_gaps=True"
        )
    if hint:
        message += f" ({hint})"
    table.problems.append(message)


def _unit_hint(column: Column, raw: np.ndarray) -> str:
    """A hint naming the unit in which the raw values would be plausible."""
    quantity = quantity_of(column.role)
    low, high, _ = RANGES[column.role]
    finite = raw[np.isfinite(raw)]
    plausible = []
    for unit, (unit_quantity, _) in UNITS.items():
        if unit_quantity != quantity or unit == column.unit:
            continue
        converted = to_si(unit, finite)
        if converted.size and np.all((converted >= low) & (converted <= high)):
            plausible.append(unit)
    if not plausible:
        return ""
    shown = " or ".join(DISPLAY_UNIT.get(unit, unit) for unit in plausible)
    return (
        f"the values look like {shown}: if so, give units={{{column.header!r}: {plausible[0]!r}}}"
    )
