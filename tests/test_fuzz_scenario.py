"""Fuzzing of scenario files (``plantside.study.scenario.loads_scenario`` / ``load_scenario``).

The example scenarios are parsed, mutated at random (hypothesis) and written back:
keys dropped, renamed or added, values replaced by other types, huge and tiny numbers,
NaN and infinity, strings that look like paths or formulas, tables replaced by lists,
air handlers repeated; then the text is damaged (truncated, junk inserted, CRLF,
byte-order mark, other encodings). Every outcome must be

- a :class:`~plantside.study.scenario.Scenario` that saves and loads back to the same text
  (``dumps_scenario`` round trip) and whose files (weather, zone loads), if any, load or
  fail with ``ScenarioError``, or
- :class:`~plantside.errors.ScenarioError` naming the file and the field (a dotted path
  such as ``air_handler[2].supply_drybulb``, or ``(syntax)`` / ``(file)``),

never any other exception. The number of cases run is printed at the end of the module.
"""

from __future__ import annotations

import math
import re
import tomllib
import traceback
from collections import Counter
from dataclasses import replace
from pathlib import Path

import pytest
import tomli_w
from fuzz_counts import case_count_fixture, examples
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from plantside.errors import ScenarioError
from plantside.study.scenario import Scenario, dumps_scenario, load_scenario, loads_scenario
from toml_damage import DAMAGES, damaged_bytes

SCENARIOS = Path(__file__).parents[1] / "example_data" / "scenarios"
EXAMPLES = sorted(SCENARIOS.glob("*.toml"))
BASES = {path.name: tomllib.loads(path.read_text(encoding="utf-8")) for path in EXAMPLES}

#: Cases run per outcome; printed at the end of the module.
OUTCOMES: Counter = Counter()
_print_case_count = case_count_fixture(OUTCOMES, "scenario TOML fuzz")

#: Defects found here: (exception type, plantside function in the traceback, text of its
#: line) -> id. Counted, not failed, while unfixed; each has a strict xfail test below, and
#: its entry must go once the fix lands.
KNOWN_DEFECTS: dict[tuple[type, str, str], str] = {}  # S2 fixed in deb230c

# The section part of a field: a dotted path of known table names with list positions.
_FIELD = re.compile(r"^[a-z_]+(\[\d+\])?([.][a-z_]+(\[\d+\])?)*$")

STRINGS = [
    "",
    "none",
    "Salvia Flats",
    "salvia flats",
    "Atlantis",
    "../../../../etc/passwd",
    "/etc/passwd",
    "C:\\Windows\\win.ini",
    "korva_school_zone_loads.csv",
    "../climates/mesa_ardiente.csv",
    "=cmd|' /C calc'!A0",
    "__import__('os').system('true')",
    "${HOME}",
    "~/year.csv",
    "x" * 5000,
    "Ünïcödé 🚀",
    "\u202eevil",
    "SI",
    "IP",
    "si",
    "metric",
    "variable_volume",
    "fixed_enthalpy",
    "reheat",
]
NUMBERS = [
    0,
    -1,
    1,
    2,
    10**30,
    -(10**30),
    0.0,
    -0.0,
    1e308,
    -1e308,
    5e-324,
    1e-300,
    math.nan,
    math.inf,
    -math.inf,
    0.5,
    0.95,
    99.6,
    0.4,
    55.0,
    4500.0,
]


def _leaf_paths(node, prefix=()):
    """Every path to a value (table keys and list indices), tables included."""
    paths = []
    if isinstance(node, dict):
        for key, value in node.items():
            paths.append((*prefix, key))
            paths += _leaf_paths(value, (*prefix, key))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            paths.append((*prefix, index))
            paths += _leaf_paths(value, (*prefix, index))
    return paths


def _get(node, path):
    for step in path:
        node = node[step]
    return node


def _copy(node):
    if isinstance(node, dict):
        return {k: _copy(v) for k, v in node.items()}
    if isinstance(node, list):
        return [_copy(v) for v in node]
    return node


