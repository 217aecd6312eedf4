"""The time axis of an hourly file: which hour of the record each row is.

Convention (the project's, see :class:`plantside.climate.weather.Weather`): an hour
is labelled by its start. Hour 0 of a year is 00:00-01:00 on 1 January, and a row
whose time reads ``2023-07-21 14:00`` is the hour 14:00-15:00.

Hour-ending files are recognised two ways and moved to that convention:

- an hour index numbered ``1..8760`` (or ``1..8784``) is stored as ``0..8759``;
- a time column that writes ``24:00`` (typical-year files write the hours of each
  day as ``01:00 .. 24:00``) is read as hour ending throughout: ``24:00`` is the end
  of that day (not the start of the next), and each row is stored as the hour that
  ends at its time, so ``01/01 01:00`` is hour 0 (00:00-01:00) and ``01/01 24:00``
  hour 23 (23:00-24:00), the last hour of 1 January.

Every row must then sit on whole hours from the first row, once, in order; missing
hours are gaps (:mod:`plantside.hourly_csv.gaps`).

Typical years (:mod:`plantside.hourly_csv.typical_year`): when the months come from
different years (the year changes where one month meets the next, so the dates go
backwards or leap forwards there), the year is ignored and the rows are checked as
one calendar year by month, day and hour. The file must then run from 1 January
00:00 to 31 December 23:00 (29 February present or absent), each hour once and in
order; a month repeated, a day out of order or a missing hour is refused (or, for
missing hours, filled with ``fill_gaps``) naming its rows, as in any other file.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from plantside.hourly_csv.layout import HourlyTable
from plantside.hourly_csv.typical_year import calendar_hours, joined_months, months_joined
from plantside.hourly_csv.values import ParsedColumn

__all__ = [
    "MAX_HOUR_INDEX",
    "TimeAxis",
    "axis_from_hour_index",
    "axis_from_times",
    "calendar_of",
    "consecutive_axis",
]

#: Largest hour index accepted (a hundred years of hours).
MAX_HOUR_INDEX = 100 * 8784
#: A time of day written as the end of the day: ``24:00`` or ``24:00:00`` after a date.
_HOUR_24 = r"^.*\d[ T]+24:00(?::00)?$"
#: Oldest and newest year a weather or load record may carry.
_YEARS = (1800, 2200)


@dataclass
class TimeAxis:
    """Hour of each row on the record's hourly axis.

    Attributes
    ----------
    hours : numpy.ndarray
        Whole hours of each row from the first row's hour (0 = the first row).
    header : str
        Column(s) the times came from, for messages (``"rows"`` when none).
    stamps : pandas.DatetimeIndex or None
        Start of each row's hour, when the file has dates.
    first_hour : int
        Hour index of the first row (hour-index files; 0 otherwise).
    gaps : list of tuple
        ``(position, missing hours, text before, text after)`` of each gap.
    """

    hours: np.ndarray
    header: str
    stamps: pd.DatetimeIndex | None = None
    first_hour: int = 0
    gaps: list = field(default_factory=list)


def consecutive_axis(table: HourlyTable) -> TimeAxis:
    """Rows read as consecutive hours from 1 January 00:00 (no time column)."""
    n = len(table.frame)
    table.notes.append(
        f"no time column: the {n} rows are read as consecutive hours from 1 January 00:00"
    )
    return TimeAxis(hours=np.arange(n, dtype=float), header="rows")


def time_cells(table: HourlyTable, date_header: str, time_header: str | None = None) -> pd.Series:
    """The date-time text of each row: one column, or a date and a time column joined."""
    cells = table.frame[date_header].astype(str).str.strip()
    if time_header is not None:
        cells = cells + " " + table.frame[time_header].astype(str).str.strip()
    return cells


def axis_from_times(
    table: HourlyTable, cells: pd.Series, header: str, max_rows: int
) -> TimeAxis | None:
    """The axis from date-time cells (or whole numbers: an hour index).

    Returns None after adding a problem to ``table`` when the times are unusable.
    """
    if cells.str.fullmatch(r"-?\d+").all():
        table.notes.append(f"column {header!r} holds whole numbers: read as hour index")
        values = pd.to_numeric(cells, errors="coerce").to_numpy(dtype=float)
        return _hour_index(table, values, header, max_rows)
    ending = cells.str.match(_HOUR_24).to_numpy()
    if ending.any():
        cells = cells.str.replace(r"([ T]+)24:00(:00)?$", r"\g<1>00:00", regex=True)
    stamps = _parse_timestamps(cells, ending)
    years = stamps.dt.year.to_numpy(dtype=float, na_value=np.nan)
    bad = ~((years >= _YEARS[0]) & (years <= _YEARS[1]))
    if bad.any():
        first = int(np.flatnonzero(bad)[0])
        table.problems.append(
            f"column {header!r}: unreadable date/time at {table.rows_text(np.flatnonzero(bad))}; "
            f"first {cells.iloc[first]!r} (use e.g. 2023-07-21 14:00)"
        )
        return None
    if stamps.dt.tz is not None:
        stamps = stamps.dt.tz_localize(None)
    if ending.any():
        stamps = stamps - pd.Timedelta(hours=1)
        table.notes.append(
            f"column {header!r}: times written 24:00 at "
            f"{table.rows_text(np.flatnonzero(ending))}: read as hour ending (each row is the "
            f"hour ending at its time; 24:00 is the last hour of its day) and stored by the "
            f"hour's start"
        )
    hours = (stamps - stamps.iloc[0]).dt.total_seconds().to_numpy() / 3600.0
    axis = TimeAxis(hours=hours, header=header, stamps=pd.DatetimeIndex(stamps))
    calendar = calendar_hours(axis.stamps)
    if months_joined(axis.stamps, calendar):
        return _typical_year_axis(table, axis, calendar, max_rows)
    return _check_steps(table, axis, max_rows)


def _typical_year_axis(table: HourlyTable, axis: TimeAxis, calendar, max_rows: int):
    """The axis of months joined from different years: one calendar year, year ignored.

    Order, repeats and missing hours are checked on the calendar hours (month, day,
    hour); messages show the rows' own dates. The accepted axis carries the
    reference-year stamps, so the hour of year and month follow the calendar.
    """
    joined = joined_months(axis.stamps)
    typical_year = f"typical year: months from {joined.years} were joined; the year is ignored"
    before = len(table.problems)
    typical = TimeAxis(
        hours=calendar.hours - calendar.hours[0], header=axis.header, stamps=axis.stamps
    )
    checked = _check_steps(table, typical, max_rows)
    context = f"; {typical_year}, so rows must run in calendar order ({joined.months})"
    if checked is None:
        table.problems[before:] = [problem + context for problem in table.problems[before:]]
        return None
    last = len(calendar.hours) - 1
    if calendar.hours[0] != 0 or calendar.hours[last] != calendar.year_hours - 1:
        first_stamp, last_stamp = (
            f"row {table.row_numbers([i])[0]} ({axis.stamps[i]:%m/%d %H:%M})" for i in (0, last)
        )
        table.problems.append(
            f"column {axis.header!r}: {typical_year}, so the file must hold one whole year "
            f"from 01/01 00:00 to 12/31 23:00 (hour starts); it runs from {first_stamp} to "
            f"{last_stamp} ({joined.months})"
        )
        return None
    checked.stamps = calendar.stamps
    table.notes.append(
        f"column {axis.header!r}: {typical_year} ({joined.months}; read as one "
        f"{calendar.year_hours}-hour calendar year from 1 January)"
    )
    return checked


def axis_from_hour_index(
    table: HourlyTable, parsed: ParsedColumn, header: str, max_rows: int
) -> TimeAxis | None:
    """The axis from an hour-index column (0..N-1, 1..N hour ending, or any start)."""
    if parsed.missing.any():
        table.problems.append(
            f"column {header!r}: empty hour index at "
            f"{table.rows_text(np.flatnonzero(parsed.missing))}"
        )
    values = parsed.values
    if not np.isfinite(values).all():
        return None
    fractional = values != np.round(values)
    if fractional.any():
        table.problems.append(
            f"column {header!r}: hour index not a whole number at "
            f"{table.rows_text(np.flatnonzero(fractional))}"
        )
        return None
    return _hour_index(table, values, header, max_rows)


def _hour_index(table, values, header, max_rows) -> TimeAxis | None:
    out_of_range = ~((values >= 0) & (values <= MAX_HOUR_INDEX))
    if out_of_range.any():
        index = np.flatnonzero(out_of_range)
        table.problems.append(
            f"column {header!r}: hour index outside 0 to {MAX_HOUR_INDEX:,} at "
            f"{table.rows_text(index)}; first {values[index[0]]:g}"
        )
        return None
    values = values.astype(np.int64)
    first = int(values[0])
    if first == 1 and int(values.max()) in (8760, 8784):
        table.notes.append(
            f"column {header!r}: hours numbered 1..{int(values.max())} (hour ending), "
            f"stored as 0..{int(values.max()) - 1}"
        )
        values = values - 1
        first = 0
    axis = TimeAxis(hours=(values - first).astype(float), header=header, first_hour=first)
    return _check_steps(table, axis, max_rows)


def _check_steps(table: HourlyTable, axis: TimeAxis, max_rows: int) -> TimeAxis | None:
    """Whole hours, each once, in order, within ``max_rows`` hours; gaps are listed."""
    hours, stamps, header = axis.hours, axis.stamps, axis.header

    def show(i):
        row = table.row_numbers([i])[0]
        if stamps is not None:
            return f"row {row} ({stamps[i].isoformat(sep=' ', timespec='minutes')})"
        return f"row {row}"

    ok = True
    off_grid = np.abs(hours - np.round(hours)) > 1e-6
    if off_grid.any():
        index = np.flatnonzero(off_grid)
        table.problems.append(
            f"column {header!r}: times not on whole hours from the first row at "
            f"{table.rows_text(index)}; first {show(index[0])} (only hourly data are accepted)"
        )
        ok = False
    rounded = np.round(hours).astype(np.int64)
    duplicated = pd.Series(rounded).duplicated(keep=False).to_numpy()
    if duplicated.any():
        index = np.flatnonzero(duplicated)
        table.problems.append(
            f"column {header!r}: duplicated hours at {table.rows_text(index)}; "
            f"first {show(index[0])} (each hour must appear once; remove the repeats)"
        )
        ok = False
    steps = np.diff(rounded)
    backwards = np.flatnonzero(steps < 0) + 1
    if backwards.size:
        table.problems.append(
            f"column {header!r}: time goes backwards at {table.rows_text(backwards)}; "
            f"first {show(backwards[0])} (rows must be in time order)"
        )
        ok = False
    if ok and rounded[-1] + 1 > max_rows:
        table.problems.append(
            f"column {header!r}: the times span {rounded[-1] + 1:,} hours from "
            f"{show(0)} to {show(len(rounded) - 1)}, more than max_rows={max_rows:,} hours"
        )
        ok = False
    if not ok:
        return None
    axis.hours = rounded.astype(float)
    axis.gaps = [
        (int(i), int(steps[i] - 1), show(i), show(i + 1)) for i in np.flatnonzero(steps > 1)
    ]
    return axis


def calendar_of(axis: TimeAxis, grid_size: int, notes: list[str]):
    """Hour of year and month of each hour of a grid of ``grid_size`` hours.

    Returns
    -------
    hour_of_year : numpy.ndarray of int
        Hours from 00:00 on 1 January of the first row's year (or the hour index).
    month : numpy.ndarray of int or None
        Month 1..12 of each hour; None when the file has no dates and is not 8784
        hours long (the record then takes a 365-day calendar).
    """
    if axis.stamps is not None:
        full = axis.stamps[0] + pd.to_timedelta(np.arange(grid_size), unit="h")
        year_start = pd.Timestamp(year=full[0].year, month=1, day=1)
        hour_of_year = ((full - year_start) // pd.Timedelta(hours=1)).to_numpy()
        if full[0].hour != 0:
            notes.append(
                f"the record starts at {full[0]:%H:%M}, not midnight: days are counted "
                f"from the first row"
            )
        return hour_of_year, full.month.to_numpy()
    hour_of_year = np.arange(grid_size) + axis.first_hour
    if grid_size == 8784:
        days = np.array([31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])
        notes.append("8784 hours without dates: read as a leap year")
        return hour_of_year, np.repeat(np.arange(1, 13), days * 24)
    return hour_of_year, None


def _parse_timestamps(cells: pd.Series, ending: np.ndarray) -> pd.Series:
    """Parse date-times, choosing between ISO, month-first and day-first forms.

    Cells marked in ``ending`` had ``24:00`` written as ``00:00`` of the same date:
    they are moved to the end of that day before the forms are compared.
    """
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
            if ending.any():
                try:
                    parsed = parsed.where(~ending, parsed + pd.Timedelta(days=1))
                except (OverflowError, ValueError):
                    continue
        steps = parsed.diff().dt.total_seconds().to_numpy()[1:]
        score = (int(parsed.isna().sum()), int(np.count_nonzero(steps != 3600)))
        if best_score is None or score < best_score:
            best, best_score = parsed, score
    return best if best is not None else pd.Series(pd.NaT, index=cells.index)
