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


def _year_values() -> pd.DataFrame:
    """8,760 plausible hours; every hour's dry bulb differs, so a shift of one hour shows."""
    hour = np.arange(8760)
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
    start = pd.Timestamp(YEAR, 1, 1)  # the start of each hour (hour beginning)
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


def _typical_year_text(values: pd.DataFrame) -> str:
    """Hour ending: the hour 00:00-01:00 is written 01:00, 23:00-24:00 of a day 24:00."""
    end = values["start"] + pd.Timedelta(hours=1)
    is_midnight = end.dt.hour == 0
    day = (end - pd.to_timedelta(is_midnight.astype(int), unit="D")).dt.strftime("%m/%d/%Y")
    clock = end.dt.strftime("%H:%M").where(~is_midnight, "24:00")
    rows = day + "," + clock + "," + _value_cells(values)
    return STATION + "\n" + HEADER + "\n" + "\n".join(rows) + "\n"


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
