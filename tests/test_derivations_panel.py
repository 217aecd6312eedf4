"""The dashboard's "How this is worked out" panel (issue 14).

The disclosures follow the state: their figures are the cards' text (the dashboard's
own formatting of :func:`plantside.study.figures.headline_figures`), in the units on
show, after any control; an unchanged state is not rebuilt. The arithmetic and sources
of the derivations themselves are checked against psychrolib, CoolProp and AHRI
550/590 in ``tests/test_derivations.py``.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from plantside.dashboard.app import _quantity
from plantside.dashboard.derivations_panel import DerivationsPanel
from plantside.dashboard.state import DashboardState, condition_text
from plantside.dashboard.water_side_panel import WaterSidePanel
from plantside.errors import InputRangeError
from plantside.study.derivations import HEADLINE_KEYS
from plantside.study.scenario import load_scenario

CLINIC = Path(__file__).resolve().parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"
CHART_NAMES = ("design", "year", "distribution", "psychrometric", "sweep")


@pytest.fixture(scope="module")
def scenario():
    return load_scenario(CLINIC)


def _card_texts(state) -> dict:
    """The figures as the dashboard's cards print them (app.Dashboard._figures_html)."""
    system = state.inputs.unit_system
    figures = state.result.figures
    texts = {}
    for field in ("design_zone_load", "design_coil_load", "recommended_capacity", "peak_coil_load"):
        texts[field] = " ".join(_quantity("power", getattr(figures, field), system))
    texts["cooling_energy"] = " ".join(_quantity("energy", figures.cooling_energy, system))
    texts["hours_above_threshold"] = f"{figures.hours_above_threshold:,} h"
    texts["coil_to_zone_ratio"] = f"{figures.coil_to_zone_ratio:.2f}"
    texts["governing_condition"] = condition_text(figures.governing, system)
    return texts


def _assert_follows(panel, state):
    texts = _card_texts(state)
    for field in HEADLINE_KEYS:
        derivation = panel.derivations[field]
        assert derivation.value_text == texts[field], field
        for check in derivation.checks:
            if check.formula:  # the arithmetic holds with the state's numbers
                value = eval(check.formula, {"max": max, "__builtins__": {}}, dict(check.operands))
                assert value == pytest.approx(check.result, rel=1e-9, abs=1e-9)
        # shown in the widget, escaped as HTML
        assert f"<b>{derivation.value_text.replace('&', '&amp;')}</b>" in panel.figures.value


def test_plant_panel_follows_the_state(scenario):
    state = DashboardState(scenario, view="plant")
    water = WaterSidePanel(state, plant=True)
    panel = DerivationsPanel(state, plant=True, water_side=water.water_side)
    assert panel.for_chart("water").value == ""  # not run for its derivation alone
    assert water.water is None
    assert panel.update(water=True) is True  # the water side on show
    assert panel.figures.value.count("<details") == len(HEADLINE_KEYS)
    assert "How this is worked out: Design plant load" in panel.figures.value
    for name in (*CHART_NAMES, "water"):
        assert panel.for_chart(name).value.count("<details") == 1, name
    _assert_follows(panel, state)
    assert "tons" in panel.figures.value
    assert panel.update(water=True) is False  # nothing changed: not rebuilt

    # the units on show
    assert state.set("unit_system", "SI")
    assert panel.update(water=True) is True
    _assert_follows(panel, state)
    assert "tons" not in panel.figures.value and " kW" in panel.figures.value
    assert "L/s" in panel.for_chart("water").value

    # a margin set on the page: the capacity step uses it
    assert state.set("cooling_margin_percent", 25.0)
    assert panel.update() is True
    _assert_follows(panel, state)
    capacity = panel.derivations["recommended_capacity"]
    assert capacity.checks[-1].operands["m"] == 25.0
    assert "(1 + 25/100)" in capacity.steps[-1]

    # an air handler's control: the figures and the psychrometric chart's states move
    assert state.set("air_handler", 1)  # the plant page's unit charts show AHU-2
    assert panel.update() is True
    before = panel.for_chart("psychrometric").value
    assert state.set("outdoor_air_fraction", 0.5), state.messages["outdoor_air_fraction"]
    assert panel.update() is True
    _assert_follows(panel, state)
    assert panel.for_chart("psychrometric").value != before


def test_air_handler_panel(scenario):
    state = DashboardState(scenario, view="air_handler", air_handler=1)
    panel = DerivationsPanel(state, plant=False)
    assert "How this is worked out: Design coil load" in panel.figures.value
    assert panel.for_chart("water").value == ""  # the plant page's
    _assert_follows(panel, state)
    name = state.result.unit.name
    assert re.search(
        rf"{re.escape(name)}: Q_coil = ṁ·\(h_entering − h_leaving\)", panel.figures.value
    )
    assert state.set("air_handler", 2)
    assert panel.update() is True
    _assert_follows(panel, state)
    assert state.result.unit.name in panel.figures.value


def test_refusals(scenario):
    state = DashboardState(scenario, view="air_handler")
    with pytest.raises(InputRangeError, match="plant"):
        DerivationsPanel(state, plant=True)
    panel = DerivationsPanel(state, plant=False)
    with pytest.raises(KeyError, match="one of design"):
        panel.for_chart("pie")
