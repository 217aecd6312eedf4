"""Read a generic hourly weather CSV into a :class:`~plantside.climate.weather.Weather`.

Accepted file
-------------
The file is taken in by :mod:`plantside.hourly_csv` (shared with the zone-load
reader); this module says which columns a weather year needs, their units and
their checks.

- Text, UTF-8 (with or without byte-order mark), UTF-16 with a byte-order mark,
  or Windows-1252 (noted); LF or CRLF line ends. Lines starting with ``#`` before
  the header are comments.
- The header row is found by its column names (a dry-bulb and a humidity column)
  among the first 20 non-comment lines; lines above it (e.g. a one-line station
  record) are skipped and listed in the notes.
- Separator ``,``, ``;`` or tab, found from the header line. With ``;`` or tab
  a decimal comma (``12,5``) is accepted.
- One header row, then one row per hour. Columns are found by their header,
  case-insensitively, ignoring spaces, underscores and punctuation; a unit may
  follow in brackets (``Dry bulb (°C)``, ``RH [%]``) or as the last word(s)
  (``drybulb_F``, ``RH %``, ``humidity_ratio_g_per_kg``, ``pressure_Pa``).

=====================  =======================================  ==========================
role                   header names recognised                  units
=====================  =======================================  ==========================
time (optional)        timestamp, datetime, date + time, time   ISO 8601 or a date form;
                                                                ``24:00``: hour ending
hour (optional)        hour, hour of year, hoy, hr              0..N-1 or 1..N
dry bulb (required)    dry bulb, drybulb, db, tdb, temperature,  °C, °F, K
                       temp, air temperature, t
one humidity measure   dew point, dp, td, tdp                    °C, °F, K
(required; if several  wet bulb, wb, twb                         °C, °F, K
are present the first  humidity ratio, w, mixing ratio           kg/kg, g/kg, lb/lb, gr/lb
of this order is used) relative humidity, rh, humidity          %, fraction
pressure (optional)    pressure, station pressure, p, patm      Pa, kPa, hPa, mbar, inHg,
                                                                psi
=====================  =======================================  ==========================

Hours are labelled by their start (hour 0 = 00:00-01:00 on 1 January). A time
column that writes ``24:00`` (``01:00 .. 24:00`` each day, as typical-year files
do) is read as hour ending: ``24:00`` is the last hour of its day (23:00-24:00)
and every row is stored one hour earlier (see :mod:`plantside.hourly_csv.time_axis`).
A typical year whose months come from different years (January 1988, February 1996,
...) is read as one calendar year with the year ignored, and a note says so; it must
hold every hour from 1 January to 31 December once, in calendar order (see
:mod:`plantside.hourly_csv.typical_year`).

Units come, for each column, from (in this order) the ``units`` mapping, the
header, or the unit system given as ``units="SI"`` (°C, %, kg/kg, Pa) or
``units="IP"`` (°F, %, lb/lb, inHg). A header unit that belongs to the other
system than the one given is reported as a conflict. A temperature column with
no unit anywhere is an error (the importer never guesses °C against °F).
Without a pressure column, ``altitude`` is required (metres, or feet with
``units="IP"``) and the standard-atmosphere pressure at it is used.

Validation
----------
Every problem found is collected and reported together in one
:class:`~plantside.errors.InputFileError`, each naming its row number(s) (line
numbers of the file, counting comment lines and lines skipped above the header) and its
column. Nothing is silently dropped:

- missing or unrecognised required columns, ambiguous columns, duplicated headers;
- text where a number is expected; empty cells (a gap); rows with extra fields;
- values outside physical ranges (dry bulb -70..60 °C, dew point -80..40 °C,
  wet bulb -70..40 °C, RH 0..100 %, humidity ratio 0..0.045 kg/kg, pressure
  50..110 kPa), with a hint when the values look like another unit or like a
  missing-value marker (e.g. -9999);
- dew point or wet bulb above the dry bulb by more than 0.05 K, humidity ratio
  above saturation by more than 0.5 % (smaller excesses, from rounding, are
  set to saturation and counted in a note);
- time: unreadable timestamps, duplicated hours, hours out of order, steps that
  are not whole hours, missing hours (in a typical year: a month repeated, a day out
  of order, not one whole year);
- length: a whole number of days is required; 8760 or 8784 hours is a year,
  any other whole number of days is accepted with a note;
- size: more than ``max_bytes`` bytes or ``max_rows`` data rows.

Gaps (missing hours and empty cells) are filled by linear interpolation only
when ``fill_gaps=True`` and a run is at most ``max_gap_hours`` long; each fill is
listed in the notes. The file's content is only ever parsed as data: it is
never executed and never used as a path.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from plantside import units as _units
from plantside.air import moist_air
from plantside.climate.weather import Weather
from plantside.climate.weather_columns import (
    DISPLAY_UNIT,
    HUMIDITY_ROLES,
    RANGES,
    ROLE_TEXT,
    SYSTEM_DEFAULTS,
    Column,
    check_columns_argument,
    check_physical,
    choose_columns,
    column_numbers,
    is_weather_header,
    parse_units_argument,
    to_si,
)
from plantside.errors import check_range
from plantside.hourly_csv.gaps import place_on_grid
from plantside.hourly_csv.layout import HourlyTable, read_hourly_table
from plantside.hourly_csv.source import read_text
from plantside.hourly_csv.time_axis import (
    TimeAxis,
    axis_from_hour_index,
    axis_from_times,
    calendar_of,
    consecutive_axis,
    time_cells,
)

__all__ = [
    "DEFAULT_MAX_BYTES",
    "DEFAULT_MAX_ROWS",
    "read_weather_csv",
]

#: Largest file accepted by default [bytes] (an hourly year is usually under 1 MB).
DEFAULT_MAX_BYTES = 20_000_000
#: Most data rows accepted by default: ten leap years of hours.
DEFAULT_MAX_ROWS = 10 * 8784

#: Tolerances before a humidity value counts as impossible (rounding in the file).
DEW_POINT_TOLERANCE_K = 0.05
SATURATION_TOLERANCE = 0.005


def read_weather_csv(
    source,
    *,
    units: str | Mapping[str, str] | None = None,
    columns: Mapping[str, str] | None = None,
    site: str | None = None,
    altitude: float | None = None,
    fill_gaps: bool = False,
    max_gap_hours: int = 6,
    max_bytes: int = DEFAULT_MAX_BYTES,
    max_rows: int = DEFAULT_MAX_ROWS,
) -> Weather:
    """Read and validate an hourly weather CSV.

    Parameters
    ----------
    source : str, os.PathLike, bytes or binary file object
        A path to the file, or its content (e.g. an upload) as bytes or a file
        object. A ``str`` is always a path; content is never used as a path.
    units : {"SI", "IP"} or mapping, optional
        Unit system of the columns whose header carries no unit, or a mapping from a
        header (or a role: ``"drybulb"``, ``"dew_point"``, ``"wet_bulb"``,
        ``"relative_humidity"``, ``"humidity_ratio"``, ``"pressure"``, ``"altitude"``,
        or ``"system"``) to a unit: ``C F K % fraction kg/kg g/kg lb/lb gr/lb Pa kPa
        hPa mbar inHg psi m ft``.
    columns : mapping, optional
        Role -> header, to pick columns the recognition misses or to choose between
        several candidates (e.g. ``{"relative_humidity": "Hum. out"}``).
    site : str, optional
        Site name; default the file name without extension.
    altitude : float, optional
        Site altitude [m, or ft with IP units], -400 to 5000 m. Required when the file
        has no pressure column; otherwise estimated from the mean pressure.
    fill_gaps : bool
        Fill missing hours and empty cells by linear interpolation (runs of at most
        ``max_gap_hours``); otherwise they are reported as errors.
    max_gap_hours : int
        Longest run filled [h], 1 to 24.
    max_bytes : int
        Largest file accepted [bytes].
    max_rows : int
        Most data rows accepted.

    Returns
    -------
    Weather
        Dry bulb [°C], humidity ratio [kg/kg], pressure [Pa], with notes on every
        choice made (units, columns used and ignored, filled gaps, skipped lines).

    Raises
    ------
    InputFileError
        Listing every problem with its row number(s) and column.
    InputRangeError
        For a bad argument (not a bad file).
    """
    check_range("max_gap_hours", max_gap_hours, 1, 24, "h")
    check_range("max_bytes", max_bytes, 1, 2**40, "bytes")
    check_range("max_rows", max_rows, 1, 10**8, "rows")
    max_rows = int(max_rows)
    system, unit_map = parse_units_argument(units)
    columns = check_columns_argument(columns or {})
    source_text = read_text(source, max_bytes=int(max_bytes), kind="weather file")

    def row_limit(data_rows: int, header_row: int) -> str | None:
        if data_rows <= max_rows:
            return None
        return (
            f"row {header_row + max_rows + 1}: the file has {data_rows:,} data rows, more "
            f"than the limit of {max_rows:,} (max_rows) in every column; an hourly year has "
            f"8,760 rows"
        )

    table = read_hourly_table(
        source_text,
        is_header=lambda cells: is_weather_header(cells, columns),
        example_header="timestamp,drybulb_C,dew_point_C,pressure_Pa",
        row_limit=row_limit,
    )
    chosen = choose_columns(table, columns, system, unit_map)
    if table.problems:
        table.fail()
    site = site if site is not None else (source_text.stem or "imported weather")
    altitude_m = _altitude_m(altitude, system, unit_map)
    return _weather_year(
        table, chosen, site, altitude, altitude_m, fill_gaps, max_gap_hours, max_rows
    )


def _time_axis(table: HourlyTable, chosen: dict[str, Column], max_rows: int) -> TimeAxis | None:
    if "timestamp" in chosen or ("date" in chosen and "time" in chosen):
        if "timestamp" in chosen:
            header = chosen["timestamp"].header
            cells = time_cells(table, header)
        else:
            header = f"{chosen['date'].header}' + '{chosen['time'].header}"
            cells = time_cells(table, chosen["date"].header, chosen["time"].header)
        return axis_from_times(table, cells, header, max_rows)
    if "hour" in chosen:
        column = chosen["hour"]
        return axis_from_hour_index(table, column_numbers(table, column), column.header, max_rows)
    return consecutive_axis(table)


def _weather_year(table, chosen, site, altitude, altitude_m, fill_gaps, max_gap_hours, max_rows):
    axis = _time_axis(table, chosen, max_rows)
    humidity_role = next(r for r in HUMIDITY_ROLES if r in chosen)
    roles = ["drybulb", humidity_role] + (["pressure"] if "pressure" in chosen else [])
    si, missing = {}, {}
    for role in roles:
        column = chosen[role]
        parsed = column_numbers(table, column)
        missing[role] = parsed.missing
        si[role] = to_si(column.unit, parsed.values)
        check_physical(table, column, si[role], parsed.values)
    if humidity_role == "relative_humidity":
        rh, column = si["relative_humidity"], chosen["relative_humidity"]
        if np.nanmax(rh, initial=0.0) <= 1.5 and column.unit == "%":
            table.problems.append(
                f"column {column.header!r}: every relative humidity is at most 1.5 % (rows "
                f"{table.header_row + 1}-{table.header_row + len(rh)}): the values look like "
                f"a fraction 0-1; give units={{{column.header!r}: 'fraction'}}"
            )
    if "pressure" not in chosen and altitude is None:
        table.problems.append(
            f"row {table.header_row}: no pressure column and no altitude given; add a "
            f"pressure column (e.g. 'pressure_Pa') or pass altitude= (columns found: "
            f"{table.header_list})"
        )
    _check_year_plausible(table, chosen["drybulb"], si["drybulb"])
    _check_humidity_limit(table, chosen, humidity_role, si, altitude_m)
    if axis is None or table.problems:
        table.fail()

    grid = place_on_grid(
        table,
        axis,
        {chosen[role].header: (si[role], missing[role]) for role in roles},
        fill_gaps=bool(fill_gaps),
        max_gap_hours=int(max_gap_hours),
    )
    if table.problems:
        table.fail()
    grid = {role: grid[chosen[role].header] for role in roles}
    grid_size = grid["drybulb"].size
    if grid_size % 24 != 0:
        position = axis.hours.astype(int)
        whole = grid_size // 24 * 24
        last_row = table.row_numbers([np.searchsorted(position, whole)])[0]
        table.problems.append(
            f"column {axis.header!r}: the record has {grid_size} hours, not a whole number "
            f"of days; the last whole day ends before row {last_row}; rows {last_row}-"
            f"{table.row_numbers([len(position) - 1])[0]} are a part day (give 8760 or 8784 "
            f"hours, or whole days)"
        )
        table.fail()
    if grid_size not in (8760, 8784):
        table.notes.append(
            f"{grid_size} hours = {grid_size // 24} day(s), not a full year: annual design "
            f"conditions computed from it describe only these days"
        )
    return _weather(table, chosen, grid, humidity_role, axis, site, altitude, altitude_m)


def _weather(table, chosen, grid, humidity_role, axis, site, altitude, altitude_m) -> Weather:
    drybulb = grid["drybulb"]
    grid_size = drybulb.size
    notes = table.notes
    if "pressure" in chosen:
        pressure = grid["pressure"]
        if altitude is None:
            altitude_m = float(moist_air.altitude_from_pressure(pressure.mean()))
            notes.append(
                f"altitude estimated from the mean pressure: {altitude_m:.0f} m "
                f"(standard atmosphere)"
            )
    else:
        pressure = np.full(grid_size, float(moist_air.pressure_from_altitude(altitude_m)))
        notes.append(
            f"no pressure column: standard-atmosphere pressure at {altitude_m:.0f} m "
            f"({pressure[0]:.0f} Pa) used for every hour"
        )
    column = chosen[humidity_role]
    values = grid[humidity_role]
    saturation = moist_air.saturation_humidity_ratio(drybulb, pressure, check=False)
    if humidity_role in ("dew_point", "wet_bulb"):
        capped = values > drybulb
        values = np.minimum(values, drybulb)
        if humidity_role == "dew_point":
            w = moist_air.humidity_ratio_from_dew_point(values, pressure, check=False)
        else:
            w = moist_air.humidity_ratio_from_wet_bulb(drybulb, values, pressure, check=False)
    elif humidity_role == "relative_humidity":
        w = moist_air.humidity_ratio_from_relative_humidity(
            drybulb, values / 100.0, pressure, check=False
        )
        capped = np.zeros(grid_size, bool)
    else:
        w = values
        capped = w > saturation
    w = np.clip(w, 0.0, saturation)
    if capped.any():
        notes.append(
            f"column {column.header!r}: {int(capped.sum())} value(s) slightly above "
            f"saturation (within rounding) set to saturation"
        )
    units_used = ", ".join(
        f"{c.header!r} as {ROLE_TEXT[c.role]} [{DISPLAY_UNIT.get(c.unit, c.unit)}]"
        for c in chosen.values()
        if c.unit is not None and c.role in ("drybulb", humidity_role, "pressure")
    )
    notes.insert(0, f"read {table.name}: {units_used}")
    hour_of_year, month = calendar_of(axis, grid_size, notes)
    return Weather(
        site=site,
        drybulb=drybulb,
        humidity_ratio=w,
        pressure=pressure,
        altitude=altitude_m,
        hour_of_year=hour_of_year,
        month=month,
        notes=tuple(notes),
    )


def _altitude_m(altitude, system, unit_map) -> float | None:
    """Altitude argument in metres (feet with IP units), checked -400 to 5000 m."""
    if altitude is None:
        return None
    unit = unit_map.get("altitude") or (SYSTEM_DEFAULTS[system]["altitude"] if system else "m")
    metres = float(_units.meters_from_feet(altitude)) if unit == "ft" else float(altitude)
    return float(check_range("altitude", metres, -400.0, 5000.0, "m"))


def _check_year_plausible(table: HourlyTable, column: Column, drybulb: np.ndarray) -> None:
    """Catch a whole year read in the wrong temperature unit (°C read as °F)."""
    finite = drybulb[np.isfinite(drybulb)]
    if finite.size >= 8760 and column.unit == "F" and finite.max() < 5.0:
        table.problems.append(
            f"column {column.header!r} (dry bulb, read in °F): the warmest hour of the "
            f"year is {finite.max() * 1.8 + 32:.1f} °F ({finite.max():.1f} °C) at "
            f"row {table.row_numbers([int(np.nanargmax(drybulb))])[0]}: the values look like "
            f"°C; if so, give units={{{column.header!r}: 'C'}}"
        )
    if finite.size >= 8760 and column.unit in ("C", "K") and finite.min() > 25.0:
        table.problems.append(
            f"column {column.header!r} (dry bulb, read in °{column.unit}): the coldest "
            f"hour of the year is {finite.min():.1f} °C at row "
            f"{table.row_numbers([int(np.nanargmin(drybulb))])[0]}: the values look like °F; "
            f"if so, give units={{{column.header!r}: 'F'}}"
        )


def _check_humidity_limit(table, chosen, humidity_role, si, altitude_m) -> None:
    """Dew point or wet bulb above the dry bulb, humidity ratio above saturation."""
    column = chosen[humidity_role]
    drybulb, values = si["drybulb"], si[humidity_role]
    # Rows already reported as out of range (or empty) are not reported again here.
    usable = np.ones(drybulb.shape, bool)
    for role, series in (("drybulb", drybulb), (humidity_role, values)):
        low, high, _ = RANGES[role]
        usable &= (series >= low) & (series <= high)
    if humidity_role in ("dew_point", "wet_bulb"):
        excess = np.where(usable, values - drybulb, np.nan)
        bad = usable & (excess > DEW_POINT_TOLERANCE_K)
        what = f"{ROLE_TEXT[humidity_role]} above the dry bulb"
        unit = "K"
    elif humidity_role == "humidity_ratio":
        if "pressure" in si:
            pressure = np.broadcast_to(si["pressure"], drybulb.shape)
        elif altitude_m is not None:
            pressure = np.full(drybulb.shape, float(moist_air.pressure_from_altitude(altitude_m)))
        else:
            return
        usable &= np.isfinite(pressure) & (pressure >= 50_000) & (pressure <= 110_000)
        saturation = np.full(drybulb.shape, np.nan)
        saturation[usable] = moist_air.saturation_humidity_ratio(
            drybulb[usable], pressure[usable], check=False
        )
        excess = np.full(drybulb.shape, np.nan)
        excess[usable] = (values[usable] / saturation[usable] - 1.0) * 100.0
        bad = usable & (excess > SATURATION_TOLERANCE * 100.0)
        what = "humidity ratio above saturation at the dry bulb (relative humidity > 100 %)"
        unit = "%"
    else:
        return
    if not bad.any():
        return
    index = np.flatnonzero(bad)
    table.problems.append(
        f"column {column.header!r}: {what} at {table.rows_text(index)}; first at row "
        f"{table.row_numbers(index[:1])[0]} by {excess[index[0]]:.2f} {unit} (compare column "
        f"{chosen['drybulb'].header!r})"
    )
