"""How each figure and chart is worked out (issue 14, "every number traceable").

Each derivation's last number is the figure the views show (the command line's
``plantside design --json`` and the design report's cells), each step's arithmetic
holds in the display units, every derivation names a source, nothing is NaN. The
air states are checked against psychrolib 2.5 (an implementation of ASHRAE Handbook
Fundamentals 2017 Ch. 1, independent of this project), the water density against
CoolProp (IAPWS-95), the IPLV weights against AHRI Standard 550/590 (1, 42, 45, 12 %).
"""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np
import psychrolib
import pytest
from CoolProp.CoolProp import PropsSI
from plantside.charts.derivation_html import (
    DERIVATION_STYLE,
    derivation_html,
    derivations_html,
    report_derivations,
    view_derivations,
)
from plantside.charts.labels import condition_text
from plantside.charts.report import HEADLINE_FIGURES, _value_text
from plantside.charts.study_frames import CHARTS, chart_frames, study_chart_views
from plantside.study.derivations import (
    CHART_KEYS,
    HEADLINE_KEYS,
    Check,
    Derivation,
    StatePoint,
    headline_derivations,
    number_text,
)
from plantside.study.figures import first_recirculating_unit, headline_figures
from plantside.study.run import run_study, study_summary
from plantside.study.scenario import load_scenario
from plantside.study.water_side_run import run_water_side
from plantside.units import from_display, to_display

SCENARIOS = Path(__file__).resolve().parents[1] / "example_data" / "scenarios"
NAMES = ("quillon_clinic.toml", "linden_office_si.toml")

#: Headline figure -> quantity shown (None: a number as it is; "hours": a count).
QUANTITY = {field: quantity for field, _, quantity, _ in HEADLINE_FIGURES}


@pytest.fixture(scope="module", params=NAMES)
def study(request):
    result = run_study(load_scenario(SCENARIOS / request.param))
    return result, run_water_side(result)


def _views(result, water, system):
    """(key, view, derivations) of the plant and every air handler."""
    out = []
    shown = first_recirculating_unit(result.scenario)
    for key, view in study_chart_views(result, "test", shown):
        derivations = view_derivations(
            result.scenario, result.air_handlers, view, system, water_side=water
        )
        out.append((key, view, derivations))
    return out


def _evaluate(check: Check) -> float:
    return float(eval(check.formula, {"max": max, "__builtins__": {}}, dict(check.operands)))


@pytest.mark.parametrize("system", ["IP", "SI"])
def test_final_numbers_are_the_figures_shown(study, system):
    """The last number of each headline derivation is the figure the views show: the
    same text as the report's cell (and the dashboard's card, the same rule), and the
    same value as ``headline_figures`` in display units."""
    result, water = study
    for _, view, derivations in _views(result, water, system):
        assert tuple(derivations)[: len(HEADLINE_KEYS)] == HEADLINE_KEYS
        figures = view.figures
        for field in HEADLINE_KEYS:
            derivation = derivations[field]
            if field == "governing_condition":
                assert derivation.value_text == condition_text(figures.governing, system)
                continue
            quantity = QUANTITY[field]
            digits = next(d for f, _, _, d in HEADLINE_FIGURES if f == field)
            text, unit = _value_text(quantity, getattr(figures, field), digits, system)
            assert derivation.value_text == (f"{text} {unit}" if unit != "-" else text)
            if quantity in ("power", "energy"):
                shown = float(to_display(quantity, getattr(figures, field), system)[0])
                assert derivation.value == pytest.approx(shown, rel=1e-12)
            else:
                assert derivation.value == pytest.approx(float(getattr(figures, field)))
            # the last step ends on the figure as shown
            assert derivation.steps[-1].endswith(derivation.value_text), derivation.steps[-1]
            assert derivation.checks[-1].result == pytest.approx(derivation.value, rel=1e-12)


