"""Reading hourly weather CSV files: accepted forms and one test per kind of bad file.

Test files are built in tmp_path (or as bytes, as an upload would arrive) from the bundled
fictional year of Linden Vale, written with the headers and units under test.
"""

import io

import numpy as np
import pandas as pd
import psychrolib
import pytest
from plantside.air import moist_air
from plantside.climate.bundled import load_bundled_climate
from plantside.climate.weather_csv import read_weather_csv
from plantside.errors import InputFileError, InputRangeError

HOURS = pd.date_range("2023-01-01", periods=8760, freq="h")


@pytest.fixture(scope="module")
def year():
    weather = load_bundled_climate("Linden Vale")
    dew_point = moist_air.dew_point_from_humidity_ratio(weather.humidity_ratio, weather.pressure)
    rh = moist_air.relative_humidity_from_humidity_ratio(
        weather.drybulb, weather.humidity_ratio, weather.pressure
    )
    return {
        "drybulb": np.round(weather.drybulb, 1),
        "dew_point": np.minimum(np.round(dew_point, 1), np.round(weather.drybulb, 1)),
        "rh": np.round(rh * 100, 1),
        "pressure": np.round(weather.pressure),
    }


def si_frame(year, numeric=False):
    frame = pd.DataFrame(
        {
            "timestamp": HOURS.strftime("%Y-%m-%d %H:%M"),
            "drybulb_C": year["drybulb"],
            "dew_point_C": year["dew_point"],
            "pressure_Pa": year["pressure"].astype(int),
        }
    )
    # object columns let a test put text into any cell
    return frame if numeric else frame.astype(object)


def csv_bytes(frame, **options):
    return frame.to_csv(index=False, **options).encode("utf-8")


def problem_text(source, **options):
    with pytest.raises(InputFileError) as error:
        read_weather_csv(source, **options)
    return str(error.value)


# --- accepted files --------------------------------------------------------------------------
def test_si_file_with_timestamps_and_dew_point(year, tmp_path):
    path = tmp_path / "linden_si.csv"
    path.write_bytes(csv_bytes(si_frame(year)))
    weather = read_weather_csv(path)
    assert weather.hours == 8760 and weather.site == "linden_si"
    np.testing.assert_allclose(weather.drybulb, year["drybulb"])
    # W from dew point and station pressure, against psychrolib (ASHRAE Fundamentals 2017
    # Ch. 1 Eqs. 20, 37) within its accuracy.
    for i in (0, 4000, 5000):
        expected = psychrolib.GetHumRatioFromTDewPoint(year["dew_point"][i], year["pressure"][i])
        assert weather.humidity_ratio[i] == pytest.approx(expected, rel=2e-4)
    assert weather.month[0] == 1 and weather.month[-1] == 12
    assert weather.altitude == pytest.approx(310, abs=60)  # standard atmosphere estimate
    assert any("'drybulb_C' as dry bulb [°C]" in note for note in weather.notes)


def test_ip_file_with_units_from_headers(year):
    # °F = °C x 1.8 + 32 and 1 inHg = 3386.389 Pa (NIST SP 811).
    frame = pd.DataFrame(
        {
            "Date/Time": HOURS.strftime("%m/%d/%Y %H:%M"),
            "Dry bulb (°F)": np.round(year["drybulb"] * 1.8 + 32, 2),
            "RH %": year["rh"],
            "Station pressure [inHg]": np.round(year["pressure"] / 3386.389, 4),
        }
    )
    weather = read_weather_csv(csv_bytes(frame), columns={"timestamp": "Date/Time"})
    np.testing.assert_allclose(weather.drybulb, year["drybulb"], atol=0.006)
    np.testing.assert_allclose(weather.pressure, year["pressure"], atol=0.2)
    # W from RH, against psychrolib (ASHRAE Fundamentals 2017 Ch. 1 Eqs. 20, 24).
    i = 4500
    expected = psychrolib.GetHumRatioFromRelHum(
        float(weather.drybulb[i]), year["rh"][i] / 100, float(weather.pressure[i])
    )
    assert weather.humidity_ratio[i] == pytest.approx(expected, rel=2e-4)


def test_semicolon_decimal_comma_bom_crlf(year):
    text = si_frame(year, numeric=True).to_csv(
        index=False, sep=";", decimal=",", lineterminator="\r\n"
    )
    assert "," in text.splitlines()[1]  # decimal commas present
    weather = read_weather_csv(("\ufeff" + text).encode("utf-8"))
    np.testing.assert_allclose(weather.drybulb, year["drybulb"])