values = st.one_of(
    st.sampled_from(STRINGS),
    st.sampled_from(NUMBERS),
    st.booleans(),
    # fresh containers each draw (mutations may edit them later)
    st.builds(list),
    st.builds(dict),
    st.lists(st.sampled_from(NUMBERS), max_size=5),
    st.builds(lambda: {"name": "x"}),
    st.text(max_size=30),
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(min_value=-(2**63), max_value=2**63 - 1),
)


@st.composite
def mutated_documents(draw):
    name = draw(st.sampled_from(sorted(BASES)))
    document = _copy(BASES[name])
    for _ in range(draw(st.integers(1, 4))):
        paths = _leaf_paths(document)
        kind = draw(st.sampled_from(["drop", "set", "add", "rename", "repeat_unit", "top"]))
        if kind == "top":
            key = draw(st.sampled_from(["unit_system", "title", "site", "plant", "air_handler"]))
            if draw(st.booleans()):
                document.pop(key, None)
            else:
                document[key] = draw(values)
            continue
        if not paths:
            continue
        path = draw(st.sampled_from(paths))
        parent = _get(document, path[:-1])
        last = path[-1]
        if kind == "drop":
            del parent[last]
        elif kind == "set":
            parent[last] = draw(values)
        elif kind == "add" and isinstance(parent, dict):
            new_key = draw(
                st.sampled_from(
                    ["supply_airflw", "zone", "climate", "weather_file", "zone_load_file",
                     "unknown", "SUPPLY_AIRFLOW", "altitude", "fill_gaps", "weather_units"]
                )
            )  # fmt: skip
            parent[new_key] = draw(values)
        elif kind == "rename" and isinstance(parent, dict) and isinstance(last, str):
            parent[last.upper() if draw(st.booleans()) else last + "s"] = parent.pop(last)
        elif kind == "repeat_unit" and isinstance(document.get("air_handler"), list):
            units = document["air_handler"]
            if units:
                units.append(_copy(draw(st.sampled_from(units))))
    return name, document


def _known_defect(error: BaseException) -> str | None:
    frames = traceback.extract_tb(error.__traceback__)
    ours = [f for f in frames if "/plantside/" in f.filename.replace("\\", "/")]
    for (kind, function, code), defect in KNOWN_DEFECTS.items():
        if isinstance(error, kind) and any(
            f.name == function and code in (f.line or "") for f in ours
        ):
            return defect
    return None


def judge(call, source: str):
    """Run a scenario load; return the Scenario or the ScenarioError; fail on anything else."""
    try:
        scenario = call()
    except ScenarioError as error:
        # The field is a dotted path to the value (its last part the key as written in
        # the file, e.g. an unknown key), or a marker for the whole file.
        field = error.field
        assert field and _FIELD.match(field.rpartition(".")[0] or "file"), error
        assert str(error).startswith(f"{source}: {error.field}: "), str(error)
        assert len(str(error)) < 20_000, "message too long to show"
        OUTCOMES["refused (ScenarioError)"] += 1
        return error
    except Exception as error:
        defect = _known_defect(error)
        if defect is None:
            raise
        OUTCOMES[f"known defect {defect} (reported)"] += 1
        return error
    assert isinstance(scenario, Scenario)
    assert scenario.air_handlers
    # A scenario that loads saves and loads back to the same text (what the dashboard's
    # "save" and "open" do).
    text = dumps_scenario(scenario)
    again = loads_scenario(text, "again.toml", SCENARIOS)
    assert dumps_scenario(again) == text
    # Files it names load, or fail with ScenarioError naming the field.
    if scenario.climate is None:
        try:
            scenario.load_weather()
        except ScenarioError as error:
            assert error.field == "site.weather_file", error
    for index, spec in enumerate(scenario.air_handlers):
        if spec.zone_load_file is not None:
            try:
                scenario.zone_loads(index)
            except ScenarioError as error:
                assert error.field == f"air_handler[{index + 1}].zone_load_file", error
    OUTCOMES["loaded"] += 1
    return scenario


