"""Fuzzing of the hourly zone-load CSV importer (``plantside.air_handler.zone_load_csv``).

Valid files are mutated at random (hypothesis): columns dropped, swapped or relabelled,
text and extreme numbers in cells, unit words changed, rows dropped, repeated or broken,
other separators and decimal commas, other encodings and byte-order marks, CR/LF line
ends, truncation, binary junk. Every outcome must be one of:

- a :class:`~plantside.air_handler.zone_loads.HourlyZoneLoads` of the expected number of hours whose
  every value is finite and inside the documented ranges (sensible and latent
  -100,000..100,000 kW, internal gains 0..100,000 kW: module docstring), or
- :class:`~plantside.errors.InputFileError` whose every problem names a row and/or a
  column (or the whole file), or :class:`~plantside.errors.InputRangeError`,

never any other exception (the harness is ``csv_fuzz``, shared with the weather
fuzz). Mutations that keep the meaning (column order, CRLF, BOM, UTF-16,
Windows-1252, semicolons with decimal commas) give the same loads. The number of cases
run is printed at the end of the module.
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
from plantside.air_handler.zone_load_csv import read_zone_loads_csv
from plantside.air_handler.zone_loads import HourlyZoneLoads
from plantside.errors import InputFileError

EXAMPLE = Path(__file__).parents[1] / "example_data" / "scenarios" / "korva_school_zone_loads.csv"
HOURS = 48

OUTCOMES: Counter = Counter()
_print_case_count = case_count_fixture(OUTCOMES, "zone-load CSV fuzz")

# The shared pools plus a load with its unit glued on, a word that is not a flag, and
# the edges of the documented load range.
JUNK = [*JUNK_CELLS, "12 kW", "maybe"]
EXTREMES = [*EXTREME_NUMBERS, "100000", "100001"]
UNIT_WORDS = ["kW", "W", "Btuh", "Btu/h", "MBH", "kw", "tons", "furlongs", "", "%"]
RENAMES = ["sensible", "latent", "internal", "hoy", "x", "", "Sensible Load"]
ENCODINGS = ["utf-8", "utf-8-sig", "utf-16", "utf-16-le", "latin-1", "cp1252"]


def _arguments(draw, table):
    table.kwargs["units"] = draw(st.sampled_from([None, "SI", "IP", "ip", "metric"]))
    table.kwargs["expected_hours"] = draw(st.sampled_from([HOURS, HOURS - 1, None]))


def zone_load_tables(base=None):
    return mutated_tables(
        BASES,
        junk=JUNK,
        extreme=EXTREMES,
        unit_words=UNIT_WORDS,
        renames=RENAMES,
        arguments={"arguments": _arguments},
        base=base,
    )


def _base_tables() -> list[Table]:
    hour = np.arange(HOURS)
    occupied = ((hour % 24) >= 7) & ((hour % 24) < 18)
    internal = np.where(occupied, 20.0, 2.0)
    sensible = -15.0 + 25.0 * np.sin(2 * np.pi * (hour - 9) / 24) + internal
    latent = np.where(occupied, 6.0, 0.6)
    si = Table(
        names=["hour", "sensible", "latent", "internal_sensible", "occupied"],
        units=["", "kW", "kW", "kW", ""],
        rows=[
            [str(h + 1), f"{s:.3f}", f"{la:.2f}", f"{i:.1f}", str(int(o))]
            for h, s, la, i, o in zip(hour, sensible, latent, internal, occupied, strict=True)
        ],
        comments=["# zone loads exported from a fictional load program"],
        kwargs={"expected_hours": HOURS},
    )
    btuh = 1000.0 / 0.29307107  # Btu/h per kW (NIST SP 811: 1 Btu/h = 0.29307107 W)
    ip = Table(
        names=["Sensible", "Latent", "Occupancy"],
        units=["Btu/h", "Btu/h", ""],
        rows=[
            [f"{s * btuh:.1f}", f"{la * btuh:.1f}", "yes" if o else "no"]
            for s, la, o in zip(sensible, latent, occupied, strict=True)
        ],
        style="bracket",
        separator=";",
        decimal_comma=True,
        kwargs={"expected_hours": HOURS},
    )
    bare = Table(
        names=["qs", "ql"],
        units=["", ""],
        rows=[[f"{s:.2f}", f"{la:.2f}"] for s, la in zip(sensible, latent, strict=True)],
        kwargs={"expected_hours": HOURS, "units": "SI"},
    )
    return [si, ip, bare]


def _example_table() -> Table:
    lines = EXAMPLE.read_text(encoding="utf-8").splitlines()
    header = lines[0].split(",")
    names, units = [], []
    for cell in header:
        name, _, unit = cell.rpartition("_") if cell.endswith("_kW") else (cell, "", "")
        names.append(name)
        units.append(unit)
    return Table(names=names, units=units, rows=[line.split(",") for line in lines[1:]])


BASES = _base_tables()
EXAMPLE_TABLE = _example_table()

_NAMES_PLACE = re.compile(r"\brows?\b|\bcolumns?\b|\bfile\b|\bheader\b|\bunits\b", re.I)


def _check_loads(loads, kwargs):
    assert isinstance(loads, HourlyZoneLoads)
    expected = kwargs.get("expected_hours")
    assert loads.hours == expected if expected else loads.hours in (8760, 8784), loads.hours
    for name, low, high in (
        ("sensible", -100_000.0, 100_000.0),
        ("latent", -100_000.0, 100_000.0),
        ("internal_sensible", 0.0, 100_000.0),
    ):
        values = getattr(loads, name)
        assert values.shape == (loads.hours,), name
        assert np.isfinite(values).all(), f"non-finite {name} loaded"
        assert ((values >= low) & (values <= high)).all(), name
    assert loads.occupied.dtype == bool and loads.occupied.shape == (loads.hours,)


def read_and_judge(data: bytes, kwargs: dict):
    """Read ``data``; return the loads or the documented error; fail on anything else."""
    return judge(
        read_zone_loads_csv,
        data,
        kwargs,
        outcomes=OUTCOMES,
        names_place=_NAMES_PLACE,
        check_loaded=_check_loads,
    )


def test_the_unmutated_bases_load():
    for table in BASES:
        loads = read_and_judge(table.text().encode("utf-8"), table.kwargs)
        assert isinstance(loads, HourlyZoneLoads), loads
        assert loads.hours == HOURS
    # The IP base is the SI one in Btu/h: 1 Btu/h = 0.29307107 W (NIST SP 811); the SI file
    # is rounded to 0.001 kW, the IP file to 0.1 Btu/h.
    si = read_zone_loads_csv(BASES[0].text().encode(), **BASES[0].kwargs)
    ip = read_zone_loads_csv(BASES[1].text().encode(), **BASES[1].kwargs)
    np.testing.assert_allclose(ip.sensible, si.sensible, rtol=0, atol=6e-4)
    np.testing.assert_array_equal(ip.occupied, si.occupied)


@settings(max_examples=examples(200), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(file_bytes(zone_load_tables(), ENCODINGS))
def test_mutated_files_load_or_fail_cleanly(case):
    data, kwargs = case
    read_and_judge(data, kwargs)


@settings(max_examples=examples(30), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(file_bytes(zone_load_tables(base=EXAMPLE_TABLE), ENCODINGS))
def test_mutated_example_year_loads_or_fails_cleanly(case):
    # The bundled example (a full year, 8,760 rows) mutated the same way.
    data, kwargs = case
    read_and_judge(data, kwargs)


@settings(max_examples=examples(120), deadline=None)
@given(st.binary(max_size=2048), st.sampled_from([None, 1, 24, 8760]))
def test_arbitrary_bytes_never_raise_anything_else(data, hours):
    read_and_judge(data, {"expected_hours": hours})


@settings(max_examples=examples(80), deadline=None)
@given(
    st.text(alphabet=st.sampled_from(list('0123456789.,;-+eE \t\r\n"#kWsensibllatntBuh_[]'))),
    st.sampled_from([None, 1, 2, 3]),
)
def test_csv_like_text_never_raises_anything_else(text, hours):
    read_and_judge(text.encode("utf-8"), {"expected_hours": hours, "units": "SI"})


@settings(max_examples=examples(60), deadline=None)
@given(
    st.sampled_from(range(len(BASES))),
    st.data(),
    st.sampled_from(["\n", "\r\n"]),
    st.sampled_from(["utf-8", "utf-8-sig", "utf-16", "cp1252", "latin-1"]),
    st.booleans(),
)
def test_meaning_preserving_changes_give_the_same_loads(index, data, newline, encoding, semi):
    base = BASES[index]
    reference = read_zone_loads_csv(base.text().encode("utf-8"), **base.kwargs)
    order = data.draw(st.permutations(range(len(base.names))))
    table = rearranged(base, order, semi)
    loads = read_and_judge(table.text(newline).encode(encoding), table.kwargs)
    assert isinstance(loads, HourlyZoneLoads), loads
    for name in ("sensible", "latent", "internal_sensible", "occupied"):
        np.testing.assert_array_equal(getattr(loads, name), getattr(reference, name))


@settings(max_examples=examples(80), deadline=None)
@given(
    st.sampled_from(range(len(BASES))),
    st.data(),
    st.sampled_from(
        [
            j
            for j in JUNK
            if j.strip() and not set(j) & set(',;"\x00') and j not in ("١٢", "\ufeff12")
        ]
    ),
)
def test_bad_cell_is_reported_at_its_row_and_column(index, data, junk):
    # One bad cell in a load or occupancy column: a problem names its file row (header =
    # row 1 after the comment lines) and the column header as written.
    base = BASES[index]
    columns = [i for i, n in enumerate(base.names) if n.lower() not in ("hour",)]
    column = data.draw(st.sampled_from(columns))
    row = data.draw(st.integers(0, len(base.rows) - 1))
    table = replace(base, rows=[list(r) for r in base.rows])
    table.rows[row][column] = junk
    try:
        result = read_zone_loads_csv(table.text().encode("utf-8"), **table.kwargs)
    except InputFileError as error:
        OUTCOMES["refused (InputFileError)"] += 1
        file_row = len(table.comments) + 2 + row
        named = [
            p
            for p in error.problems
            if re.search(rf"\brows? (?:[\d, ]+, )?{file_row}\b", p) and table.header(column) in p
        ]
        assert named, (file_row, table.header(column), error.problems)
        return
    OUTCOMES["loaded"] += 1
    # Only a flag column may take words (yes/no/true/false); none of these are flags.
    pytest.fail(f"{junk!r} in {table.header(column)!r} loaded: {result!r}")


# ---------------------------------------------------------------------------------------
# defect the fuzz found, fixed, kept as a regression: Z1 a field of 200,000 characters (in
# the header or a cell) must be refused naming its row, not crash the CSV parser.
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    "data",
    [b"a" * 200_000 + b"\n", b"sensible_kW,latent_kW\n" + b"1" * 200_000 + b",1\n"],
    ids=["header", "cell"],
)
def test_z1_huge_field_is_reported(data):
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv(data, expected_hours=1)
    assert re.search(r"\brow [12]\b", str(caught.value)), str(caught.value)


def test_value_limits_are_the_documented_ones():
    # 100,000 kW is accepted, 100,001 kW refused naming the row and column (module docstring).
    header = b"sensible_kW,latent_kW\n"
    loads = read_and_judge(header + b"100000,-100000\n", {"expected_hours": 1})
    assert isinstance(loads, HourlyZoneLoads) and loads.sensible[0] == 100_000.0
    error = read_and_judge(header + b"100001,0\n", {"expected_hours": 1})
    assert isinstance(error, InputFileError)
    assert "row 2" in str(error) and "sensible_kW" in str(error), str(error)
    assert math.isclose(loads.latent[0], -100_000.0)