def test_hour_index_1_to_8760_and_units_given_by_user(year):
    frame = pd.DataFrame(
        {
            "hour": np.arange(1, 8761),
            "temp": year["drybulb"],
            "wet bulb": np.round(
                moist_air.wet_bulb_from_humidity_ratio(
                    year["drybulb"],
                    moist_air.humidity_ratio_from_dew_point(year["dew_point"], 97_700.0),
                    97_700.0,
                ),
                2,
            ),
        }
    )
    weather = read_weather_csv(csv_bytes(frame), units="SI", altitude=310)
    assert weather.hour_of_year[0] == 0 and weather.hour_of_year[-1] == 8759
    assert any("hour ending" in note for note in weather.notes)
    # standard atmosphere at 310 m, ASHRAE Fundamentals 2017 Ch. 1 Eq. 3
    assert weather.pressure[0] == pytest.approx(101.325e3 * (1 - 2.25577e-5 * 310) ** 5.2559)


def test_humidity_ratio_in_grains_and_altitude_in_feet(year):
    pressure = moist_air.pressure_from_altitude(1017 * 0.3048)  # 1 ft = 0.3048 m exactly
    w = moist_air.humidity_ratio_from_dew_point(year["dew_point"], pressure)
    frame = pd.DataFrame(
        {"drybulb_F": np.round(year["drybulb"] * 1.8 + 32, 2), "W_gr_per_lb": w * 7000}
    )
    weather = read_weather_csv(csv_bytes(frame), units="IP", altitude=1017)
    # 7000 grains per pound (NIST SP 811): the ratio comes back unchanged.
    np.testing.assert_allclose(weather.humidity_ratio, w, rtol=1e-6)
    assert weather.altitude == pytest.approx(1017 * 0.3048)
    assert weather.pressure[0] == pytest.approx(pressure)
    assert any("no time column" in note for note in weather.notes)


def test_whole_days_accepted_with_a_note(year):
    weather = read_weather_csv(csv_bytes(si_frame(year).iloc[: 24 * 7]))
    assert weather.hours == 168
    assert any("7 day(s), not a full year" in note for note in weather.notes)


def test_leap_year_of_8784_hours(year):
    stamps = pd.date_range("2024-01-01", periods=8784, freq="h")
    frame = pd.DataFrame(
        {
            "timestamp": stamps.strftime("%Y-%m-%dT%H:%M"),
            "drybulb_C": np.resize(year["drybulb"], 8784),
            "dew_point_C": np.resize(year["dew_point"], 8784),
        }
    )
    weather = read_weather_csv(csv_bytes(frame), altitude=0)
    assert weather.hours == 8784
    assert weather.month[24 * 59] == 2  # 29 February 2024 exists
    assert weather.month[-1] == 12


def test_fill_gaps_interpolates_short_gaps(year):
    frame = si_frame(year).drop(index=[100, 101, 102])
    frame.loc[500, "drybulb_C"] = ""
    weather = read_weather_csv(csv_bytes(frame), fill_gaps=True)
    assert weather.hours == 8760
    expected = np.interp(101, [99, 103], year["drybulb"][[99, 103]])
    assert weather.drybulb[101] == pytest.approx(expected)
    assert weather.drybulb[500] == pytest.approx(year["drybulb"][[499, 501]].mean())
    notes = " ".join(weather.notes)
    assert "filled" in notes and "row 499" in notes  # row 499 = data row 497 after 3 drops


def test_content_is_never_used_as_a_path():
    # Bytes naming a file are read as CSV content, not opened.
    text = problem_text(b"/etc/hostname\n")
    assert "row 2" in text and "'/etc/hostname'" in text and "no data rows" in text


# --- one test per kind of bad file: each message names the row(s) and the column -------------
def test_wrong_columns():
    text = problem_text(b"when,a,b\n2023-01-01 00:00,1,2\n")
    assert "row 1" in text
    assert "no dry-bulb column" in text and "'when', 'a', 'b'" in text
    assert "no humidity column" in text


def test_text_in_numbers(year):
    frame = si_frame(year)
    frame.loc[10, "drybulb_C"] = "warm"
    text = problem_text(csv_bytes(frame))
    assert "column 'drybulb_C'" in text and "row 12" in text and "'warm'" in text


def test_relative_humidity_above_100_percent(year):
    frame = pd.DataFrame(
        {
            "timestamp": HOURS.strftime("%Y-%m-%d %H:%M"),
            "temp_C": year["drybulb"],
            "RH %": year["rh"],
        }
    ).astype(object)
    frame.loc[[5, 6, 700], "RH %"] = 101.5
    text = problem_text(csv_bytes(frame), altitude=310)
    assert "column 'RH %'" in text and "above 100 %" in text
    assert "rows 7-8, 702" in text


