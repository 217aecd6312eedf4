"""The shared intake of hourly CSV files (``plantside.hourly_csv``) through both readers.

The typical-year file here is written by the test itself in the shape weather services
give typical-year files: a one-line station record above the column header, a
``MM/DD/YYYY`` date column and an ``HH:MM`` time column whose hours run 01:00 .. 24:00
(hour ending). The station and its values are fictional.
"""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest
from plantside.air_handler.zone_load_csv import read_zone_loads_csv
from plantside.climate.weather_csv import read_weather_csv
from plantside.errors import InputFileError
from plantside.hourly_csv.headers import split_header
from plantside.hourly_csv.messages import rows_text

STATION = "Station 990417,Harrowmere Fen (fictional),XX,lat 52.10,lon -0.50,elev 12 m,TZ +0"
HEADER = "Date (MM/DD/YYYY),Time (HH:MM),Dry-bulb (C),Dew-point (C),Station pressure (mbar)"
YEAR = 1989  # not a leap year: 8,760 hours


def _year_values(year: int = YEAR) -> pd.DataFrame:
    """A year of plausible hours; every hour's dry bulb differs, so a shift of one hour shows."""
    hour = np.arange(8784 if pd.Timestamp(year, 1, 1).is_leap_year else 8760)
    drybulb = (
        9.0
        + 9.0 * np.sin(2 * np.pi * (hour / 8760 - 0.3))
        + 4.0 * np.sin(2 * np.pi * (hour - 9) / 24)
    )
    drybulb = np.round(drybulb, 1) + (hour % 10) / 100.0  # distinct neighbours
    dew_point = np.round(drybulb - 4.0 - 2.0 * np.cos(2 * np.pi * hour / 24), 2)
    pressure = np.round(1009.0 + 6.0 * np.sin(2 * np.pi * hour / 500), 1)  # hPa
    # As the file will hold them (two decimals), so a value read back compares exactly.
    drybulb, dew_point = (
        np.array([f"{v:.2f}" for v in x], dtype=float) for x in (drybulb, dew_point)
    )
    start = pd.Timestamp(year, 1, 1)  # the start of each hour (hour beginning)
    return pd.DataFrame(
        {
            "start": start + pd.to_timedelta(hour, unit="h"),
            "drybulb": drybulb,
            "dew_point": dew_point,
            "pressure": pressure,
        }
    )


def _value_cells(values: pd.DataFrame) -> pd.Series:
    """Dry bulb, dew point and pressure of each hour as the file writes them."""
    return (
        values["drybulb"].map("{:.2f}".format)
        + ","
        + values["dew_point"].map("{:.2f}".format)
        + ","
        + values["pressure"].map("{:.1f}".format)
    )


def _typical_year_rows(values: pd.DataFrame, years_of_month=None) -> pd.Series:
    """Hour ending: the hour 00:00-01:00 is written 01:00, 23:00-24:00 of a day 24:00.

    ``years_of_month`` (12 years, January first) writes each month's dates in its own
    year, as a typical year joined from months of different years does.
    """
    end = values["start"] + pd.Timedelta(hours=1)
    is_midnight = end.dt.hour == 0
    day = end - pd.to_timedelta(is_midnight.astype(int), unit="D")
    if years_of_month is None:
        date = day.dt.strftime("%m/%d/%Y")
    else:
        year = pd.Series(np.asarray(years_of_month)[day.dt.month - 1], index=day.index)
        date = day.dt.strftime("%m/%d/") + year.astype(str)
    clock = end.dt.strftime("%H:%M").where(~is_midnight, "24:00")
    return date + "," + clock + "," + _value_cells(values)


def _file_text(rows) -> str:
    return STATION + "\n" + HEADER + "\n" + "\n".join(rows) + "\n"


def _typical_year_text(values: pd.DataFrame) -> str:
    return _file_text(_typical_year_rows(values))


def _hour_beginning_text(values: pd.DataFrame) -> str:
    """The same hours written 00:00 .. 23:00 (hour beginning), no station line."""
    rows = values["start"].dt.strftime("%Y-%m-%d %H:%M") + "," + _value_cells(values)
    return "timestamp,drybulb_C,dew_point_C,pressure_hPa\n" + "\n".join(rows) + "\n"


@pytest.fixture(scope="module")
def values():
    return _year_values()


@pytest.fixture(scope="module")
def typical_year(values):
    return read_weather_csv(_typical_year_text(values).encode("utf-8"), site="Harrowmere Fen")


