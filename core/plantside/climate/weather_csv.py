"""Read a generic hourly weather CSV into a :class:`~plantside.climate.weather.Weather`.

Accepted file
-------------
- Text, UTF-8 (with or without byte-order mark), UTF-16 with a byte-order mark,
  or Windows-1252; LF or CRLF line ends. Lines starting with ``#`` before the
  header are comments.
- Separator ``,``, ``;`` or tab, found from the header line. With ``;`` or tab
  a decimal comma (``12,5``) is accepted.
- One header row, then one row per hour. Columns are found by their header,
  case-insensitively, ignoring spaces, underscores and punctuation; a unit may
  follow in brackets (``Dry bulb (°C)``, ``RH [%]``) or as the last word(s)
  (``drybulb_F``, ``RH %``, ``humidity_ratio_g_per_kg``, ``pressure_Pa``).

=====================  =======================================  ==========================
role                   header names recognised                  units
=====================  =======================================  ==========================
time (optional)        timestamp, datetime, date + time, time   ISO 8601 or a date form
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
numbers of the file, the header being row 1 after any comment lines) and its
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
  are not whole hours, missing hours;
- length: a whole number of days is required; 8760 or 8784 hours is a year,
  any other whole number of days is accepted with a note;
- size: more than ``max_bytes`` bytes or ``max_rows`` data rows.

Gaps (missing hours and empty cells) are filled by linear interpolation only
when ``fill_gaps=True`` and a run is at most ``max_gap_hours`` long; each fill is
listed in the notes. The file's content is only ever parsed as data: it is
never executed and never used as a path.
"""

from __future__ import annotations

import csv
import io
import os
import re
import warnings
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from plantside import units as _units
from plantside.air import moist_air
from plantside.climate.weather import Weather
from plantside.constants import ZERO_CELSIUS
from plantside.errors import InputFileError, InputRangeError, check_range

__all__ = [
    "DEFAULT_MAX_BYTES",
    "DEFAULT_MAX_ROWS",
    "read_weather_csv",
]

#: Largest file accepted by default [bytes] (an hourly year is usually under 1 MB).
DEFAULT_MAX_BYTES = 20_000_000
#: Most data rows accepted by default: ten leap years of hours.
DEFAULT_MAX_ROWS = 10 * 8784

#: Longest header line accepted [characters].
MAX_HEADER_CHARACTERS = 10_000
#: Largest hour index accepted (a hundred years of hours).
MAX_HOUR_INDEX = 100 * 8784
#: Tolerances before a humidity value counts as impossible (rounding in the file).
DEW_POINT_TOLERANCE_K = 0.05
SATURATION_TOLERANCE = 0.005

_MISSING_MARKERS = {"", "na", "n/a", "nan", "null", "none"}

# Physical range of each quantity in SI [unit] (project rule from world records,
# rounded out): dry bulb records are about -89 and +57 °C; dew points above 35 °C
# are unknown.
_RANGES = {
    "drybulb": (-70.0, 60.0, "°C"),
    "dew_point": (-80.0, 40.0, "°C"),
    "wet_bulb": (-70.0, 40.0, "°C"),
    "relative_humidity": (0.0, 100.0, "%"),
    "humidity_ratio": (0.0, 0.045, "kg/kg"),
    "pressure": (50_000.0, 110_000.0, "Pa"),
}