def test_the_examples_load():
    for path in EXAMPLES:
        assert isinstance(judge(lambda p=path: load_scenario(p), str(path)), Scenario)


@settings(max_examples=examples(200), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated_documents())
def test_mutated_scenarios_load_or_fail_with_a_field(case):
    name, document = case
    try:
        text = tomli_w.dumps(document)
    except (TypeError, ValueError):
        return  # not expressible as TOML (e.g. a list of mixed tables): nothing to read
    judge(lambda: loads_scenario(text, name, SCENARIOS), name)


@settings(max_examples=examples(120), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    path=st.sampled_from(EXAMPLES),
    damage=st.sampled_from(DAMAGES),
    encoding=st.sampled_from(["utf-8", "utf-8-sig", "utf-16", "latin-1", "cp1252"]),
    data=st.data(),
)
def test_damaged_scenario_files_load_or_fail_with_a_field(
    tmp_path_factory, path, damage, encoding, data
):
    raw = damaged_bytes(path.read_text(encoding="utf-8"), damage, encoding, data)
    # Written beside the example's files so relative names still resolve.
    folder = tmp_path_factory.mktemp("scenario")
    for other in SCENARIOS.iterdir():
        if other.suffix == ".csv":
            (folder / other.name).symlink_to(other)
    climates = folder.parent / "climates"
    if not climates.exists():
        climates.symlink_to(SCENARIOS.parent / "climates", target_is_directory=True)
    target = folder / path.name
    target.write_bytes(raw)
    judge(lambda: load_scenario(target), str(target))


@settings(max_examples=examples(100), deadline=None)
@given(st.text(max_size=400))
def test_arbitrary_text_never_raises_anything_else(text):
    judge(lambda: loads_scenario(text, "upload.toml", SCENARIOS), "upload.toml")


def test_unknown_key_gets_a_suggestion_and_the_allowed_keys():
    # Spot check of the message quality the fuzz only checks for form.
    text = (SCENARIOS / "linden_office_si.toml").read_text(encoding="utf-8")
    bad = text.replace("supply_airflow = 4200.0", "supply_airflw = 4200.0", 1)
    error = judge(lambda: loads_scenario(bad, "office.toml", SCENARIOS), "office.toml")
    assert isinstance(error, ScenarioError)
    assert error.field == "air_handler[1].supply_airflw"
    assert "did you mean 'supply_airflow'" in str(error)


# ---------------------------------------------------------------------------------------
# defects found by the fuzz (S2-S4), fixed in deb230c: kept as regressions
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("value", ["", "metric", "kelvin"])
def test_s2_bad_weather_units_names_the_field(value):
    text = (SCENARIOS / "mesa_lab_weather_file.toml").read_text(encoding="utf-8")
    bad = text.replace('weather_units = "SI"', f'weather_units = "{value}"', 1)
    assert bad != text
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(bad, "lab.toml", SCENARIOS)
    assert caught.value.field == "site.weather_units"


@pytest.mark.parametrize("title", ["Ward A\nfoo = 1", "Ward A\r\nB", "Ward\x0cA", "Ward\x7f"])
def test_s3_saved_scenario_with_any_title_opens_again(title):
    scenario = replace(load_scenario(SCENARIOS / "linden_office_si.toml"), title=title)
    again = loads_scenario(dumps_scenario(scenario), "saved.toml", SCENARIOS)
    assert again.title == title


@pytest.mark.parametrize(
    ("old", "new", "field"),
    [
        ('climate = "Linden Vale"', 'climate = "Atlantis"', "site.climate"),
        ('efficiency_metric = "cop"', 'efficiency_metric = "mpg"',
         "plant.cooling_option[1].efficiency_metric"),
    ],
)  # fmt: skip
def test_s4_bad_choice_names_its_field(old, new, field):
    text = (SCENARIOS / "linden_office_si.toml").read_text(encoding="utf-8")
    assert old in text
    with pytest.raises(ScenarioError) as caught:
        loads_scenario(text.replace(old, new, 1), "office.toml", SCENARIOS)
    assert caught.value.field == field
    assert "unknown key" not in str(caught.value)