def test_final_numbers_equal_the_command_lines_json(study, tmp_path):
    """``plantside design --json`` (SI) gives the numbers the SI derivations end on."""
    result, water = study
    name = next(n for n in NAMES if result.scenario.title == load_scenario(SCENARIOS / n).title)
    out = subprocess.run(
        [sys.executable, "-m", "plantside.cli", "design", str(SCENARIOS / name), "--json"],
        capture_output=True,
        text=True,
        check=True,
        cwd=tmp_path,
    )
    summary = json.loads(out.stdout)
    assert summary["cooling_plant"]["design_load_kW"] == pytest.approx(
        study_summary(result)["cooling_plant"]["design_load_kW"]
    )
    views = {key: d for key, _, d in _views(result, water, "SI")}
    plant = views[None]
    cooling = summary["cooling_plant"]
    assert plant["design_coil_load"].value == pytest.approx(cooling["design_load_kW"], rel=1e-9)
    assert plant["recommended_capacity"].value == pytest.approx(
        cooling["design_capacity_kW"], rel=1e-9
    )
    assert plant["peak_coil_load"].value == pytest.approx(cooling["annual_peak_kW"], rel=1e-9)
    # energy in MWh on the SI page
    assert plant["cooling_energy"].value == pytest.approx(
        cooling["annual_energy_kWh"] / 1000.0, rel=1e-9
    )
    assert plant["design_zone_load"].value == pytest.approx(cooling["design_zone_kW"], rel=1e-9)
    assert plant["hours_above_threshold"].value == cooling["hours_above_75_percent_of_capacity"]
    for index, unit in enumerate(summary["air_handlers"]):
        mine = views[index]
        assert mine["design_coil_load"].value == pytest.approx(unit["design_coil_total_kW"])
        assert mine["design_zone_load"].value == pytest.approx(unit["design_zone_kW"])
        assert mine["recommended_capacity"].value == pytest.approx(unit["design_capacity_kW"])
        assert mine["peak_coil_load"].value == pytest.approx(unit["annual_peak_coil_total_kW"])
        assert mine["hours_above_threshold"].value == unit["hours_above_75_percent_of_capacity"]


@pytest.mark.parametrize("system", ["IP", "SI"])
def test_every_step_adds_up(study, system):
    """Each step's formula, on its operands in display units, gives its result; the
    result printed is the number the step ends on; no NaN anywhere."""
    result, water = study
    checked = 0
    for _, _, derivations in _views(result, water, system):
        for derivation in derivations.values():
            assert derivation.source.strip(), derivation.key
            assert len(derivation.checks) == len(derivation.steps) >= 1
            assert "nan" not in derivation.value_text.lower()
            assert math.isfinite(derivation.value), derivation.key
            arithmetic = [c for c in derivation.checks if c.formula]
            # a choice, or a unit without return air swept at its one (100 %) fraction
            if derivation.key != "governing_condition" and "(1 fraction," not in derivation.title:
                assert arithmetic, derivation.key
            for step, check in zip(derivation.steps, derivation.checks, strict=True):
                assert "nan" not in step.lower(), step
                assert math.isfinite(check.result), step
                assert all(math.isfinite(v) for v in check.operands.values()), step
                if not check.formula:
                    continue
                assert _evaluate(check) == pytest.approx(check.result, rel=1e-9, abs=1e-9), step
                checked += 1
            for point in derivation.state_points:
                assert all(math.isfinite(v) for v in point[1:]), point
    assert checked > 40


def test_printed_numbers_add_up(study):
    """The numbers as printed add up too, to their rounding: every "a + b + ... = c"
    step of the sums, read back from its text."""
    result, water = study
    read = 0
    for _, _, derivations in _views(result, water, "SI"):
        for key in ("design_zone_load", "design", "cooling_energy"):
            for step in derivations[key].steps:
                match = re.search(r"= ([-\d.,]+(?: [+−] [\d.,]+)+) \S+ = ([\d.,]+)", step)
                if not match:
                    continue
                terms = re.findall(r"([+−]?) ?([\d.,]+)", match.group(1))
                total = sum((-1 if s == "−" else 1) * float(n.replace(",", "")) for s, n in terms)
                shown = float(match.group(2).replace(",", ""))
                # each term rounded to half its last digit (at most 0.05 here) and the total
                assert abs(total - shown) <= 0.05 * len(terms) + 0.5, step
                read += 1
    assert read >= 6