_ROLE_TEXT = {
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

_ROLE_NAMES = {
    "timestamp": {"timestamp", "datetime", "dateandtime", "localtime", "datetimelocal"},
    "date": {"date"},
    "time": {"time", "timeofday", "clocktime"},
    "hour": {"hour", "hourofyear", "hoy", "hr", "hourindex", "hours"},
    "drybulb": {
        "drybulb", "drybulbtemperature", "drybulbtemp", "db", "dbt", "tdb", "temperature",
        "temp", "airtemperature", "airtemp", "tair", "t", "outdoortemperature",
        "outdoorairtemperature", "oat", "outsideairtemperature",
    },
    "dew_point": {"dewpoint", "dewpointtemperature", "dewpointtemp", "dp", "td", "tdp", "dew"},
    "wet_bulb": {"wetbulb", "wetbulbtemperature", "wetbulbtemp", "wb", "twb"},
    "humidity_ratio": {"humidityratio", "w", "mixingratio", "moisturecontent"},
    "relative_humidity": {"relativehumidity", "rh", "humidity", "relhum", "relhumidity"},
    "pressure": {
        "pressure", "stationpressure", "atmosphericpressure", "barometricpressure", "p",
        "patm", "pbaro", "baro", "airpressure", "pstation",
    },
}  # fmt: skip

_HUMIDITY_ROLES = ("dew_point", "humidity_ratio", "wet_bulb", "relative_humidity")
_TEMPERATURE_ROLES = ("drybulb", "dew_point", "wet_bulb")

# canonical unit -> (quantity, systems it belongs to)
_UNITS = {
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

_UNIT_ALIASES = {
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

_SYSTEM_DEFAULTS = {
    "SI": {"temperature": "C", "relative_humidity": "%", "humidity_ratio": "kg/kg",
           "pressure": "Pa", "altitude": "m"},
    "IP": {"temperature": "F", "relative_humidity": "%", "humidity_ratio": "lb/lb",
           "pressure": "inHg", "altitude": "ft"},
}  # fmt: skip

# Conversion of each file unit to SI (plantside.units, factors from plantside.constants).
_TO_SI = {
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


_DISPLAY_UNIT = {"C": "°C", "F": "°F", "fraction": "(fraction)"}


def _quantity(role: str) -> str:
    return "temperature" if role in _TEMPERATURE_ROLES else role


# ---------------------------------------------------------------------------------------
# row-number text
# ---------------------------------------------------------------------------------------
def _rows_text(rows, limit: int = 8) -> str:
    """'row 5' / 'rows 5, 9-12, 40 (6 rows)' from sorted file row numbers."""
    rows = np.unique(np.asarray(rows, dtype=int))
    if rows.size == 1:
        return f"row {rows[0]}"
    breaks = np.flatnonzero(np.diff(rows) != 1)
    starts = np.concatenate(([rows[0]], rows[breaks + 1]))
    ends = np.concatenate((rows[breaks], [rows[-1]]))
    parts = [f"{a}" if a == b else f"{a}-{b}" for a, b in zip(starts, ends, strict=True)]
    text = ", ".join(parts[:limit]) + (", ..." if len(parts) > limit else "")
    return f"rows {text} ({rows.size} rows)"


# ---------------------------------------------------------------------------------------
# reading bytes and text
# ---------------------------------------------------------------------------------------
def _read_source(source, max_bytes: int) -> tuple[bytes, str, str | None]:
    """Bytes of the source, a display name, and the file stem (paths only)."""
    if isinstance(source, bytes | bytearray | memoryview):
        data = bytes(source)
        name, stem = "uploaded file", None
    elif isinstance(source, str | os.PathLike):
        path = Path(source)
        name, stem = path.name, path.stem
        if not path.is_file():
            raise InputFileError(name, [f"no such file: {str(path)!r}"])
        size = path.stat().st_size
        if size > max_bytes:
            raise InputFileError(name, [_size_message(size, max_bytes)])
        data = path.read_bytes()
    elif hasattr(source, "read"):
        data = source.read(max_bytes + 1)
        if isinstance(data, str):
            data = data.encode("utf-8")
        name, stem = str(getattr(source, "name", "uploaded file")), None
    else:
        raise InputFileError(
            "weather file", [f"cannot read a weather file from a {type(source).__name__}"]
        )
    if len(data) > max_bytes:
        raise InputFileError(name, [_size_message(len(data), max_bytes)])
    return data, name, stem


def _size_message(size: int, max_bytes: int) -> str:
    return (
        f"the file is {size:,} bytes (or more), above the limit of {max_bytes:,} bytes "
        f"(max_bytes); an hourly year is usually under 1 MB: check that this is an hourly "
        f"weather CSV, or raise max_bytes. Nothing was read (row 1 onwards, all columns)"
    )


def _decode(data: bytes, notes: list[str]) -> str:
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        return data.decode("utf-16")
    if b"\x00" in data[:4096]:
        raise ValueError("the file contains NUL bytes: it is not a text (CSV) file")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError:
        notes.append("the file is not UTF-8; it was read as Windows-1252 text")
        return data.decode("cp1252")


# ---------------------------------------------------------------------------------------
# header recognition
# ---------------------------------------------------------------------------------------
def _canonical_unit(text: str) -> str | None:
    key = text.strip().lower().replace("°", "deg").replace("º", "deg")
    key = key.replace("degrees", "deg").replace("degree", "deg")
    key = re.sub(r"[\s_]+", "", key)
    key = key.replace("per", "/")
    return _UNIT_ALIASES.get(key)


def _split_header(header: str) -> tuple[str, str | None, str | None]:
    """(normalised name, canonical unit or None, unit text as written or None)."""
    text = header.strip().replace("%", " % ")
    bracket = re.search(r"[\(\[\{]([^\)\]\}]*)[\)\]\}]", text)
    unit_text = None
    if bracket:
        unit_text = bracket.group(1).strip()
        text = (text[: bracket.start()] + " " + text[bracket.end() :]).strip()
        unit = _canonical_unit(unit_text) if unit_text else None
    else:
        unit = None
        tokens = [t for t in re.split(r"[\s_]+", text) if t]
        for length in (4, 3, 2, 1):
            if len(tokens) > length:
                candidate = " ".join(tokens[-length:])
                found = _canonical_unit(candidate)
                if found is not None:
                    unit, unit_text = found, candidate
                    text = " ".join(tokens[:-length])
                    break
    name = re.sub(r"[^a-z0-9]", "", text.lower())
    return name, unit, (unit_text if unit_text else None)


def _role_of(name: str) -> str | None:
    for role, names in _ROLE_NAMES.items():
        if name in names:
            return role
    return None


@dataclass
class _Column:
    header: str
    role: str
    unit: str | None
    unit_text: str | None


# ---------------------------------------------------------------------------------------
# main entry
# ---------------------------------------------------------------------------------------
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
        choice made (units, columns used and ignored, filled gaps).

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
    system, unit_map = _parse_units_argument(units)
    data, name, stem = _read_source(source, int(max_bytes))
    notes: list[str] = []
    try:
        text = _decode(data, notes)
    except (UnicodeDecodeError, ValueError) as error:
        raise InputFileError(name, [f"row 1: {error}"]) from None
    site = site if site is not None else (stem or "imported weather")
    return _Reader(name, notes, system, unit_map, columns or {}).read(
        text, site, altitude, bool(fill_gaps), int(max_gap_hours), int(max_rows)
    )


def _parse_units_argument(units):
    if units is None:
        return None, {}
    if isinstance(units, str):
        system = units.strip().upper()
        if system not in _SYSTEM_DEFAULTS:
            raise InputRangeError("units", f"units = {units!r}: use 'SI', 'IP' or a mapping")
        return system, {}
    if isinstance(units, Mapping):
        unit_map = {}
        system = None
        for key, value in units.items():
            if key == "system":
                system, _ = _parse_units_argument(value)
                continue
            if key == "altitude":
                if str(value).strip().lower() not in ("m", "ft"):
                    raise InputRangeError("units", f"altitude unit {value!r}: use 'm' or 'ft'")
                unit_map[key] = str(value).strip().lower()
                continue
            canonical = _canonical_unit(str(value))
            if canonical is None:
                raise InputRangeError(
                    "units",
                    f"unit {value!r} for {key!r} is not recognised; use one of "
                    f"{', '.join(_UNITS)} (or mbar, psia)",
                )
            unit_map[str(key)] = canonical
        return system, unit_map
    raise InputRangeError("units", f"units must be 'SI', 'IP' or a mapping, not {units!r}")


class _Reader:
    """One read of one file: collects problems and notes as it goes."""

    def __init__(self, name, notes, system, unit_map, columns):
        self.name = name
        self.notes = notes
        self.problems: list[str] = []
        self.system = system
        self.unit_map = unit_map
        self.columns = dict(columns)

    def fail(self):
        raise InputFileError(self.name, self.problems)

    # -- structure ------------------------------------------------------------------
    def read(self, text, site, altitude, fill_gaps, max_gap_hours, max_rows) -> Weather:
        self.max_rows = max_rows
        text = text.replace("\r\n", "\n").replace("\r", "\n")
        lines = text.split("\n")
        # Leading comment ('#') and blank lines are skipped but still counted as rows.
        skipped = 0
        while skipped < len(lines) and (
            not lines[skipped].strip() or lines[skipped].lstrip().startswith("#")
        ):
            skipped += 1
        self.header_row = skipped + 1
        if skipped >= len(lines):
            self.header_row = 1
            self.problems.append(
                f"row {self.header_row}: the file is empty (no header row, no columns); "
                f"expected a header such as 'timestamp,drybulb_C,dew_point_C,pressure_Pa' "
                f"and one row per hour"
            )
            self.fail()
        data_lines = len(lines) - skipped - 1
        if lines[-1] == "":
            data_lines -= 1
        if data_lines > max_rows:
            self.problems.append(
                f"row {self.header_row + max_rows + 1}: the file has {data_lines:,} data rows, "
                f"more than the limit of {max_rows:,} (max_rows) in every column; an hourly "
                f"year has 8,760 rows"
            )
            self.fail()
        header_line = lines[skipped]
        separator = max((",", ";", "\t"), key=header_line.count)
        if len(header_line) > MAX_HEADER_CHARACTERS:
            self.problems.append(
                f"row {self.header_row}: the header is {len(header_line):,} characters long "
                f"(more than {MAX_HEADER_CHARACTERS:,}), so no columns can be read; is this an "
                f"hourly weather CSV?"
            )
            self.fail()
        self.raw_headers = next(csv.reader([header_line], delimiter=separator))
        self.decimal_comma = separator in (";", "\t")
        body = "\n".join(lines[skipped:])
        try:
            frame = pd.read_csv(
                io.StringIO(body),
                sep=separator,
                dtype=str,
                keep_default_na=False,
                skip_blank_lines=False,
                header=0,
                engine="c",
                quotechar='"',
            )
        except pd.errors.ParserError as error:
            match = re.search(r"Expected (\d+) fields in line (\d+), saw (\d+)", str(error))
            if match:
                expected, line, saw = (int(g) for g in match.groups())
                self.problems.append(
                    f"row {line + skipped}: {saw} fields where the header (row "
                    f"{self.header_row}) has {expected} columns; check the separator "
                    f"{separator!r} and decimal marks"
                )
            else:
                self.problems.append(f"row {self.header_row}: the file cannot be read as CSV")
            self.fail()
        except csv.Error as error:
            self.problems.append(f"row {self.header_row}: the file cannot be read as CSV ({error})")
            self.fail()
        except pd.errors.EmptyDataError:
            self.problems.append(f"row {self.header_row}: the file is empty (no columns)")
            self.fail()
        # Drop trailing rows in which every field is empty (spreadsheet export debris).
        filled = (frame.apply(lambda c: c.str.strip()) != "").any(axis=1).to_numpy()
        last = int(np.flatnonzero(filled)[-1]) + 1 if filled.any() else 0
        if last < len(frame):
            self.notes.append(
                f"ignored {len(frame) - last} empty row(s) at the end of the file "
                f"({_rows_text(self.row_numbers(np.arange(last, len(frame))))})"
            )
            frame = frame.iloc[:last]
        if len(frame) == 0:
            self.problems.append(
                f"row {self.header_row + 1}: the file has a header but no data rows "
                f"(columns: {', '.join(repr(c) for c in frame.columns)})"
            )
            self.fail()
        self.frame = frame
        self.headers = [str(c) for c in frame.columns]
        self.header_list = ", ".join(repr(h) for h in self.headers)
        chosen = self.choose_columns()
        if self.problems:
            self.fail()
        return self.build(chosen, site, altitude, fill_gaps, max_gap_hours)

    def row_numbers(self, index):
        """File row numbers of data-row positions (0 = first data row)."""
        return np.asarray(index, dtype=int) + self.header_row + 1

    # -- columns --------------------------------------------------------------------
    def choose_columns(self) -> dict[str, _Column]:
        headers = self.headers
        first_position = {}
        for position, header in enumerate(self.raw_headers):
            key = header.strip()
            if key in first_position:
                self.problems.append(
                    f"row {self.header_row}: column name {key!r} appears more than once "
                    f"(columns {first_position[key] + 1} and {position + 1})"
                )
            first_position.setdefault(key, position)
        candidates: dict[str, list[_Column]] = {}
        ignored = []
        forced = {}
        for role, header in self.columns.items():
            if role not in _ROLE_TEXT:
                raise InputRangeError(
                    "columns", f"columns: unknown role {role!r}; use one of {sorted(_ROLE_TEXT)}"
                )
            if header not in headers:
                self.problems.append(
                    f"row {self.header_row}: column {header!r} given for {_ROLE_TEXT[role]} "
                    f"is not in the header; columns found: {self.header_list}"
                )
                continue
            forced[header] = role
        for header in headers:
            name, unit, unit_text = _split_header(header)
            role = forced.get(header) or _role_of(name)
            if header in forced and _role_of(name) is None:
                # A forced column may carry a unit the splitter did not see.
                unit = unit or _canonical_unit(header)
            if role is None:
                ignored.append(header)
                continue
            if header not in forced and role in forced.values():
                ignored.append(header)
                continue
            candidates.setdefault(role, []).append(_Column(header, role, unit, unit_text))
        chosen: dict[str, _Column] = {}
        for role, found in candidates.items():
            if len(found) > 1:
                names = " and ".join(repr(c.header) for c in found)
                self.problems.append(
                    f"row {self.header_row}: columns {names} both look like the "
                    f"{_ROLE_TEXT[role]}; choose one with columns={{'{role}': ...}}"
                )
                continue
            chosen[role] = found[0]
        if "drybulb" not in candidates:
            self.problems.append(
                f"row {self.header_row}: no dry-bulb column; columns found: "
                f"{self.header_list}; expected a header such as 'drybulb_C', 'Dry bulb (°F)' "
                f"or 'temperature', or name it with columns={{'drybulb': ...}}"
            )
        humidity = [role for role in _HUMIDITY_ROLES if role in candidates]
        if not humidity:
            self.problems.append(
                f"row {self.header_row}: no humidity column; columns found: "
                f"{self.header_list}; expected one of dew point, wet bulb, relative humidity "
                f"or humidity ratio (e.g. 'dew_point_C', 'RH %', 'humidity_ratio_g_per_kg')"
            )
        elif len(humidity) > 1:
            unused = [chosen[r].header for r in humidity[1:] if r in chosen]
            for role in humidity[1:]:
                chosen.pop(role, None)
            if unused and humidity[0] in chosen:
                self.notes.append(
                    f"humidity taken from {chosen[humidity[0]].header!r} "
                    f"({_ROLE_TEXT[humidity[0]]}); not used: " + ", ".join(repr(u) for u in unused)
                )
        # A lone date or time column is read as the timestamp column.
        lone = [role for role in ("date", "time") if role in chosen]
        if len(lone) == 1 and "timestamp" not in chosen:
            column = chosen.pop(lone[0])
            chosen["timestamp"] = _Column(column.header, "timestamp", None, None)
        if "timestamp" in chosen and "hour" in chosen:
            self.notes.append(
                f"time taken from {chosen['timestamp'].header!r}; hour column "
                f"{chosen['hour'].header!r} not used"
            )
            chosen.pop("hour")
        if ignored:
            self.notes.append("ignored columns: " + ", ".join(repr(h) for h in ignored))
        for column in chosen.values():
            self.resolve_unit(column)
        return chosen

    def resolve_unit(self, column: _Column):
        quantity = _quantity(column.role)
        if column.role in ("timestamp", "date", "time", "hour"):
            return
        given = self.unit_map.get(column.header) or self.unit_map.get(column.role)
        header_unit = column.unit
        if header_unit is None and column.unit_text:
            self.problems.append(
                f"row {self.header_row}, column {column.header!r}: unit "
                f"{column.unit_text!r} is not recognised for the {_ROLE_TEXT[column.role]}"
            )
            return
        if header_unit is not None and _UNITS[header_unit][0] != quantity:
            self.problems.append(
                f"row {self.header_row}, column {column.header!r}: unit {header_unit!r} "
                f"is not a unit of {_ROLE_TEXT[column.role]}"
            )
            return
        if given is not None:
            if _UNITS[given][0] != quantity:
                self.problems.append(
                    f"column {column.header!r}: the unit {given!r} given in units= is not a "
                    f"unit of {_ROLE_TEXT[column.role]} (row {self.header_row})"
                )
                return
            if header_unit is not None and header_unit != given:
                self.notes.append(
                    f"column {column.header!r}: the header says {header_unit!r}; read in "
                    f"{given!r} as units= gives"
                )
            column.unit = given
            return
        if header_unit is not None:
            if self.system is not None and self.system not in _UNITS[header_unit][1]:
                self.problems.append(
                    f"row {self.header_row}, column {column.header!r}: the header says "
                    f"{header_unit!r}, an {'/'.join(sorted(_UNITS[header_unit][1]))} unit, "
                    f"but units={self.system!r} was given; give units={{{column.header!r}: "
                    f"{header_unit!r}}} or correct the header"
                )
                return
            column.unit = header_unit
            return
        if self.system is not None:
            column.unit = _SYSTEM_DEFAULTS[self.system][quantity]
            return
        if quantity == "relative_humidity":
            column.unit = "%"
            self.notes.append(f"column {column.header!r}: no unit given, read as percent")
            return
        self.problems.append(
            f"row {self.header_row}, column {column.header!r}: no unit in the header and "
            f"none given; pass units='SI' or units='IP', or units={{{column.header!r}: "
            f"'C'}} (or 'F', ...)"
        )

    # -- values ---------------------------------------------------------------------
    def numbers(self, column: _Column) -> tuple[np.ndarray, np.ndarray]:
        """Numeric values of a column [file unit] and the mask of empty cells."""
        cells = self.frame[column.header].str.strip()
        missing = cells.str.lower().isin(_MISSING_MARKERS).to_numpy()
        if self.decimal_comma:
            cells = cells.str.replace(",", ".", regex=False)
        values = pd.to_numeric(cells.where(~missing), errors="coerce").to_numpy(
            dtype=float, copy=True
        )
        bad = ~np.isfinite(values) & ~missing
        if bad.any():
            first = int(np.flatnonzero(bad)[0])
            self.problems.append(
                f"column {column.header!r}: text where a number is expected at "
                f"{_rows_text(self.row_numbers(np.flatnonzero(bad)))}; first "
                f"{self.frame[column.header].iloc[first]!r} at row "
                f"{self.row_numbers([first])[0]}"
            )
        values[bad | missing] = np.nan
        return values, missing

    def to_si(self, column: _Column, values: np.ndarray) -> np.ndarray:
        return np.asarray(_TO_SI[column.unit](values), dtype=float)

    def check_physical(self, column: _Column, values_si: np.ndarray, raw: np.ndarray):
        low, high, unit = _RANGES[column.role]
        finite = np.isfinite(values_si)
        bad = finite & ((values_si < low) | (values_si > high))
        if not bad.any():
            return
        index = np.flatnonzero(bad)
        first_raw = raw[index[0]]
        shown_unit = _DISPLAY_UNIT.get(column.unit, column.unit)
        plural = "s" if index.size > 1 else ""
        if column.role == "relative_humidity" and (values_si[bad] > high).all():
            what = f"value{plural} of relative humidity above 100 %"
        else:
            what = f"value{plural} outside {low:g} to {high:g} {unit}"
        message = (
            f"column {column.header!r} ({_ROLE_TEXT[column.role]}, read in {shown_unit}): "
            f"{index.size} {what} at {_rows_text(self.row_numbers(index))}; first "
            f"{first_raw:g} {shown_unit}"
        )
        hint = self.unit_hint(column, raw)
        if np.any(np.abs(raw[bad]) >= 999):
            hint = (hint + "; " if hint else "") + (
                "values such as -9999 or 9999 look like missing-value markers: leave the "
                "cell empty and use fill_gaps=True"
            )
        if hint:
            message += f" ({hint})"
        self.problems.append(message)

    def unit_hint(self, column: _Column, raw: np.ndarray) -> str:
        """A hint naming the unit in which the raw values would be plausible."""
        quantity = _quantity(column.role)
        low, high, _ = _RANGES[column.role]
        finite = raw[np.isfinite(raw)]
        plausible = []
        for unit, (unit_quantity, _) in _UNITS.items():
            if unit_quantity != quantity or unit == column.unit:
                continue
            converted = np.asarray(_TO_SI[unit](finite), dtype=float)
            if converted.size and np.all((converted >= low) & (converted <= high)):
                plausible.append(unit)
        if not plausible:
            return ""
        shown = " or ".join(_DISPLAY_UNIT.get(unit, unit) for unit in plausible)
        return (
            f"the values look like {shown}: if so, give "
            f"units={{{column.header!r}: {plausible[0]!r}}}"
        )

    # -- time -----------------------------------------------------------------------
    def hour_positions(self, chosen) -> tuple[np.ndarray | None, pd.DatetimeIndex | None]:
        """Hour offset of each row from the first row, and the timestamps if any."""
        n = len(self.frame)
        if "timestamp" in chosen or ("date" in chosen and "time" in chosen):
            if "timestamp" in chosen:
                header = chosen["timestamp"].header
                cells = self.frame[header].str.strip()
            else:
                header = f"{chosen['date'].header}' + '{chosen['time'].header}"
                cells = (
                    self.frame[chosen["date"].header].str.strip()
                    + " "
                    + self.frame[chosen["time"].header].str.strip()
                )
            if cells.str.fullmatch(r"-?\d+").all():
                self.notes.append(f"column {header!r} holds whole numbers: read as hour index")
                values = pd.to_numeric(cells, errors="coerce").to_numpy(dtype=float)
                return self.hour_index(values, header), None
            stamps = _parse_timestamps(cells)
            # Years far outside any weather record (e.g. a -9999 marker read as a year).
            years = stamps.dt.year.to_numpy(dtype=float, na_value=np.nan)
            bad = ~((years >= 1800) & (years <= 2200))
            if bad.any():
                first = int(np.flatnonzero(bad)[0])
                self.problems.append(
                    f"column {header!r}: unreadable date/time at "
                    f"{_rows_text(self.row_numbers(np.flatnonzero(bad)))}; first "
                    f"{cells.iloc[first]!r} (use e.g. 2023-07-21 14:00)"
                )
                return None, None
            if stamps.dt.tz is not None:
                stamps = stamps.dt.tz_localize(None)
            hours = (stamps - stamps.iloc[0]).dt.total_seconds().to_numpy() / 3600.0
            self.time_header = header
            return self.check_steps(hours, stamps, header), pd.DatetimeIndex(stamps)
        if "hour" in chosen:
            column = chosen["hour"]
            values, missing = self.numbers(column)
            if missing.any():
                self.problems.append(
                    f"column {column.header!r}: empty hour index at "
                    f"{_rows_text(self.row_numbers(np.flatnonzero(missing)))}"
                )
            if not np.isfinite(values).all():
                return None, None
            fractional = values != np.round(values)
            if fractional.any():
                self.problems.append(
                    f"column {column.header!r}: hour index not a whole number at "
                    f"{_rows_text(self.row_numbers(np.flatnonzero(fractional)))}"
                )
                return None, None
            return self.hour_index(values, column.header), None
        self.notes.append(
            f"no time column: the {n} rows are read as consecutive hours from 1 January 00:00"
        )
        self.first_hour = 0
        return np.arange(n, dtype=float), None

    def hour_index(self, values: np.ndarray, header: str) -> np.ndarray | None:
        """Hour offsets from an hour-index column (whole numbers as floats)."""
        out_of_range = ~((values >= 0) & (values <= MAX_HOUR_INDEX))
        if out_of_range.any():
            index = np.flatnonzero(out_of_range)
            self.problems.append(
                f"column {header!r}: hour index outside 0 to {MAX_HOUR_INDEX:,} at "
                f"{_rows_text(self.row_numbers(index))}; first {values[index[0]]:g}"
            )
            return None
        values = values.astype(np.int64)
        first = int(values[0])
        if first == 1 and int(values.max()) in (8760, 8784):
            self.notes.append(
                f"column {header!r}: hours numbered 1..{int(values.max())} (hour ending), "
                f"stored as 0..{int(values.max()) - 1}"
            )
            values = values - 1
            first = 0
        self.first_hour = first
        self.time_header = header
        return self.check_steps((values - first).astype(float), None, header)

    def check_steps(self, hours, stamps, header) -> np.ndarray | None:
        def show(i):
            row = self.row_numbers([i])[0]
            if stamps is not None:
                return f"row {row} ({stamps.iloc[i].isoformat(sep=' ', timespec='minutes')})"
            return f"row {row}"

        ok = True
        off_grid = np.abs(hours - np.round(hours)) > 1e-6
        if off_grid.any():
            index = np.flatnonzero(off_grid)
            self.problems.append(
                f"column {header!r}: times not on whole hours from the first row at "
                f"{_rows_text(self.row_numbers(index))}; first {show(index[0])} (only hourly "
                f"data are accepted)"
            )
            ok = False
        rounded = np.round(hours).astype(np.int64)
        duplicated = pd.Series(rounded).duplicated(keep=False).to_numpy()
        if duplicated.any():
            index = np.flatnonzero(duplicated)
            self.problems.append(
                f"column {header!r}: duplicated hours at {_rows_text(self.row_numbers(index))}; "
                f"first {show(index[0])} (each hour must appear once; remove the repeats)"
            )
            ok = False
        steps = np.diff(rounded)
        backwards = np.flatnonzero(steps < 0) + 1
        if backwards.size:
            self.problems.append(
                f"column {header!r}: time goes backwards at "
                f"{_rows_text(self.row_numbers(backwards))}; first {show(backwards[0])} "
                f"(rows must be in time order)"
            )
            ok = False
        if ok and rounded[-1] + 1 > self.max_rows:
            self.problems.append(
                f"column {header!r}: the times span {rounded[-1] + 1:,} hours from "
                f"{show(0)} to {show(len(rounded) - 1)}, more than max_rows="
                f"{self.max_rows:,} hours"
            )
            ok = False
        if not ok:
            return None
        self.gaps = [
            (int(i), int(steps[i] - 1), show(i), show(i + 1)) for i in np.flatnonzero(steps > 1)
        ]
        return rounded.astype(float)

    # -- assembly -------------------------------------------------------------------
    def build(self, chosen, site, altitude, fill_gaps, max_gap_hours) -> Weather:
        self.gaps = []
        self.first_hour = 0
        hours, stamps = self.hour_positions(chosen)
        humidity_role = next(r for r in _HUMIDITY_ROLES if r in chosen)
        roles = ["drybulb", humidity_role] + (["pressure"] if "pressure" in chosen else [])
        raw, si, missing = {}, {}, {}
        for role in roles:
            column = chosen[role]
            values, empty = self.numbers(column)
            raw[role], missing[role] = values, empty
            si[role] = self.to_si(column, values)
            self.check_physical(column, si[role], values)
        if humidity_role == "relative_humidity":
            rh = si["relative_humidity"]
            if np.nanmax(rh, initial=0.0) <= 1.5 and chosen[humidity_role].unit == "%":
                self.problems.append(
                    f"column {chosen[humidity_role].header!r}: every relative humidity is at "
                    f"most 1.5 % (rows {self.header_row + 1}-{self.header_row + len(rh)}): the "
                    f"values look like a fraction 0-1; give units="
                    f"{{{chosen[humidity_role].header!r}: 'fraction'}}"
                )
        if "pressure" not in chosen and altitude is None:
            self.problems.append(
                f"row {self.header_row}: no pressure column and no altitude given; add a "
                f"pressure column (e.g. 'pressure_Pa') or pass altitude= (columns found: "
                f"{self.header_list})"
            )
        self.check_year_plausible(chosen, si)
        self.check_humidity_limit(chosen, humidity_role, si, altitude)
        if hours is None or self.problems:
            self.fail()

        # Place rows on the hourly grid; missing hours become NaN.
        grid_size = int(hours[-1]) + 1
        position = hours.astype(int)
        grid = {}
        for role in roles:
            values = np.full(grid_size, np.nan)
            values[position] = si[role]
            grid[role] = values
        self.handle_gaps(grid, chosen, position, grid_size, fill_gaps, max_gap_hours, missing)
        if self.problems:
            self.fail()
        if grid_size % 24 != 0:
            whole = grid_size // 24 * 24
            last_row = self.row_numbers([np.searchsorted(position, whole)])[0]
            self.problems.append(
                f"column {self.time_header_or_rows()!r}: the record has {grid_size} hours, "
                f"not a whole number of days; the last whole day ends before row {last_row}; "
                f"rows {last_row}-{self.row_numbers([len(position) - 1])[0]} are a part day "
                f"(give 8760 or 8784 hours, or whole days)"
            )
            self.fail()
        if grid_size not in (8760, 8784):
            self.notes.append(
                f"{grid_size} hours = {grid_size // 24} day(s), not a full year: annual design "
                f"conditions computed from it describe only these days"
            )
        return self.weather(chosen, grid, humidity_role, stamps, grid_size, site, altitude)

    def time_header_or_rows(self) -> str:
        return getattr(self, "time_header", "rows")

    def check_year_plausible(self, chosen, si):
        """Catch a whole year read in the wrong temperature unit (°C read as °F)."""
        drybulb = si["drybulb"]
        finite = drybulb[np.isfinite(drybulb)]
        column = chosen["drybulb"]
        if finite.size >= 8760 and column.unit == "F" and finite.max() < 5.0:
            self.problems.append(
                f"column {column.header!r} (dry bulb, read in °F): the warmest hour of the "
                f"year is {finite.max() * 1.8 + 32:.1f} °F ({finite.max():.1f} °C) at "
                f"row {self.row_numbers([int(np.argmax(drybulb))])[0]}: the values look like "
                f"°C; if so, give units={{{column.header!r}: 'C'}}"
            )
        if finite.size >= 8760 and column.unit in ("C", "K") and finite.min() > 25.0:
            self.problems.append(
                f"column {column.header!r} (dry bulb, read in °{column.unit}): the coldest "
                f"hour of the year is {finite.min():.1f} °C at row "
                f"{self.row_numbers([int(np.argmin(drybulb))])[0]}: the values look like °F; "
                f"if so, give units={{{column.header!r}: 'F'}}"
            )

    def handle_gaps(self, grid, chosen, position, grid_size, fill_gaps, max_gap_hours, missing):
        for _index, count, before, after in self.gaps:
            text = f"{count} missing hour(s) between {before} and {after}"
            header = self.time_header_or_rows()
            if not fill_gaps:
                self.problems.append(
                    f"column {header!r}: {text} (pass fill_gaps=True to interpolate gaps of "
                    f"up to {max_gap_hours} h)"
                )
            elif count > max_gap_hours:
                self.problems.append(
                    f"column {header!r}: {text}, longer than max_gap_hours={max_gap_hours}"
                )
        if not fill_gaps:
            for role, empty in missing.items():
                if empty.any():
                    self.problems.append(
                        f"column {chosen[role].header!r}: empty or missing values at "
                        f"{_rows_text(self.row_numbers(np.flatnonzero(empty)))} (pass "
                        f"fill_gaps=True to interpolate gaps of up to {max_gap_hours} h)"
                    )
            return
        if self.problems:
            return
        filled_rows = {}
        for role, values in grid.items():
            gap = np.isnan(values)
            if not gap.any():
                continue
            edges = np.diff(np.concatenate(([0], gap.astype(np.int8), [0])))
            starts, ends = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1)
            header = chosen[role].header
            too_long = (ends - starts) > max_gap_hours
            at_edge = (starts == 0) | (ends == grid_size)
            for start, end in zip(
                starts[too_long | at_edge], ends[too_long | at_edge], strict=True
            ):
                reason = (
                    "at the start or end of the record"
                    if (start == 0 or end == grid_size)
                    else f"longer than max_gap_hours={max_gap_hours}"
                )
                self.problems.append(
                    f"column {header!r}: {end - start} missing hour(s) {reason}, "
                    f"{self.grid_rows_text(position, start, end)}; cannot interpolate"
                )
            if self.problems:
                continue
            known = np.flatnonzero(~gap)
            values[gap] = np.interp(np.flatnonzero(gap), known, values[known])
            filled_rows[header] = [
                self.grid_rows_text(position, s, e) for s, e in zip(starts, ends, strict=True)
            ]
        for header, spans in filled_rows.items():
            self.notes.append(
                f"column {header!r}: filled {len(spans)} gap(s) by linear interpolation: "
                + "; ".join(spans[:8])
                + ("; ..." if len(spans) > 8 else "")
            )

    def grid_rows_text(self, position, start, end) -> str:
        """Describe grid hours [start, end) by the file rows around them."""
        inside = np.flatnonzero((position >= start) & (position < end))
        if inside.size:
            return _rows_text(self.row_numbers(inside))
        before = np.searchsorted(position, start) - 1
        after = before + 1
        parts = []
        if before >= 0:
            parts.append(f"after row {self.row_numbers([before])[0]}")
        if after < position.size:
            parts.append(f"before row {self.row_numbers([after])[0]}")
        return " and ".join(parts) or "rows unknown"

    def weather(self, chosen, grid, humidity_role, stamps, grid_size, site, altitude):
        drybulb = grid["drybulb"]
        altitude_m = self.altitude_m(altitude)
        if "pressure" in chosen:
            pressure = grid["pressure"]
            if altitude is None:
                altitude_m = float(moist_air.altitude_from_pressure(pressure.mean()))
                self.notes.append(
                    f"altitude estimated from the mean pressure: {altitude_m:.0f} m "
                    f"(standard atmosphere)"
                )
        else:
            pressure = np.full(grid_size, float(moist_air.pressure_from_altitude(altitude_m)))
            self.notes.append(
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
            self.notes.append(
                f"column {column.header!r}: {int(capped.sum())} value(s) slightly above "
                f"saturation (within rounding) set to saturation"
            )
        units_used = ", ".join(
            f"{c.header!r} as {_ROLE_TEXT[c.role]} [{_DISPLAY_UNIT.get(c.unit, c.unit)}]"
            for c in chosen.values()
            if c.unit is not None and c.role in ("drybulb", humidity_role, "pressure")
        )
        self.notes.insert(0, f"read {self.name}: {units_used}")
        if stamps is not None:
            full = stamps[0] + pd.to_timedelta(np.arange(grid_size), unit="h")
            year_start = pd.Timestamp(year=full[0].year, month=1, day=1)
            hour_of_year = ((full - year_start) // pd.Timedelta(hours=1)).to_numpy()
            month = full.month.to_numpy()
            if full[0].hour != 0:
                self.notes.append(
                    f"the record starts at {full[0]:%H:%M}, not midnight: days are counted "
                    f"from the first row"
                )
        else:
            hour_of_year = np.arange(grid_size) + self.first_hour
            month = None
            if grid_size == 8784:
                days = np.array([31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])
                month = np.repeat(np.arange(1, 13), days * 24)
                self.notes.append("8784 hours without dates: read as a leap year")
        return Weather(
            site=site,
            drybulb=drybulb,
            humidity_ratio=w,
            pressure=pressure,
            altitude=altitude_m,
            hour_of_year=hour_of_year,
            month=month,
            notes=tuple(self.notes),
        )

    def altitude_m(self, altitude):
        """Altitude argument in metres (feet with IP units)."""
        if altitude is None:
            return None
        unit = self.unit_map.get("altitude") or (
            _SYSTEM_DEFAULTS[self.system]["altitude"] if self.system else "m"
        )
        metres = float(_units.meters_from_feet(altitude)) if unit == "ft" else float(altitude)
        return float(check_range("altitude", metres, -400.0, 5000.0, "m"))

    def check_humidity_limit(self, chosen, humidity_role, si, altitude):
        """Dew point or wet bulb above the dry bulb, humidity ratio above saturation."""
        column = chosen[humidity_role]
        drybulb, values = si["drybulb"], si[humidity_role]
        if humidity_role in ("dew_point", "wet_bulb"):
            excess = values - drybulb
            bad = excess > DEW_POINT_TOLERANCE_K
            what = f"{_ROLE_TEXT[humidity_role]} above the dry bulb"
            unit = "K"
        elif humidity_role == "humidity_ratio":
            if "pressure" in si:
                pressure = si["pressure"]
            elif altitude is not None:
                pressure = moist_air.pressure_from_altitude(self.altitude_m(altitude))
            else:
                return
            usable = np.isfinite(drybulb) & (drybulb >= -70) & (drybulb <= 60)
            usable &= np.isfinite(pressure) & (pressure >= 50_000) & (pressure <= 110_000)
            saturation = np.full(drybulb.shape, np.nan)
            saturation[usable] = moist_air.saturation_humidity_ratio(
                drybulb[usable], np.broadcast_to(pressure, drybulb.shape)[usable], check=False
            )
            excess = (values / saturation - 1.0) * 100.0
            bad = excess > SATURATION_TOLERANCE * 100.0
            what = "humidity ratio above saturation at the dry bulb (relative humidity > 100 %)"
            unit = "%"
        else:
            return
        # Rows already reported as out of range are not reported again here.
        for role, series in (("drybulb", drybulb), (humidity_role, values)):
            low, high, _ = _RANGES[role]
            bad &= (series >= low) & (series <= high)
        bad &= np.isfinite(excess)
        if not bad.any():
            return
        index = np.flatnonzero(bad)
        self.problems.append(
            f"column {column.header!r}: {what} at {_rows_text(self.row_numbers(index))}; "
            f"first at row {self.row_numbers(index[:1])[0]} by {excess[index[0]]:.2f} {unit} "
            f"(compare column {chosen['drybulb'].header!r})"
        )


def _parse_timestamps(cells: pd.Series) -> pd.Series:
    """Parse date-times, choosing between ISO, month-first and day-first forms."""
    best, best_score = None, None
    for options in ({"format": "ISO8601"}, {"dayfirst": False}, {"dayfirst": True}):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            parsed = None
            # Mixed UTC offsets are refused by the plain parse: read them as UTC instants.
            for utc in (False, True):
                try:
                    parsed = pd.to_datetime(cells, errors="coerce", utc=utc, **options)
                except (ValueError, TypeError, OverflowError, NotImplementedError):
                    continue
                if pd.api.types.is_datetime64_any_dtype(parsed):
                    break
                parsed = None
            if parsed is None:
                continue
        steps = parsed.diff().dt.total_seconds().to_numpy()[1:]
        score = (int(parsed.isna().sum()), int(np.count_nonzero(steps != 3600)))
        if best_score is None or score < best_score:
            best, best_score = parsed, score
    return best if best is not None else pd.Series(pd.NaT, index=cells.index)
