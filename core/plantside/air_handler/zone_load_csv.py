"""Read hourly zone loads (sensible, latent) from a CSV file.

The file is one the engineer exports from their own load calculation. plantside
reads it as data only: it is never executed and its content never used as a path.

Accepted file
-------------
The file is taken in by :mod:`plantside.hourly_csv` (shared with the weather
reader); this module says which columns zone loads need, their units and checks.

- Text, UTF-8 (with or without byte-order mark), UTF-16 with a byte-order mark,
  or Windows-1252 (noted); LF or CRLF line ends. Lines starting with ``#`` before
  the header are comments.
- The header row is found by its column names (a sensible and a latent column)
  among the first 20 non-comment lines; lines above it are skipped and noted.
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
number is expected, empty cells (a short row's missing fields are empty cells),
rows with more fields than the header, values out of
range (sensible and latent -100,000 to 100,000 kW, internal gains 0 to 100,000
kW), an hour column that is not consecutive, and a row count other than 8760 or
8784 (or ``expected_hours``). Sign convention: sensible positive = cooling
needed, negative = heating needed; latent positive = moisture added to the zone.
"""

from __future__ import annotations

import numpy as np

from plantside.air_handler.zone_loads import LOAD_LIMIT_KW, HourlyZoneLoads
from plantside.constants import W_PER_BTUH
from plantside.hourly_csv.headers import role_of, split_header
from plantside.hourly_csv.layout import HourlyTable, read_hourly_table
from plantside.hourly_csv.source import read_text
from plantside.hourly_csv.values import flags, numbers

__all__ = ["DEFAULT_MAX_BYTES", "read_zone_loads_csv"]

#: Largest file accepted [bytes].
DEFAULT_MAX_BYTES = 20_000_000

#: Normalised header names of each role (see plantside.hourly_csv.headers).
_ROLES = {
    "sensible": ("sensible", "sensibleload", "qs"),
    "latent": ("latent", "latentload", "ql"),
    "internal_sensible": ("internalsensible", "internal", "internalgains", "internalgain"),
    "occupied": ("occupied", "occupancy"),
    "hour": ("hour", "hourofyear", "hoy"),
}
#: Unit words (plantside.hourly_csv.headers.unit_key form) -> canonical unit.
_UNIT_ALIASES = {
    "kw": "kW",
    "w": "W",
    "btuh": "Btu/h",
    "btu/h": "Btu/h",
    "btuhr": "Btu/h",
    "btu/hr": "Btu/h",
    "mbh": "MBH",
}
#: kW per unit (NIST SP 811 Btu/h, via plantside.constants).
_KW_PER_UNIT = {"kW": 1.0, "W": 1e-3, "Btu/h": W_PER_BTUH / 1000.0, "MBH": W_PER_BTUH}
_SYSTEM_UNIT = {"SI": "kW", "IP": "Btu/h"}
_RANGES = {
    "sensible": (-LOAD_LIMIT_KW, LOAD_LIMIT_KW),
    "latent": (-LOAD_LIMIT_KW, LOAD_LIMIT_KW),
    "internal_sensible": (0.0, LOAD_LIMIT_KW),
}


def _is_header(cells: list[str]) -> bool:
    roles = {role_of(split_header(cell, _UNIT_ALIASES).name, _ROLES) for cell in cells}
    return {"sensible", "latent"} <= roles


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
    source_text = read_text(
        source, max_bytes=max_bytes, kind="zone loads", name=name, text_allowed=True
    )
    allowed = (8760, 8784) if expected_hours is None else (int(expected_hours),)
    allowed_text = " or ".join(str(a) for a in allowed)

    def row_limit(data_rows: int, header_row: int) -> str | None:
        # The row count alone can rule a file out: say so before parsing any row.
        if data_rows <= max(allowed):
            return None
        return f"the file has {data_rows} data rows; allowed {allowed_text} (one per hour)"

    table = read_hourly_table(
        source_text,
        is_header=_is_header,
        example_header="hour,sensible_kW,latent_kW",
        row_limit=row_limit,
    )
    # Problems in the header stop the read; problems in rows are all collected first.
    rows_problems = len(table.problems)
    columns = _choose_columns(table, units)
    if len(table.problems) > rows_problems:
        table.fail()
    values = {
        role: _column_values(table, role, header, factor)
        for role, (header, factor) in columns.items()
    }
    n = len(table.frame)
    if "hour" in columns:
        _check_hours(table, columns["hour"][0], values["hour"])
    if n not in allowed:
        table.problems.append(
            f"the file has {n} data rows (rows {table.header_row + 1} to {table.header_row + n}); "
            f"allowed {allowed_text} (one per hour)"
        )
    if table.problems:
        table.fail()
    return HourlyZoneLoads(
        sensible=values["sensible"],
        latent=values["latent"],
        internal_sensible=values.get("internal_sensible"),
        occupied=None if "occupied" not in values else values["occupied"].astype(bool),
        source=table.name,
        notes=tuple(table.notes),
    )


