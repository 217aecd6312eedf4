"""Upload limits (file size, row count) and uploads treated as data only.

- Size and row limits of the weather importer, the zone-load importer, scenario files
  and the dashboard's weather upload are enforced with a message that gives the size
  or count and the limit, before any costly parsing or allocation.
- Nothing an upload contains is executed or used as a path: cells that look like
  formulas, code or paths are read as text (and refused as text in a number); content
  given as bytes is never opened as a file; names inside a scenario resolve against the
  scenario's folder, not the working directory.
"""

from __future__ import annotations

import io
import os
import re
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest
from plantside.air_handler.zone_load_csv import read_zone_loads_csv
from plantside.climate.weather_csv import DEFAULT_MAX_BYTES, DEFAULT_MAX_ROWS, read_weather_csv
from plantside.errors import InputFileError, ScenarioError
from plantside.study.scenario import (
    MAX_SCENARIO_BYTES,
    dumps_scenario,
    load_scenario,
    loads_scenario,
)

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
CLIMATES = Path(__file__).parents[1] / "example_data" / "climates"
HEADER = b"hour,drybulb_C,dew_point_C,pressure_Pa\n"


def _day_rows(hours=24, start=0):
    return b"".join(b"%d,20.0,10.0,98000\n" % h for h in range(start, start + hours))


# ---------------------------------------------------------------------------------------
# weather CSV: size and rows
# ---------------------------------------------------------------------------------------
def test_default_weather_limits_allow_ten_leap_years():
    # Documented defaults: 20 MB and ten leap years of hours (weather_import docstring).
    assert DEFAULT_MAX_BYTES == 20_000_000
    assert DEFAULT_MAX_ROWS == 10 * 8784


@pytest.mark.parametrize("form", ["bytes", "stream", "path"])
def test_weather_file_above_max_bytes_is_refused_with_size_and_limit(form, tmp_path):
    data = HEADER + _day_rows(48)
    source = {"bytes": data, "stream": io.BytesIO(data)}.get(form)
    if form == "path":
        source = tmp_path / "year.csv"
        source.write_bytes(data)
    with pytest.raises(InputFileError) as caught:
        read_weather_csv(source, max_bytes=500)
    text = str(caught.value)
    assert "limit of 500 bytes" in text and "max_bytes" in text, text
    # The file's size (a stream is read only up to the limit + 1 byte: "or more").
    size = len(data) if form != "stream" else 501
    assert f"the file is {size:,} bytes" in text, text


def test_weather_file_above_max_rows_is_refused_before_parsing():
    # One row more than the default limit: refused naming the row count and the limit,
    # from the line count alone (fast).
    rows = DEFAULT_MAX_ROWS + 1
    data = HEADER + b"0,20,10,98000\n" * rows
    start = time.perf_counter()
    with pytest.raises(InputFileError) as caught:
        read_weather_csv(data)
    seconds = time.perf_counter() - start
    text = str(caught.value)
    assert f"{rows:,} data rows" in text and f"{DEFAULT_MAX_ROWS:,}" in text, text
    assert "max_rows" in text
    # Functional bound, not a benchmark: parsing 87,841 rows would take far longer.
    assert seconds < 5.0


@pytest.mark.parametrize(
    "last_hour", [100_000_000, 10**17], ids=["1e8 (2.4 GB if allocated)", "1e17 (no array)"]
)
def test_huge_hour_index_is_refused_without_allocating(last_hour):
    # W4 (fixed in dbfbede): a 40-byte upload whose hour column jumps to 1e8 used to
    # allocate 800 MB per column before being refused. Run in a fresh process and read
    # its peak memory: VmHWM of /proc/self/status (kB), which starts afresh at exec, unlike
    # ru_maxrss, which Linux carries over from the (large) forking test process.
    code = textwrap.dedent(
        f"""
        from plantside.errors import InputFileError
        from plantside.climate.weather_csv import read_weather_csv
        try:
            read_weather_csv(b"hour,drybulb_C,dew_point_C\\n0,20,10\\n{last_hour},20,10\\n",
                             altitude=0)
        except InputFileError as error:
            print("REFUSED", error)
        with open("/proc/self/status") as status:
            peak_kb = next(int(line.split()[1]) for line in status if line.startswith("VmHWM"))
        print("PEAK_MB", peak_kb / 1024)
        """
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=False
    )
    assert result.returncode == 0, result.stderr[-2000:]
    assert "REFUSED" in result.stdout, result.stdout
    assert "row 3" in result.stdout and "'hour'" in result.stdout, result.stdout
    peak = float(re.search(r"PEAK_MB ([\d.]+)", result.stdout).group(1))
    # numpy + pandas import alone is ~100-150 MB; one column of 1e8 hours would be 800 MB.
    assert peak < 400, f"peak memory {peak:.0f} MB"


