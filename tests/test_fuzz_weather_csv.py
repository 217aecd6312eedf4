"""Fuzzing of the hourly weather CSV importer (``plantside.climate.weather_csv.read_weather_csv``).

Valid files are mutated at random (hypothesis): columns dropped, swapped or relabelled,
text and extreme numbers put in cells, unit words changed, rows dropped, repeated or
broken, other separators and decimal commas, other encodings and byte-order marks, CR/LF
line ends, truncation, binary junk. Every outcome must be one of:

- a :class:`~plantside.climate.weather.Weather` whose every value is finite and physical, or
- :class:`~plantside.errors.InputFileError` whose every problem names a row and/or a
  column, or :class:`~plantside.errors.InputRangeError` naming the argument,

never any other exception (the harness is ``csv_fuzz``, shared with the zone-load
fuzz). Mutations that do not change the meaning of a file (column
order, CRLF, BOM, UTF-16, Windows-1252, semicolons with decimal commas) must give the
same year as the original. The number of cases run is printed at the end of the module.

Physical ranges checked on loaded files are the importer's documented ones
(weather_import module docstring): dry bulb -70..60 °C (dry-bulb world records about
-89 and +57 °C, rounded in; project rule), humidity ratio 0..0.045 kg/kg, pressure
50..110 kPa (ASHRAE Handbook Fundamentals 2017 Ch. 1 Table 1: standard atmosphere
spans 54 kPa at 5,000 m to 101.325 kPa at sea level; project rule rounded out).
"""

from __future__ import annotations

import math
import re
from collections import Counter
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from csv_fuzz import (
    EXTREME_NUMBERS,
    JUNK_CELLS,
    Table,
    file_bytes,
    judge,
    mutated_tables,
    rearranged,
)
from fuzz_counts import case_count_fixture, examples
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from plantside.climate.weather_csv import read_weather_csv
from plantside.errors import InputFileError
from plantside.units import fahrenheit_from_celsius, inhg_from_pa

BUNDLED = Path(__file__).parents[1] / "core" / "plantside" / "data" / "linden_vale.csv"

#: Cases run per outcome; printed at the end of the module.
OUTCOMES: Counter = Counter()
_print_case_count = case_count_fixture(OUTCOMES, "weather CSV fuzz")

# The shared pools plus a temperature with its unit glued on and a cold absolute zero.
JUNK = [*JUNK_CELLS, "12°C"]
EXTREMES = [*EXTREME_NUMBERS, "-273.15"]
UNIT_WORDS = ["C", "F", "K", "degC", "°F", "kPa", "Pa", "inHg", "g/kg", "%", "furlongs", "", "mbar"]
RENAMES = ["temp", "wb", "w", "humidity", "p", "x", "", "dry bulb", "hour"]
ENCODINGS = ["utf-8", "utf-8-sig", "utf-16", "utf-16-le", "utf-16-be", "latin-1", "cp1252"]


def _units_argument(draw, table):
    table.kwargs["units"] = draw(st.sampled_from([None, "SI", "IP", "si"]))


def _fill_gaps_argument(draw, table):
    table.kwargs["fill_gaps"] = draw(st.booleans())
    table.kwargs["max_gap_hours"] = draw(st.integers(1, 24))


ARGUMENTS = {"units_argument": _units_argument, "fill_gaps": _fill_gaps_argument}


def weather_tables(base=None):
    return mutated_tables(
        BASES,
        junk=JUNK,
        extreme=EXTREMES,
        unit_words=UNIT_WORDS,
        renames=RENAMES,
        arguments=ARGUMENTS,
        base=base,
    )


def _two_days() -> dict[str, np.ndarray]:
    """48 hours of a plausible summer record [SI]: a daily swing, dew point below dry bulb."""
    hour = np.arange(48)
    drybulb = 24.0 + 7.0 * np.sin(2 * np.pi * (hour - 9) / 24)
    dew_point = 13.0 + 1.5 * np.sin(2 * np.pi * hour / 24)
    relative_humidity = 100.0 * np.exp(
        17.62 * dew_point / (243.12 + dew_point) - 17.62 * drybulb / (243.12 + drybulb)
    )  # Magnus form (common practice, no source): only to make plausible test data
    pressure = 98_500.0 + 150.0 * np.sin(2 * np.pi * hour / 48)
    return {
        "hour": hour,
        "drybulb": drybulb,
        "dew_point": dew_point,
        "relative_humidity": relative_humidity,
        "pressure": pressure,
    }