@pytest.mark.parametrize("system", ["IP", "SI"])
def test_air_states_against_psychrolib(study, system):
    """The psychrometric derivation's states: enthalpy and relative humidity from dry
    bulb and humidity ratio by psychrolib 2.5 (ASHRAE Handbook Fundamentals 2017 Ch. 1,
    Eq. 30 and Eq. 22), in the same unit system."""
    result, water = study
    for _, view, derivations in _views(result, water, system):
        point = view.unit.cooling_design.points[view.unit.cooling_design.governing]
        pressure = float(point.row["pressure_Pa"])
        derivation = derivations["psychrometric"]
        assert len(derivation.state_points) >= 6
        for state in derivation.state_points:
            if system == "IP":
                psychrolib.SetUnitSystem(psychrolib.IP)
                w = state.humidity_ratio / 7000.0  # gr/lb -> lb/lb (7000 gr = 1 lb, exact)
                h = psychrolib.GetMoistAirEnthalpy(state.drybulb, w)  # Btu/lb
                p = pressure / 6894.757293168  # psi (NIST SP 811)
                # the I-P form of Eq. 30 (0.240, 1061, 0.444) rounds the SI one's
                # coefficients: 0.03 Btu/lb apart at 90 °F and 147 gr/lb
                assert state.enthalpy == pytest.approx(h, abs=0.05), state
            else:
                psychrolib.SetUnitSystem(psychrolib.SI)
                w = state.humidity_ratio / 1000.0
                h = psychrolib.GetMoistAirEnthalpy(state.drybulb, w) / 1000.0  # kJ/kg
                p = pressure
                assert state.enthalpy == pytest.approx(h, abs=0.05), state
            rh = psychrolib.GetRelHumFromHumRatio(state.drybulb, w, p) * 100.0
            assert state.relative_humidity == pytest.approx(min(rh, 100.0), abs=0.5), state


def test_coil_step_is_the_handbook_equation(study):
    """q = m_da [(h1 - h2) - (W1 - W2) h_w2] (Fundamentals 2017 Ch. 1, cooling and
    dehumidification), redone here from psychrolib enthalpies of the coil's entering and
    leaving states and CoolProp's liquid-water enthalpy above 0 °C."""
    result, _ = study
    psychrolib.SetUnitSystem(psychrolib.SI)
    for unit in result.air_handlers:
        point = unit.cooling_design.points[unit.cooling_design.governing]
        states = point.states
        m = float(point.row["supply_mass_flow_kgs"])
        h1 = psychrolib.GetMoistAirEnthalpy(
            states.loc["coil_entering", "drybulb_C"],
            states.loc["coil_entering", "humidity_ratio_kgkg"],
        )
        h2 = psychrolib.GetMoistAirEnthalpy(
            states.loc["coil_leaving", "drybulb_C"],
            states.loc["coil_leaving", "humidity_ratio_kgkg"],
        )
        dw = (
            states.loc["coil_entering", "humidity_ratio_kgkg"]
            - states.loc["coil_leaving", "humidity_ratio_kgkg"]
        )
        t2 = states.loc["coil_leaving", "drybulb_C"] + 273.15
        h_w2 = PropsSI("H", "T", t2, "Q", 0, "Water") - PropsSI("H", "T", 273.16, "Q", 0, "Water")
        q = m * ((h1 - h2) - dw * h_w2) / 1000.0
        figures = headline_figures(
            result.scenario,
            result.air_handlers,
            result.conditions,
            air_handler=result.air_handlers.index(unit),
        )
        derivation = headline_derivations(
            result.scenario,
            result.air_handlers,
            figures,
            "SI",
            result.air_handlers.index(unit),
        )["design_coil_load"]
        assert derivation.value == pytest.approx(q, rel=2e-3)
        assert "ṁ·(h_entering − h_leaving)" in derivation.steps[0]


