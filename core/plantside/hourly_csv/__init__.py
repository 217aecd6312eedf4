"""The shared intake of hourly CSV files (weather years, zone loads).

A reader of one kind of hourly file (:mod:`plantside.climate.weather_csv`,
:mod:`plantside.air_handler.zone_load_csv`) says which columns it needs, in which
units, and what it checks; everything else about getting from bytes to checked
columns is done here, the same way for every kind of file:

source      bytes from a path, an upload or a stream, with a size limit; decoding
            (UTF-8 with or without byte-order mark, UTF-16 with one, then a
            Windows-1252 fallback that is always reported in the notes)
layout      lines, comment lines, finding the header row by its column names (lines
            above it are skipped and reported), separator and decimal comma, the
            row limit, the table of cells (text) with file row numbers
headers     a header cell split into its name and unit (``Dry bulb (°C)``,
            ``sensible_kW``)
values      cells to numbers (decimal comma, missing-value markers, text where a
            number belongs) and to on/off flags
time_axis   date/time cells or an hour index to hours on a whole-hour axis: clock
            forms, hour-ending ``24:00``, duplicates, order, missing hours
typical_year
            a typical year of months from different years placed in one
            calendar year by month, day and hour (the year ignored)
gaps        values placed on the hourly grid; gaps reported or filled by linear
            interpolation
messages    how row numbers are written in messages (``rows 5, 9-12 (5 rows)``)

Row numbers in every message are line numbers of the file (1 = first line), so
the engineer can go to them in any text editor.

This subpackage is layer 2: it imports only :mod:`plantside.errors`,
:mod:`plantside.constants` and :mod:`plantside.units`.
"""

from plantside.hourly_csv.layout import HourlyTable, read_hourly_table
from plantside.hourly_csv.source import read_text

__all__ = ["HourlyTable", "read_hourly_table", "read_text"]