def test_missing_hours(year):
    frame = si_frame(year).drop(index=[100, 101, 102])
    text = problem_text(csv_bytes(frame))
    assert "column 'timestamp'" in text
    assert "3 missing hour(s) between row 101 (2023-01-05 03:00) and row 102" in text
    assert "fill_gaps=True" in text
    # A gap longer than max_gap_hours is refused even with fill_gaps.
    longer = si_frame(year).drop(index=range(200, 210))
    assert "longer than max_gap_hours=6" in problem_text(csv_bytes(longer), fill_gaps=True)


def test_duplicated_hours(year):
    frame = si_frame(year)
    frame.loc[51, "timestamp"] = frame.loc[50, "timestamp"]
    text = problem_text(csv_bytes(frame))
    assert "column 'timestamp'" in text and "duplicated hours at rows 52-53" in text


def test_wrong_units_guess(year):
    # Header says °C, values are °F: the values exceed the dry-bulb range and the message
    # points to °F.
    frame = si_frame(year).rename(columns={"drybulb_C": "Temperature (°C)"})
    frame["Temperature (°C)"] = np.round(year["drybulb"] * 1.8 + 32, 1)
    text = problem_text(csv_bytes(frame))
    assert "column 'Temperature (°C)'" in text and "rows" in text
    assert "look like °F" in text
    # The remedy the message gives works: a unit given per column overrides the header.
    fixed = read_weather_csv(csv_bytes(frame), units={"Temperature (°C)": "F"})
    np.testing.assert_allclose(fixed.drybulb, year["drybulb"], atol=0.03)
    assert any("header says 'C'" in note for note in fixed.notes)
    # °C values declared as IP (no unit in the header): a year whose warmest hour is below
    # 5 °C is reported with its row, the column and the likely unit.
    plain = pd.DataFrame({"Temperature": year["drybulb"], "Dew point": year["dew_point"]})
    text = problem_text(csv_bytes(plain), units="IP", altitude=1017)
    assert "column 'Temperature'" in text and "look like °C" in text and "row " in text
    # A header unit from the other system than the one given is a conflict.
    text = problem_text(csv_bytes(si_frame(year)), units="IP")
    assert "row 1, column 'drybulb_C'" in text and "units='IP'" in text


def test_no_unit_anywhere_is_refused(year):
    plain = pd.DataFrame({"Temperature": year["drybulb"], "Dew point": year["dew_point"]})
    text = problem_text(csv_bytes(plain), altitude=0)
    assert "row 1, column 'Temperature': no unit" in text


def test_empty_file(tmp_path):
    path = tmp_path / "empty.csv"
    path.write_bytes(b"")
    text = problem_text(path)
    assert "row 1" in text and "empty" in text and "no columns" in text
    assert "row 1" in problem_text(b"\r\n\r\n")


def test_file_of_20_megabytes(tmp_path, year):
    path = tmp_path / "huge.csv"
    block = csv_bytes(si_frame(year))
    with path.open("wb") as handle:
        while handle.tell() <= 20_000_000:
            handle.write(block)
    text = problem_text(path)
    assert "above the limit of 20,000,000 bytes (max_bytes)" in text
    assert "row 1" in text and "all columns" in text
    # The same limit holds for uploaded bytes and for file objects.
    data = path.read_bytes()
    assert "max_bytes" in problem_text(data)
    assert "max_bytes" in problem_text(io.BytesIO(data))
    # Under a raised byte limit, the row limit names the first row beyond it.
    small = csv_bytes(si_frame(year).iloc[:2000])
    text = problem_text(small, max_rows=1000)
    assert "row 1002" in text and "max_rows" in text


# --- further bad files ------------------------------------------------------------------------
def test_dew_point_above_dry_bulb(year):
    frame = si_frame(year)
    frame.loc[200, "dew_point_C"] = year["drybulb"][200] + 2
    text = problem_text(csv_bytes(frame))
    assert "column 'dew_point_C': dew point above the dry bulb at row 202" in text


def test_missing_value_marker_hint(year):
    frame = si_frame(year)
    frame.loc[300, "drybulb_C"] = -9999
    text = problem_text(csv_bytes(frame))
    assert "column 'drybulb_C'" in text and "row 302" in text and "missing-value markers" in text
    assert "dew point above" not in text  # not reported twice