@pytest.fixture(scope="module")
def clinic():
    """The study with water-side tables (chilled water, tower, hot water)."""
    result = run_study(load_scenario(SCENARIOS / "quillon_clinic.toml"))
    return result, run_water_side(result)


def test_water_flow_against_coolprop(clinic):
    """The design chilled-water flow: Q / (rho c_p dT) with rho and c_p of liquid water at
    the mean water temperature from CoolProp (IAPWS-95) within 0.5 %."""
    result, water = clinic
    assert water is not None and water.chiller_options
    plant = {key: d for key, _, d in _views(result, water, "SI")}[None]
    derivation = plant["water"]
    mean = derivation.checks[0].result
    load = derivation.checks[1].operands["q"]
    dt = derivation.checks[1].operands["d"]
    rho = PropsSI("D", "T", mean + 273.15, "P", 101325.0, "Water")
    cp = PropsSI("C", "T", mean + 273.15, "P", 101325.0, "Water") / 1000.0
    flow_lps = load / (rho * cp * dt) * 1000.0
    assert derivation.value == pytest.approx(flow_lps, rel=5e-3)
    _, ws = next(iter(water.chiller_options))
    assert from_display("water_flow", derivation.value, "SI") == pytest.approx(
        ws.design["chilled_water_flow_m3s"]
    )


def test_iplv_weights_are_ahri(study):
    """The distribution chart's step names AHRI 550/590's weights 1, 42, 45, 12 %."""
    result, water = study
    for _, _, derivations in _views(result, water, "IP"):
        derivation = derivations["distribution"]
        assert "AHRI 550/590 1 %, 42 %, 45 %, 12 %" in derivation.steps[-1]
        assert "0.01 A + 0.42 B + 0.45 C + 0.12 D" in derivation.source
        assert derivation.checks[-1].result == pytest.approx(100.0, abs=1e-6)


def test_pickup_allowance_in_the_plant_derivation(study):
    """A morning pick-up allowance shows as its own step and still ends on the figure."""
    result, _ = study
    scenario = replace(result.scenario, cooling_pickup_percent=15.0)
    figures = headline_figures(scenario, result.air_handlers, result.conditions)
    derivation = headline_derivations(scenario, result.air_handlers, figures, "SI")[
        "design_coil_load"
    ]
    pickup = next(c for c in derivation.checks if c.formula == "q * (1 + g / 100) * p / 100")
    assert pickup.operands["p"] == 15.0
    assert pickup.result > 0
    assert derivation.checks[-1].result == pytest.approx(figures.design_coil_load, rel=1e-12)


def test_every_chart_has_a_derivation(study):
    """One derivation per chart of each view (the water side on the plant with tables)."""
    result, water = study
    for key, _, derivations in _views(result, water, "IP"):
        for name in CHARTS:
            assert name in derivations, (key, name)
        if water is not None and water.chiller_options:
            assert "water" in derivations
        assert set(derivations) <= set(HEADLINE_KEYS) | set(CHART_KEYS)


def test_report_hook(study):
    """The report's hook gives a disclosure for the figures and each chart."""
    result, water = study
    render = report_derivations(result, "SI", water_side=water)
    figures = render("figures", None, None)
    assert figures.count("<details") == len(HEADLINE_KEYS)
    assert " open>" in figures  # printed open
    for key, view in study_chart_views(result, "test", first_recirculating_unit(result.scenario)):
        for name in CHARTS:
            text = render(name, key, view)
            assert text.startswith(DERIVATION_STYLE) and "<summary>" in text, (key, name)