def test_typical_year_file_with_station_line_and_24_00_loads(typical_year):
    assert typical_year.hours == 8760
    notes = " | ".join(typical_year.notes)
    # The station record (row 1) is skipped and said so, quoting it.
    assert "skipped row 1 above the header (row 2)" in notes, notes
    assert "Station 990417" in notes
    assert "24:00" in notes and "hour ending" in notes


def test_24_00_is_the_last_hour_of_its_day(typical_year, values):
    # ISO 8601:2004 §4.2.3 (from memory): 24:00 marks the end of a calendar day, so the
    # row '01/01/1989 24:00' is the hour 23:00-24:00 of 1 January, and '01/01/1989 01:00'
    # the hour 00:00-01:00. The project labels an hour by its start (Weather docstring:
    # hour 0 from local midnight, 1 January).
    np.testing.assert_array_equal(typical_year.drybulb[:24], values["drybulb"][:24])
    assert typical_year.drybulb[0] == values["drybulb"][0]  # written '01/01/1989,01:00'
    assert typical_year.drybulb[23] == values["drybulb"][23]  # written '01/01/1989,24:00'
    assert typical_year.hour_of_year[23] == 23 and typical_year.month[23] == 1
    # The last row, '12/31/1989,24:00', is the last hour of the year, still in December.
    assert typical_year.drybulb[-1] == values["drybulb"].iloc[-1]
    assert typical_year.hour_of_year[-1] == 8759 and typical_year.month[-1] == 12


def test_hour_ending_file_equals_the_same_data_written_hour_beginning(typical_year, values):
    beginning = read_weather_csv(_hour_beginning_text(values).encode("utf-8"), site="x")
    for name in ("drybulb", "humidity_ratio", "pressure", "hour_of_year", "month"):
        np.testing.assert_array_equal(getattr(typical_year, name), getattr(beginning, name))
    assert not any("24:00" in note for note in beginning.notes)


def test_rows_below_a_skipped_station_line_keep_their_file_row_numbers(values):
    lines = _typical_year_text(values).splitlines()
    lines[2 + 3] = lines[2 + 3].replace(lines[2 + 3].split(",")[2], "warm", 1)
    with pytest.raises(InputFileError) as caught:
        read_weather_csv("\n".join(lines).encode())
    # Station = row 1, header = row 2, data row 3 (0-based) = row 6 of the file.
    assert "column 'Dry-bulb (C)': text where a number is expected at row 6" in str(caught.value)


def test_header_not_found_says_which_names_it_looked_for():
    text = STATION + "\nDate,Time,Air (C),Moisture (C)\n01/01/1989,01:00,3.0,1.0\n"
    with pytest.raises(InputFileError) as caught:
        read_weather_csv(text.encode(), altitude=0.0)
    message = str(caught.value)
    assert "looked for a header row naming the dry bulb ('drybulb'" in message, message
    assert "'temperature'" in message and "in rows 1-3" in message
    assert "looked for a header row naming the humidity ('dewpoint'" in message
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv("Zone 4 (fictional)\nheat,moisture\n1,2\n", expected_hours=2)
    assert "looked for a header row naming the sensible load ('sensible'" in str(caught.value)


def test_zone_loads_header_found_below_a_title_line():
    text = "Zone 4 loads, fictional school\nsensible_kW,latent_kW\n" + "1.5,0.2\n" * 24
    loads = read_zone_loads_csv(text, expected_hours=24)
    assert loads.hours == 24 and loads.sensible[0] == 1.5
    assert any("skipped row 1 above the header (row 2)" in note for note in loads.notes)


def test_both_readers_report_the_windows_1252_fallback_the_same_way():
    # '°' is byte 0xB0 in Windows-1252 (and not valid UTF-8 on its own).
    weather = read_weather_csv(
        "drybulb (°C),dew_point (°C)\n".encode("cp1252") + b"20,10\n" * 24, altitude=0.0
    )
    loads = read_zone_loads_csv(
        b"sensible_kW,latent_kW,note\n" + "1,2,5 °C\n".encode("cp1252") * 24,
        expected_hours=24,
    )
    note = "the file is not UTF-8; it was read as Windows-1252 text"
    assert note in weather.notes and note in loads.notes


def test_huge_fraction_is_refused_with_a_message_and_no_overflow_warning():
    # 1e308 as a fraction is 1e310 %: beyond the largest float (IEEE 754 double, about
    # 1.8e308). It must be an out-of-range value at its row, never an overflow warning.
    data = b"drybulb_C,rh (fraction)\n" + b"20,0.5\n" * 5 + b"20,1e308\n" + b"20,0.5\n" * 18
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with pytest.raises(InputFileError) as caught:
            read_weather_csv(data, altitude=0.0)
    message = str(caught.value)
    assert "column 'rh (fraction)'" in message and "row 7" in message, message
    assert "above 100 %" in message and "1e+308" in message