def test_empty_cells_without_fill_gaps(year):
    frame = si_frame(year)
    frame.loc[[300, 301], "pressure_Pa"] = ""
    text = problem_text(csv_bytes(frame))
    assert "column 'pressure_Pa': empty or missing values at rows 302-303" in text


def test_extra_fields_in_a_row(year):
    lines = csv_bytes(si_frame(year)).decode().split("\n")
    lines[20] += ",5"
    text = problem_text("\n".join(lines).encode())
    assert "row 21: 5 fields where the header (row 1) has 4 columns" in text


def test_part_day_and_time_going_backwards(year):
    text = problem_text(csv_bytes(si_frame(year).iloc[:100]))
    assert "100 hours, not a whole number of days" in text and "rows 98-101" in text
    frame = si_frame(year)
    frame.loc[[10, 11], "timestamp"] = frame.loc[[11, 10], "timestamp"].to_numpy()
    text = problem_text(csv_bytes(frame))
    assert "time goes backwards at row 13" in text


def test_no_pressure_and_no_altitude(year):
    text = problem_text(csv_bytes(si_frame(year).drop(columns="pressure_Pa")))
    assert "row 1" in text and "no pressure column and no altitude" in text


def test_ambiguous_and_duplicate_columns(year):
    frame = si_frame(year)
    frame["Temperature (°C)"] = frame["drybulb_C"]
    text = problem_text(csv_bytes(frame))
    assert "columns 'drybulb_C' and 'Temperature (°C)' both look like the dry bulb" in text
    raw = b"timestamp,drybulb_C,drybulb_C,dew_point_C\n2023-01-01 00:00,1,1,0\n"
    assert "column name 'drybulb_C' appears more than once" in problem_text(raw, altitude=0)


def test_bad_arguments_are_range_errors():
    with pytest.raises(InputRangeError, match="units"):
        read_weather_csv(b"x", units="metric")
    with pytest.raises(InputRangeError, match="max_gap_hours"):
        read_weather_csv(b"x", max_gap_hours=0)


def test_separate_date_and_time_columns_day_first(year):
    # A European export: day-first dates, a separate time column, semicolons, decimal commas,
    # an extra column that is ignored with a note.
    frame = pd.DataFrame(
        {
            "Date (DD.MM.YYYY)": HOURS.strftime("%d.%m.%Y"),
            "Time": HOURS.strftime("%H:%M"),
            "Temperature (°C)": year["drybulb"],
            "RH (%)": year["rh"],
            "Wind (m/s)": 3.0,
        }
    )
    data = frame.to_csv(index=False, sep=";", decimal=",").encode("utf-8")
    weather = read_weather_csv(data, altitude=310)
    assert weather.hours == 8760
    assert weather.month[24 * 40] == 2  # 10 February: the dates were read day first
    assert any("ignored columns: 'Wind (m/s)'" in note for note in weather.notes)


# --- robustness: defects W1-W4 found by the fuzz (tests/test_fuzz_weather_csv.py) ------------
def test_ambiguous_humidity_columns_are_reported_not_crashed():
    data = b"drybulb_C,wb_C,wet bulb_C,rh_%\n" + b"20,15,15,50\n" * 24
    text = problem_text(data, altitude=0)
    assert "row 1: columns 'wb_C' and 'wet bulb_C' both look like the wet bulb" in text


def test_marker_in_a_timestamp_cell_is_an_unreadable_time():
    rows = b"".join(f"2023-01-01T{h:02d}:00,20,10\n".encode() for h in range(1, 24))
    text = problem_text(b"timestamp,drybulb_C,dew_point_C\n-9999,20,10\n" + rows, altitude=0)
    assert "column 'timestamp': unreadable date/time at row 2; first '-9999'" in text


def test_junk_without_line_breaks_is_refused_at_row_1():
    text = problem_text(b"a" * 200_000 + b"\n1\n", altitude=0)
    assert "row 1: the header is 200,000 characters long" in text


@pytest.mark.parametrize("last", [b"50000000", b"1e30", b"-5"])
def test_huge_or_negative_hour_index_is_refused_before_any_allocation(last):
    text = problem_text(b"hour,drybulb_C,dew_point_C\n0,20,10\n" + last + b",20,10\n", altitude=0)
    assert "column 'hour'" in text and "row 3" in text


def test_stray_year_in_timestamps_exceeds_max_rows(year):
    frame = si_frame(year).iloc[:48]
    frame.loc[47, "timestamp"] = "2200-01-01 00:00"
    text = problem_text(csv_bytes(frame))
    assert "column 'timestamp': the times span" in text and "max_rows=87,840" in text