def _base_tables() -> list[Table]:
    d = _two_days()
    stamps = [f"2023-07-{1 + h // 24:02d}T{h % 24:02d}:00" for h in d["hour"]]
    iso = Table(
        names=["timestamp", "drybulb", "dew_point", "pressure"],
        units=["", "C", "C", "Pa"],
        rows=[
            [s, f"{t:.2f}", f"{td:.2f}", f"{p:.0f}"]
            for s, t, td, p in zip(stamps, d["drybulb"], d["dew_point"], d["pressure"], strict=True)
        ],
        style="suffix",
        kwargs={"altitude": 150.0},
    )
    ip = Table(
        names=["Hour", "Dry bulb", "RH", "Station pressure"],
        units=["", "°F", "%", "inHg"],
        rows=[
            [str(h + 1), f"{t:.1f}", f"{rh:.1f}", f"{p:.3f}"]
            for h, t, rh, p in zip(
                d["hour"],
                fahrenheit_from_celsius(d["drybulb"]),
                d["relative_humidity"],
                inhg_from_pa(d["pressure"]),
                strict=True,
            )
        ],
        style="paren",
        kwargs={"altitude": 500.0, "units": "IP"},
    )
    european = Table(
        names=["Datum", "Zeit", "Temperatur", "rel. Feuchte"],
        units=["", "", "°C", "%"],
        rows=[
            [f"{1 + h // 24:02d}.07.2023", f"{h % 24:02d}:00", f"{t:.1f}", f"{rh:.1f}"]
            for h, t, rh in zip(d["hour"], d["drybulb"], d["relative_humidity"], strict=True)
        ],
        style="paren",
        separator=";",
        decimal_comma=True,
        comments=["# exported from a fictional logger at Linden Vale"],
        kwargs={"altitude": 310.0, "columns": {"date": "Datum", "time": "Zeit",
                                                 "relative_humidity": "rel. Feuchte (%)",
                                                 "drybulb": "Temperatur (°C)"}},
    )  # fmt: skip
    return [iso, ip, european]


def _bundled_table() -> Table:
    lines = BUNDLED.read_text(encoding="utf-8").splitlines()
    comments = [line for line in lines if line.startswith("#")]
    body = [line for line in lines if line and not line.startswith("#")]
    headers = body[0].split(",")
    names, units = [], []
    for header in headers:
        name, _, unit = header.partition("_") if header != "hour" else (header, "", "")
        if header.startswith("humidity_ratio"):
            name, unit = "humidity_ratio", header.removeprefix("humidity_ratio_")
        elif header.startswith("drybulb"):
            name, unit = "drybulb", header.removeprefix("drybulb_")
        names.append(name)
        units.append(unit)
    return Table(
        names=names,
        units=units,
        rows=[line.split(",") for line in body[1:]],
        style="suffix",
        comments=comments,
        kwargs={"altitude": 310.0},
    )


BASES = _base_tables()
BUNDLED_TABLE = _bundled_table()


# ---------------------------------------------------------------------------------------
# the oracle
# ---------------------------------------------------------------------------------------
_NAMES_PLACE = re.compile(r"\brows?\b|\bcolumns?\b", re.IGNORECASE)


def _check_weather(weather, kwargs):
    n = weather.hours
    assert n > 0 and n % 24 == 0, n
    for name in ("drybulb", "humidity_ratio", "pressure"):
        values = getattr(weather, name)
        assert values.shape == (n,), name
        assert np.isfinite(values).all(), f"non-finite {name} in a loaded file"
    # Documented importer ranges (see module docstring).
    assert ((weather.drybulb >= -70.0) & (weather.drybulb <= 60.0)).all()
    assert ((weather.humidity_ratio >= 0.0) & (weather.humidity_ratio <= 0.045)).all()
    assert ((weather.pressure >= 50_000.0) & (weather.pressure <= 110_000.0)).all()
    assert math.isfinite(weather.altitude)


def read_and_judge(data: bytes, kwargs: dict):
    """Read ``data``; return the Weather or the documented error; fail on anything else."""
    return judge(
        read_weather_csv,
        data,
        kwargs,
        outcomes=OUTCOMES,
        names_place=_NAMES_PLACE,
        check_loaded=_check_weather,
    )


# ---------------------------------------------------------------------------------------
# tests
# ---------------------------------------------------------------------------------------
def test_the_unmutated_bases_load():
    # The fuzz starts from files that really are valid: each loads to 48 hours.
    for table in BASES:
        weather = read_and_judge(table.text().encode("utf-8"), table.kwargs)
        assert not isinstance(weather, Exception), weather
        assert weather.hours == 48