def test_every_row_with_extra_fields_is_reported_and_trailing_empty_fields_pass():
    rows = ["1,2"] * 24
    rows[3], rows[9] = "1,2,3", "1,2,x,y"
    rows[5] = "1,2,"  # a trailing separator: an empty field, accepted
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv("sensible_kW,latent_kW\n" + "\n".join(rows), expected_hours=24)
    message = str(caught.value)
    assert "rows 5, 11 (2 rows): more fields than the header (row 1) has columns (2)" in message
    assert "row 7" not in message


def test_header_cells_split_into_name_and_unit():
    aliases = {"degc": "C", "kw": "kW", "g/kg": "g/kg"}
    cell = split_header("Dry bulb (°C)", aliases)
    assert (cell.name, cell.unit, cell.unit_text) == ("drybulb", "C", "°C")
    cell = split_header("humidity_ratio_g_per_kg", aliases)
    assert (cell.name, cell.unit) == ("humidityratio", "g/kg")
    cell = split_header("Sensible [furlongs]", aliases)
    assert (cell.name, cell.unit, cell.unit_text) == ("sensible", None, "furlongs")


def test_row_numbers_are_written_as_runs():
    assert rows_text([5]) == "row 5"
    assert rows_text([40, 5, 9, 10, 11, 12]) == "rows 5, 9-12, 40 (6 rows)"


# --- typical years joined from months of different years -----------------------------
# Typical-year data sets are built from twelve typical months, each taken from its own
# year (the typical meteorological month method; Wilcox & Marion, Users Manual for TMY3
# Data Sets, NREL/TP-581-43156, 2008, from memory, not checked). The years below are
# invented; February comes from a leap year with 29 February left out, as such files do
# (same source, from memory).
YEARS_OF_MONTH = [1988, 1996, 2003, 1991, 1999, 1985, 2001, 1994, 1990, 2000, 1997, 1992]
JOINED = "typical year: months from 1985-2003 were joined; the year is ignored"
FIRST_ROW = 3  # station line = row 1, header = row 2


@pytest.fixture(scope="module")
def joined_rows(values):
    return _typical_year_rows(values, YEARS_OF_MONTH)


@pytest.fixture(scope="module")
def joined_year(joined_rows):
    return read_weather_csv(_file_text(joined_rows).encode("utf-8"), site="Harrowmere Fen")


def test_typical_year_of_months_from_different_years_loads_and_says_so(joined_year):
    assert joined_year.hours == 8760
    notes = " | ".join(joined_year.notes)
    assert JOINED in notes, notes
    # Each month with the year it came from, in file order.
    assert "Jan 1988, Feb 1996, Mar 2003, Apr 1991" in notes and "Dec 1992" in notes
    assert "time goes backwards" not in notes


def test_typical_year_values_land_on_their_calendar_hour(joined_year, values, joined_rows):
    # The same values written as one year, 00:00 .. 23:00, must read identically: the year
    # of each month changes only the date text, never the hour a value belongs to
    # (hour labelled by its start, Weather docstring; 24:00 = end of day, ISO 8601:2004
    # §4.2.3, from memory).
    beginning = read_weather_csv(_hour_beginning_text(values).encode("utf-8"), site="x")
    for name in ("drybulb", "humidity_ratio", "pressure", "hour_of_year", "month"):
        np.testing.assert_array_equal(getattr(joined_year, name), getattr(beginning, name))
    # At the seams: 31 January 24:00 (1988) is hour 743, 1 February 01:00 (1996) hour 744;
    # 28 February 24:00 (1996, a leap year whose 29 February is left out) is hour 1415 and
    # 1 March 01:00 (2003) hour 1416 (31 + 28 = 59 days before 1 March in a 365-day year).
    for hour, written, month in (
        (743, "01/31/1988,24:00", 1),
        (744, "02/01/1996,01:00", 2),
        (1415, "02/28/1996,24:00", 2),
        (1416, "03/01/2003,01:00", 3),
        (8759, "12/31/1992,24:00", 12),
    ):
        assert joined_rows.iloc[hour].startswith(written), joined_rows.iloc[hour]
        assert joined_year.drybulb[hour] == values["drybulb"][hour]
        assert joined_year.hour_of_year[hour] == hour and joined_year.month[hour] == month


