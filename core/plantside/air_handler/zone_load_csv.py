"""Read hourly zone loads (sensible, latent) from a CSV file.

The file is one the engineer exports from their own load calculation. plantside
reads it as data only: it is never executed and its content never used as a path.

Accepted file
-------------
- Text, UTF-8 (with or without byte-order mark) or Windows-1252; LF or CRLF line
  ends. Lines starting with ``#`` before the header are comments.
- Separator ``,``, ``;`` or tab, found from the header line. With ``;`` or tab a
  decimal comma (``12,5``) is accepted.
- One header row, then one row per hour, in time order from the first hour of the
  year. Headers are matched case-insensitively, ignoring spaces, underscores and
  punctuation; the unit follows the name (``sensible_kW``, ``Latent [Btu/h]``,
  ``sensible (W)``).

==================  ====================================  =========================
role                header names recognised                units
==================  ====================================  =========================
sensible (req.)     sensible, sensible load, qs            kW, W, Btu/h (btuh), MBH
latent (req.)       latent, latent load, ql                kW, W, Btu/h (btuh), MBH
internal (opt.)     internal sensible, internal, internal  kW, W, Btu/h (btuh), MBH
                    gains
occupied (opt.)     occupied, occupancy                    1/0, true/false, yes/no
hour (opt.)         hour, hour of year, hoy                1..N or 0..N-1, consecutive
==================  ====================================  =========================

Other columns are ignored (and listed in the notes). A load column without a unit
in its header takes the unit of ``units`` (``"SI"``: kW, ``"IP"``: Btu/h); with no
unit anywhere it is an error: the importer never guesses.

Validation
----------
All problems are collected and raised together as one
:class:`plantside.errors.InputFileError`, each naming the row number(s) (line
numbers of the file) and the column: missing or duplicated columns, text where a
number is expected, empty cells, rows with missing or extra fields, values out of
range (sensible and latent -100,000 to 100,000 kW, internal gains 0 to 100,000
kW), an hour column that is not consecutive, and a row count other than 8760 or
8784 (or ``expected_hours``). Sign convention: sensible positive = cooling
needed, negative = heating needed; latent positive = moisture added to the zone.
"""

from __future__ import annotations

import csv
import io
import os
import re
from pathlib import Path

import numpy as np

from plantside.air_handler.zone_loads import LOAD_LIMIT_KW, HourlyZoneLoads
from plantside.constants import W_PER_BTUH
from plantside.errors import InputFileError

__all__ = ["DEFAULT_MAX_BYTES", "read_zone_loads_csv"]

#: Largest file accepted [bytes].
DEFAULT_MAX_BYTES = 20_000_000

_ROLES = {
    "sensible": ("sensible", "sensibleload", "qs", "sensiblekw"),
    "latent": ("latent", "latentload", "ql"),
    "internal_sensible": ("internalsensible", "internal", "internalgains", "internalgain"),
    "occupied": ("occupied", "occupancy"),
    "hour": ("hour", "hourofyear", "hoy"),
}
# unit text (normalised) -> kW per unit
_UNITS = {
    "kw": 1.0,
    "w": 1e-3,
    "btuh": W_PER_BTUH / 1000.0,
    "btu/h": W_PER_BTUH / 1000.0,
    "btuhr": W_PER_BTUH / 1000.0,
    "btu/hr": W_PER_BTUH / 1000.0,
    "mbh": W_PER_BTUH,
}
_TRUE = {"1", "true", "yes", "y", "t"}
_FALSE = {"0", "false", "no", "n", "f"}
_RANGES = {
    "sensible": (-LOAD_LIMIT_KW, LOAD_LIMIT_KW),
    "latent": (-LOAD_LIMIT_KW, LOAD_LIMIT_KW),
    "internal_sensible": (0.0, LOAD_LIMIT_KW),
}


def _too_big(name, size, max_bytes):
    return InputFileError(
        name, [f"the file is {size:,} bytes; at most {max_bytes:,} bytes are accepted"]
    )


def _read(source, max_bytes, name):
    if isinstance(source, bytes | bytearray):
        name = name or "zone loads"
        if len(source) > max_bytes:
            raise _too_big(name, len(source), max_bytes)
        return bytes(source), name
    if isinstance(source, str | os.PathLike) and not (isinstance(source, str) and "\n" in source):
        path = Path(source)
        name = name or path.name
        try:
            size = path.stat().st_size
            if size > max_bytes:
                raise _too_big(name, size, max_bytes)
            return path.read_bytes(), name
        except FileNotFoundError:
            raise InputFileError(name, [f"no file '{path.name}' was found"]) from None
        except IsADirectoryError:
            raise InputFileError(name, [f"'{path.name}' is a folder, not a file"]) from None
        except OSError as error:
            raise InputFileError(name, [f"the file cannot be read ({error.strerror})"]) from None
    if isinstance(source, str):
        name = name or "zone loads"
        data = source.encode("utf-8")
        if len(data) > max_bytes:
            raise _too_big(name, len(data), max_bytes)
        return data, name
    name = name or str(getattr(source, "name", "zone loads"))
    data = source.read(max_bytes + 1)
    if isinstance(data, str):
        data = data.encode("utf-8")
    if len(data) > max_bytes:
        raise InputFileError(name, [f"the file exceeds {max_bytes:,} bytes"])
    return data, name