@settings(max_examples=examples(200), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(file_bytes(weather_tables(), ENCODINGS))
def test_mutated_two_day_files_load_or_fail_cleanly(case):
    data, kwargs = case
    read_and_judge(data, kwargs)


@settings(max_examples=examples(60), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    file_bytes(
        weather_tables(base=replace(BUNDLED_TABLE, rows=BUNDLED_TABLE.rows[: 24 * 20])), ENCODINGS
    )
)
def test_mutated_bundled_file_loads_or_fails_cleanly(case):
    # The first 20 days of a bundled year (the importer's own example format).
    data, kwargs = case
    read_and_judge(data, kwargs)


@settings(max_examples=examples(150), deadline=None)
@given(st.binary(max_size=2048))
def test_arbitrary_bytes_never_raise_anything_else(data):
    read_and_judge(data, {"altitude": 0.0})


@settings(max_examples=examples(100), deadline=None)
@given(
    st.text(alphabet=st.sampled_from(list('0123456789.,;-+eE \t\r\n"#abcCF%()_'))), st.booleans()
)
def test_csv_like_text_never_raises_anything_else(text, si):
    read_and_judge(text.encode("utf-8"), {"altitude": 0.0, "units": "SI" if si else None})


def _same_year(a, b):
    return (
        a.hours == b.hours
        and np.allclose(a.drybulb, b.drybulb, rtol=0, atol=1e-9)
        and np.allclose(a.humidity_ratio, b.humidity_ratio, rtol=0, atol=1e-12)
        and np.allclose(a.pressure, b.pressure, rtol=0, atol=1e-6)
        and np.array_equal(a.hour_of_year, b.hour_of_year)
    )


@settings(max_examples=examples(80), deadline=None)
@given(
    st.sampled_from(range(len(BASES))),
    st.permutations(range(4)),
    st.sampled_from(["\n", "\r\n"]),
    st.sampled_from(["utf-8", "utf-8-sig", "utf-16", "cp1252", "latin-1"]),
    st.booleans(),
)
def test_meaning_preserving_changes_give_the_same_year(index, order, newline, encoding, semicolon):
    # Column order, line ends, a byte-order mark, UTF-16 with its BOM, Windows-1252/latin-1
    # (the '°' of a header is one byte there) and a semicolon separator with decimal
    # commas do not change what the file says: the year read must be the same.
    base = BASES[index]
    reference = read_weather_csv(base.text().encode("utf-8"), **base.kwargs)
    table = rearranged(base, order, semicolon)
    weather = read_and_judge(table.text(newline).encode(encoding), table.kwargs)
    assert not isinstance(weather, Exception), weather
    assert _same_year(weather, reference)


@settings(max_examples=examples(80), deadline=None)
@given(
    st.sampled_from(range(len(BASES))),
    st.data(),
    # Cells that keep the row's structure (no separator, quote or NUL) and are not a
    # missing-value marker (those are gaps, reported as such).
    st.sampled_from(
        [
            j
            for j in JUNK
            if j.strip() and j.lower() not in ("nan", "n/a") and not set(j) & set(',;"\x00')
        ]
    ),
)
def test_text_in_a_number_cell_is_reported_at_its_row_and_column(index, data, junk):
    # A single bad cell in a required numeric column: the message names its file row
    # (header = row 1 after the comment lines; data row r is row header + 1 + r) and the
    # column header as written.
    base = BASES[index]
    numeric = [i for i, name in enumerate(base.names) if base.units[i] not in ("",)]
    column = data.draw(st.sampled_from(numeric))
    row = data.draw(st.integers(0, len(base.rows) - 1))
    table = replace(base, rows=[list(r) for r in base.rows])
    table.rows[row][column] = junk
    text = table.text()
    try:
        result = read_weather_csv(text.encode("utf-8"), **table.kwargs)
    except InputFileError as error:
        OUTCOMES["refused (InputFileError)"] += 1
        file_row = len(table.comments) + 1 + 1 + row
        where = [p for p in error.problems if f"{file_row}" in p]
        assert where, f"row {file_row} not named: {error.problems}"
        assert any(table.header(column) in p for p in where), error.problems
        return
    OUTCOMES["loaded"] += 1
    # The only text cells that may load are numbers in disguise (+7-like forms are not
    # in the pool): none here.
    pytest.fail(f"{junk!r} in column {table.header(column)!r} loaded as {result!r}")


# ---------------------------------------------------------------------------------------
# defects the fuzz found, fixed, kept as regressions: W1 an ambiguous humidity column
# not reported, W2 a timestamp beyond the years a date can hold, W3 a header line too
# long to split. Each test below states the file and what its refusal must name.
# ---------------------------------------------------------------------------------------
def _assert_clean_refusal(data: bytes, kwargs: dict, *words: str):
    with pytest.raises(InputFileError) as caught:
        read_weather_csv(data, **kwargs)
    text = str(caught.value)
    for word in words:
        assert word in text, text


def test_w1_ambiguous_humidity_column_is_reported():
    # Two wet-bulb columns and an RH column: the ambiguity must be reported by row and
    # column ("row 1: columns 'wb_C' and 'wet bulb_C' both look like the wet bulb").
    data = b"drybulb_C,wb_C,wet bulb_C,rh_%\n" + b"20,15,15,50\n" * 24
    _assert_clean_refusal(data, {"altitude": 0.0}, "row 1", "wb_C", "wet bulb_C")


def test_w2_timestamp_outside_python_years_is_reported():
    # '-9999' (a missing-value marker) in a timestamp cell must be an unreadable time at row 2.
    rows = b"".join(f"2023-01-01T{h:02d}:00,20,10\n".encode() for h in range(1, 24))
    data = b"timestamp,drybulb_C,dew_point_C\n-9999,20,10\n" + rows
    _assert_clean_refusal(data, {"altitude": 0.0}, "row 2", "timestamp")


def test_w3_huge_header_field_is_reported():
    # Junk without a line break (e.g. a binary file renamed .csv): refused at row 1.
    _assert_clean_refusal(b"a" * 200_000 + b"\n1\n", {"altitude": 0.0}, "row 1")