def test_typical_year_with_29_february_reads_as_a_leap_year():
    # February taken whole from a leap year (29 February kept): 8,784 hours, read as the
    # reader reads any leap year (Gregorian calendar: 366 days, 29 February = hours
    # 1416-1439).
    leap_values = _year_values(1996)  # 1996 is February's year in YEARS_OF_MONTH
    rows = _typical_year_rows(leap_values, YEARS_OF_MONTH)
    weather = read_weather_csv(_file_text(rows).encode("utf-8"), site="x")
    assert weather.hours == 8784
    assert any(JOINED in note and "8784-hour" in note for note in weather.notes)
    assert rows.iloc[1439].startswith("02/29/1996,24:00")
    assert weather.drybulb[1439] == leap_values["drybulb"][1439]
    assert weather.month[1439] == 2 and weather.month[1440] == 3


def _refusal(rows) -> str:
    with pytest.raises(InputFileError) as caught:
        read_weather_csv(_file_text(rows).encode("utf-8"), site="x")
    return str(caught.value)


def test_typical_year_with_two_januaries_is_refused_naming_the_rows(joined_rows):
    # A second January (its dates written in 1990) after the first: hours 0-743 twice.
    second = joined_rows.iloc[:744].str.replace("/1988,", "/1990,", regex=False)
    message = _refusal(pd.concat([joined_rows.iloc[:744], second, joined_rows.iloc[744:]]))
    first, repeat = FIRST_ROW, FIRST_ROW + 744
    assert f"duplicated hours at rows {first}-{repeat + 743} (1488 rows)" in message, message
    assert f"time goes backwards at row {repeat}; first row {repeat} (1990-01-01 00:00)" in message
    assert JOINED in message


def test_typical_year_with_a_day_out_of_order_is_refused_naming_the_row(joined_rows):
    # 5 and 6 March (2003) swapped: 1 March 00:00 is hour 1416 (59 days), so 5 March starts
    # at hour 1416 + 96 and, written after 6 March, at data row 1416 + 120.
    march_5 = joined_rows.iloc[1416 + 96 : 1416 + 120]
    march_6 = joined_rows.iloc[1416 + 120 : 1416 + 144]
    rows = pd.concat(
        [joined_rows.iloc[: 1416 + 96], march_6, march_5, joined_rows.iloc[1416 + 144 :]]
    )
    message = _refusal(rows)
    row = FIRST_ROW + 1416 + 120
    assert f"time goes backwards at row {row}; first row {row} (2003-03-05 00:00)" in message
    assert JOINED in message


def test_typical_year_with_a_missing_hour_is_refused_or_filled_on_request(joined_rows):
    # 4 July 12:00-13:00 (184 days before 4 July in a 365-day year: hour 184 x 24 + 12),
    # written '07/04/2001,13:00'.
    hour = 184 * 24 + 12
    assert joined_rows.iloc[hour].startswith("07/04/2001,13:00")
    rows = pd.concat([joined_rows.iloc[:hour], joined_rows.iloc[hour + 1 :]])
    message = _refusal(rows)
    before, after = FIRST_ROW + hour - 1, FIRST_ROW + hour
    assert (
        f"1 missing hour(s) between row {before} (2001-07-04 11:00) and row {after} "
        f"(2001-07-04 13:00)" in message
    ), message
    filled = read_weather_csv(_file_text(rows).encode("utf-8"), site="x", fill_gaps=True)
    assert filled.hours == 8760 and any(JOINED in note for note in filled.notes)


def test_typical_year_short_of_a_whole_year_is_refused_naming_first_and_last_row(joined_rows):
    # December left out: the joined months must make one whole year from 1 January.
    rows = joined_rows.iloc[: 8760 - 31 * 24]
    message = _refusal(rows)
    last = FIRST_ROW + len(rows) - 1
    assert "must hold one whole year from 01/01 00:00 to 12/31 23:00" in message, message
    assert f"from row {FIRST_ROW} (01/01 00:00) to row {last} (11/30 23:00)" in message


def test_a_record_of_two_years_in_order_is_not_a_typical_year(values):
    # Two consecutive years change year only at 31 December 24:00 -> 1 January 01:00,
    # where the calendar moves back: a plain record of 17,520 hours, no typical-year note.
    second = values.assign(start=values["start"] + pd.DateOffset(years=1))
    rows = pd.concat([_typical_year_rows(values), _typical_year_rows(second)])
    weather = read_weather_csv(_file_text(rows).encode("utf-8"), site="x")
    assert weather.hours == 17520
    assert not any("typical year" in note for note in weather.notes)
    assert weather.month[8759] == 12 and weather.month[8760] == 1