def _decode(data: bytes, name: str) -> str:
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        try:
            return data.decode("utf-16")
        except UnicodeDecodeError:
            raise InputFileError(name, ["row 1: the file cannot be read as UTF-16 text"]) from None
    if b"\x00" in data:
        raise InputFileError(
            name,
            [
                "row 1: the file contains NUL bytes: it is not a text (CSV) file; "
                "save it as UTF-8 CSV"
            ],
        )
    for encoding in ("utf-8-sig", "cp1252"):
        try:
            return data.decode(encoding)
        except UnicodeDecodeError:
            continue
    return data.decode("latin-1")


def _split_header(text):
    """Return (role key, unit text or None) of one header cell."""
    raw = text.strip()
    unit = None
    bracket = re.search(r"[\[(]([^\])]*)[\])]\s*$", raw)
    if bracket:
        unit = bracket.group(1).strip().lower().replace(" ", "")
        raw = raw[: bracket.start()]
    key = re.sub(r"[^a-z0-9]", "", raw.lower())
    if unit is None:
        for candidate in sorted(_UNITS, key=len, reverse=True):
            bare = re.sub(r"[^a-z0-9]", "", candidate)
            if key.endswith(bare) and len(key) > len(bare):
                stem = key[: -len(bare)]
                if any(stem in names for names in _ROLES.values()):
                    return stem, candidate
    return key, unit


def _rows_text(rows, limit=6):
    rows = list(rows)
    shown = ", ".join(str(r) for r in rows[:limit])
    return (
        f"row {shown}"
        if len(rows) == 1
        else f"rows {shown}" + (f" and {len(rows) - limit} more" if len(rows) > limit else "")
    )


