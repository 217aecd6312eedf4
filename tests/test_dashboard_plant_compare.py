"""The plant page's plant and water-side parts with a pinned "A".

The reference is the study itself: :func:`plantside.study.run.run_study` of the scenario
each of A and B saves (as ``plantside design`` runs it), as in
``test_plant_page_shows_cooling_and_heating_plants_as_the_study``
(tests/test_dashboard_state.py). The table must show A's plant figures beside B's.
"""

from __future__ import annotations

import html
import re
from pathlib import Path

import pytest
from plantside.dashboard.app import Dashboard
from plantside.study.run import run_study
from plantside.study.scenario import load_scenario
from plantside.units import to_display, tons_from_kw

EXAMPLE = Path(__file__).resolve().parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"


def _figures(text: str) -> dict[str, list[str]]:
    """Rows of the plant's figures table: label -> the cells after it."""
    table = re.search(r"<table class='ps-table ps-plant-figures'>(.*?)</table>", text, re.S)
    assert table is not None
    rows = {}
    for row in re.findall(r"<tr>(.*?)</tr>", table.group(1), re.S):
        cells = [
            html.unescape(re.sub("<[^>]+>", "", c))
            for c in re.findall(r"<t[hd][^>]*>(.*?)</t[hd]>", row, re.S)
        ]
        rows[cells[0]] = cells[1:]
    return rows


def _number(cell: str) -> float:
    return float(cell.split()[0].replace(",", ""))


@pytest.fixture(scope="module")
def pinned_and_not():
    dashboard = Dashboard(load_scenario(EXAMPLE), view="plant")
    dashboard.show_page("Plant: cooling | heating")
    alone = {k: t.value for k, t in dashboard.plant_panel.tables.items()}
    dashboard.controls.widgets["outdoor_air_fraction"].value = 20.0
    saved_a = dashboard.state.current_scenario()
    dashboard.state.pin()
    dashboard.controls.widgets["outdoor_air_fraction"].value = 45.0
    assert dashboard.state.last_update["ok"]
    saved_b = dashboard.state.current_scenario()
    return dashboard, alone, run_study(saved_a), run_study(saved_b)


def test_pinned_a_stands_beside_b_in_the_plant_figures(pinned_and_not):
    dashboard, alone, study_a, study_b = pinned_and_not
    assert "A (pinned)" not in alone["cooling"]  # nothing pinned: one column
    # heating in MBH: 1 MBH = 1,000 Btu/h = 0.29307107 kW (NIST SP 811, Btu_IT/h);
    # 1 ton = 12,000 Btu/h (tons_from_kw, NIST SP 811)
    for kind, convert in (("cooling", tons_from_kw), ("heating", lambda kw: kw / 0.29307107)):
        text = dashboard.plant_panel.tables[kind].value
        assert "<th scope='col'>A (pinned)</th><th scope='col'>B (current)</th>" in text
        assert "of B (current) only" in text
        rows = _figures(text)
        for column, study in ((0, study_a), (1, study_b)):
            plant = getattr(study, kind)
            for label, value in (
                ("Design load", plant.design_load),
                ("Design capacity", plant.design_capacity),
                ("Peak hour of the year", plant.annual_peak),
            ):
                shown = float(convert(value))
                digits = 0 if abs(shown) >= 100 else 1  # the table's rounding
                assert _number(rows[label][column]) == pytest.approx(
                    shown, abs=0.5 * 10**-digits + 1e-9
                ), (kind, label, column)
            quantity = "energy" if kind == "cooling" else "heating_energy"
            energy = float(to_display(quantity, plant.annual_energy, "IP")[0])
            digits = 0 if abs(energy) >= 100 else 1
            assert _number(rows["Load energy, year"][column]) == pytest.approx(
                energy, abs=0.5 * 10**-digits + 1e-9
            )
            above = int(plant.bins.loc[plant.bins["band"] == "above 100 %", "hours"].sum())
            assert rows["Hours above design capacity"][column] == f"{above:,} h"
        # the two columns differ where the studies do (20 % against 45 % outdoor air)
        if getattr(study_a, kind).design_load != pytest.approx(getattr(study_b, kind).design_load):
            assert rows["Design load"][0] != rows["Design load"][1]
    assert study_a.cooling.design_load != pytest.approx(study_b.cooling.design_load, rel=1e-3)


def test_water_side_says_it_shows_b_when_a_is_pinned(pinned_and_not):
    dashboard = pinned_and_not[0]
    dashboard.show_page("Water side")
    text = dashboard.water_side.tables.value
    assert "Water side of B (current) only" in text
    dashboard.state.unpin()
    dashboard.show_page("Plant: cooling | heating")
    assert "A (pinned)" not in dashboard.plant_panel.tables["cooling"].value
    dashboard.show_page("Water side")
    assert "B (current)" not in dashboard.water_side.tables.value