def test_html_is_escaped_and_accessible():
    """Text is escaped; the disclosure is a details/summary pair (keyboard: Tab, Enter)."""
    derivation = Derivation(
        key="design_zone_load",
        title="<script>alert(1)</script>",
        value_text="1 < 2 & 3",
        steps=("a <b> c",),
        state_points=(StatePoint("<zone>", 24.0, 9.3, 47.8, 50.0),),
        source="Handbook 'quoted' \"twice\"",
        checks=(Check("", {}, 1.0),),
        value=1.0,
    )
    text = derivation_html(derivation)
    assert "<script>" not in text and "&lt;script&gt;" in text
    assert "&lt;zone&gt;" in text and "a &lt;b&gt; c" in text and "1 &lt; 2 &amp; 3" in text
    assert re.search(
        r"<details [^>]*><summary>How this is worked out: Design zone load</summary>", text
    )
    assert " open>" not in text
    assert " open>" in derivation_html(derivation, opened=True)
    assert derivation_html(derivation, plant=True).count("Design zone load") == 1
    many = derivations_html([derivation, derivation])
    assert many.count("<style>") == 1 and many.count("<details") == 2


def test_number_text():
    """The steps' numbers: decimals by size; given decimals when asked."""
    assert number_text(1234.5) == "1,234"
    assert number_text(61.34) == "61.3"
    assert number_text(4.123) == "4.12"
    assert number_text(0.01234) == "0.0123"
    assert number_text(12.0, 0) == "12"
    assert np.isnan(Derivation("k", "t", "v", (), (), "s").value)


def test_view_of_copies_finds_its_air_handler_by_name(study):
    """A view whose air handler is a copy (a pinned study's) is matched by name; an
    unknown air handler is refused by name, not with a bare StopIteration."""
    result, _ = study
    _, view = study_chart_views(result, "test", first_recirculating_unit(result.scenario))[-1]
    copied = replace(view, unit=replace(view.unit))
    assert copied.unit is not view.unit
    same = view_derivations(result.scenario, result.air_handlers, view, "SI")
    again = view_derivations(result.scenario, result.air_handlers, copied, "SI")
    assert [d.steps for d in again.values()] == [d.steps for d in same.values()]
    stranger = replace(view, unit=replace(view.unit, name="AHU-99 nowhere"))
    with pytest.raises(KeyError, match="AHU-99 nowhere"):
        view_derivations(result.scenario, result.air_handlers, stranger, "SI")


@pytest.mark.parametrize("system", ["IP", "SI"])
def test_sweep_marker_is_the_charts(study, system):
    """The outdoor-air derivation's load at the set fraction is the marker the chart
    draws (charts.oa_sweep_frames.oa_marker_frame of the chart's own frames)."""
    result, water = study
    for key, view, derivations in _views(result, water, system):
        frames = chart_frames("sweep", view, system)
        marker = frames["marker"].set_index("series")["load"]
        steps = [c for c in derivations["sweep"].checks if c.formula.startswith("qa + (x - xa)")]
        if next(iter(view.sweep.values())).size == 1:
            assert not steps  # one point (no return air): nothing to read along
            continue
        assert len(steps) == len(marker) == len(view.sweep), key
        for check, (_, load) in zip(steps, marker.items(), strict=True):
            assert check.result == pytest.approx(load, rel=1e-9)
            assert check.operands["x"] == pytest.approx(100 * view.outdoor_air_fraction)


@pytest.mark.parametrize("system", ["IP", "SI"])
def test_design_steps_are_the_charts_bars(study, system):
    """The design derivation sums the bars the design chart draws (its frame's steps,
    in display units) and ends on its total bar."""
    result, water = study
    for _, view, derivations in _views(result, water, system):
        frame = chart_frames("design", view, system)["frame"]
        bars = frame[frame["kind"] == "part"]["load"].to_numpy()
        check = derivations["design"].checks[-1]
        # "Other" (what the terms do not explain) is taken in SI by the chart: 1e-9 abs
        assert list(check.operands.values()) == pytest.approx(list(bars), rel=1e-9, abs=1e-9)
        assert check.result == pytest.approx(frame["load"].iloc[-1], rel=1e-12)