def read_zone_loads_csv(
    source, *, units=None, expected_hours=None, name=None, max_bytes=DEFAULT_MAX_BYTES
):
    """Read hourly zone loads from a CSV file.

    Parameters
    ----------
    source : str, os.PathLike, bytes or file-like
        Path of the file, its bytes, its text (a string containing a newline), or an
        open file.
    units : {"SI", "IP"}, optional
        Unit of load columns whose header has none: kW (SI) or Btu/h (IP).
    expected_hours : int, optional
        Required number of rows (e.g. the weather's hours); default 8760 or 8784.
    name : str, optional
        Name used in messages and as the loads' ``source``.
    max_bytes : int
        Largest file accepted [bytes].

    Returns
    -------
    HourlyZoneLoads
        Loads in kW.

    Raises
    ------
    InputFileError
        Listing every problem with its row number(s) and column.
    """
    data, name = _read(source, max_bytes, name)
    text = _decode(data, name)
    lines = text.splitlines()
    first = 0
    while first < len(lines) and (
        not lines[first].strip() or lines[first].lstrip().startswith("#")
    ):
        first += 1
    if first >= len(lines):
        raise InputFileError(name, ["the file has no header row"])
    allowed = (8760, 8784) if expected_hours is None else (int(expected_hours),)
    # The row count alone can rule a file out: say so before parsing any row.
    rows_present = sum(1 for line in lines[first + 1 :] if line.strip())
    if rows_present > max(allowed):
        raise InputFileError(
            name,
            [
                f"the file has {rows_present} data rows; allowed "
                f"{' or '.join(str(a) for a in allowed)} (one per hour)"
            ],
        )
    header_line = lines[first]
    delimiter = max((",", ";", "\t"), key=header_line.count)
    decimal_comma = delimiter in (";", "\t")
    reader = csv.reader(io.StringIO("\n".join(lines[first:])), delimiter=delimiter)
    header_row = first + 1
    rows = []
    try:
        for row in reader:
            rows.append(row)
    except csv.Error as error:
        raise InputFileError(
            name, [f"row {first + reader.line_num}: cannot be read as CSV ({error})"]
        ) from None
    header, body = rows[0], rows[1:]
    problems, notes = [], []

    default_unit = None
    if units is not None:
        system = str(units).strip().upper()
        if system not in ("SI", "IP"):
            problems.append(f"units = {units!r}: allowed 'SI' (kW) or 'IP' (Btu/h)")
        default_unit = "kw" if system == "SI" else "btuh"

    columns = {}
    ignored = []
    for index, cell in enumerate(header):
        key, unit = _split_header(cell)
        role = next((r for r, names in _ROLES.items() if key in names), None)
        if role is None:
            ignored.append(cell.strip())
            continue
        if role in columns:
            problems.append(
                f"row {header_row}: columns '{header[columns[role][0]].strip()}' and "
                f"'{cell.strip()}' both give the {role.replace('_', ' ')} load; keep one"
            )
            continue
        columns[role] = (index, unit)
    if ignored:
        notes.append("ignored columns: " + ", ".join(c for c in ignored if c))
    for role in ("sensible", "latent"):
        if role not in columns:
            problems.append(
                f"row {header_row}: no {role} load column (expected a header such as "
                f"'{role}_kW' or '{role}_Btuh'); found: {', '.join(c.strip() for c in header)}"
            )
    if problems:
        raise InputFileError(name, problems)

    factors = {}
    for role in ("sensible", "latent", "internal_sensible"):
        if role not in columns:
            continue
        index, unit = columns[role]
        unit = unit or default_unit
        if unit is None:
            problems.append(
                f"row {header_row}, column '{header[index].strip()}': no unit; put it in the "
                "header (e.g. sensible_kW, latent_Btuh) or pass units='SI' or 'IP'"
            )
        elif unit not in _UNITS:
            problems.append(
                f"row {header_row}, column '{header[index].strip()}': unit '{unit}' is not "
                "recognised; allowed kW, W, Btu/h (Btuh), MBH"
            )
        else:
            factors[role] = _UNITS[unit]
    if problems:
        raise InputFileError(name, problems)

    n = len(body)
    width = len(header)
    values = {role: np.full(n, np.nan) for role in columns}
    bad_fields, bad_number, empty, bad_flag = [], {}, {}, {}
    for i, row in enumerate(body):
        row_number = header_row + 1 + i
        if len(row) != width and not (len(row) > width and not any(c.strip() for c in row[width:])):
            bad_fields.append(row_number)
            if len(row) < width:
                continue
        for role, (index, _) in columns.items():
            cell = row[index].strip() if index < len(row) else ""
            if cell == "":
                empty.setdefault(role, []).append(row_number)
                continue
            if role == "occupied":
                flag = cell.lower()
                if flag in _TRUE:
                    values[role][i] = 1.0
                elif flag in _FALSE:
                    values[role][i] = 0.0
                else:
                    bad_flag.setdefault(role, []).append(row_number)
                continue
            number = cell.replace(",", ".") if decimal_comma else cell
            try:
                values[role][i] = float(number)
            except ValueError:
                bad_number.setdefault(role, []).append(row_number)
    if bad_fields:
        problems.append(
            f"{_rows_text(bad_fields)}: number of fields differs from the header ({width})"
        )
    for role, rows_ in empty.items():
        problems.append(f"{_rows_text(rows_)}, column '{header[columns[role][0]].strip()}': empty")
    for role, rows_ in bad_number.items():
        problems.append(
            f"{_rows_text(rows_)}, column '{header[columns[role][0]].strip()}': not a number"
        )
    for role, rows_ in bad_flag.items():
        problems.append(
            f"{_rows_text(rows_)}, column '{header[columns[role][0]].strip()}': "
            "not 1/0, true/false or yes/no"
        )
    for role, factor in factors.items():
        values[role] = values[role] * factor
        low, high = _RANGES[role]
        finite = np.isfinite(values[role])
        out = finite & ((values[role] < low) | (values[role] > high))
        nonfinite = ~finite & ~np.isin(
            np.arange(n),
            np.array(
                [r - header_row - 1 for r in empty.get(role, []) + bad_number.get(role, [])],
                dtype=int,
            ),
        )
        column = header[columns[role][0]].strip()
        if np.any(out):
            rows_ = header_row + 1 + np.flatnonzero(out)
            problems.append(
                f"{_rows_text(rows_)}, column '{column}': outside the allowed range "
                f"{low:g} to {high:g} kW (first {values[role][out][0]:.6g} kW)"
            )
        if np.any(nonfinite):
            rows_ = header_row + 1 + np.flatnonzero(nonfinite)
            problems.append(f"{_rows_text(rows_)}, column '{column}': not a finite number")
    if "hour" in columns:
        index = columns["hour"][0]
        column = header[index].strip()
        hours = values["hour"]
        if np.all(np.isfinite(hours)) and n:
            start = hours[0]
            if start not in (0.0, 1.0):
                problems.append(
                    f"row {header_row + 1}, column '{column}': first hour {start:g}; allowed 0 or 1"
                )
            else:
                wrong = np.flatnonzero(hours != start + np.arange(n))
                if wrong.size:
                    problems.append(
                        f"{_rows_text(header_row + 1 + wrong)}, column '{column}': hours are not "
                        "consecutive (one row per hour, in order, is required)"
                    )
    if n not in allowed:
        problems.append(
            f"the file has {n} data rows (rows {header_row + 1} to {header_row + n}); "
            f"allowed {' or '.join(str(a) for a in allowed)} (one per hour)"
        )
    if problems:
        raise InputFileError(name, problems)
    return HourlyZoneLoads(
        sensible=values["sensible"],
        latent=values["latent"],
        internal_sensible=values.get("internal_sensible"),
        occupied=None if "occupied" not in values else values["occupied"].astype(bool),
        source=name,
        notes=tuple(notes),
    )