def _choose_columns(table: HourlyTable, units) -> dict[str, tuple[str, float | None]]:
    """Role -> (header, kW per file unit; None for the flag and hour columns)."""
    row = table.header_row
    default_unit = None
    if units is not None:
        system = str(units).strip().upper()
        if system not in _SYSTEM_UNIT:
            table.problems.append(f"units = {units!r}: allowed 'SI' (kW) or 'IP' (Btu/h)")
        default_unit = _SYSTEM_UNIT.get(system)
    found, ignored = {}, []
    for header in table.headers:
        cell = split_header(header, _UNIT_ALIASES)
        role = role_of(cell.name, _ROLES)
        if role is None:
            ignored.append(header.strip())
        elif role in found:
            table.problems.append(
                f"row {row}: columns '{found[role][0].strip()}' and '{header.strip()}' both give "
                f"the {role.replace('_', ' ')} load; keep one"
            )
        else:
            found[role] = (header, cell)
    if ignored:
        table.notes.append("ignored columns: " + ", ".join(c for c in ignored if c))
    for role in ("sensible", "latent"):
        if role not in found:
            table.problems.append(
                f"row {row}: no {role} load column (expected a header such as '{role}_kW' or "
                f"'{role}_Btuh'); found: {', '.join(h.strip() for h in table.headers)}; "
                + table.looked_for(f"{role} load", _ROLES[role])
            )
    columns = {}
    for role, (header, cell) in found.items():
        if role in ("occupied", "hour"):
            columns[role] = (header, None)
            continue
        unit = cell.unit or (None if cell.unit_text else default_unit)
        if cell.unit_text and cell.unit is None:
            table.problems.append(
                f"row {row}, column '{header.strip()}': unit '{cell.unit_text}' is not "
                "recognised; allowed kW, W, Btu/h (Btuh), MBH"
            )
        elif unit is None:
            table.problems.append(
                f"row {row}, column '{header.strip()}': no unit; put it in the header (e.g. "
                "sensible_kW, latent_Btuh) or pass units='SI' or 'IP'"
            )
        else:
            columns[role] = (header, _KW_PER_UNIT[unit])
    return columns


def _column_values(table: HourlyTable, role: str, header: str, factor: float | None):
    """Values of one column [kW, flag 0/1 or hour]; bad cells are reported."""
    cells = table.frame[header]
    where = f"column '{header.strip()}'"
    if role == "occupied":
        on, empty, bad = flags(cells)
        for mask, what in ((empty, "empty"), (bad, "not 1/0, true/false or yes/no")):
            if mask.any():
                table.problems.append(f"{table.rows_text(np.flatnonzero(mask))}, {where}: {what}")
        return on.astype(float)
    parsed = numbers(cells, decimal_comma=table.decimal_comma, missing_markers={""})
    for mask, what in (
        (parsed.missing, "empty"),
        (parsed.text, "not a number"),
        (parsed.infinite, "not a finite number"),
    ):
        if mask.any():
            table.problems.append(f"{table.rows_text(np.flatnonzero(mask))}, {where}: {what}")
    if factor is None:
        return parsed.values
    values = parsed.values * factor
    low, high = _RANGES[role]
    out = np.isfinite(values) & ((values < low) | (values > high))
    if out.any():
        table.problems.append(
            f"{table.rows_text(np.flatnonzero(out))}, {where}: outside the allowed range "
            f"{low:g} to {high:g} kW (first {values[out][0]:.6g} kW)"
        )
    return values


def _check_hours(table: HourlyTable, header: str, hours: np.ndarray) -> None:
    """An hour column must count 0.. or 1.. by one, row by row."""
    if not (hours.size and np.isfinite(hours).all()):
        return
    where = f"column '{header.strip()}'"
    start = hours[0]
    if start not in (0.0, 1.0):
        table.problems.append(
            f"row {table.header_row + 1}, {where}: first hour {start:g}; allowed 0 or 1"
        )
        return
    wrong = np.flatnonzero(hours != start + np.arange(hours.size))
    if wrong.size:
        table.problems.append(
            f"{table.rows_text(wrong)}, {where}: hours are not consecutive (one row per hour, "
            "in order, is required)"
        )
