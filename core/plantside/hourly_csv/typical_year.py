"""Typical years: twelve months taken from different years, read as one calendar year.

A typical-year weather file joins months chosen from different years (January from
one year, February from another, ...), so its dates go backwards (or leap forwards)
where one month meets the next. Read with its years the file would look disordered;
read by month, day and hour alone it is one ordered calendar year.

This module only computes; :func:`plantside.hourly_csv.time_axis.axis_from_times`
decides, checks and reports:

- :func:`calendar_hours` places each row in one reference year by its month, day and
  time of day (the year ignored);
- :func:`months_joined` tells a file whose months were joined from different years
  from a record that runs through several years in time order.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
import pandas as pd

__all__ = ["CalendarHours", "JoinedMonths", "calendar_hours", "joined_months", "months_joined"]

#: Reference years the rows are placed in: one of 365 days and one of 366 (a row on
#: 29 February asks for the second). Only their lengths matter; no weekday is used.
_REFERENCE_YEAR = {False: 2001, True: 2000}
_MONTH_NAMES = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


class CalendarHours(NamedTuple):
    """Rows placed in one calendar year by month, day and time of day.

    Attributes
    ----------
    hours : numpy.ndarray
        Hours of each row from 00:00 on 1 January of the reference year [h].
    leap : bool
        Whether the reference year has 29 February (some row falls on it).
    stamps : pandas.DatetimeIndex
        The start of each row's hour in the reference year.
    year_hours : int
        Hours in the reference year: 8760, or 8784 when ``leap``.
    """

    hours: np.ndarray
    leap: bool
    stamps: pd.DatetimeIndex
    year_hours: int


def calendar_hours(stamps: pd.DatetimeIndex) -> CalendarHours:
    """Place each row in one reference year by its month, day and time of day.

    Parameters
    ----------
    stamps : pandas.DatetimeIndex
        Start of each row's hour (hour-ending times already moved to their start).

    Returns
    -------
    CalendarHours
        ``hours`` = 24 (days before the month + day - 1) + time of day [h], in a year of
        365 days, or of 366 when a row falls on 29 February.
    """
    month = stamps.month.to_numpy()
    day = stamps.day.to_numpy()
    leap = bool(np.any((month == 2) & (day == 29)))
    days_in_month = np.array([31, 29 if leap else 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])
    days_before = np.concatenate(([0], np.cumsum(days_in_month)[:-1]))
    time_of_day = (stamps - stamps.normalize()) / pd.Timedelta(hours=1)
    hours = 24.0 * (days_before[month - 1] + day - 1) + np.asarray(time_of_day, dtype=float)
    year_start = pd.Timestamp(year=_REFERENCE_YEAR[leap], month=1, day=1)
    return CalendarHours(
        hours=hours,
        leap=leap,
        stamps=year_start + pd.to_timedelta(hours, unit="h"),
        year_hours=int(days_in_month.sum()) * 24,
    )


def months_joined(stamps: pd.DatetimeIndex, calendar: CalendarHours) -> bool:
    """Whether the rows look like months joined from different years.

    True when, at some row, the year changes while the calendar (month, day, hour)
    moves forward but the time itself does not move one hour on: the seam between a
    month of one year and the next month of another. A record running through
    several years in time order changes year only from 31 December to 1 January,
    where the calendar moves back, so it is never taken for a typical year.

    Parameters
    ----------
    stamps : pandas.DatetimeIndex
        Start of each row's hour.
    calendar : CalendarHours
        The same rows placed in one year (:func:`calendar_hours`).

    Returns
    -------
    bool
    """
    years = stamps.year.to_numpy()
    if years.size < 2 or years.min() == years.max():
        return False
    real_step = np.diff(stamps.asi8) / 3.6e12  # nanoseconds to hours
    seam = (np.diff(years) != 0) & (real_step != 1.0) & (np.diff(calendar.hours) > 0)
    return bool(seam.any())


class JoinedMonths(NamedTuple):
    """Which years the months of a typical year come from, as text for the notes.

    Attributes
    ----------
    years : str
        First and last year, e.g. ``"1988-2003"``.
    months : str
        Each month with its year, in file order, e.g. ``"Jan 1988, Feb 1996, ..."``.
    """

    years: str
    months: str


def joined_months(stamps: pd.DatetimeIndex) -> JoinedMonths:
    """The years of the file and the year of each month (each run of one month and year)."""
    years = stamps.year.to_numpy()
    months = stamps.month.to_numpy()
    starts = np.flatnonzero(
        np.concatenate(([True], (np.diff(years) != 0) | (np.diff(months) != 0)))
    )
    each = ", ".join(f"{_MONTH_NAMES[months[i] - 1]} {years[i]}" for i in starts[:12])
    return JoinedMonths(
        years=f"{years.min()}-{years.max()}",
        months=each + (", ..." if starts.size > 12 else ""),
    )
