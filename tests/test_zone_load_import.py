"""Import of hourly zone loads from CSV.

Unit factors: NIST SP 811 (2008) Appendix B, 1 Btu/h = 0.293 071 W; AHRI 550/590,
1 ton = 12,000 Btu/h = 3.516 853 kW. Every error must name its row(s) and column.
"""

from __future__ import annotations

import io

import numpy as np
import pytest
from plantside.air_handler.zone_load_csv import read_zone_loads_csv
from plantside.errors import InputFileError


def _csv(header, rows, separator=","):
    return header + "\n" + "".join(separator.join(str(v) for v in row) + "\n" for row in rows)


def _year(n=8760):
    hours = np.arange(n)
    sensible = 20.0 + 10.0 * np.sin(hours / 24.0)
    latent = np.full(n, 3.0)
    return hours, sensible, latent


def test_reads_si_file_with_comments_and_optional_columns():
    hours, sensible, latent = _year()
    rows = [
        (h + 1, f"{s:.4f}", f"{q:.3f}", int(h % 24 >= 8), 5)
        for h, s, q in zip(hours, sensible, latent, strict=True)
    ]
    text = "# exported by the engineer's load program\n" + _csv(
        "Hour,Sensible [kW],latent_kW,Occupied,internal_sensible_kW,note", [(*r, "x") for r in rows]
    )
    loads = read_zone_loads_csv(text, name="zone1.csv")
    assert loads.hours == 8760 and loads.source == "zone1.csv"
    np.testing.assert_allclose(loads.sensible, np.round(sensible, 4))
    np.testing.assert_allclose(loads.latent, 3.0)
    np.testing.assert_allclose(loads.internal_sensible, 5.0)
    assert loads.occupied.sum() == 365 * 16
    assert any("note" in n for n in loads.notes)


def test_ip_units_converted_to_kw():
    # 12,000 Btu/h = 3.516853 kW (AHRI 550/590 ton; NIST SP 811 Btu).
    n = 8760
    text = _csv("sensible_Btuh,latent (MBH)", [(12000, 12)] * n)
    loads = read_zone_loads_csv(text)
    np.testing.assert_allclose(loads.sensible, 3.516853, rtol=1e-6)
    np.testing.assert_allclose(loads.latent, 3.516853, rtol=1e-6)
    # no unit in the header: taken from units="IP" (Btu/h)
    loads = read_zone_loads_csv(_csv("sensible,latent", [(3412.14, 0)] * n), units="IP")
    np.testing.assert_allclose(loads.sensible, 1.0, rtol=1e-5)
    # watts
    loads = read_zone_loads_csv(_csv("sensible_W,latent_W", [(1500, 250)] * n))
    np.testing.assert_allclose(loads.sensible, 1.5)


def test_semicolon_and_decimal_comma_from_bytes_and_file(tmp_path):
    n = 8784  # a leap year
    text = _csv("sensible_kW;latent_kW", [("12,5", "1,25")] * n, separator=";")
    loads = read_zone_loads_csv(text.encode("cp1252"))
    np.testing.assert_allclose(loads.sensible, 12.5)
    path = tmp_path / "loads.csv"
    path.write_text(text, encoding="utf-8-sig")
    assert read_zone_loads_csv(path).hours == n
    assert read_zone_loads_csv(io.StringIO(text)).hours == n


def test_errors_name_rows_and_columns():
    rows = [(10, 2)] * 8760
    rows[4] = ("abc", 2)
    rows[9] = ("", 2)
    rows[19] = (200000, 2)
    rows[29] = (5, 2, 7)
    with pytest.raises(InputFileError) as info:
        read_zone_loads_csv(_csv("sensible_kW,latent_kW", rows), name="bad.csv")
    text = str(info.value)
    problems = info.value.problems
    assert text.startswith("bad.csv")
    # data row i is file row i + 2 (header is row 1)
    assert any("row 6" in p and "'sensible_kW'" in p and "not a number" in p for p in problems)
    assert any("row 11" in p and "'sensible_kW'" in p and "empty" in p for p in problems)
    assert any("row 21" in p and "outside the allowed range" in p for p in problems)
    assert any("row 31" in p and "fields" in p for p in problems)


def test_missing_column_unit_and_length():
    with pytest.raises(InputFileError, match="no latent load column"):
        read_zone_loads_csv(_csv("sensible_kW,other", [(1, 2)] * 8760))
    with pytest.raises(InputFileError, match="no unit"):
        read_zone_loads_csv(_csv("sensible,latent", [(1, 2)] * 8760))
    with pytest.raises(InputFileError, match="allowed 8760 or 8784"):
        read_zone_loads_csv(_csv("sensible_kW,latent_kW", [(1, 2)] * 100))
    assert (
        read_zone_loads_csv(_csv("sensible_kW,latent_kW", [(1, 2)] * 48), expected_hours=48).hours
        == 48
    )
    with pytest.raises(InputFileError, match="hours are not consecutive") as info:
        rows = [(h + 1, 1, 2) for h in range(8760)]
        rows[100] = (100, 1, 2)
        read_zone_loads_csv(_csv("hour,sensible_kW,latent_kW", rows))
    assert "row 102" in str(info.value)
    with pytest.raises(InputFileError, match="both give the sensible"):
        read_zone_loads_csv(_csv("sensible_kW,sensible_W,latent_kW", [(1, 1, 2)] * 8760))
    with pytest.raises(InputFileError, match="not 1/0"):
        read_zone_loads_csv(_csv("sensible_kW,latent_kW,occupied", [(1, 2, "maybe")] * 8760))
    with pytest.raises(InputFileError, match="internal"):
        read_zone_loads_csv(_csv("sensible_kW,latent_kW,internal_kW", [(1, 2, -3)] * 8760))


def test_file_problems_are_input_file_errors(tmp_path):
    # A missing path, a folder, content over max_bytes (any source kind), a field too long
    # for CSV, a binary file: each an InputFileError naming the problem, never a traceback.
    with pytest.raises(InputFileError, match=r"no file 'missing\.csv'"):
        read_zone_loads_csv(tmp_path / "missing.csv")
    with pytest.raises(InputFileError, match="folder"):
        read_zone_loads_csv(tmp_path)
    data = b"sensible_kW,latent_kW\n" + b"10,1\n" * 100
    for source in (data, data.decode(), io.BytesIO(data)):
        with pytest.raises(InputFileError, match="100"):
            read_zone_loads_csv(source, max_bytes=100, expected_hours=100)
    with pytest.raises(InputFileError, match="row 2: cannot be read as CSV"):
        read_zone_loads_csv(b"sensible_kW,latent_kW\n" + b"1" * 200_000 + b",1\n", expected_hours=1)
    with pytest.raises(InputFileError, match="NUL bytes"):
        read_zone_loads_csv(b"sensible_kW,latent_kW\n1,\x002\n", expected_hours=1)


def test_utf16_file_is_read():
    # Spreadsheet "Unicode text" export: UTF-16 with a byte-order mark.
    text = "sensible_kW\tlatent_kW\n" + "2,5\t1\n" * 24
    loads = read_zone_loads_csv(text.encode("utf-16"), expected_hours=24)
    np.testing.assert_allclose(loads.sensible, 2.5)


def test_too_many_rows_refused_before_parsing():
    import time

    data = b"sensible_kW,latent_kW\n" + b"10,1\n" * 200_000
    start = time.perf_counter()
    with pytest.raises(InputFileError, match="200000 data rows"):
        read_zone_loads_csv(data)
    assert time.perf_counter() - start < 2.0  # counted, not parsed (generous on shared CI)