def test_timestamps_spanning_centuries_are_refused():
    data = (
        b"timestamp,drybulb_C,dew_point_C,pressure_Pa\n"
        b"1850-01-01T00:00,20,10,98000\n2150-01-01T00:00,20,10,98000\n"
    )
    with pytest.raises(InputFileError) as caught:
        read_weather_csv(data)
    assert "max_rows" in str(caught.value) and "timestamp" in str(caught.value)


def test_dashboard_weather_upload_above_its_limit_is_refused_with_the_size():
    from plantside.dashboard.state import MAX_UPLOAD_BYTES, DashboardState

    state = DashboardState(load_scenario(SCENARIOS / "linden_office_si.toml"))
    before = state.result
    data = HEADER + b"0,20,10,98000\n" * (MAX_UPLOAD_BYTES // 14 + 10)
    assert len(data) > MAX_UPLOAD_BYTES
    assert state.add_weather_file("big year.csv", data) == ""
    message = state.messages["climate"]
    assert "MB" in message and "at most" in message, message
    assert state.result is before


@pytest.mark.parametrize(
    "text",
    [
        "title = " + "[" * 10_000 + "]" * 10_000 + "\n",  # 10,000-deep inline arrays
        "x = 1\n" + "a." * 5_000 + "b = 1\n",  # a dotted key 5,000 parts deep
    ],
    ids=["nested arrays", "dotted key"],
)
def test_dashboard_scenario_upload_nested_too_deep_gets_a_message(text):
    # Found by an attack on the served page: a deeply nested upload raised an uncaught
    # RecursionError inside the TOML parser (no message; the upload button stopped).
    from plantside.dashboard.app import Dashboard

    dashboard = Dashboard(load_scenario(SCENARIOS / "linden_office_si.toml"))
    before = dashboard.state.result
    assert dashboard.load_scenario_file("deep.toml", text.encode("utf-8")) is False
    message = dashboard.state.messages["scenario"]
    assert "nested more than" in message and "deep.toml" in message, message
    assert dashboard.state.result is before


# ---------------------------------------------------------------------------------------
# zone-load CSV: size and rows
# ---------------------------------------------------------------------------------------
def test_zone_load_path_above_max_bytes_is_refused(tmp_path):
    path = tmp_path / "loads.csv"
    path.write_bytes(b"sensible_kW,latent_kW\n" + b"10,1\n" * 100)
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv(path, max_bytes=100)
    assert "522 bytes" in str(caught.value) and "at most 100" in str(caught.value)


def test_zone_load_row_count_other_than_a_year_is_refused_with_the_rows():
    data = b"sensible_kW,latent_kW\n" + b"10,1\n" * 8761
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv(data)
    assert "8761 data rows (rows 2 to 8762)" in str(caught.value)
    assert "8760 or 8784" in str(caught.value)


@pytest.mark.parametrize("form", ["bytes", "text"])
def test_z5_zone_load_content_above_max_bytes_is_refused(form):
    data = b"sensible_kW,latent_kW\n" + b"10,1\n" * 100
    source = data if form == "bytes" else data.decode()
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv(source, max_bytes=100, expected_hours=100)
    assert "100" in str(caught.value)


def test_z2_oversized_zone_load_file_is_refused_quickly():
    # 500,000 rows (2.5 MB, well under max_bytes): the row count alone rules it out, so the
    # refusal needs no parsing (Z2, fixed in c080f05: it used to take ~2 s).
    data = b"sensible_kW,latent_kW\n" + b"10,1\n" * 500_000
    start = time.perf_counter()
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv(data)
    seconds = time.perf_counter() - start
    assert "500000 data rows" in str(caught.value).replace(",", "")
    assert seconds < 0.5, f"{seconds:.2f} s to refuse"


def test_z3_missing_zone_load_path_is_an_input_file_error(tmp_path):
    with pytest.raises(InputFileError) as caught:
        read_zone_loads_csv(tmp_path / "no such loads.csv")
    assert "no such loads.csv" in str(caught.value)


# ---------------------------------------------------------------------------------------
# scenario files: size
# ---------------------------------------------------------------------------------------
def test_scenario_file_above_its_limit_is_refused(tmp_path):
    text = (SCENARIOS / "linden_office_si.toml").read_text(encoding="utf-8")
    padding = "# " + "x" * 98 + "\n"
    path = tmp_path / "big.toml"
    path.write_text(text + padding * (MAX_SCENARIO_BYTES // 100 + 1), encoding="utf-8")
    assert path.stat().st_size > MAX_SCENARIO_BYTES
    with pytest.raises(ScenarioError) as caught:
        load_scenario(path)
    assert caught.value.field == "(file)"
    assert "1000 kB" in str(caught.value)


# ---------------------------------------------------------------------------------------
# nothing an upload contains is executed or used as a path
# ---------------------------------------------------------------------------------------
def _payloads(marker: Path) -> list[str]:
    """Cell texts that would create ``marker`` if anything evaluated or ran them."""
    path = str(marker).replace("\\", "/")
    return [
        f"__import__('pathlib').Path('{path}').touch()",
        f"=cmd|' /C type nul > {path}'!A0",
        f"@SUM(1+1)*cmd|'/C touch {path}'!A0",
        f"$(touch {path})",
        f"`touch {path}`",
        f"{{{{7*7}}}}{path}",
    ]


def test_weather_cells_that_look_like_code_are_text_in_a_number(tmp_path):
    marker = tmp_path / "executed"
    for payload in _payloads(marker):
        cell = payload.replace(",", ";").encode()
        data = HEADER + _day_rows(5) + b"5," + cell + b",10,98000\n" + _day_rows(18, start=6)
        with pytest.raises(InputFileError) as caught:
            read_weather_csv(data)
        text = str(caught.value)
        assert "text where a number is expected at row 7" in text, text
        assert "'drybulb_C'" in text, text
        # Code in a header is a column name like any other (ignored, listed in the notes).
        header = b"hour,drybulb_C,dew_point_C,pressure_Pa," + payload.replace(",", ";").encode()
        weather = read_weather_csv(
            header + b"\n" + _day_rows(24).replace(b"\n", b",1\n"), altitude=0
        )
        assert weather.hours == 24
    assert not marker.exists()


def test_zone_load_cells_that_look_like_code_or_paths_are_refused_as_text(tmp_path):
    marker = tmp_path / "executed"
    for payload in [*_payloads(marker), "/etc/passwd", "../../secret.csv", "C:\\boot.ini"]:
        cell = payload.replace(",", ";").encode()
        data = b"sensible_kW,latent_kW\n" + b"10,1\n" * 3 + cell + b",1\n" + b"10,1\n" * 20
        with pytest.raises(InputFileError) as caught:
            read_zone_loads_csv(data, expected_hours=24)
        assert "row 5, column 'sensible_kW': not a number" in str(caught.value)
    assert not marker.exists()


def test_content_that_looks_like_a_path_is_never_opened(tmp_path):
    # A file on disk whose name is the upload's entire content: if the importers used the
    # content as a path they would read this valid file and succeed.
    valid = HEADER + _day_rows(24)
    target = tmp_path / "year.csv"
    target.write_bytes(valid)
    for content in (str(target).encode(), str(target).encode() + b"\n"):
        with pytest.raises(InputFileError) as caught:
            read_weather_csv(content, altitude=0)
        assert "row" in str(caught.value)
    zone_target = tmp_path / "loads.csv"
    zone_target.write_bytes(b"sensible_kW,latent_kW\n" + b"10,1\n" * 24)
    for content in (str(zone_target).encode(), (str(zone_target) + "\n").encode()):
        with pytest.raises(InputFileError):
            read_zone_loads_csv(content, expected_hours=24)
    # Text with a line break is content (documented), even if its first line is a path.
    with pytest.raises(InputFileError):
        read_zone_loads_csv(str(zone_target) + "\n", expected_hours=24)


def test_uploaded_file_name_is_a_label_only(tmp_path):
    # The dashboard's upload name is shown, never opened: a path-like name of a file that
    # does not parse must not matter; the content is what is read.
    from plantside.dashboard.state import DashboardState

    decoy = tmp_path / "decoy.csv"
    decoy.write_bytes(b"not,a,weather,file\n")
    state = DashboardState(load_scenario(SCENARIOS / "linden_office_si.toml"))
    content = (CLIMATES / "linden_vale.csv").read_bytes()
    label = state.add_weather_file(str(decoy), content)
    assert label, state.messages["climate"]
    assert state.uploaded[label].hours == 8760
    label = state.add_weather_file("../../etc/passwd\x00\n<script>", content)
    assert label and "\x00" not in label and "\n" not in label


def test_scenario_file_names_resolve_against_the_scenario_folder(tmp_path, monkeypatch):
    # The same relative name exists in the working directory (a different, broken file)
    # and in the scenario's folder (the real one): the scenario's folder wins.
    folder = tmp_path / "study"
    folder.mkdir()
    (folder / "year.csv").write_bytes((CLIMATES / "linden_vale.csv").read_bytes())
    elsewhere = tmp_path / "cwd"
    elsewhere.mkdir()
    (elsewhere / "year.csv").write_bytes(b"this,is,not,it\n")
    monkeypatch.chdir(elsewhere)
    text = textwrap.dedent(
        """
        unit_system = "SI"
        [site]
        weather_file = "year.csv"
        weather_units = "SI"
        altitude = 310
        [[air_handler]]
        name = "AHU-1"
        [air_handler.zone]
        cooling_design_sensible = 50.0
        """
    )
    path = folder / "study.toml"
    path.write_text(text, encoding="utf-8")
    scenario = load_scenario(path)
    assert scenario.load_weather().hours == 8760
    # From text, names resolve against the base_dir given, and a missing one is an error
    # naming the field and the folder looked in (not the working directory's file).
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text, "upload.toml", tmp_path / "empty")
    assert caught.value.field == "site.weather_file"
    assert str(tmp_path / "empty") in str(caught.value)


def test_scenario_strings_that_look_like_paths_or_code_stay_text(tmp_path):
    marker = tmp_path / "executed"
    base = (SCENARIOS / "linden_office_si.toml").read_text(encoding="utf-8")
    for payload in [*_payloads(marker), "/etc/passwd", "../../../etc/shadow"]:
        quoted = payload.replace("\\", "\\\\").replace('"', '\\"')
        text = re.sub(r'^title = ".*"$', f'title = "{quoted}"', base, count=1, flags=re.M)
        text = text.replace('name = "AHU-1"', f'name = "{quoted}"', 1)
        scenario = loads_scenario(text, "upload.toml", SCENARIOS)
        assert scenario.title == payload
        assert scenario.air_handlers[0].settings.name == payload
        dumps_scenario(scenario)
        # A climate that looks like a path is an unknown climate, not a file.
        bad = text.replace('climate = "Linden Vale"', f'climate = "{quoted}"', 1)
        with pytest.raises(ScenarioError) as caught:
            loads_scenario(bad, "upload.toml", SCENARIOS)
        assert caught.value.field.startswith("site.climate")
    assert not marker.exists()
    assert os.path.exists(SCENARIOS / "linden_office_si.toml")


@pytest.mark.parametrize("name", ["ABSOLUTE", "../climates/linden_vale.csv", "sub/../../x.csv"])
def test_uploaded_scenario_cannot_name_files_outside_its_folder(name, tmp_path):
    # files="inside" (for uploads, S1): absolute names and names leading out of the
    # scenario's folder are refused naming the field, before anything is read.
    folder = tmp_path / "upload"
    folder.mkdir()
    (tmp_path / "climates").mkdir()
    (tmp_path / "climates" / "linden_vale.csv").write_bytes(
        (CLIMATES / "linden_vale.csv").read_bytes()
    )
    # Every target exists and is a valid year: only the folder rule can refuse it.
    (folder / "sub").mkdir()
    (tmp_path / "x.csv").write_bytes((CLIMATES / "linden_vale.csv").read_bytes())
    if name == "ABSOLUTE":
        name = str(tmp_path / "x.csv").replace("\\", "/")
    text = textwrap.dedent(
        f"""
        unit_system = "SI"
        [site]
        weather_file = "{name}"
        altitude = 310
        [[air_handler]]
        name = "AHU-1"
        [air_handler.zone]
        cooling_design_sensible = 50.0
        """
    )
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text, "upload.toml", folder, files="inside")
    assert caught.value.field == "site.weather_file"
    assert "inside the scenario's folder" in str(caught.value), str(caught.value)
    if name == "../climates/linden_vale.csv":
        # The same name is followed for the user's own files (the default, "any").
        scenario = loads_scenario(text, "own.toml", folder)
        assert scenario.load_weather().hours == 8760


def test_uploaded_scenario_may_name_a_file_inside_its_folder(tmp_path):
    (tmp_path / "year.csv").write_bytes((CLIMATES / "linden_vale.csv").read_bytes())
    text = textwrap.dedent(
        """
        unit_system = "SI"
        [site]
        weather_file = "year.csv"
        altitude = 310
        [[air_handler]]
        name = "AHU-1"
        [air_handler.zone]
        cooling_design_sensible = 50.0
        """
    )
    scenario = loads_scenario(text, "upload.toml", tmp_path, files="inside")
    assert scenario.load_weather().hours == 8760


# ------------------------------------------------------------------ limits before the work
def _scenario_of(count: int) -> str:
    head, *units = (SCENARIOS / "linden_office_si.toml").read_text("utf-8").split("[[air_handler]]")
    name = units[0].split('"')[1]
    return head + "".join(
        "[[air_handler]]" + units[0].replace(f'"{name}"', f'"AHU-{i}"', 1) for i in range(count)
    )


def test_more_air_handlers_than_the_limit_are_refused_before_the_work():
    # MAX_AIR_HANDLERS (50, common practice: a plant serves a few to a few dozen units);
    # a first attack uploaded 400 (22 s of CPU, 1.5 GB). The limit itself loads.
    from plantside.study.scenario import MAX_AIR_HANDLERS

    assert len(loads_scenario(_scenario_of(MAX_AIR_HANDLERS), "ok.toml").air_handlers) == 50
    start = time.perf_counter()
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(_scenario_of(400), "big.toml")
    assert time.perf_counter() - start < 2.0  # parsing only: nothing is computed
    assert caught.value.field == "air_handler"
    assert "400 [[air_handler]] tables is more than the 50 allowed" in str(caught.value)


@pytest.mark.parametrize(
    "data",
    [
        b"\x89PNG\r\n\x1a\n" + bytes(range(1, 256)) * 8,  # a PNG signature, no NUL byte
        bytes(range(1, 256)) * 8,  # binary without NUL bytes
        b"PK\x03\x04" + b"x" * 200,  # a ZIP (.xlsx) signature
    ],
    ids=["png", "binary", "xlsx"],
)
def test_a_file_that_is_not_text_gets_a_plain_message(data):
    # No codec error and no column hunt in binary junk: one problem saying what it is.
    for read in (read_weather_csv, read_zone_loads_csv):
        with pytest.raises(InputFileError) as caught:
            read(data)
        assert caught.value.problems == [caught.value.problems[0]]
        problem = caught.value.problems[0]
        assert problem.startswith("row 1: the file is not text (") and "codec" not in problem
