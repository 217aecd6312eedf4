"""Fuzzing of sweep files (``plantside.study.sweep.loads_sweep`` / ``load_sweep``).

The example sweep (``example_data/sweeps/clinic_oa_by_climate.toml``) is parsed,
mutated at random (hypothesis) and written back: keys dropped, renamed or added, values
replaced by other types (the scenario fuzz's pool: huge and tiny numbers, NaN, strings
that look like paths or formulas, tables and lists), axes added on fields that do and
do not exist, axis ranges with bad counts, other climates and base files; then the text
is damaged (truncated, junk bytes, other encodings). Every outcome must be

- a :class:`~plantside.study.sweep.Sweep` of 1 to ``MAX_CASES`` cases, or
- a :class:`~plantside.errors.ScenarioError` whose message starts with the file and
  names the field (``sweep.axes."air_handler[2].supply_drybulb"``, ``sweep.climates``,
  ``(syntax)``, ``(file)``),

never any other exception. The number of cases run is printed at the end of the module.
"""

from __future__ import annotations

import tomllib
from collections import Counter
from pathlib import Path

import tomli_w
from fuzz_counts import case_count_fixture, examples
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from plantside.errors import ScenarioError
from plantside.study.sweep import MAX_CASES, Sweep, load_sweep, loads_sweep
from test_fuzz_scenario import _copy, _get, _leaf_paths, values
from toml_damage import DAMAGES, damaged_bytes

SWEEPS = Path(__file__).parents[1] / "example_data" / "sweeps"
EXAMPLE = SWEEPS / "clinic_oa_by_climate.toml"
BASE = tomllib.loads(EXAMPLE.read_text(encoding="utf-8"))

OUTCOMES: Counter = Counter()
_print_case_count = case_count_fixture(OUTCOMES, "sweep TOML fuzz")

AXIS_FIELDS = [
    "air_handler[2].minimum_outdoor_air_fraction",
    "air_handler[1].supply_drybulb",
    "air_handler[9].supply_drybulb",
    "air_handler[0].supply_drybulb",
    "air_handler[-1].supply_drybulb",
    "air_handler[2].supply_drybulbb",
    "air_handler[2].zone.cooling_design_sensible",
    "air_handler[2].economizer",
    "air_handler[2].name",
    "plant.cooling_margin_percent",
    "site.climate",
    "site.altitude",
    "unknown",
    "",
    "x" * 5000,
]
AXIS_VALUES = st.one_of(
    st.fixed_dictionaries(
        {"start": values, "stop": values, "num": st.one_of(st.integers(-5, 20_000), values)}
    ),
    st.just({"start": 0.1, "stop": 0.4, "num": 7}),
    st.just({"start": 0.1, "stop": 0.4, "num": 10**9}),
    st.just({"start": 0.1, "num": 3}),
    st.lists(values, max_size=4),
    st.lists(st.sampled_from([0.1, 0.2, 0.3]), min_size=1, max_size=3),
    st.just(["fixed_drybulb", "differential_enthalpy", "fixed_enthalpy"]),
    values,
)
CLIMATES = st.one_of(
    st.just("all"),
    st.just("none"),
    st.lists(st.sampled_from(["Salvia Flats", "Port Calder", "Atlantis", "", "x" * 5000])),
    values,
)
BASES = ["../scenarios/quillon_clinic.toml", "quillon_clinic.toml", "/etc/passwd", "", "x" * 5000]


@st.composite
def mutated_sweeps(draw):
    document = _copy(BASE)
    for _ in range(draw(st.integers(1, 4))):
        kind = draw(st.sampled_from(["drop", "set", "axis", "climates", "base", "key", "top"]))
        sweep = document.get("sweep")
        if kind == "top":
            key = draw(st.sampled_from(["sweep", "title", "air_handler", "unit_system"]))
            document[key] = draw(values)
            continue
        if not isinstance(sweep, dict):
            continue
        if kind == "axis":
            axes = sweep.setdefault("axes", {})
            if isinstance(axes, dict):
                # copies: st.just draws the same object each time, and later steps edit
                # it (an example then differs when replayed: FlakyStrategyDefinition)
                axes[draw(st.sampled_from(AXIS_FIELDS))] = _copy(draw(AXIS_VALUES))
        elif kind == "climates":
            sweep[draw(st.sampled_from(["climates", "climate_folder"]))] = _copy(draw(CLIMATES))
        elif kind == "base":
            sweep["base"] = draw(st.one_of(st.sampled_from(BASES), values))
        elif kind == "key":
            key = draw(st.sampled_from(["titel", "axis", "cases", "workers", "x", "water_side"]))
            sweep[key] = draw(st.one_of(st.booleans(), values))
        else:
            paths = _leaf_paths(document)
            if not paths:
                continue
            path = draw(st.sampled_from(paths))
            parent = _get(document, path[:-1])
            if kind == "drop":
                del parent[path[-1]]
            else:
                parent[path[-1]] = draw(values)
    return document


def judge(call, source: str):
    """Load a sweep; return the Sweep or the ScenarioError; fail on anything else."""
    try:
        sweep = call()
    except ScenarioError as error:
        assert error.field, error
        text = str(error)
        # the sweep file, or the base scenario it names (an error inside that file)
        assert (
            text.startswith(f"{source}: ")
            or error.source.endswith(".toml")
            or (Path(error.source).is_file())
        ), text[:300]
        # the field is named (as an excerpt when it is long, e.g. a 5,000-character key)
        assert error.field in text or "..." in text.split(": ")[1], text[:300]
        assert len(text) < 20_000, "message too long to show"
        OUTCOMES["refused (ScenarioError)"] += 1
        return error
    assert isinstance(sweep, Sweep)
    assert 1 <= sweep.size <= MAX_CASES
    OUTCOMES["loaded"] += 1
    return sweep


def test_the_example_sweep_loads():
    # 7 outdoor-air fractions x 5 bundled climates (the file's own comment).
    sweep = judge(lambda: load_sweep(EXAMPLE), str(EXAMPLE))
    assert sweep.size == 35


@settings(max_examples=examples(150), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated_sweeps())
def test_mutated_sweeps_load_or_fail_with_a_field(document):
    try:
        text = tomli_w.dumps(document)
    except (TypeError, ValueError):
        return  # not expressible as TOML: nothing to read
    judge(lambda: loads_sweep(text, "sweep.toml", SWEEPS), "sweep.toml")


@settings(max_examples=examples(80), deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    damage=st.sampled_from(DAMAGES[1:]),
    encoding=st.sampled_from(["utf-8", "utf-16", "latin-1"]),
    data=st.data(),
)
def test_damaged_sweep_files_load_or_fail_with_a_field(damage, encoding, data):
    raw = damaged_bytes(EXAMPLE.read_text(encoding="utf-8"), damage, encoding, data)

    def load():
        from plantside.study.toml_input import read_toml_text

        return loads_sweep(read_toml_text(raw, "sweep.toml"), "sweep.toml", SWEEPS)

    judge(load, "sweep.toml")


def test_sw1_a_base_name_too_long_for_the_file_system_names_the_field():
    # Found by the long run: a 5,000-character base name raised OSError (name too long).
    text = EXAMPLE.read_text(encoding="utf-8").replace(
        "../scenarios/quillon_clinic.toml", "x" * 5000, 1
    )
    error = judge(lambda: loads_sweep(text, "sweep.toml", SWEEPS), "sweep.toml")
    assert isinstance(error, ScenarioError) and error.field == "sweep.base"
    assert len(str(error)) < 400  # the name is quoted as an excerpt
